import type { ReactNode } from 'react';
import { Link } from 'react-router';
import { CUTTERHEAD_ENTRY_CAUTION } from '../../../../shared/cautions';
import { formatChainage } from '../../../../shared/domain/chainage';
import { COMPRESSED_AIR_CAUTION } from '../../../../shared/domain/compressed-air';
import { changeShare } from '../../../../shared/domain/overview';
import type { OverviewWire, WeekFigures } from '../../../../shared/schemas/overview';
import { stopStatusLabels } from '../../../../shared/schemas/stop';
import { formatSiteDate, formatSiteDateTime } from '../../../../shared/site-time';
import { Alert } from '../../../components/ui/alert';
import { Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';

/** A link big enough for a gloved finger. */
function Go({ to, children }: { to: string; children: ReactNode }) {
  return (
    <Link to={to} className="inline-flex min-h-touch items-center font-semibold text-ember-700 underline underline-offset-4">
      {children}
    </Link>
  );
}

function Items({ label, children }: { label: string; children: ReactNode }) {
  return (
    <ul aria-label={label} className="divide-y divide-basalt-100">
      {children}
    </ul>
  );
}

const Row = ({ children }: { children: ReactNode }) => <li className="flex flex-wrap items-center gap-x-4 py-1">{children}</li>;
const None = ({ children }: { children: ReactNode }) => <p className="text-basalt-600">{children}</p>;
const hours = (h: number) => `${h.toFixed(1)} h`;
/** An amount in its currency with thousands separators; a code Intl does not know is written after the number. */
function money(value: number, currency: string): string {
  try {
    return new Intl.NumberFormat('en-GB', { style: 'currency', currency }).format(value);
  } catch {
    return `${value.toLocaleString('en-GB', { minimumFractionDigits: 2, maximumFractionDigits: 2 })} ${currency}`;
  }
}
const more = (shown: number, total: number) => (total > shown ? <None>…and {total - shown} more.</None> : null);

export function OverviewPanels({ overview: o, projectId }: { overview: OverviewWire; projectId: string }) {
  const tz = o.timeZone;
  const at = (instant: string | null) => formatSiteDateTime(instant, tz);
  return (
    <>
      {o.fitter && (
        <>
          <Panel title="Inspection round">
            {o.fitter.openRound ? (
              <p className="flex flex-wrap items-center gap-x-4">
                <span>
                  Open since {at(o.fitter.openRound.startedAt)} at {formatChainage(o.fitter.openRound.chainageM)}:{' '}
                  {o.fitter.openRound.entries} of {o.fitter.openRound.positionCount} positions recorded.
                </span>
                <Go to={paths.round(projectId, o.fitter.openRound.id)}>Continue the round</Go>
              </p>
            ) : (
              <p className="flex flex-wrap items-center gap-x-4">
                <span>No round is open.</span>
                <Go to={paths.rounds(projectId)}>Start a round</Go>
              </p>
            )}
          </Panel>
          <Panel title="Next stop">
            {o.fitter.nextStop ? (
              <div className="space-y-2">
                <p className="flex flex-wrap items-center gap-x-4">
                  <span>
                    {stopStatusLabels[o.fitter.nextStop.status]} at {formatChainage(o.fitter.nextStop.chainageM)}
                    {o.fitter.nextStop.ringNumber != null && `, ring ${o.fitter.nextStop.ringNumber}`}
                    {o.fitter.nextStop.plannedStart && `, planned ${at(o.fitter.nextStop.plannedStart)}`}
                    {o.fitter.nextStop.compressedAir && ', under compressed air'}.
                  </span>
                  <Go to={paths.stop(projectId, o.fitter.nextStop.id)}>Open the work pack</Go>
                </p>
                <p>
                  Positions to change:{' '}
                  {o.fitter.nextStop.positions.length === 0
                    ? 'none listed yet.'
                    : o.fitter.nextStop.positions.map((p) => `${p.number}${p.fittedSerial ? ` (${p.fittedSerial})` : ''}`).join(', ')}
                </p>
                <p role="note" className="text-caption text-basalt-700">
                  {CUTTERHEAD_ENTRY_CAUTION}
                  {o.fitter.nextStop.compressedAir && ` ${COMPRESSED_AIR_CAUTION}`}
                </p>
              </div>
            ) : (
              <None>No stop is scheduled or under way.</None>
            )}
          </Panel>
          <Panel title="Discs over or near their limit">
            <p className="mb-2 text-caption text-basalt-600">
              By the last measurement of the disc now fitted; near is from {Math.round(o.fitter.nearLimitShare * 100)} % of the limit.
            </p>
            {o.fitter.discs.length === 0 ? (
              <None>No disc is over or near its limit.</None>
            ) : (
              <Items label="Discs over or near their limit">
                {o.fitter.discs.map((d) => (
                  <Row key={d.positionId}>
                    <Go to={paths.position(projectId, d.positionId)}>Position {d.positionNumber}</Go>
                    <span>
                      <strong>{d.band === 'over' ? 'Over the limit' : 'Near the limit'}</strong>: {d.wearMm.toFixed(1)} of{' '}
                      {d.wearLimitMm.toFixed(1)} mm{d.serial && `, ${d.serial}`}, measured {at(d.measuredAt)}
                    </span>
                  </Row>
                ))}
              </Items>
            )}
          </Panel>
        </>
      )}
      {o.planner && (
        <>
          <Panel title="Next change-outs (P90)">
            {o.planner.changeOuts.length === 0 ? (
              <None>{o.planner.changeOutProblems[0] ?? 'No position to forecast.'}</None>
            ) : (
              <Items label="Next change-outs">
                {o.planner.changeOuts.map((c) => (
                  <Row key={c.positionId}>
                    <Go to={paths.stopPlan(projectId)}>Position {c.positionNumber}</Go>
                    <span>
                      {c.status === 'over_limit'
                        ? 'over the limit now'
                        : `${c.status === 'beyond_known_ground' ? 'at least ' : ''}${c.remainingM.toFixed(0)} m left, at ${formatChainage(c.chainageM)} (ring ${c.ringNumber}) about ${formatSiteDate(c.date, tz)}`}
                    </span>
                  </Row>
                ))}
              </Items>
            )}
            <p className="mt-2">
              <Go to={paths.forecast(projectId)}>How the forecast was made</Go>
            </p>
          </Panel>
          <Panel title="Open and proposed stops">
            {o.planner.openStops.length === 0 ? (
              <None>No stop is open.</None>
            ) : (
              <Items label="Open and proposed stops">
                {o.planner.openStops.map((s) => (
                  <Row key={s.id}>
                    <Go to={paths.stop(projectId, s.id)}>Stop at {formatChainage(s.chainageM)}</Go>
                    <span>
                      {stopStatusLabels[s.status]}, {s.positionCount} positions{s.plannedStart && `, planned ${at(s.plannedStart)}`}
                    </span>
                  </Row>
                ))}
              </Items>
            )}
          </Panel>
          <Panel title="Drive data">
            <p className="mb-2 text-caption text-basalt-600">Stale means nothing newer than {o.planner.staleAfterDays} days.</p>
            <Items label="Drive data freshness">
              <Row>
                <span>
                  <strong>{o.planner.strokes.stale ? 'Stale' : 'Up to date'}</strong>: last stroke{' '}
                  {o.planner.strokes.lastAt ? `ended ${at(o.planner.strokes.lastAt)}` : 'never imported'}
                </span>
                {o.planner.strokes.stale && <Go to={paths.advanceLog(projectId)}>Import strokes</Go>}
              </Row>
              <Row>
                <span>
                  <strong>{o.planner.inspections.stale ? 'Stale' : 'Up to date'}</strong>: last inspection{' '}
                  {o.planner.inspections.lastAt ? at(o.planner.inspections.lastAt) : 'never recorded'}
                </span>
                {o.planner.inspections.stale && <Go to={paths.rounds(projectId)}>Plan a round</Go>}
              </Row>
            </Items>
          </Panel>
        </>
      )}
      {o.buyer && (
        <>
          <Panel title="Parts to order now">
            {o.buyer.orderNow.length === 0 ? (
              <None>Nothing needs ordering now.</None>
            ) : (
              <Items label="Parts to order now">
                {o.buyer.orderNow.map((s) => (
                  <Row key={s.partId}>
                    <Go to={paths.parts(projectId)}>Order {s.code}</Go>
                    <span>
                      {s.orderQty} × {s.name}
                      {s.supplier && ` from ${s.supplier}`}, {money(s.orderValue, s.currency)}
                      {s.firstShortageDate && `; short from ${s.firstShortageDate}`}
                    </span>
                  </Row>
                ))}
              </Items>
            )}
            {o.buyer.problems.length > 0 && (
              <div className="mt-2">
                <Alert tone="caution" title="The suggestions are incomplete">
                  {o.buyer.problems.join(' ')}
                </Alert>
              </div>
            )}
          </Panel>
          <Panel title={`Orders late or due within ${o.buyer.dueWithinDays} days`}>
            {o.buyer.orderLines.length === 0 ? (
              <None>No order is late or due.</None>
            ) : (
              <Items label="Orders late or due">
                {o.buyer.orderLines.map((l) => (
                  <Row key={l.lineId}>
                    <Go to={paths.parts(projectId)}>Order {l.orderNumber}</Go>
                    <span>
                      <strong>{l.state === 'late' ? 'Late' : 'Due'}</strong>: {l.outstanding} × {l.partCode} {l.partName}, due {l.dueDate}
                      {l.supplier && ` from ${l.supplier}`}
                    </span>
                  </Row>
                ))}
              </Items>
            )}
          </Panel>
        </>
      )}
      {o.siteManager && (
        <>
          <Panel title="This week against last week">
            <WeekTable s={o.siteManager} timeZone={tz} />
            <p className="mt-2">
              <Go to={paths.downtimeReport(projectId)}>Open the downtime report</Go>
            </p>
          </Panel>
          <Panel title="Unexplained standstills">
            {o.siteManager.unexplainedCount === 0 ? (
              <None>Every standstill has a cause.</None>
            ) : (
              <>
                <p className="mb-2">
                  {o.siteManager.unexplainedCount} standstills without a cause, {hours(o.siteManager.unexplainedHours)} in all.
                </p>
                <Items label="Unexplained standstills">
                  {o.siteManager.unexplained.map((u) => (
                    <Row key={u.eventId}>
                      <Go to={paths.downtime(projectId)}>Give a cause</Go>
                      <span>
                        {at(u.startAt)} to {at(u.endAt)}, {hours(u.hours)}
                        {u.source === 'gap' && ' (a gap in the advance log)'}
                      </span>
                    </Row>
                  ))}
                </Items>
                {more(o.siteManager.unexplained.length, o.siteManager.unexplainedCount)}
              </>
            )}
          </Panel>
        </>
      )}
    </>
  );
}

function WeekTable({ s, timeZone }: { s: NonNullable<OverviewWire['siteManager']>; timeZone: string }) {
  const rows: { label: string; key: 'boringHours' | 'advanceM' | 'downtimeHours' | 'cutterWorkHours'; unit: string }[] = [
    { label: 'Boring', key: 'boringHours', unit: 'h' },
    { label: 'Advance', key: 'advanceM', unit: 'm' },
    { label: 'Downtime', key: 'downtimeHours', unit: 'h' },
    { label: 'Cutter work', key: 'cutterWorkHours', unit: 'h' },
  ];
  const value = (w: WeekFigures, key: (typeof rows)[number]['key'], unit: string) => `${w[key].toFixed(1)} ${unit}`;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left">
        <caption className="text-left text-caption text-basalt-600">
          Site time ({timeZone}). This week so far: {s.thisWeek.from} to {s.thisWeek.to}; compared with the same days of last week (
          {s.lastWeekSameDays.from} to {s.lastWeekSameDays.to}); the whole of last week runs {s.lastWeek.from} to {s.lastWeek.to}.
        </caption>
        <thead>
          <tr>
            <th scope="col"></th>
            <th scope="col">This week so far ({s.thisWeek.isoWeek})</th>
            <th scope="col">Last week, same days</th>
            <th scope="col">Change</th>
            <th scope="col">Whole of last week ({s.lastWeek.isoWeek})</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => {
            const change = changeShare(s.thisWeek[r.key], s.lastWeekSameDays[r.key]);
            return (
              <tr key={r.key}>
                <th scope="row">{r.label}</th>
                <td>{value(s.thisWeek, r.key, r.unit)}</td>
                <td>{value(s.lastWeekSameDays, r.key, r.unit)}</td>
                <td>{change === null ? '—' : `${change >= 0 ? '+' : '−'}${Math.abs(change * 100).toFixed(0)} %`}</td>
                <td>{value(s.lastWeek, r.key, r.unit)}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
