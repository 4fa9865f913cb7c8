import { useQueryClient, useSuspenseQuery } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { Link, useNavigate, useParams, useSearchParams } from 'react-router';
import { positionClassLabels } from '../../../../shared/cutters';
import { roleCan } from '../../../../shared/roles';
import { stopPlanQuerySchema, type StopPlanQuery } from '../../../../shared/schemas/stop';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDateTime as formatDateTime } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { proposeStop, stopQueries, type PlanStop, type PlanView, type StopPlan, type StopPlanSettings } from '../api';
import { AirBadge } from '../components/air-badge';
import { StopCautions } from '../components/cautions';
import { hoursText } from '../format';

const linkClass = 'inline-flex min-h-touch items-center font-semibold text-ember-700 underline underline-offset-2';

/** The optimised stop plan against the plan a planner would make by hand, and a way to propose its stops. */
export function StopPlanRoute() {
  const { projectId = '' } = useParams();
  const [search, setSearch] = useSearchParams();
  const overrides = stopPlanQuerySchema.catch({}).parse(Object.fromEntries(search));
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: plan } = useSuspenseQuery(stopQueries.plan(projectId, overrides));
  const canPlan = roleCan(project.role, 'stops.plan');
  const ahead = plan.horizonEndChainageM != null && plan.currentChainageM != null ? Math.abs(plan.horizonEndChainageM - plan.currentChainageM) : null;

  return (
    <Page title="Stop plan" actions={<Link className={linkClass} to={paths.stops(projectId)}>All stops</Link>}>
      <p className="max-w-prose">
        {plan.currentChainageM == null
          ? 'The machine’s position is not known yet.'
          : `Machine at ${formatChainage(plan.currentChainageM)}, ring ${plan.currentRingNumber}. `}
        {ahead != null && `Planned to ${formatChainage(plan.horizonEndChainageM)} (${ahead.toFixed(0)} m ahead) over ${plan.candidatePlaceCount} ring ends where a stop is allowed. `}
        Worked out {formatDateTime(plan.now, project.siteTimeZone)} (site time) from the cautious (P90) forecast: no cutter should pass its wear limit between stops.
      </p>

      {plan.problems.map((p) => <Alert key={p} tone="caution" title={p} />)}
      {plan.infeasible.length > 0 && (
        <Alert tone="error" title="Positions no plan can keep within their limit">
          <ul className="list-disc pl-6">
            {plan.infeasible.map((p) => (
              <li key={p.positionId}>Position {p.positionNumber}, due at {formatChainage(p.dueChainageM)}: {p.reason}.</li>
            ))}
          </ul>
        </Alert>
      )}
      <StopCautions cautions={plan.cautions} />

      {plan.optimised && plan.hand && (
        <>
          <Panel title="Optimised plan against the hand plan">
            <CostComparison optimised={plan.optimised} hand={plan.hand} savingH={plan.savingH ?? 0} />
          </Panel>
          <Panel title={`Optimised plan: ${plan.optimised.stops.length} stop${plan.optimised.stops.length === 1 ? '' : 's'}`}>
            {plan.optimised.stops.length === 0 ? (
              <p>No cutter reaches its cautious limit within the plan: no stop is needed.</p>
            ) : (
              <ol className="space-y-3">
                {plan.optimised.stops.map((s, i) => <PlanStopCard key={s.chainageM} projectId={projectId} stop={s} index={i + 1} canPlan={canPlan} />)}
              </ol>
            )}
          </Panel>
          <details className="rounded-lg border border-basalt-200 bg-white p-4">
            <summary className="min-h-touch cursor-pointer font-semibold">The hand plan’s {plan.hand.stops.length} stops, for comparison</summary>
            <p className="my-2 max-w-prose text-basalt-700">
              Stop at the last allowed place before the first cutter is due; change there only what would be due before the next such stop; repeat.
            </p>
            <ol className="space-y-3">
              {plan.hand.stops.map((s, i) => <PlanStopCard key={s.chainageM} projectId={projectId} stop={s} index={i + 1} canPlan={false} />)}
            </ol>
          </details>
        </>
      )}

      <AssumptionsPanel settings={plan.settings} onApply={(q) => setSearch(new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)])))} />
    </Page>
  );
}

function CostComparison({ optimised, hand, savingH }: { optimised: PlanView; hand: PlanView; savingH: number }) {
  const rows = [
    { name: 'Optimised', plan: optimised },
    { name: 'By hand', plan: hand },
  ];
  const share = hand.cost.totalH > 0 ? (100 * savingH) / hand.cost.totalH : 0;
  return (
    <div className="space-y-3">
      <div className="overflow-x-auto">
        <table className="min-w-full text-left" aria-label="Cost of the two plans, in hours">
          <thead className="bg-basalt-100">
            <tr>
              <th scope="col" className="px-3 py-2">Plan</th>
              <th scope="col" className="px-3 py-2 text-right">Stops</th>
              <th scope="col" className="px-3 py-2 text-right">Stop hours</th>
              <th scope="col" className="px-3 py-2 text-right">Change hours</th>
              <th scope="col" className="px-3 py-2 text-right">Ring life thrown away</th>
              <th scope="col" className="px-3 py-2 text-right">Total</th>
            </tr>
          </thead>
          <tbody>
            {rows.map(({ name, plan }) => (
              <tr key={name} className="border-t border-basalt-100">
                <th scope="row" className="px-3 py-2">{name}</th>
                <td className="px-3 py-2 text-right">{plan.stops.length}</td>
                <td className="px-3 py-2 text-right">{hoursText(plan.cost.stopH)}</td>
                <td className="px-3 py-2 text-right">{hoursText(plan.cost.changeH)}</td>
                <td className="px-3 py-2 text-right">{hoursText(plan.cost.wastedRingLifeH)}</td>
                <td className="px-3 py-2 text-right font-semibold">{hoursText(plan.cost.totalH)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="text-lead font-semibold">
        {savingH > 1e-6 ? `The optimised plan saves ${hoursText(savingH)} (${share.toFixed(0)} %) against the hand plan.` : 'The hand plan is already as good as it gets here.'}
      </p>
    </div>
  );
}

function PlanStopCard({ projectId, stop, index, canPlan }: { projectId: string; stop: PlanStop; index: number; canPlan: boolean }) {
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const propose = async () => {
    setBusy(true);
    setError(null);
    try {
      const pack = await proposeStop(projectId, {
        chainageM: stop.chainageM,
        compressedAir: stop.compressedAir,
        expectedHours: Math.round((stop.stopH + stop.changeH) * 10) / 10,
        positions: stop.changes.map((c) => ({ positionId: c.positionId, expectedWearMm: Math.round(c.wearAtChangeMm * 10) / 10 })),
        notes: '',
      });
      await queryClient.invalidateQueries({ queryKey: stopQueries.all(projectId) });
      navigate(paths.stop(projectId, pack.stop.id));
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'The stop could not be proposed. Try again.');
      setBusy(false);
    }
  };
  const label = `Stop ${index} at ${formatChainage(stop.chainageM)}`;
  return (
    <li aria-label={label} className="space-y-2 rounded-md border border-basalt-200 p-3">
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
        <span className="text-lead font-semibold">{index}. {formatChainage(stop.chainageM)}</span>
        <span>ring {stop.ringNumber} · {stop.aheadM.toFixed(0)} m ahead</span>
        <AirBadge compressedAir={stop.compressedAir} workingPressureBar={stop.workingPressureBar} />
      </div>
      <p className="text-caption text-basalt-700">
        Stop {hoursText(stop.stopH)} + changes {hoursText(stop.changeH)} + ring life thrown away {hoursText(stop.wastedRingLifeH)}
        {stop.waterHeadM != null && ` · water head ${stop.waterHeadM} m`}
      </p>
      <div>
        <span className="font-semibold">Change {stop.changes.length} position{stop.changes.length === 1 ? '' : 's'}: </span>
        <ul className="inline">
          {stop.changes.map((c) => (
            <li key={c.positionId} className="mr-2 inline-block">
              {c.positionNumber} <span className="text-caption text-basalt-600">({positionClassLabels[c.positionClass].toLowerCase()}, {c.wearAtChangeMm.toFixed(1)} of {c.limitMm} mm)</span>
            </li>
          ))}
        </ul>
      </div>
      {error && <Alert tone="error">{error}</Alert>}
      {stop.existingStopId ? (
        <Link className={linkClass} to={paths.stop(projectId, stop.existingStopId)}>Open the stop already proposed here</Link>
      ) : (
        canPlan && <Button variant="secondary" onClick={propose} disabled={busy}>{busy ? 'Proposing…' : 'Propose this stop'}</Button>
      )}
    </li>
  );
}

const settingFields: { key: keyof StopPlanQuery; label: string; hint: string; value: (s: StopPlanSettings) => number }[] = [
  { key: 'horizonM', label: 'Horizon (m ahead)', hint: 'How far ahead to plan.', value: (s) => s.horizonM },
  { key: 'freeAirStopH', label: 'Hours per free-air stop', hint: 'Fixed time of a stop.', value: (s) => s.freeAirStopH },
  { key: 'compressedAirStopH', label: 'Hours per compressed-air stop', hint: 'Locking in and out, slower work.', value: (s) => s.compressedAirStopH },
  { key: 'changeHCentre', label: 'Hours per centre change', hint: 'Twin hubs take longer.', value: (s) => s.changeHByClass.centre },
  { key: 'changeHFace', label: 'Hours per face change', hint: 'One face disc.', value: (s) => s.changeHByClass.face },
  { key: 'changeHGauge', label: 'Hours per gauge change', hint: 'One gauge disc.', value: (s) => s.changeHByClass.gauge },
  { key: 'wastedRingLifeHPerMm', label: 'Hours per mm of ring life thrown away', hint: 'The price of a ring, as boring time.', value: (s) => s.wastedRingLifeHPerMm },
  { key: 'compressedAirAboveHeadM', label: 'Compressed air above water head (m)', hint: 'The site’s rule for this drive.', value: (s) => s.compressedAirAboveHeadM },
];

/** The plan's assumptions; changing them recalculates the plan (they travel in the page address, nothing is saved). */
function AssumptionsPanel({ settings, onApply }: { settings: StopPlan['settings']; onApply: (q: StopPlanQuery) => void }) {
  const [values, setValues] = useState(() => Object.fromEntries(settingFields.map((f) => [f.key, String(f.value(settings))])) as Record<keyof StopPlanQuery, string>);
  const [errors, setErrors] = useState<Partial<Record<keyof StopPlanQuery, string>>>({});
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = stopPlanQuerySchema.safeParse(Object.fromEntries(Object.entries(values).map(([k, v]) => [k, v.replace(',', '.')])));
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    onApply(parsed.data);
  };
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
            value={values[f.key]}
            error={errors[f.key]}
            onChange={(e) => setValues((v) => ({ ...v, [f.key]: e.target.value }))}
          />
        ))}
        <div className="md:col-span-2">
          <Button type="submit">Recalculate the plan</Button>
        </div>
      </form>
    </Panel>
  );
}
