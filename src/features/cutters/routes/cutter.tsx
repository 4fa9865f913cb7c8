import { useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useParams } from 'react-router';
import { conditionLabel, cutterStatusLabels, type DiscCondition } from '../../../../shared/cutters';
import { roleCan } from '../../../../shared/roles';
import { workshopInputSchema } from '../../../../shared/schemas/cutter';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { serverErrors } from '../../../lib/form';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDate, formatSiteDateTime } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { cutterQueries, useRecordWorkshop, type CutterLife } from '../api';

const linkClass = 'font-semibold text-ember-700 underline underline-offset-2';
type LifeEvent = CutterLife['events'][number];
type Period = CutterLife['periods'][number];

/** One line in plain words for each kind of event in a serial's life. */
function eventText(e: LifeEvent): string {
  const d = e.details as {
    reason?: string;
    conditions?: DiscCondition[];
    wearMm?: number | null;
    chainageM?: number;
    ringNumber?: number | null;
    newRing?: boolean;
    newBearings?: boolean;
    newSeals?: boolean;
    note?: string;
    enteredAtFace?: boolean;
  };
  const where = d.chainageM != null ? ` at ${formatChainage(d.chainageM)}${d.ringNumber != null ? `, ring ${d.ringNumber}` : ''}` : '';
  switch (e.kind) {
    case 'received':
      return d.enteredAtFace ? 'Entered at the face as a new serial' : 'Received into the store';
    case 'fitted':
      return `Fitted at position ${e.positionNumber}${where}`;
    case 'removed': {
      const extra = [
        d.reason && `Reason: ${d.reason}.`,
        d.conditions?.length && `Seen: ${d.conditions.map(conditionLabel).join(', ')}.`,
        d.wearMm != null && `Wear ${d.wearMm} mm.`,
      ]
        .filter(Boolean)
        .join(' ');
      return `Removed from position ${e.positionNumber}${where}, to the workshop.${extra ? ` ${extra}` : ''}`;
    }
    case 'rebuilt': {
      const parts = [d.newRing && 'new ring', d.newBearings && 'new bearings', d.newSeals && 'new seals'].filter(Boolean).join(', ');
      return `Rebuilt${parts ? `: ${parts}` : ''}, back in the store${d.note ? ` (${d.note})` : ''}`;
    }
    case 'scrapped':
      return `Scrapped: ${d.reason ?? ''}`;
    default:
      return e.kind;
  }
}

interface WorkshopForm {
  outcome: 'rebuilt' | 'scrapped';
  newRing: boolean;
  newBearings: boolean;
  newSeals: boolean;
  note: string;
  reason: string;
}

function WorkshopOutcome({ projectId, cutterId, serial }: { projectId: string; cutterId: string; serial: string }) {
  const save = useRecordWorkshop(projectId, cutterId);
  const [error, setError] = useState<string | null>(null);
  const form = useForm<WorkshopForm>({
    defaultValues: { outcome: 'rebuilt', newRing: true, newBearings: false, newSeals: false, note: '', reason: '' },
  });
  const outcome = form.watch('outcome');
  const onSubmit = form.handleSubmit(async (v) => {
    setError(null);
    const parsed = workshopInputSchema.safeParse(
      v.outcome === 'rebuilt'
        ? { outcome: 'rebuilt', newRing: v.newRing, newBearings: v.newBearings, newSeals: v.newSeals, note: v.note }
        : { outcome: 'scrapped', reason: v.reason },
    );
    if (!parsed.success) {
      for (const i of parsed.error.issues) form.setError(i.path.join('.') as keyof WorkshopForm, { message: i.message });
      return;
    }
    try {
      await save.mutateAsync(parsed.data);
    } catch (err) {
      setError(serverErrors(err, form.setError, 'Saving failed. Try again.').text);
    }
  });
  const check = (name: 'newRing' | 'newBearings' | 'newSeals', label: string) => (
    <label className="flex min-h-touch items-center gap-3">
      <input type="checkbox" className="size-6 accent-ember-600" {...form.register(name)} />
      {label}
    </label>
  );
  return (
    <Panel title="Workshop outcome">
      <form onSubmit={onSubmit} noValidate className="max-w-xl space-y-4">
        {error && <Alert tone="error">{error}</Alert>}
        <fieldset className="space-y-1">
          <legend className="font-semibold">What became of {serial}?</legend>
          <label className="flex min-h-touch items-center gap-3">
            <input type="radio" value="rebuilt" className="size-6 accent-ember-600" {...form.register('outcome')} />
            Rebuilt, back to the store
          </label>
          <label className="flex min-h-touch items-center gap-3">
            <input type="radio" value="scrapped" className="size-6 accent-ember-600" {...form.register('outcome')} />
            Scrapped
          </label>
        </fieldset>
        {outcome === 'rebuilt' ? (
          <fieldset className="space-y-1">
            <legend className="font-semibold">Renewed</legend>
            {check('newRing', 'New ring')}
            {check('newBearings', 'New bearings')}
            {check('newSeals', 'New seals')}
            <TextField label="Note (optional)" {...form.register('note')} error={form.formState.errors.note?.message} />
          </fieldset>
        ) : (
          <TextField label="Why is it scrapped?" {...form.register('reason')} error={form.formState.errors.reason?.message} />
        )}
        <Button type="submit" disabled={form.formState.isSubmitting}>
          {outcome === 'rebuilt' ? 'Record the rebuild' : 'Record as scrapped'}
        </Button>
      </form>
    </Panel>
  );
}

export function CutterRoute() {
  const { projectId = '', cutterId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: life } = useSuspenseQuery(cutterQueries.detail(projectId, cutterId));
  const { cutter, periods, events } = life;
  const tz = project.siteTimeZone;
  const current = periods.find((p) => p.removedAt == null);

  const eCol = createColumnHelper<LifeEvent>();
  const eventColumns = [
    eCol.accessor((e) => formatSiteDateTime(e.at, tz), {
      id: 'at',
      header: 'When',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    eCol.accessor(eventText, {
      id: 'event',
      header: 'What happened',
      cell: ({ getValue }) => <span className="block min-w-56">{getValue()}</span>,
    }),
    eCol.accessor('positionNumber', {
      meta: { csvDecimals: 0 },
      header: 'Position',
      cell: ({ row }) =>
        row.original.positionId ? (
          <Link className={linkClass} to={paths.position(projectId, row.original.positionId)}>
            {row.original.positionNumber}
          </Link>
        ) : (
          '—'
        ),
    }),
  ];
  const pCol = createColumnHelper<Period>();
  const periodColumns = [
    pCol.accessor('positionNumber', {
      meta: { csvDecimals: 0 },
      header: 'Position',
      cell: ({ row }) => (
        <Link className={linkClass} to={paths.position(projectId, row.original.positionId)}>
          {row.original.positionNumber}
        </Link>
      ),
    }),
    pCol.accessor((p) => formatSiteDate(p.fittedAt, tz), {
      id: 'fitted',
      header: 'Fitted',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    pCol.accessor('fittedChainageM', {
      meta: { csvDecimals: 1 },
      header: 'At chainage',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{formatChainage(getValue())}</span>,
    }),
    pCol.accessor((p) => (p.removedAt ? formatSiteDate(p.removedAt, tz) : 'still fitted'), {
      id: 'removed',
      header: 'Removed',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    pCol.accessor('removedChainageM', {
      meta: { csvDecimals: 1 },
      header: 'At chainage',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{formatChainage(getValue())}</span>,
    }),
    pCol.accessor((p) => (p.removedChainageM == null ? null : Math.abs(p.removedChainageM - p.fittedChainageM)), {
      id: 'advance',
      meta: { csvDecimals: 1 },
      header: 'Advance (m)',
      cell: ({ getValue }) => getValue()?.toFixed(1) ?? '—',
    }),
    pCol.accessor((p) => p.removalReason ?? '', { id: 'reason', header: 'Reason' }),
  ];

  return (
    <Page
      title={`Serial ${cutter.serial}`}
      actions={
        <Link className={`${linkClass} flex min-h-touch items-center`} to={paths.cutters(projectId)}>
          All cutters
        </Link>
      }
    >
      <Panel>
        <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
          <dt className="font-semibold">State</dt>
          <dd>
            {cutterStatusLabels[cutter.status]}
            {current && (
              <>
                {' '}
                at{' '}
                <Link className={linkClass} to={paths.position(projectId, current.positionId)}>
                  position {current.positionNumber}
                </Link>{' '}
                since {formatSiteDate(current.fittedAt, tz)}
              </>
            )}
          </dd>
          <dt className="font-semibold">Disc size</dt>
          <dd>{cutter.discSizeIn}″</dd>
          <dt className="font-semibold">Rebuilds</dt>
          <dd>{cutter.rebuildCount}</dd>
          <dt className="font-semibold">In Kerfwise since</dt>
          <dd>{formatSiteDate(events.find((e) => e.kind === 'received')?.at ?? cutter.createdAt, tz)}</dd>
          {cutter.notes && (
            <>
              <dt className="font-semibold">Notes</dt>
              <dd>{cutter.notes}</dd>
            </>
          )}
        </dl>
      </Panel>
      {cutter.status === 'workshop' && roleCan(project.role, 'cutters.edit') && (
        <WorkshopOutcome key={cutter.updatedAt} projectId={projectId} cutterId={cutter.id} serial={cutter.serial} />
      )}
      <Panel title="Life of this serial">
        <DataTable data={events} columns={eventColumns} exportName={`kerfwise-serial-${cutter.serial}-life`} />
      </Panel>
      <Panel title="Fitted periods">
        <DataTable
          data={periods}
          columns={periodColumns}
          exportName={`kerfwise-serial-${cutter.serial}-periods`}
          emptyText="Never fitted yet."
        />
      </Panel>
    </Page>
  );
}
