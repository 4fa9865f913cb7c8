import { zodResolver } from '@hookform/resolvers/zod';
import { useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm, type Resolver } from 'react-hook-form';
import { Link, useNavigate, useParams, useSearchParams } from 'react-router';
import { positionClassLabels } from '../../../../shared/cutters';
import { roleCan } from '../../../../shared/roles';
import { stopPlanQuerySchema, type StopPlanQuery } from '../../../../shared/schemas/stop';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDate as formatDate, formatSiteDateTime as formatDateTime } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { stopPlanOverrides, stopQueries, useProposeStop, type PlanStop, type PlanView, type StopPlan, type StopPlanSettings } from '../api';
import { AirBadge } from '../components/air-badge';
import { StopCautions } from '../components/cautions';
import { hoursText } from '../format';

const linkClass = 'inline-flex min-h-touch items-center font-semibold text-ember-700 underline underline-offset-2';

/** The optimised stop plan with its certificate, against site practice and a fixed interval, and a way to propose its stops. */
export function StopPlanRoute() {
  const { projectId = '' } = useParams();
  const [search, setSearch] = useSearchParams();
  const overrides = stopPlanOverrides(search);
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: plan } = useSuspenseQuery(stopQueries.plan(projectId, overrides));
  const canPlan = roleCan(project.role, 'stops.plan');
  const ahead =
    plan.horizonEndChainageM != null && plan.currentChainageM != null ? Math.abs(plan.horizonEndChainageM - plan.currentChainageM) : null;

  return (
    <Page
      title="Stop plan"
      actions={
        <Link className={linkClass} to={paths.stops(projectId)}>
          All stops
        </Link>
      }
    >
      <p className="max-w-prose">
        {plan.currentChainageM == null
          ? 'The machine’s position is not known yet.'
          : `Machine at ${formatChainage(plan.currentChainageM)}, ring ${plan.currentRingNumber}. `}
        {ahead != null &&
          `Planned to ${formatChainage(plan.horizonEndChainageM)} (${ahead.toFixed(0)} m ahead) over ${plan.candidatePlaceCount} ring ends where a stop is allowed. `}
        Worked out {formatDateTime(plan.now, project.siteTimeZone)} (site time) from the cautious (P90) forecast: no cutter should pass its
        wear limit between stops.
      </p>

      {plan.problems.map((p) => (
        <Alert key={p} tone="caution" title={p} />
      ))}
      {plan.infeasible.length > 0 && (
        <Alert tone="error" title="Positions no plan can keep within their limit">
          <ul className="list-disc pl-6">
            {plan.infeasible.map((p) => (
              <li key={p.positionId}>
                Position {p.positionNumber}, due at {formatChainage(p.dueChainageM)}: {p.reason}.
              </li>
            ))}
          </ul>
        </Alert>
      )}
      <StopCautions cautions={plan.cautions} />

      {plan.optimised && (
        <>
          <Panel title="Plan, certificate and savings">
            <CertificateText plan={plan} />
            <CostComparison plan={plan} />
          </Panel>
          <Panel title={`Long section and ${plan.optimised.stops.length} planned stop${plan.optimised.stops.length === 1 ? '' : 's'}`}>
            <LongSection plan={plan} />
            {plan.optimised.stops.length === 0 ? (
              <p>No cutter reaches its cautious limit within the plan: no stop is needed.</p>
            ) : (
              <StopTable
                projectId={projectId}
                stops={plan.optimised.stops}
                timeZone={project.siteTimeZone}
                canPlan={canPlan}
                label="Planned stops"
              />
            )}
          </Panel>
          {[
            { name: `Site practice (change at ${plan.settings.practiceChangeSharePercent} % of the limit)`, view: plan.practice },
            { name: `A stop every ${plan.settings.fixedIntervalM} m`, view: plan.fixedInterval },
          ].map(
            ({ name, view }) =>
              view && (
                <details key={name} className="rounded-lg border border-basalt-200 bg-white p-4">
                  <summary className="min-h-touch cursor-pointer font-semibold">
                    {name}: {view.stops.length} stops, {hoursText(view.cost.totalH)}, for comparison
                  </summary>
                  <StopTable projectId={projectId} stops={view.stops} timeZone={project.siteTimeZone} canPlan={false} label={name} />
                </details>
              ),
          )}
        </>
      )}

      <AssumptionsPanel
        settings={plan.settings}
        onApply={(q) => setSearch(new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)])))}
      />
    </Page>
  );
}

/** Whether the plan is proven the cheapest, or how far above the cheapest it can be at most. */
function CertificateText({ plan }: { plan: StopPlan }) {
  const c = plan.certificate;
  if (!c || !plan.optimised) return null;
  return (
    <>
      <p className="mb-3 text-lead font-semibold">
        {c.proven
          ? 'Cheapest possible plan (proven).'
          : `At most ${c.gapPercent.toFixed(1)} % above the cheapest possible plan: no plan can cost less than ${hoursText(c.lowerBoundH)}.`}
      </p>
      {c.cutAfterS !== null && (
        <p className="mb-3">
          The search was stopped after {c.cutAfterS} s so that the plan comes in time: this is the best plan found by then, and the figure
          above still holds. A shorter horizon is searched further.
        </p>
      )}
    </>
  );
}

/** The three plans' hours side by side; each total is the sum of that plan's own table. */
function CostComparison({ plan }: { plan: StopPlan }) {
  const rows = [
    { name: 'Optimised', view: plan.optimised },
    { name: `Site practice (${plan.settings.practiceChangeSharePercent} %)`, view: plan.practice },
    { name: `Every ${plan.settings.fixedIntervalM} m`, view: plan.fixedInterval },
  ].filter((r): r is { name: string; view: PlanView } => r.view !== null);
  const saving = (h: number | null, against: string) =>
    h == null ? null : h > 1e-6 ? `saves ${hoursText(h)} against ${against}` : `is no better than ${against}`;
  const sentences = [
    saving(plan.savingVsPracticeH, 'site practice'),
    saving(plan.savingVsIntervalH, `a stop every ${plan.settings.fixedIntervalM} m`),
  ].filter(Boolean);
  return (
    <div className="space-y-3">
      <DataTable
        data={rows}
        columns={costColumns}
        label="Cost of the plans, in hours"
        exportName="kerfwise-stop-plan-costs"
        getRowId={(r) => r.name}
        filterable={false}
      />
      {sentences.length > 0 && (
        <p className="font-semibold">The optimised plan {sentences.join(' and ')}: the totals of the tables below.</p>
      )}
    </div>
  );
}

const SVG_W = 1000;
const SVG_H = 170;
const STRIP_Y = 112;
const STRIP_H = 26;
const HEAD_TOP = 40;
const HEAD_BOTTOM = 104;

/**
 * The plan's stretch of the long section: the ground strip (named), no-stop zones hatched, the
 * water-head line with the compressed-air threshold, and each stop as a mark — a circle for free
 * air, a diamond for compressed air, each with its number and the word in its tooltip and legend.
 */
function LongSection({ plan }: { plan: StopPlan }) {
  const from = plan.currentChainageM;
  const to = plan.horizonEndChainageM;
  if (from == null || to == null || from === to || !plan.optimised) return null;
  const x = (c: number) => 30 + ((c - from) / (to - from)) * (SVG_W - 60);
  const maxHead = Math.max(plan.compressedAirAboveHeadM * 1.2, ...plan.longSection.map((s) => s.waterHeadM), 1);
  const y = (h: number) => HEAD_BOTTOM - (h / maxHead) * (HEAD_BOTTOM - HEAD_TOP);
  const grounds = [...new Set(plan.longSection.map((s) => s.groundName ?? 'unknown'))];
  const shade = (name: string | null) => ['#e7e3dc', '#cfc8bb', '#b3a996', '#968a74', '#7a6e59'][grounds.indexOf(name ?? 'unknown') % 5];
  return (
    <figure className="mb-4">
      <svg
        viewBox={`0 0 ${SVG_W} ${SVG_H}`}
        className="w-full"
        role="img"
        aria-label={`Long section from ${formatChainage(from)} to ${formatChainage(to)} with ${plan.optimised.stops.length} planned stops`}
      >
        <defs>
          <pattern id="no-stop-hatch" width="8" height="8" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
            <line x1="0" y1="0" x2="0" y2="8" stroke="#7f1d1d" strokeWidth="2" />
          </pattern>
        </defs>
        {plan.longSection.map((s) => {
          const [a, b] = [x(s.chainageFromM), x(s.chainageToM)].sort((p, q) => p - q);
          return (
            <g key={`${s.chainageFromM}-${s.chainageToM}`}>
              <rect x={a} y={STRIP_Y} width={b - a} height={STRIP_H} fill={shade(s.groundName)} stroke="#3f3a33" strokeWidth="0.5">
                <title>{`${s.groundName ?? 'Unknown ground'}, ${formatChainage(s.chainageFromM)}–${formatChainage(s.chainageToM)}, water head ${s.waterHeadM} m${s.stopAllowed ? '' : `; no stop: ${s.stopReason || 'not allowed'}`}`}</title>
              </rect>
              {b - a > 70 && (
                <text x={(a + b) / 2} y={STRIP_Y + 17} textAnchor="middle" fontSize="12" fill="#1c1917">
                  {s.groundName ?? 'unknown'}
                </text>
              )}
              {!s.stopAllowed && (
                <>
                  <rect x={a} y={STRIP_Y - 10} width={b - a} height={8} fill="url(#no-stop-hatch)" />
                  {b - a > 40 && (
                    <text x={(a + b) / 2} y={STRIP_Y + STRIP_H + 14} textAnchor="middle" fontSize="11" fill="#7f1d1d">
                      no stop
                    </text>
                  )}
                </>
              )}
              <line x1={a} x2={b} y1={y(s.waterHeadM)} y2={y(s.waterHeadM)} stroke="#1d4ed8" strokeWidth="2" />
            </g>
          );
        })}
        <line
          x1={30}
          x2={SVG_W - 30}
          y1={y(plan.compressedAirAboveHeadM)}
          y2={y(plan.compressedAirAboveHeadM)}
          stroke="#1d4ed8"
          strokeDasharray="6 4"
          strokeWidth="1"
        />
        <text x={SVG_W - 30} y={y(plan.compressedAirAboveHeadM) - 4} textAnchor="end" fontSize="11" fill="#1d4ed8">
          compressed air above {plan.compressedAirAboveHeadM} m head
        </text>
        {plan.optimised.stops.map((s, i) => {
          const cx = x(s.chainageM);
          const cy = 20;
          return (
            <g key={s.chainageM}>
              <line x1={cx} x2={cx} y1={cy + 7} y2={STRIP_Y} stroke="#57534e" strokeWidth="0.75" />
              {s.compressedAir ? (
                <rect x={cx - 6} y={cy - 6} width={12} height={12} transform={`rotate(45 ${cx} ${cy})`} fill="#b45309" />
              ) : (
                <circle cx={cx} cy={cy} r={6} fill="#ffffff" stroke="#1c1917" strokeWidth="2" />
              )}
              <title>{`Stop ${i + 1} at ${formatChainage(s.chainageM)}, ${s.compressedAir ? 'compressed air' : 'free air'}, ${s.changes.length} positions`}</title>
              <text x={cx} y={cy - 10} textAnchor="middle" fontSize="10" fill="#1c1917">
                {i + 1}
              </text>
            </g>
          );
        })}
        <text x={30} y={SVG_H - 4} fontSize="11" fill="#1c1917">
          {formatChainage(from)} (machine)
        </text>
        <text x={SVG_W - 30} y={SVG_H - 4} textAnchor="end" fontSize="11" fill="#1c1917">
          {formatChainage(to)}
        </text>
      </svg>
      <figcaption className="text-caption text-basalt-700">
        ○ stop in free air · ◆ stop in compressed air · blue line: water head above the axis (dashed: the site’s compressed-air threshold) ·
        hatched: no stop allowed · strip: ground type.
      </figcaption>
    </figure>
  );
}

/** The stops as a compact table; a row opens to its positions (and, for the optimised plan, a way to propose it). */
const costCol = createColumnHelper<{ name: string; view: PlanView }>();
const costColumns = [
  costCol.accessor('name', { header: 'Plan', cell: ({ getValue }) => <span className="font-semibold">{getValue()}</span> }),
  costCol.accessor((r) => r.view.stops.length, { id: 'stops', header: 'Stops', meta: { csvDecimals: 0 } }),
  costCol.accessor((r) => r.view.cost.stopH, {
    id: 'stopH',
    header: 'Stop hours',
    meta: { csvDecimals: 1 },
    cell: ({ getValue }) => hoursText(getValue()),
  }),
  costCol.accessor((r) => r.view.cost.changeH, {
    id: 'changeH',
    header: 'Change hours',
    meta: { csvDecimals: 1 },
    cell: ({ getValue }) => hoursText(getValue()),
  }),
  costCol.accessor((r) => r.view.cost.wastedRingLifeH, {
    id: 'wastedH',
    header: 'Ring life thrown away',
    meta: { csvDecimals: 1 },
    cell: ({ getValue }) => hoursText(getValue()),
  }),
  costCol.accessor((r) => r.view.cost.totalH, {
    id: 'totalH',
    header: 'Total',
    meta: { csvDecimals: 1 },
    cell: ({ getValue }) => <span className="font-semibold">{hoursText(getValue())}</span>,
  }),
];

const planCol = createColumnHelper<PlanStop>();
/** A plan's stops in chainage order (not sortable: the order is the plan); the chainage opens the stop. */
const planStopColumns = (timeZone: string) =>
  [
    planCol.display({ id: 'n', header: '#', cell: ({ row }) => row.index + 1 }),
    planCol.accessor('chainageM', {
      header: 'Chainage',
      meta: { csvDecimals: 1 },
      cell: ({ row }) => (
        <button
          type="button"
          className="min-h-touch font-semibold text-ember-700 underline underline-offset-2"
          aria-expanded={row.getIsExpanded()}
          aria-controls={`plan-stop-${row.id}`}
          onClick={() => row.toggleExpanded()}
        >
          {formatChainage(row.original.chainageM)}
        </button>
      ),
    }),
    planCol.accessor('ringNumber', { header: 'Ring', meta: { csvDecimals: 0 } }),
    planCol.accessor((s) => (s.expectedAt ? formatDate(s.expectedAt, timeZone) : '—'), { id: 'expected', header: 'Expected' }),
    planCol.accessor((s) => s.changes.length, { id: 'positions', header: 'Positions', meta: { csvDecimals: 0 } }),
    planCol.accessor((s) => s.stopH + s.changeH + s.wastedRingLifeH, {
      id: 'hours',
      header: 'Hours (stop + changes + ring life)',
      meta: { csvDecimals: 1 },
      cell: ({ row, getValue }) =>
        `${hoursText(getValue())} (${row.original.stopH.toFixed(1)} + ${row.original.changeH.toFixed(1)} + ${row.original.wastedRingLifeH.toFixed(1)})`,
    }),
    planCol.accessor((s) => (s.compressedAir ? '◆ compressed air' : '○ free air'), { id: 'air', header: 'Air' }),
  ].map((c) => ({ ...c, enableSorting: false }));

function StopTable({
  projectId,
  stops,
  timeZone,
  canPlan,
  label,
}: {
  projectId: string;
  stops: PlanStop[];
  timeZone: string;
  canPlan: boolean;
  label: string;
}) {
  return (
    <div className="text-caption">
      <DataTable
        data={stops}
        columns={planStopColumns(timeZone)}
        label={label}
        exportName={`kerfwise-stop-plan-${label.toLowerCase().replace(/[^a-z0-9]+/g, '-')}`}
        getRowId={(s) => String(s.chainageM)}
        filterable={false}
        expandIdPrefix="plan-stop-"
        renderExpanded={(row) => <StopDetail projectId={projectId} stop={row.original} canPlan={canPlan} />}
      />
    </div>
  );
}

function StopDetail({ projectId, stop, canPlan }: { projectId: string; stop: PlanStop; canPlan: boolean }) {
  const navigate = useNavigate();
  const proposeStop = useProposeStop(projectId);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const propose = async () => {
    setBusy(true);
    setError(null);
    try {
      const pack = await proposeStop.mutateAsync({
        chainageM: stop.chainageM,
        compressedAir: stop.compressedAir,
        expectedHours: Math.round((stop.stopH + stop.changeH) * 10) / 10,
        positions: stop.changes.map((c) => ({ positionId: c.positionId, expectedWearMm: Math.round(c.wearAtChangeMm * 10) / 10 })),
        notes: '',
      });
      navigate(paths.stop(projectId, pack.stop.id));
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'The stop could not be proposed. Try again.');
      setBusy(false);
    }
  };
  return (
    <div
      role="group"
      aria-label={`Stop at ${formatChainage(stop.chainageM)}`}
      className="space-y-2 rounded-md border border-basalt-200 p-2 text-body"
    >
      <div className="flex flex-wrap items-center gap-x-3">
        <span>
          {stop.aheadM.toFixed(0)} m ahead{stop.waterHeadM != null && ` · water head ${stop.waterHeadM} m`}
        </span>
        <AirBadge compressedAir={stop.compressedAir} workingPressureBar={stop.workingPressureBar} />
      </div>
      <ul className="flex flex-wrap gap-x-3">
        {stop.changes.map((c) => (
          <li key={c.positionId}>
            {c.positionNumber}{' '}
            <span className="text-caption text-basalt-600">
              ({positionClassLabels[c.positionClass].toLowerCase()}, {c.wearAtChangeMm.toFixed(1)} of {c.limitMm} mm)
            </span>
          </li>
        ))}
      </ul>
      {error && <Alert tone="error">{error}</Alert>}
      {stop.existingStopId ? (
        <Link className={linkClass} to={paths.stop(projectId, stop.existingStopId)}>
          Open the stop already proposed here
        </Link>
      ) : (
        canPlan && (
          <Button variant="secondary" onClick={propose} disabled={busy}>
            {busy ? 'Proposing…' : 'Propose this stop'}
          </Button>
        )
      )}
    </div>
  );
}

const settingFields: { key: keyof StopPlanQuery; label: string; hint: string; value: (s: StopPlanSettings) => number }[] = [
  { key: 'horizonM', label: 'Horizon (m ahead)', hint: 'How far ahead to plan.', value: (s) => s.horizonM },
  { key: 'freeAirStopH', label: 'Hours per free-air stop', hint: 'Fixed time of a stop.', value: (s) => s.freeAirStopH },
  {
    key: 'compressedAirStopH',
    label: 'Hours per compressed-air stop',
    hint: 'Locking in and out, slower work.',
    value: (s) => s.compressedAirStopH,
  },
  { key: 'changeHCentre', label: 'Hours per centre change', hint: 'Twin hubs take longer.', value: (s) => s.changeHByClass.centre },
  { key: 'changeHFace', label: 'Hours per face change', hint: 'One face disc.', value: (s) => s.changeHByClass.face },
  { key: 'changeHGauge', label: 'Hours per gauge change', hint: 'One gauge disc.', value: (s) => s.changeHByClass.gauge },
  {
    key: 'wastedRingLifeHPerMm',
    label: 'Hours per mm of ring life thrown away',
    hint: 'The price of a ring, as boring time.',
    value: (s) => s.wastedRingLifeHPerMm,
  },
  {
    key: 'compressedAirAboveHeadM',
    label: 'Compressed air above water head (m)',
    hint: 'The site’s rule for this drive.',
    value: (s) => s.compressedAirAboveHeadM,
  },
  {
    key: 'practiceChangeSharePercent',
    label: 'Site practice: change at % of the limit',
    hint: 'Discs worn past this share are changed at every stop (common practice, no source).',
    value: (s) => s.practiceChangeSharePercent,
  },
  {
    key: 'fixedIntervalM',
    label: 'Fixed interval (m between stops)',
    hint: 'The rule of a stop every N metres, for comparison.',
    value: (s) => s.fixedIntervalM,
  },
];

/** The plan's assumptions; changing them recalculates the plan (they travel in the page address, nothing is saved). */
function AssumptionsPanel({ settings, onApply }: { settings: StopPlan['settings']; onApply: (q: StopPlanQuery) => void }) {
  type AssumptionsForm = Record<keyof StopPlanQuery, string>;
  const form = useForm<AssumptionsForm, unknown, StopPlanQuery>({
    // The server's query schema reads the numbers from text, as it does from the address.
    resolver: zodResolver(stopPlanQuerySchema) as unknown as Resolver<AssumptionsForm, unknown, StopPlanQuery>,
    defaultValues: Object.fromEntries(settingFields.map((f) => [f.key, String(f.value(settings))])) as AssumptionsForm,
  });
  const onSubmit = form.handleSubmit(onApply);
  /** A decimal comma reads as a point. */
  const decimal = { setValueAs: (v: unknown) => String(v ?? '').replace(',', '.') };
  return (
    <Panel title="Assumptions">
      <p className="mb-3 max-w-prose text-basalt-700">
        Defaults are common practice, with no published source: adjust them to this site. They change this view only.
      </p>
      <form onSubmit={onSubmit} noValidate className="grid gap-4 md:grid-cols-2">
        {settingFields.map((f) => (
          <TextField
            key={f.key}
            label={f.label}
            hint={f.hint}
            inputMode="decimal"
            {...form.register(f.key, decimal)}
            error={form.formState.errors[f.key]?.message}
          />
        ))}
        <div className="md:col-span-2">
          <Button type="submit">Recalculate the plan</Button>
        </div>
      </form>
    </Panel>
  );
}
