import { zodResolver } from '@hookform/resolvers/zod';
import { useSuspenseQueries } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState, type ReactNode } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { Link, useParams } from 'react-router';
import { positionClassLabels } from '../../../../shared/cutters';
import { roleCan } from '../../../../shared/roles';
import {
  cancelStopInputSchema,
  canStop,
  scheduleStopInputSchema,
  stopStatusLabels,
  type CancelStopInput,
  type ScheduleStopInput,
} from '../../../../shared/schemas/stop';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { serverErrors } from '../../../lib/form';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDateTime, fromSiteInput, toSiteInput } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { stopQueries, useChangeStop, type Crew, type RoundOption, type StopChange, type WorkPack } from '../api';
import { AirBadge } from '../components/air-badge';
import { StopCautions } from '../components/cautions';
import { hoursText } from '../format';
import '../work-pack-print.css';

const linkClass = 'inline-flex min-h-touch items-center font-semibold text-ember-700 underline underline-offset-2';

/** Runs a change to the stop, puts the answer (the new work pack) in the cache and keeps the outcome to show. */
function useStopAction(projectId: string, stopId: string) {
  const changeStop = useChangeStop(projectId, stopId);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  /** `refused` is a form's way to show the server's refusal (serverErrors: issues on its fields); it returns the message. */
  const run = async (change: StopChange, message: string, refused?: (err: unknown) => string) => {
    setBusy(true);
    setError(null);
    setDone(null);
    try {
      await changeStop.mutateAsync(change);
      setDone(message);
    } catch (err) {
      setError(refused ? refused(err) : err instanceof ApiError ? err.message : 'That did not work. Try again.');
    } finally {
      setBusy(false);
    }
  };
  return { busy, error, done, run };
}
type StopChanger = ReturnType<typeof useStopAction>;

/** A stop, its work pack (printable on one or two A4 pages) and what the planner and the fitters do with it. */
export function StopRoute() {
  const { projectId = '', stopId = '' } = useParams();
  const [{ data: project }, { data: pack }, { data: crews }, { data: rounds }] = useSuspenseQueries({
    queries: [
      projectQueries.detail(projectId),
      stopQueries.detail(projectId, stopId),
      stopQueries.crews(projectId),
      stopQueries.rounds(projectId),
    ],
  });
  const action = useStopAction(projectId, stopId);
  const { stop } = pack;
  const canPlan = roleCan(project.role, 'stops.plan');
  const canRun = roleCan(project.role, 'stops.run');

  return (
    <Page
      title={`Stop at ${formatChainage(stop.chainageM)}`}
      actions={
        <div className="no-print flex flex-wrap gap-2">
          <Button variant="secondary" onClick={() => window.print()}>
            Print work pack
          </Button>
          <Link className={linkClass} to={paths.stops(projectId)}>
            All stops
          </Link>
        </div>
      }
    >
      <div className="no-print space-y-2" aria-live="polite">
        {action.error && <Alert tone="error">{action.error}</Alert>}
        {action.done && <Alert tone="success">{action.done}</Alert>}
      </div>

      <WorkPackView pack={pack} projectName={project.name} timeZone={project.siteTimeZone} />

      <div className="no-print space-y-6">
        {canPlan && canStop('schedule', stop.status) && (
          <ScheduleForm pack={pack} crews={crews} timeZone={project.siteTimeZone} action={action} />
        )}
        {canPlan && stop.status === 'scheduled' && (
          <Panel title="Publish">
            {stop.publishedAt ? (
              <p>
                Published {formatSiteDateTime(stop.publishedAt, project.siteTimeZone)}: the crew has the work pack. Change the schedule to
                publish again.
              </p>
            ) : (
              <div className="space-y-3">
                <p>
                  Every member of {pack.crew?.name ?? 'the crew'} gets the work pack and the cautions by e-mail, and reminders before the
                  start.
                </p>
                <Button onClick={() => action.run({ kind: 'publish' }, 'Published: the crew is told by e-mail.')} disabled={action.busy}>
                  Publish to the crew
                </Button>
              </div>
            )}
          </Panel>
        )}
        {canRun && canStop('start', stop.status) && (
          <Panel title="At the face">
            <Button onClick={() => action.run({ kind: 'start', input: {} }, 'Started: the stop is in progress.')} disabled={action.busy}>
              Start the stop now
            </Button>
          </Panel>
        )}
        {canRun && canStop('complete', stop.status) && <CompleteForm rounds={rounds} timeZone={project.siteTimeZone} action={action} />}
        {canPlan && canStop('cancel', stop.status) && <CancelForm action={action} />}
      </div>
    </Page>
  );
}

function Fact({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div>
      <dt className="text-caption text-basalt-600">{label}</dt>
      <dd className="font-semibold">{children}</dd>
    </div>
  );
}

const pCol = createColumnHelper<WorkPack['positions'][number]>();
const packPositionColumns = [
  pCol.accessor('number', {
    header: 'Position',
    meta: { csvDecimals: 0 },
    cell: ({ getValue }) => <span className="font-semibold">{getValue()}</span>,
  }),
  pCol.accessor((p) => `${positionClassLabels[p.positionClass]}${p.twinDisc ? ', twin' : ''}`, { id: 'class', header: 'Class' }),
  pCol.accessor('trackRadiusMm', { header: 'Track radius (mm)', meta: { csvDecimals: 0 } }),
  pCol.accessor('discSizeIn', { header: 'Disc (in)', cell: ({ getValue }) => `${getValue()}″`, meta: { csvDecimals: 0 } }),
  pCol.accessor((p) => p.fittedSerial ?? '—', { id: 'serialOff', header: 'Serial off' }),
  pCol.accessor('expectedWearMm', {
    header: 'Expected wear (mm)',
    meta: { csvDecimals: 1 },
    cell: ({ row, getValue }) => {
      const v = getValue();
      return v == null ? '—' : `${v.toFixed(1)} of ${row.original.wearLimitMm} mm`;
    },
  }),
  pCol.display({
    id: 'serialOn',
    header: 'Serial on',
    cell: () => (
      <span className="block h-6 min-w-32 border-b-2 border-dotted border-basalt-400">
        <span className="sr-only">To be written in</span>
      </span>
    ),
  }),
];
const sCol = createColumnHelper<WorkPack['storeSerials'][number]>();
const storeColumns = [
  sCol.accessor('serial', { header: 'Serial' }),
  sCol.accessor('discSizeIn', { header: 'Disc (in)', cell: ({ getValue }) => `${getValue()}″`, meta: { csvDecimals: 0 } }),
  sCol.accessor('rebuildCount', { header: 'Rebuilds', meta: { csvDecimals: 0 } }),
];
const kCol = createColumnHelper<WorkPack['partsKit'][number]>();
const kitColumns = [
  kCol.accessor('item', { header: 'Item' }),
  kCol.accessor('quantity', {
    header: 'Qty',
    meta: { csvDecimals: 0 },
    cell: ({ getValue }) => <span className="font-semibold">{getValue()}</span>,
  }),
  kCol.accessor('basis', { header: 'Basis', cell: ({ getValue }) => <span className="text-caption">{getValue()}</span> }),
];

function WorkPackView({ pack, projectName, timeZone }: { pack: WorkPack; projectName: string; timeZone: string }) {
  const { stop } = pack;
  return (
    <article aria-label="Work pack" className="work-pack space-y-4 rounded-lg border border-basalt-200 bg-white p-4 shadow-sm">
      <header>
        <p className="text-caption text-basalt-600">{projectName} · work pack</p>
        <h2>
          Cutter stop at {formatChainage(stop.chainageM)}
          {stop.ringNumber != null && `, ring ${stop.ringNumber}`}
        </h2>
      </header>
      <dl className="grid grid-cols-2 gap-3 md:grid-cols-3 print:grid-cols-3">
        <Fact label="Status">
          {stopStatusLabels[stop.status]}
          {stop.publishedAt && ' · published'}
        </Fact>
        <Fact label="Air">
          <AirBadge compressedAir={stop.compressedAir} workingPressureBar={stop.workingPressureBar} />
        </Fact>
        <Fact label={`Planned start (${timeZone})`}>
          {stop.plannedStart ? formatSiteDateTime(stop.plannedStart, timeZone) : 'Not scheduled'}
        </Fact>
        <Fact label="Expected duration">{hoursText(stop.expectedHours)}</Fact>
        <Fact label="Crew">
          {pack.crew ? `${pack.crew.name} (${pack.crew.members.map((m) => m.name).join(', ') || 'no members'})` : 'None yet'}
        </Fact>
        {(stop.actualStart || stop.actualEnd) && (
          <Fact label="Actual">
            {formatSiteDateTime(stop.actualStart, timeZone)} –{' '}
            {stop.actualEnd ? formatSiteDateTime(stop.actualEnd, timeZone) : 'in progress'}
            {stop.actualHours != null && ` (${hoursText(stop.actualHours)})`}
          </Fact>
        )}
        {pack.round && (
          <Fact label="Inspection round">
            {formatSiteDateTime(pack.round.startedAt, timeZone)} at {formatChainage(pack.round.chainageM)}
          </Fact>
        )}
        {stop.cancelReason && <Fact label="Cancelled because">{stop.cancelReason}</Fact>}
      </dl>

      <StopCautions cautions={pack.cautions} />

      <section aria-labelledby="wp-positions">
        <h3 id="wp-positions" className="font-semibold">
          Positions to change ({pack.positions.length})
        </h3>
        <DataTable
          data={pack.positions}
          columns={packPositionColumns}
          label="Positions to change"
          exportName={`kerfwise-work-pack-${formatChainage(stop.chainageM)}`}
          getRowId={(p) => p.positionId}
          initialSort={[{ id: 'number', desc: false }]}
          filterable={false}
        />
        <p className="text-caption text-basalt-600">Expected wear is the cautious (P90) forecast at this chainage.</p>
      </section>

      <div className="grid gap-4 md:grid-cols-2 print:grid-cols-2">
        <section aria-labelledby="wp-store">
          <h3 id="wp-store" className="font-semibold">
            Take from the store ({pack.storeSerials.length})
          </h3>
          {pack.shortages.map((s) => (
            <Alert
              key={s.discSizeIn}
              tone="caution"
              title={`Short of ${s.discSizeIn}″ cutters: ${s.needed} needed, ${s.inStore} in store.`}
            />
          ))}
          {pack.storeSerials.length > 0 ? (
            <DataTable
              data={pack.storeSerials}
              columns={storeColumns}
              label="Take from the store"
              exportName={`kerfwise-work-pack-${formatChainage(stop.chainageM)}-store`}
              getRowId={(c) => c.cutterId}
              filterable={false}
            />
          ) : (
            <p>{stop.status === 'done' || stop.status === 'cancelled' ? 'The stop is closed.' : 'No matching cutter in store.'}</p>
          )}
          <p className="text-caption text-basalt-600">Fewest rebuilds first, then the longest in store.</p>
        </section>
        <section aria-labelledby="wp-kit">
          <h3 id="wp-kit" className="font-semibold">
            Parts kit
          </h3>
          <DataTable
            data={pack.partsKit}
            columns={kitColumns}
            label="Parts kit"
            exportName={`kerfwise-work-pack-${formatChainage(stop.chainageM)}-kit`}
            getRowId={(k) => k.item}
            filterable={false}
          />
          <p className="text-caption text-basalt-600">
            Spares per number of changes are common practice (no published source); adjust to the site’s history.
          </p>
        </section>
      </div>

      {pack.crew && pack.crew.members.length > 0 && (
        <section aria-labelledby="wp-crew">
          <h3 id="wp-crew" className="font-semibold">
            Crew: {pack.crew.name}
          </h3>
          <ul className="grid gap-x-4 md:grid-cols-2 print:grid-cols-2">
            {pack.crew.members.map((m) => (
              <li key={m.email}>
                {m.name} · {m.email}
              </li>
            ))}
          </ul>
        </section>
      )}
    </article>
  );
}

/** What the schedule form holds: the site time as typed and the hours as text. */
interface ScheduleFormValues {
  plannedStart: string;
  expectedHours: string;
  crewId: string;
  compressedAir: boolean;
}

/** The form turned into the request, then checked with the server's schema (same field names, so errors land on the fields). */
const scheduleFormSchema = (timeZone: string) =>
  z
    .object({ plannedStart: z.string(), expectedHours: z.string(), crewId: z.string(), compressedAir: z.boolean() })
    .transform((v): z.input<typeof scheduleStopInputSchema> => ({
      plannedStart: fromSiteInput(v.plannedStart, timeZone) ?? '',
      expectedHours: (v.expectedHours.trim() === '' ? undefined : Number(v.expectedHours.trim().replace(',', '.'))) as number,
      crewId: v.crewId,
      compressedAir: v.compressedAir,
    }))
    .pipe(scheduleStopInputSchema);

function ScheduleForm({ pack, crews, timeZone, action }: { pack: WorkPack; crews: Crew[]; timeZone: string; action: StopChanger }) {
  const { stop } = pack;
  const form = useForm<ScheduleFormValues, unknown, ScheduleStopInput>({
    resolver: zodResolver(scheduleFormSchema(timeZone)),
    defaultValues: {
      plannedStart: stop.plannedStart ? toSiteInput(stop.plannedStart, timeZone) : '',
      expectedHours: stop.expectedHours == null ? '' : String(stop.expectedHours),
      crewId: stop.crewId ?? '',
      compressedAir: stop.compressedAir,
    },
  });
  const errors = form.formState.errors;
  const compressedAir = form.watch('compressedAir');
  const onSubmit = form.handleSubmit((input) =>
    action.run(
      { kind: 'schedule', input },
      'Scheduled. Publish it to tell the crew.',
      (err) => serverErrors(err, form.setError, 'That did not work. Try again.').text,
    ),
  );
  const airOption = (compressed: boolean, label: string) => (
    <label className="flex min-h-touch items-center gap-2 rounded-md border-2 border-basalt-300 px-3 has-[:checked]:border-ember-500">
      <input
        type="radio"
        name="air"
        checked={compressedAir === compressed}
        onChange={() => form.setValue('compressedAir', compressed, { shouldDirty: true })}
      />
      {label}
    </label>
  );
  return (
    <Panel title={stop.status === 'scheduled' ? 'Change the schedule' : 'Schedule'}>
      <form onSubmit={onSubmit} noValidate className="grid gap-4 md:grid-cols-2">
        <TextField
          label={`Planned start (site time, ${timeZone})`}
          type="datetime-local"
          {...form.register('plannedStart')}
          error={errors.plannedStart?.message}
        />
        <TextField
          label="Expected duration (h)"
          inputMode="decimal"
          {...form.register('expectedHours')}
          error={errors.expectedHours?.message}
          hint="From the plan: stop hours plus change hours."
        />
        <SelectField label="Crew" {...form.register('crewId')} error={errors.crewId?.message}>
          <option value="">Choose a crew…</option>
          {crews.map((c) => (
            <option key={c.id} value={c.id}>
              {c.name} ({c.members.length} member{c.members.length === 1 ? '' : 's'})
            </option>
          ))}
        </SelectField>
        <fieldset className="space-y-1">
          <legend className="font-semibold">Air</legend>
          <div className="flex flex-wrap gap-2">
            {airOption(false, 'Free air')}
            {airOption(true, 'Compressed air')}
          </div>
          {compressedAir && stop.workingPressureBar != null && (
            <p className="text-caption text-basalt-600">
              Indicative working pressure from the water head: {stop.workingPressureBar.toFixed(2)} bar.
            </p>
          )}
        </fieldset>
        <div className="md:col-span-2">
          <Button type="submit" disabled={action.busy}>
            {stop.status === 'scheduled' ? 'Save the schedule' : 'Schedule the stop'}
          </Button>
        </div>
      </form>
    </Panel>
  );
}

function CompleteForm({ rounds, timeZone, action }: { rounds: RoundOption[]; timeZone: string; action: StopChanger }) {
  const [roundId, setRoundId] = useState('');
  return (
    <Panel title="Finish">
      <div className="grid gap-4 md:grid-cols-2">
        <SelectField
          label="Inspection round done during the stop"
          value={roundId}
          onChange={(e) => setRoundId(e.target.value)}
          hint="Optional."
        >
          <option value="">No round</option>
          {rounds.map((r) => (
            <option key={r.id} value={r.id}>
              {formatSiteDateTime(r.startedAt, timeZone)} · {formatChainage(r.chainageM)}
              {r.crew && ` · ${r.crew}`}
            </option>
          ))}
        </SelectField>
        <div className="flex items-end">
          <Button
            onClick={() => action.run({ kind: 'complete', input: { roundId: roundId || null } }, 'Done: the stop is complete.')}
            disabled={action.busy}
          >
            Complete the stop now
          </Button>
        </div>
      </div>
    </Panel>
  );
}

function CancelForm({ action }: { action: StopChanger }) {
  const form = useForm<z.input<typeof cancelStopInputSchema>, unknown, CancelStopInput>({
    resolver: zodResolver(cancelStopInputSchema),
    defaultValues: { reason: '' },
  });
  const onSubmit = form.handleSubmit((input) =>
    action.run({ kind: 'cancel', input }, 'Cancelled.', (err) => serverErrors(err, form.setError, 'That did not work. Try again.').text),
  );
  return (
    <Panel title="Cancel the stop">
      <form onSubmit={onSubmit} noValidate className="grid gap-4 md:grid-cols-2">
        <TextField
          label="Reason"
          {...form.register('reason')}
          error={form.formState.errors.reason?.message}
          hint="The crew is told if the stop was published."
        />
        <div className="flex items-end">
          <Button type="submit" variant="danger" disabled={action.busy}>
            Cancel the stop
          </Button>
        </div>
      </form>
    </Panel>
  );
}
