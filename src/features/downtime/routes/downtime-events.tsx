import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery, useSuspenseQueries } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { useParams, useSearchParams } from 'react-router';
import { z } from 'zod';
import { roleCan } from '../../../../shared/roles';
import { downtimePeriodQuerySchema, NO_CAUSE_LABEL, type DowntimeCause, type DowntimeEventRow } from '../../../../shared/schemas/downtime';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDateTime } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { downtimeQueries, eventFiltersFrom, UNEXPLAINED, useProposeFromGaps } from '../api';
import { CausesPanel } from '../components/causes-panel';
import { DowntimeTabs } from '../components/downtime-tabs';
import { EventForm } from '../components/event-form';
import { dayOrNothing } from '../components/period-filter';
import { SiteSettingsPanel } from '../components/site-settings-panel';

const col = createColumnHelper<DowntimeEventRow>();

interface EventFilterValues {
  from: string;
  to: string;
  /** A cause id, UNEXPLAINED, or '' for all. */
  cause: string;
}

/** The filters in the address: site days (events overlapping them), a cause, or "no cause yet". */
function useEventFilters() {
  const [params, setParams] = useSearchParams();
  const { cause, query } = eventFiltersFrom(params);
  const apply = (next: EventFilterValues) => {
    const p = new URLSearchParams();
    if (next.from) p.set('from', next.from);
    if (next.to) p.set('to', next.to);
    if (next.cause === UNEXPLAINED) p.set('unexplained', 'true');
    else if (next.cause) p.set('causeId', next.cause);
    setParams(p);
  };
  return { query, cause, apply };
}

/** The server's period check, with the cause choice (an id, UNEXPLAINED or '') beside it. */
const eventFilterSchema = downtimePeriodQuerySchema.and(z.object({ cause: z.string() }));

/** Period and cause of the list; the period starts as the one the server used (the last eight ISO weeks with data). */
function EventFilters({
  shown,
  causes,
  onApply,
}: {
  shown: EventFilterValues;
  causes: DowntimeCause[];
  onApply: (v: EventFilterValues) => void;
}) {
  const form = useForm<z.input<typeof eventFilterSchema>, unknown, z.output<typeof eventFilterSchema>>({
    resolver: zodResolver(eventFilterSchema),
    defaultValues: shown,
  });
  const [from, to] = form.watch(['from', 'to']);
  const e = form.formState.errors;
  const submit = form.handleSubmit((v) => onApply({ from: v.from ?? '', to: v.to ?? '', cause: v.cause }));
  return (
    <form onSubmit={submit} noValidate className="mb-4 flex flex-wrap items-end gap-3" aria-label="Filter events">
      <TextField label="From" type="date" max={to} {...form.register('from', dayOrNothing)} error={e.from?.message} />
      <TextField label="To (included)" type="date" min={from} {...form.register('to', dayOrNothing)} error={e.to?.message} />
      <SelectField label="Cause" {...form.register('cause')}>
        <option value="">All causes</option>
        <option value={UNEXPLAINED}>{NO_CAUSE_LABEL}</option>
        {causes.map((c) => (
          <option key={c.id} value={c.id}>
            {c.name}
          </option>
        ))}
      </SelectField>
      <Button type="submit" variant="secondary" disabled={!from || !to || from > to}>
        Show
      </Button>
    </form>
  );
}

/** Downtime events with filters; editors add and edit them, propose standstills from the log, and keep causes and settings. */
export function DowntimeEventsRoute() {
  const { projectId = '' } = useParams();
  const proposeGaps = useProposeFromGaps(projectId);
  const { query, cause, apply } = useEventFilters();
  const [{ data: project }, { data: list }, { data: causes }, { data: settings }] = useSuspenseQueries({
    queries: [
      projectQueries.detail(projectId),
      downtimeQueries.events(projectId, query),
      downtimeQueries.causes(projectId),
      downtimeQueries.settings(projectId),
    ],
  });
  const canEdit = roleCan(project.role, 'downtime.edit');
  const { data: stops = [] } = useQuery({ ...downtimeQueries.stops(projectId), enabled: canEdit });
  const tz = project.siteTimeZone;
  const [editing, setEditing] = useState<DowntimeEventRow | 'new' | null>(null);
  const [message, setMessage] = useState<{ tone: 'success' | 'error' | 'info'; text: string } | null>(null);
  const { events } = list;
  const [proposing, setProposing] = useState(false);

  const propose = async () => {
    setMessage(null);
    setProposing(true);
    try {
      const r = await proposeGaps.mutateAsync();
      setMessage(
        r.created === 0
          ? { tone: 'info', text: `Every standstill longer than ${r.gapMinutes} minutes between strokes already has an event.` }
          : {
              tone: 'success',
              text: `${r.created} standstill(s), ${r.hours.toFixed(1)} h in all, proposed from gaps of more than ${r.gapMinutes} minutes between strokes. Give each a cause.`,
            },
      );
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'Proposing failed. Try again.' });
    } finally {
      setProposing(false);
    }
  };
  const columns = [
    col.accessor((e) => formatSiteDateTime(e.startAt, tz), {
      id: 'start',
      header: 'Start',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    col.accessor((e) => formatSiteDateTime(e.endAt, tz), {
      id: 'end',
      header: 'End',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    col.accessor((e) => Math.round(e.hours * 100) / 100, { id: 'hours', meta: { csvDecimals: 2 }, header: 'Hours' }),
    col.accessor((e) => e.causeName ?? NO_CAUSE_LABEL, {
      id: 'cause',
      header: 'Cause',
      cell: ({ row, getValue }) =>
        row.original.causeId ? (
          getValue()
        ) : (
          <span className="inline-block rounded bg-caution-100 px-2 font-semibold text-caution-700">{getValue()}</span>
        ),
    }),
    col.accessor((e) => (e.cutterWork ? 'yes' : 'no'), { id: 'cutterWork', header: 'Cutter work' }),
    col.accessor((e) => (e.source === 'gap' ? 'from the log' : 'entered'), { id: 'source', header: 'Source' }),
    col.accessor((e) => (e.stopChainageM == null ? '' : formatChainage(e.stopChainageM)), { id: 'stop', header: 'Stop at' }),
    col.accessor('note', { header: 'Note' }),
    ...(canEdit
      ? [
          col.display({
            id: 'actions',
            header: '',
            cell: ({ row }) => (
              <Button
                variant="secondary"
                aria-label={`Edit the event from ${formatSiteDateTime(row.original.startAt, tz)}`}
                onClick={() => {
                  setMessage(null);
                  setEditing(row.original);
                }}
              >
                Edit
              </Button>
            ),
          }),
        ]
      : []),
  ];
  const totalHours = events.reduce((s, e) => s + e.hours, 0);
  const unexplained = events.filter((e) => !e.causeId).length;

  return (
    <Page
      title="Downtime"
      actions={
        canEdit && (
          <>
            <Button variant="secondary" disabled={proposing} onClick={propose}>
              {proposing ? 'Looking for gaps…' : 'Propose from gaps'}
            </Button>
            <Button
              onClick={() => {
                setMessage(null);
                setEditing('new');
              }}
            >
              Add a downtime event
            </Button>
          </>
        )
      }
    >
      <DowntimeTabs projectId={projectId} />
      {message && <Alert tone={message.tone}>{message.text}</Alert>}
      {canEdit && editing !== null && (
        <EventForm
          key={editing === 'new' ? 'new' : editing.id}
          projectId={projectId}
          timeZone={tz}
          causes={causes}
          stops={stops}
          editing={editing === 'new' ? null : editing}
          onDone={(text) => {
            setEditing(null);
            if (text) setMessage({ tone: 'success', text });
          }}
        />
      )}
      <Panel title="Events">
        <EventFilters
          key={`${list.from}/${list.to}/${cause}`}
          shown={{ from: list.from, to: list.to, cause }}
          causes={causes}
          onApply={apply}
        />
        <p className="mb-3 text-basalt-700" role="status">
          {events.length} event(s), {totalHours.toFixed(1)} h{unexplained > 0 ? `; ${unexplained} without a cause yet` : ''}, from{' '}
          {list.from} to {list.to}. Times in site time ({tz}).
        </p>
        <DataTable data={events} columns={columns} exportName="kerfwise-downtime-events" emptyText="No downtime events match." />
      </Panel>
      <CausesPanel projectId={projectId} causes={causes} canEdit={canEdit} />
      <SiteSettingsPanel key={JSON.stringify(settings)} projectId={projectId} settings={settings} canEdit={canEdit} timeZone={tz} />
    </Page>
  );
}
