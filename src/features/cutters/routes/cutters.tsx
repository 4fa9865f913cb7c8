import { zodResolver } from '@hookform/resolvers/zod';
import { keepPreviousData, useQuery, useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useDeferredValue, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useParams, useSearchParams } from 'react-router';
import { z } from 'zod';
import { cutterStatuses, cutterStatusLabels, type CutterStatus } from '../../../../shared/cutters';
import { roleCan } from '../../../../shared/roles';
import { receiveCutterInputSchema, type ReceiveCutterInput } from '../../../../shared/schemas/cutter';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { serverErrors } from '../../../lib/form';
import { formatSiteDate } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { cutterQueries, useReceiveCutter, type CutterListItem } from '../api';

/** Ring diameters in use (DOMAIN.md §4, common practice). */
const discSizesIn = [15.5, 17, 19, 20];
const linkClass = 'font-semibold text-ember-700 underline underline-offset-2';

function ReceiveCutter({ projectId }: { projectId: string }) {
  const receive = useReceiveCutter(projectId);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const form = useForm<z.input<typeof receiveCutterInputSchema>, unknown, ReceiveCutterInput>({
    resolver: zodResolver(receiveCutterInputSchema),
    defaultValues: { serial: '', discSizeIn: 17, notes: '' },
  });
  const onSubmit = form.handleSubmit(async (input) => {
    setMessage(null);
    try {
      const cutter = await receive.mutateAsync(input);
      form.reset({ serial: '', discSizeIn: input.discSizeIn, notes: '' });
      setMessage({ tone: 'success', text: `Serial ${cutter.serial} is in the store.` });
    } catch (err) {
      setMessage({ tone: 'error', text: serverErrors(err, form.setError, 'Receiving failed. Try again.').text });
    }
  });
  const e = form.formState.errors;
  return (
    <Panel title="Receive a cutter into the store">
      <form onSubmit={onSubmit} noValidate className="grid gap-4 md:grid-cols-[1fr_10rem_1fr_auto] md:items-start">
        {message && (
          <div className="md:col-span-4">
            <Alert tone={message.tone}>{message.text}</Alert>
          </div>
        )}
        <TextField
          label="Serial number"
          autoComplete="off"
          autoCapitalize="characters"
          {...form.register('serial')}
          error={e.serial?.message}
        />
        <SelectField label="Disc size" {...form.register('discSizeIn')} error={e.discSizeIn?.message}>
          {discSizesIn.map((d) => (
            <option key={d} value={d}>
              {d}″
            </option>
          ))}
        </SelectField>
        <TextField label="Notes (optional)" {...form.register('notes')} error={e.notes?.message} />
        <div className="md:pt-8">
          <Button type="submit" disabled={form.formState.isSubmitting}>
            Receive
          </Button>
        </div>
      </form>
    </Panel>
  );
}

const col = createColumnHelper<CutterListItem>();

export function CuttersRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const [params, setParams] = useSearchParams();
  const status = cutterStatuses.find((s) => s === params.get('status'));
  const q = params.get('q') ?? '';
  const searched = useDeferredValue(q.trim());
  const filters = { status, q: searched || undefined };
  const list = useQuery({ ...cutterQueries.list(projectId, filters), placeholderData: keepPreviousData });
  const setParam = (name: string, value: string) =>
    setParams(
      (prev) => {
        const next = new URLSearchParams(prev);
        if (value) next.set(name, value);
        else next.delete(name);
        return next;
      },
      { replace: true },
    );

  const columns = [
    col.accessor('serial', {
      header: 'Serial',
      cell: ({ row }) => (
        <Link className={`${linkClass} whitespace-nowrap`} to={paths.cutter(projectId, row.original.id)}>
          {row.original.serial}
        </Link>
      ),
    }),
    col.accessor((c) => cutterStatusLabels[c.status], { id: 'status', header: 'State' }),
    col.accessor('discSizeIn', { meta: { csvDecimals: 0 }, header: 'Disc (in)' }),
    col.accessor('rebuildCount', { meta: { csvDecimals: 0 }, header: 'Rebuilds' }),
    col.accessor('positionNumber', { meta: { csvDecimals: 0 }, header: 'Position', cell: ({ getValue }) => getValue() ?? '—' }),
    col.accessor((c) => (c.fittedAt ? formatSiteDate(c.fittedAt, project.siteTimeZone) : ''), {
      id: 'fittedAt',
      header: 'Fitted since',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    col.accessor('notes', { header: 'Notes' }),
  ];

  return (
    <Page title="Cutters">
      {roleCan(project.role, 'cutters.edit') && <ReceiveCutter projectId={projectId} />}
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField label="State" value={status ?? ''} onChange={(ev) => setParam('status', ev.target.value)}>
          <option value="">All states</option>
          {cutterStatuses.map((s: CutterStatus) => (
            <option key={s} value={s}>
              {cutterStatusLabels[s]}
            </option>
          ))}
        </SelectField>
        <TextField label="Search by serial" type="search" value={q} onChange={(ev) => setParam('q', ev.target.value)} />
      </div>
      {list.error && <Alert tone="error">{list.error.message}</Alert>}
      {list.isPending ? (
        <p>Loading…</p>
      ) : (
        <>
          <p className="text-basalt-700" aria-live="polite">
            {list.data?.length ?? 0} serial(s){status ? ` ${cutterStatusLabels[status].toLowerCase()}` : ''}
            {filters.q ? ` matching “${filters.q}”` : ''}.
          </p>
          <DataTable data={list.data ?? []} columns={columns} exportName="kerfwise-cutters" emptyText="No serials match." />
        </>
      )}
    </Page>
  );
}
