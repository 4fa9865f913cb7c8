/**
 * Each role's Overview (start of the day), from what Kerfwise already has: rounds, stops and the
 * forecast for the fitter and the planner, parts demand and open orders for the buyer, the
 * downtime report of this and last week for the site manager. Only the caller's role's sections
 * are computed. The small rules are in shared/domain/overview.ts.
 */
import { and, asc, desc, eq, gt, isNull, sql } from 'drizzle-orm';
import {
  daysUntil,
  isStale,
  limitBand,
  NEAR_LIMIT_SHARE,
  ORDERS_DUE_WITHIN_DAYS,
  orderLineState,
  OVERVIEW_LIST_LIMIT,
  STALE_AFTER_DAYS,
} from '../../shared/domain/overview';
import type {
  BuyerOverview,
  FitterOverview,
  Overview,
  OverviewOrderLine,
  OverviewStop,
  PlannerOverview,
  SiteManagerOverview,
  WeekFigures,
} from '../../shared/schemas/overview';
import type { ProjectRole } from '../../shared/roles';
import { addSiteDays, siteDay, siteIsoWeek, siteWeekStart } from '../../shared/site-time';
import type { DbOrTx } from '../db/client';
import {
  downtimeEvents,
  inspectionEntries,
  inspectionRounds,
  parts,
  projects,
  purchaseOrderLines,
  purchaseOrders,
  strokes,
} from '../db/schema';
import { NotFoundError } from '../lib/errors';
import { buildDowntimeReport, periodOfDays, previousIsoWeek, type Period } from './downtime';
import { computeForecast } from './forecast';
import { computePartsDemand } from './parts';
import { listStops, loadWorkPack } from './stops';

type Project = typeof projects.$inferSelect;

const openStopStatuses = new Set(['proposed', 'scheduled', 'in_progress']);

type StopRow = Awaited<ReturnType<typeof listStops>>[number];
const stopItem = (s: StopRow): OverviewStop => ({
  id: s.id,
  status: s.status,
  chainageM: s.chainageM,
  ringNumber: s.ringNumber,
  plannedStart: s.plannedStart,
  compressedAir: s.compressedAir,
  positionCount: s.positionCount,
});

/** The newest round not yet closed, with how many positions it has measured. */
async function openRound(tx: DbOrTx, projectId: string): Promise<FitterOverview['openRound']> {
  const [round] = await tx
    .select()
    .from(inspectionRounds)
    .where(and(eq(inspectionRounds.projectId, projectId), isNull(inspectionRounds.closedAt)))
    .orderBy(desc(inspectionRounds.startedAt))
    .limit(1);
  if (!round) return null;
  const [counts] = await tx
    .execute<{ entries: number; positions: number }>(
      sql`
    select (select count(distinct e.position_id)::int from inspection_entries e where e.round_id = ${round.id}) as entries,
           (select count(*)::int from positions p where p.project_id = ${projectId}) as positions`,
    )
    .then((r) => r.rows);
  return {
    id: round.id,
    startedAt: round.startedAt,
    chainageM: round.chainageM,
    ringNumber: round.ringNumber,
    entries: counts.entries,
    positionCount: counts.positions,
  };
}

/** Discs whose last measured wear (of the cutter now fitted) is over or near the position's limit, worst share first. */
async function discsNearLimit(tx: DbOrTx, projectId: string): Promise<FitterOverview['discs']> {
  const { rows } = await tx.execute<{
    position_id: string;
    number: number;
    wear_limit_mm: number;
    serial: string | null;
    wear_mm: number;
    measured_at: Date;
  }>(sql`
    select p.id as position_id, p.number, p.wear_limit_mm, c.serial, w.wear_mm, w.started_at as measured_at
    from positions p
    join fittings f on f.position_id = p.id and f.removed_at is null
    join cutters c on c.id = f.cutter_id
    join lateral (
      select e.wear_mm, r.started_at from inspection_entries e join inspection_rounds r on r.id = e.round_id
      where e.fitting_id = f.id and e.wear_mm is not null
      order by r.started_at desc, e.recorded_at desc limit 1
    ) w on true
    where p.project_id = ${projectId}`);
  return rows
    .flatMap((r) => {
      const band = limitBand(r.wear_mm, r.wear_limit_mm);
      return band
        ? [
            {
              positionId: r.position_id,
              positionNumber: r.number,
              serial: r.serial,
              wearMm: r.wear_mm,
              wearLimitMm: r.wear_limit_mm,
              band,
              measuredAt: new Date(r.measured_at),
            },
          ]
        : [];
    })
    .sort((a, b) => b.wearMm / b.wearLimitMm - a.wearMm / a.wearLimitMm || a.positionNumber - b.positionNumber);
}

async function fitterOverview(tx: DbOrTx, projectId: string): Promise<FitterOverview> {
  const round = await openRound(tx, projectId);
  const stopRows = await listStops(tx, projectId);
  const next = stopRows.find((s) => s.status === 'in_progress') ?? stopRows.find((s) => s.status === 'scheduled');
  let nextStop: FitterOverview['nextStop'] = null;
  if (next) {
    const pack = await loadWorkPack(tx, projectId, next.id);
    nextStop = {
      ...stopItem(next),
      positions: pack.positions.map((p) => ({ positionId: p.positionId, number: p.number, fittedSerial: p.fittedSerial })),
    };
  }
  return { openRound: round, nextStop, discs: await discsNearLimit(tx, projectId), nearLimitShare: NEAR_LIMIT_SHARE };
}

async function plannerOverview(tx: DbOrTx, projectId: string, now: Date): Promise<PlannerOverview> {
  const forecast = await computeForecast(tx, projectId, now);
  const stopRows = await listStops(tx, projectId);
  const [lastStroke] = await tx
    .select({ at: sql<Date | null>`max(${strokes.endTime})` })
    .from(strokes)
    .where(eq(strokes.projectId, projectId));
  const [lastInspection] = await tx
    .select({ at: sql<Date | null>`max(${inspectionRounds.startedAt})` })
    .from(inspectionEntries)
    .innerJoin(inspectionRounds, eq(inspectionRounds.id, inspectionEntries.roundId))
    .where(eq(inspectionEntries.projectId, projectId));
  const strokeAt = lastStroke?.at ? new Date(lastStroke.at) : null;
  const inspectionAt = lastInspection?.at ? new Date(lastInspection.at) : null;
  return {
    changeOuts: forecast.positions.slice(0, OVERVIEW_LIST_LIMIT).map((p) => ({
      positionId: p.position.positionId,
      positionNumber: p.position.positionNumber,
      serial: p.serial,
      status: p.p90.status,
      remainingM: p.p90.remainingM,
      chainageM: p.p90.chainageM,
      ringNumber: p.p90.ringNumber,
      date: p.p90.date,
    })),
    changeOutProblems: forecast.problems,
    openStops: stopRows.filter((s) => openStopStatuses.has(s.status)).map(stopItem),
    staleAfterDays: STALE_AFTER_DAYS,
    strokes: { lastAt: strokeAt, stale: isStale(strokeAt, now) },
    inspections: { lastAt: inspectionAt, stale: isStale(inspectionAt, now) },
  };
}

async function buyerOverview(tx: DbOrTx, project: Project, now: Date): Promise<BuyerOverview> {
  // The same 12-week demand as the parts catalogue's "order now" (server/routes/parts.ts).
  const demand = await computePartsDemand(tx, project.id, now, { weeks: 12 });
  const today = siteDay(now, project.siteTimeZone);
  const lines = await tx
    .select({
      orderId: purchaseOrders.id,
      lineId: purchaseOrderLines.id,
      orderNumber: purchaseOrders.number,
      supplier: purchaseOrders.supplier,
      partCode: parts.code,
      partName: parts.name,
      outstanding: sql<number>`${purchaseOrderLines.qtyOrdered} - ${purchaseOrderLines.qtyReceived}`,
      dueDate: purchaseOrderLines.dueDate,
    })
    .from(purchaseOrderLines)
    .innerJoin(purchaseOrders, eq(purchaseOrders.id, purchaseOrderLines.purchaseOrderId))
    .innerJoin(parts, eq(parts.id, purchaseOrderLines.partId))
    .where(
      and(
        eq(purchaseOrders.projectId, project.id),
        gt(purchaseOrderLines.qtyOrdered, purchaseOrderLines.qtyReceived),
        sql`${purchaseOrderLines.dueDate} <= ${addSiteDays(today, ORDERS_DUE_WITHIN_DAYS, project.siteTimeZone)}`,
      ),
    )
    .orderBy(asc(purchaseOrderLines.dueDate), asc(purchaseOrders.number), asc(parts.code));
  const orderLines: OverviewOrderLine[] = lines.flatMap((l) => {
    const state = orderLineState(l.dueDate, today);
    return state ? [{ ...l, state }] : [];
  });
  return {
    orderNow: demand.suggestions
      .filter((s) => s.orderNow)
      .map((s) => ({
        partId: s.partId,
        code: s.code,
        name: s.name,
        supplier: s.supplier,
        orderQty: s.orderQty,
        orderValue: s.orderValue,
        currency: s.currency,
        firstShortageDate: s.firstShortageDate,
      })),
    orderLines,
    dueWithinDays: ORDERS_DUE_WITHIN_DAYS,
    problems: demand.problems,
  };
}

async function weekFigures(tx: DbOrTx, project: Project, p: Period): Promise<WeekFigures> {
  const report = await buildDowntimeReport(tx, project, p);
  return {
    from: p.from,
    to: p.to,
    isoWeek: siteIsoWeek(p.start, p.timeZone),
    boringHours: report.boringHours,
    advanceM: report.advanceM,
    downtimeHours: report.downtimeHours,
    cutterWorkHours: report.pareto.filter((r) => r.cutterWork).reduce((s, r) => s + r.hours, 0),
  };
}

async function siteManagerOverview(tx: DbOrTx, project: Project, now: Date): Promise<SiteManagerOverview> {
  const tz = project.siteTimeZone;
  const monday = siteDay(siteWeekStart(now, tz), tz);
  const today = siteDay(now, tz);
  const thisWeek = await weekFigures(tx, project, periodOfDays(monday, today, tz));
  const previous = previousIsoWeek(now, tz);
  const lastWeek = await weekFigures(tx, project, previous);
  const sameDays = addSiteDays(previous.from, daysUntil(today, monday), tz);
  const lastWeekSameDays = await weekFigures(tx, project, periodOfDays(previous.from, sameDays, tz));
  const unexplainedWhere = and(eq(downtimeEvents.projectId, project.id), isNull(downtimeEvents.causeId));
  const rows = await tx
    .select({ eventId: downtimeEvents.id, startAt: downtimeEvents.startAt, endAt: downtimeEvents.endAt, source: downtimeEvents.source })
    .from(downtimeEvents)
    .where(unexplainedWhere)
    .orderBy(desc(downtimeEvents.startAt))
    .limit(OVERVIEW_LIST_LIMIT);
  const [total] = await tx
    .select({
      count: sql<number>`count(*)::int`,
      hours: sql<number>`coalesce(sum(extract(epoch from (${downtimeEvents.endAt} - ${downtimeEvents.startAt}))), 0)::float8 / 3600`,
    })
    .from(downtimeEvents)
    .where(unexplainedWhere);
  return {
    thisWeek,
    lastWeekSameDays,
    lastWeek,
    unexplained: rows.map((r) => ({ ...r, hours: (r.endAt.getTime() - r.startAt.getTime()) / 3_600_000 })),
    unexplainedCount: total.count,
    unexplainedHours: total.hours,
  };
}

/** The Overview of `role` on the project: that role's sections only. */
export async function buildOverview(tx: DbOrTx, projectId: string, role: ProjectRole, now: Date): Promise<Overview> {
  const [project] = await tx.select().from(projects).where(eq(projects.id, projectId));
  if (!project) throw new NotFoundError('That project');
  const base: Overview = { role, timeZone: project.siteTimeZone, now, listLimit: OVERVIEW_LIST_LIMIT };
  switch (role) {
    case 'fitter':
      return { ...base, fitter: await fitterOverview(tx, projectId) };
    case 'planner':
      return { ...base, planner: await plannerOverview(tx, projectId, now) };
    case 'buyer':
      return { ...base, buyer: await buyerOverview(tx, project, now) };
    case 'site_manager':
      return { ...base, siteManager: await siteManagerOverview(tx, project, now) };
  }
}
