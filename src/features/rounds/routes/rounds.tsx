import { useQueryClient, useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useEffect, useState, type FormEvent } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import { roleCan } from '../../../../shared/roles';
import { startRoundInputSchema } from '../../../../shared/schemas/inspection';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { LastSynced } from '../../../components/ui/last-synced';
import { TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { projectQueries } from '../../projects/api';
import { roundQueries, startRound, type RoundListItem } from '../api';
import { OutboxBanner } from '../components/outbox-status';
import { CutterheadCaution } from '../../../components/ui/cutterhead-caution';
import { startRoundOnDevice } from '../offline-round';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDateTime, fromSiteInput, toSiteInput } from '../../../../shared/site-time';

const col = createColumnHelper<RoundListItem>();

export function RoundsRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: rounds, dataUpdatedAt } = useSuspenseQuery(roundQueries.list(projectId));
  const tz = project.siteTimeZone;
  const queryClient = useQueryClient();
  // What a round needs offline is read now, while online, and kept on the device (decision 42).
  const newest = rounds[0]?.id;
  useEffect(() => {
    if (!newest || !navigator.onLine) return;
    void queryClient.prefetchQuery(roundQueries.detail(projectId, newest));
    void queryClient.prefetchQuery(roundQueries.inStore(projectId));
  }, [queryClient, projectId, newest]);

  const columns = [
    col.accessor('startedAt', {
      header: 'Date',
      cell: ({ row }) => (
        <Link
          to={paths.round(projectId, row.original.id)}
          className="inline-flex min-h-touch items-center font-semibold text-ember-700 underline"
        >
          {formatSiteDateTime(row.original.startedAt, tz)}
        </Link>
      ),
    }),
    col.accessor('chainageM', { meta: { csvDecimals: 1 }, header: 'Chainage', cell: (c) => formatChainage(c.getValue()) }),
    col.accessor('ringNumber', { meta: { csvDecimals: 0 }, header: 'Ring', cell: (c) => c.getValue() ?? '—' }),
    col.accessor('crew', { header: 'Crew' }),
    col.accessor('entryCount', { meta: { csvDecimals: 0 }, header: 'Entries' }),
    col.accessor('changeCount', { meta: { csvDecimals: 0 }, header: 'Changes' }),
    col.accessor((r) => (r.closedAt ? 'closed' : 'open'), { id: 'status', header: 'Status' }),
  ];

  return (
    <Page title="Inspection rounds">
      <CutterheadCaution />
      <LastSynced at={dataUpdatedAt} timeZone={tz} />
      <OutboxBanner />
      {roleCan(project.role, 'rounds.record') && <StartRoundForm projectId={projectId} timeZone={tz} />}
      <DataTable data={rounds} columns={columns} exportName="kerfwise-rounds" emptyText="No rounds recorded yet." />
    </Page>
  );
}

type Field = 'startedAt' | 'chainageM' | 'ringNumber' | 'crew';

function StartRoundForm({ projectId, timeZone }: { projectId: string; timeZone: string }) {
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const [values, setValues] = useState<Record<Field, string>>(() => ({
    startedAt: toSiteInput(Date.now(), timeZone),
    chainageM: '',
    ringNumber: '',
    crew: '',
  }));
  const [errors, setErrors] = useState<Partial<Record<Field, string>>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const bind = (field: Field) => ({
    value: values[field],
    onChange: (e: { target: { value: string } }) => setValues((v) => ({ ...v, [field]: e.target.value })),
    error: errors[field],
  });

  const onSubmit = async (e: FormEvent) => {
    e.preventDefault();
    setMessage(null);
    const parsed = startRoundInputSchema.safeParse({
      startedAt: fromSiteInput(values.startedAt, timeZone) ?? '',
      chainageM: values.chainageM.trim() === '' ? undefined : values.chainageM.replace(',', '.'),
      ringNumber: values.ringNumber.trim() === '' ? null : values.ringNumber,
      crew: values.crew,
    });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    setBusy(true);
    // The id is made here, so a round started with no network keeps it when the server creates it.
    const input = { ...parsed.data, id: crypto.randomUUID() };
    try {
      const round = await startRound(projectId, input);
      await queryClient.invalidateQueries({ queryKey: roundQueries.all(projectId) });
      navigate(paths.round(projectId, round.id));
    } catch (err) {
      if (err instanceof ApiError && err.status === 0) {
        const id = await startRoundOnDevice(queryClient, projectId, input);
        if (id) navigate(paths.round(projectId, id));
        else setMessage('No network, and this device has no cutterhead positions of this drive yet. Open a round once while online.');
      } else if (err instanceof ApiError) {
        setErrors(Object.fromEntries(err.issues.map((i) => [i.path.split('.')[0], i.message])));
        setMessage(err.message);
      } else setMessage('The round could not be started. Try again.');
    } finally {
      setBusy(false);
    }
  };

  return (
    <Panel title="Start a round">
      <form onSubmit={onSubmit} noValidate className="grid gap-4 md:grid-cols-2">
        {message && (
          <div className="md:col-span-2">
            <Alert tone="error">{message}</Alert>
          </div>
        )}
        <TextField label={`Date and time (site time, ${timeZone})`} type="datetime-local" {...bind('startedAt')} />
        <TextField label="Chainage (m)" inputMode="decimal" {...bind('chainageM')} hint="Where the machine stands, in metres." />
        <TextField label="Ring" inputMode="numeric" {...bind('ringNumber')} hint="Optional." />
        <TextField label="Crew" {...bind('crew')} hint="Who walks the positions." />
        <div className="md:col-span-2">
          <Button type="submit" className="min-h-14 px-6 text-lead" disabled={busy}>
            {busy ? 'Starting…' : 'Start the round'}
          </Button>
        </div>
      </form>
    </Panel>
  );
}
