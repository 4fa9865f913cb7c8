/**
 * Parts for the buyer: stock on hand (sum of movements), open orders, the workshop settings, and the
 * demand forecast per part and week with order suggestions. Shared by the parts routes and the
 * weekly digest job.
 *
 * Where the demand comes from (all expected values, so they may be fractional):
 * - Open stops (proposed, scheduled, in progress): each position on a stop is changed in the week of
 *   the stop's planned start (an in-progress stop: now); a stop without a date changes each of its
 *   positions in the week of that position's cautious (P90) change-out date.
 * - Positions not on an open stop whose P90 change-out date falls inside the horizon ('forecast').
 * - After a change the new disc wears again: its central (P50) wear is added week by week from the
 *   advance estimate below, and it is changed again when it reaches its limit ('forecast' too). P50,
 *   not P90: summed over many discs the expected count is what matters; the safety stock carries
 *   the spread.
 * - Sudden failures: the drive's rates per 1,000 km rolled per ground (wear fit) times the km the
 *   discs are expected to roll each week. Expected km per week: walk the geology ahead of the
 *   machine at each ground's expected advance per calendar day and penetration (the forecast's
 *   drive rates), each position rolling 2·π·r/p km per metre of advance per disc (DOMAIN.md §1).
 *   Unknown ground takes the cautious extreme (lowest penetration, fastest advance, highest
 *   failure rate), as in the forecast. Beyond the mapped geology nothing more is forecast.
 * Each removed cutter goes through the workshop loop (shared/domain/parts-projection.ts) by its
 * worst condition: scrap if any of its conditions is scrap, else the dearest bill of materials.
 */
import { and, asc, eq, gt, inArray, sql } from 'drizzle-orm';
import { discConditions, type PositionClass } from '../../shared/cutters';
import { advanceAheadByWeek, weightedRolledKm } from '../../shared/domain/advance-ahead';
import { formatChainage } from '../../shared/domain/chainage';
import { serviceLevelZ, suggestOrderFromWeeks } from '../../shared/domain/inventory';
import {
  projectParts,
  weekIndexOf,
  type CutterRebuildSpec,
  type ExpectedChange,
  type ExpectedFailure,
  type OpenOrder,
  type RebuildInProgress,
  type RebuildOutcome,
} from '../../shared/domain/parts-projection';
import type {
  CataloguePart,
  DemandSource,
  DemandStop,
  DemandWeek,
  OrderSuggestion,
  PartsDemand,
  WorkshopSettingsInput,
} from '../../shared/schemas/parts';
import { siteDay } from '../../shared/site-time';
import type { DbOrTx } from '../db/client';
import {
  geologySections,
  parts,
  positions,
  projects,
  purchaseOrderLines,
  purchaseOrders,
  stockMovements,
  stopPositions,
  stops,
  workshopSettings,
} from '../db/schema';
import { computeForecast, usableSection } from './forecast';
import { usableTrackRadius } from './rolled-distance';

/** Until the buyer saves settings: two weeks in the workshop, three rebuilds, 95 % service (common practice, no source). */
export const defaultWorkshopSettings: WorkshopSettingsInput = { turnaroundDays: 14, maxRebuilds: 3, serviceLevel: 0.95, boms: {} };

/** Demand source key of changes the forecast expects without a stop (real stop ids are UUIDs). */
const FORECAST_SOURCE = 'forecast';
const openStopStatuses = ['proposed', 'scheduled', 'in_progress'] as const;

export async function loadWorkshopSettings(tx: DbOrTx, projectId: string): Promise<WorkshopSettingsInput> {
  const [row] = await tx.select().from(workshopSettings).where(eq(workshopSettings.projectId, projectId));
  return row
    ? { turnaroundDays: row.turnaroundDays, maxRebuilds: row.maxRebuilds, serviceLevel: row.serviceLevel, boms: row.boms }
    : defaultWorkshopSettings;
}

/** The catalogue with stock on hand and on order, by code. */
export async function listCatalogue(tx: DbOrTx, projectId: string): Promise<CataloguePart[]> {
  const rows = await tx
    .select({
      part: parts,
      onHand: sql<number>`coalesce((select sum(m.qty) from stock_movements m where m.part_id = parts.id), 0)::int`,
      onOrder: sql<number>`coalesce((select sum(l.qty_ordered - l.qty_received) from purchase_order_lines l where l.part_id = parts.id), 0)::int`,
    })
    .from(parts)
    .where(eq(parts.projectId, projectId))
    .orderBy(asc(parts.code));
  return rows.map((r) => ({ ...r.part, unitCost: Number(r.part.unitCost), onHand: r.onHand, onOrder: r.onOrder }));
}

/** Order lines with quantity still to come. */
async function openOrderLines(tx: DbOrTx, projectId: string) {
  return tx
    .select({
      partId: purchaseOrderLines.partId,
      dueDate: purchaseOrderLines.dueDate,
      qty: sql<number>`${purchaseOrderLines.qtyOrdered} - ${purchaseOrderLines.qtyReceived}`,
    })
    .from(purchaseOrderLines)
    .innerJoin(purchaseOrders, eq(purchaseOrders.id, purchaseOrderLines.purchaseOrderId))
    .where(and(eq(purchaseOrders.projectId, projectId), gt(purchaseOrderLines.qtyOrdered, purchaseOrderLines.qtyReceived)));
}

/** A per-ground value, or the highest known one for unknown ground or a ground without a value (cautious). */
function perGround(byGround: Readonly<Record<string, number>>, groundTypeId: string | null): number {
  if (groundTypeId !== null && Object.hasOwn(byGround, groundTypeId)) return byGround[groundTypeId];
  const known = Object.values(byGround);
  return known.length > 0 ? Math.max(...known) : 0;
}

/** Demand per part and week over `weeks` weeks from `now`, with order suggestions at `serviceLevel` (default: the workshop setting). */
export async function computePartsDemand(
  tx: DbOrTx,
  projectId: string,
  now: Date,
  options: { weeks: number; serviceLevel?: number },
): Promise<PartsDemand<Date>> {
  const horizonWeeks = options.weeks;
  const [project] = await tx.select().from(projects).where(eq(projects.id, projectId));
  const settings = await loadWorkshopSettings(tx, projectId);
  const serviceLevel = options.serviceLevel ?? settings.serviceLevel;
  const z = serviceLevelZ(serviceLevel);
  const startDate = siteDay(now, project.siteTimeZone);
  const weekOf = (at: Date) => Math.max(0, weekIndexOf(siteDay(at, project.siteTimeZone), startDate));
  const problems: string[] = [];

  const catalogue = await listCatalogue(tx, projectId);
  const partById = new Map(catalogue.map((p) => [p.id, p]));
  const assemblies = catalogue.filter((p) => p.kind === 'cutter-assembly');
  const assemblyForSize = (discSizeIn: number) => assemblies.find((a) => a.discSizeIn === discSizeIn);

  // Workshop specs; an assembly without a bill of materials scraps every removed cutter (said as a problem).
  const bomCost = (outcome: RebuildOutcome) =>
    outcome === 'scrap' ? Infinity : outcome.reduce((s, l) => s + l.qty * (partById.get(l.partId)?.unitCost ?? 0), 0);
  const specs: CutterRebuildSpec[] = assemblies.map((a) => {
    const saved = settings.boms[a.id];
    if (!saved) problems.push(`The workshop settings have no bill of materials for ${a.code}: its removed cutters count as scrapped.`);
    const bomByCondition: Record<string, RebuildOutcome> = {};
    for (const c of ['worn', ...discConditions.map((d) => d.key)]) {
      const outcome = (saved as Record<string, RebuildOutcome> | undefined)?.[c] ?? 'scrap';
      bomByCondition[c] = outcome === 'scrap' ? 'scrap' : outcome.filter((l) => partById.has(l.partId));
    }
    return { assemblyPartId: a.id, bomByCondition, maxRebuilds: settings.maxRebuilds, turnaroundDays: settings.turnaroundDays };
  });
  const specOf = new Map(specs.map((s) => [s.assemblyPartId, s]));
  /** The condition that decides a removed cutter's outcome: scrap first, else the dearest bill of materials. */
  const worstCondition = (assemblyId: string, conditions: readonly string[]) => {
    const bom = specOf.get(assemblyId)!.bomByCondition;
    const known = (conditions.length > 0 ? conditions : ['worn']).filter((c) => bom[c] !== undefined);
    return known.sort((a, b) => bomCost(bom[b]) - bomCost(bom[a]))[0] ?? 'worn';
  };

  const forecast = await computeForecast(tx, projectId, now);
  problems.push(...forecast.problems);
  const positionRows = await tx
    .select({
      id: positions.id,
      number: positions.number,
      trackRadiusMm: positions.trackRadiusMm,
      positionClass: positions.positionClass,
      discSizeIn: positions.discSizeIn,
      twinDisc: positions.twinDisc,
      wearLimitMm: positions.wearLimitMm,
      rebuildCount: sql<
        number | null
      >`(select c.rebuild_count from fittings f join cutters c on c.id = f.cutter_id where f.position_id = positions.id and f.removed_at is null)`,
    })
    .from(positions)
    .where(eq(positions.projectId, projectId))
    .orderBy(asc(positions.number));
  const missingSizes = [...new Set(positionRows.map((p) => p.discSizeIn))].filter((s) => !assemblyForSize(s));
  for (const size of missingSizes)
    problems.push(`The catalogue has no ${size}″ cutter assembly: changes and failures of ${size}″ positions are not counted.`);

  // Expected advance and rolled km ahead; sudden failures and the wear of discs fitted at a change.
  const sections = await tx.select().from(geologySections).where(eq(geologySections.projectId, projectId));
  const advance =
    forecast.currentChainageM == null
      ? null
      : advanceAheadByWeek({
          currentChainageM: forecast.currentChainageM,
          direction: project.driveDirection,
          sections: sections
            .filter(usableSection) // the others are named by the forecast's problems
            .map((s) => ({ fromChainageM: s.chainageFromM, toChainageM: s.chainageToM, groundTypeId: s.groundTypeId })),
          penetrationMmPerRevByGround: forecast.driveRates.penetrationMmPerRevByGround,
          advanceMPerDayByGround: forecast.driveRates.advanceMPerDayByGround,
          weeks: horizonWeeks,
        });
  if (forecast.currentChainageM != null && !advance)
    problems.push('No advance or penetration is known yet: sudden failures and repeat changes are not forecast.');
  if (advance?.geologyEndsWeek != null)
    problems.push(`The mapped geology ends in week ${advance.geologyEndsWeek + 1}: no failures or repeat changes are forecast after it.`);
  const failuresPerKm: Record<string, number> = {};
  for (const f of forecast.wearFit.failures) if (f.ratePer1000Km != null) failuresPerKm[f.groundTypeId] = f.ratePer1000Km / 1000;
  const p50PerKm: Record<string, number> = Object.fromEntries(Object.entries(forecast.rates.byGround).map(([g, r]) => [g, r.p50MmPerKm]));
  const classFactor = (c: PositionClass) => forecast.rates.classFactors[c] ?? 1;

  const changes: ExpectedChange[] = [];
  const suddenFailures: ExpectedFailure[] = [];
  const rolledKmPerWeek = new Array<number>(horizonWeeks).fill(0);
  const suddenFailuresPerWeek = new Array<number>(horizonWeeks).fill(0);
  const firstChangeWeek = new Map<string, number>();
  const change = (week: number, positionId: string, source: string, priorRebuilds: number) => {
    const position = positionRows.find((p) => p.id === positionId)!;
    const assembly = assemblyForSize(position.discSizeIn);
    if (!assembly || week >= horizonWeeks) return;
    changes.push({
      week,
      assemblyPartId: assembly.id,
      count: 1,
      conditionMix: { [worstCondition(assembly.id, [])]: 1 },
      stopId: source,
      priorRebuilds,
    });
  };

  // Open stops: their positions change in the stop's week, or each at its own P90 date.
  const openStops = await tx
    .select({ stop: stops, positionId: stopPositions.positionId, positionNumber: positions.number })
    .from(stops)
    .innerJoin(stopPositions, eq(stopPositions.stopId, stops.id))
    .innerJoin(positions, eq(positions.id, stopPositions.positionId))
    .where(and(eq(stops.projectId, projectId), inArray(stops.status, [...openStopStatuses])))
    .orderBy(asc(stops.plannedStart), asc(stops.chainageM), asc(positions.number));
  const p90Of = new Map(forecast.positions.map((p) => [p.position.positionId, p.p90]));
  const demandStops = new Map<string, DemandStop<Date>>();
  for (const { stop, positionId, positionNumber } of openStops) {
    const dated = stop.status === 'in_progress' ? (stop.actualStart ?? stop.plannedStart ?? now) : stop.plannedStart;
    let ds = demandStops.get(stop.id);
    if (!ds) {
      const when = dated ? ` on ${siteDay(dated, project.siteTimeZone)}` : ' (no date yet: at the positions’ P90 dates)';
      ds = {
        id: stop.id,
        status: stop.status,
        chainageM: stop.chainageM,
        ringNumber: stop.ringNumber,
        plannedStart: dated,
        dateBasis: dated ? 'planned' : 'p90',
        positionNumbers: [],
        label: `Stop at ${formatChainage(stop.chainageM)}${stop.ringNumber != null ? ` (ring ${stop.ringNumber})` : ''}, ${stop.status.replace('_', ' ')}${when}`,
      };
      demandStops.set(stop.id, ds);
    }
    ds.positionNumbers.push(positionNumber);
    const p90 = p90Of.get(positionId);
    const at = dated ?? (p90 && p90.status !== 'beyond_known_ground' ? p90.date : null);
    if (!at) {
      problems.push(
        `Position ${positionNumber} is on the stop at ${formatChainage(stop.chainageM)}, which has no date, and the forecast gives it no change-out date: its change is not counted.`,
      );
      continue;
    }
    if (firstChangeWeek.has(positionId)) continue; // on two open stops: counted once, at the first
    const week = weekOf(at);
    firstChangeWeek.set(positionId, week);
    change(week, positionId, stop.id, positionRows.find((p) => p.id === positionId)?.rebuildCount ?? 0);
  }
  // Positions due by the forecast with no open stop covering them.
  for (const f of forecast.positions) {
    const id = f.position.positionId;
    if (firstChangeWeek.has(id) || openStops.some((s) => s.positionId === id) || f.p90.status === 'beyond_known_ground') continue;
    const week = weekOf(f.p90.date);
    if (week >= horizonWeeks) continue;
    firstChangeWeek.set(id, week);
    change(week, id, FORECAST_SOURCE, positionRows.find((p) => p.id === id)?.rebuildCount ?? 0);
  }

  const eventMix = (assemblyId: string) => {
    const mix: Record<string, number> = {};
    const events = forecast.wearFit.abnormalEvents;
    for (const e of events) {
      const worst = worstCondition(assemblyId, e.conditions);
      mix[worst] = (mix[worst] ?? 0) + 1 / events.length;
    }
    return mix;
  };
  if (advance) {
    for (const p of positionRows) {
      if (!usableTrackRadius(p.trackRadiusMm) || !(p.wearLimitMm > 0)) continue; // named by the forecast's problems
      const assembly = assemblyForSize(p.discSizeIn);
      const discs = p.twinDisc ? 2 : 1;
      const mix = assembly ? eventMix(assembly.id) : {};
      let wearMm = 0;
      advance.weeks.forEach((segments, week) => {
        rolledKmPerWeek[week] += discs * weightedRolledKm(segments, p.trackRadiusMm, () => 1);
        // A failure of either disc on a twin hub takes the whole assembly out.
        const failures = discs * weightedRolledKm(segments, p.trackRadiusMm, (g) => perGround(failuresPerKm, g));
        if (failures > 0 && assembly && Object.keys(mix).length > 0) {
          suddenFailuresPerWeek[week] += failures;
          suddenFailures.push({
            week,
            assemblyPartId: assembly.id,
            count: failures,
            conditionMix: mix,
            priorRebuilds: p.rebuildCount ?? 0,
          });
        }
        // Repeat changes: the disc fitted at the first change wears from the next week on at the central rate.
        const first = firstChangeWeek.get(p.id);
        if (first === undefined || week <= first || Object.keys(p50PerKm).length === 0) return;
        wearMm += classFactor(p.positionClass) * weightedRolledKm(segments, p.trackRadiusMm, (g) => perGround(p50PerKm, g));
        if (wearMm >= p.wearLimitMm) {
          change(week, p.id, FORECAST_SOURCE, 0);
          wearMm = 0;
        }
      });
    }
  }

  // Cutters in the workshop now come back after the turnaround, unless their condition or age scraps them.
  const inWorkshop = await tx.execute<{
    disc_size_in: number;
    rebuild_count: number;
    removed_at: Date | string;
    removal_conditions: string[] | null;
  }>(sql`
    select c.disc_size_in, c.rebuild_count, coalesce(f.removed_at, c.updated_at) as removed_at, f.removal_conditions
    from cutters c
    left join lateral (select removed_at, removal_conditions from fittings where cutter_id = c.id and removed_at is not null order by removed_at desc limit 1) f on true
    where c.project_id = ${projectId} and c.status = 'workshop'`);
  const rebuildsInProgress: RebuildInProgress[] = [];
  for (const c of inWorkshop.rows) {
    const assembly = assemblyForSize(c.disc_size_in);
    if (!assembly || c.rebuild_count >= settings.maxRebuilds) continue;
    if (specOf.get(assembly.id)!.bomByCondition[worstCondition(assembly.id, c.removal_conditions ?? [])] === 'scrap') continue;
    const ready = new Date(new Date(c.removed_at).getTime() + settings.turnaroundDays * 86_400_000);
    rebuildsInProgress.push({
      assemblyPartId: assembly.id,
      readyWeek: Math.max(0, weekIndexOf(siteDay(ready, project.siteTimeZone), startDate)),
      qty: 1,
    });
  }

  const openOrders: OpenOrder[] = (await openOrderLines(tx, projectId)).map((l) => ({
    partId: l.partId,
    dueWeek: weekIndexOf(l.dueDate, startDate),
    qty: l.qty,
  }));
  const projected = projectParts({
    startDate,
    horizonWeeks,
    parts: catalogue.map((p) => ({ partId: p.id, kind: p.kind, discSizeIn: p.discSizeIn ?? undefined })),
    onHand: Object.fromEntries(catalogue.map((p) => [p.id, p.onHand])),
    rebuildSpecs: specs,
    changes,
    suddenFailures,
    openOrders,
    rebuildsInProgress,
  });
  const weeks: DemandWeek[] = projected.map(({ demandSources, ...w }) => ({
    ...w,
    sources: demandSources.map((s) => ({
      kind: s.stopId === null ? 'failures' : s.stopId === FORECAST_SOURCE ? 'forecast' : 'stop',
      stopId: s.stopId === FORECAST_SOURCE ? null : s.stopId,
      qty: s.qty,
    })),
  }));

  const suggestions = catalogue.map((part) =>
    suggestionFor(
      part,
      weeks.filter((w) => w.partId === part.id),
      z,
    ),
  );
  return {
    now,
    startDate,
    horizonWeeks,
    serviceLevel,
    z,
    parts: catalogue,
    weeks,
    suggestions,
    stops: [...demandStops.values()],
    estimate: { rolledKmPerWeek, suddenFailuresPerWeek, geologyEndsWeek: advance?.geologyEndsWeek ?? null },
    problems,
  };
}

function addSources(into: DemandSource[], from: readonly DemandSource[]) {
  for (const s of from) {
    const same = into.find((x) => x.kind === s.kind && x.stopId === s.stopId);
    if (same) same.qty += s.qty;
    else into.push({ ...s });
  }
}

/**
 * The order suggestion of one part from its weekly rows (shared/domain/inventory.ts): every open
 * order counts, whatever its due date, so an order just placed always reduces the suggestion.
 */
function suggestionFor(part: CataloguePart, rows: DemandWeek[], z: number): OrderSuggestion {
  const leadTimeWeeks = part.leadTimeMeanDays / 7;
  const leadTimeSdWeeks = part.leadTimeSdDays / 7;
  const s = suggestOrderFromWeeks({
    weeks: rows,
    onHandUnits: part.onHand,
    openOrderUnits: part.onOrder,
    leadTimeWeeks,
    leadTimeSdWeeks,
    z,
    minOrderUnits: part.minOrderQty,
  });
  const mean = s.meanWeeklyDemand;
  const inWindow = rows.slice(0, s.windowWeeks);
  const shortage = rows.find((r) => r.projectedStock < -1e-9);
  const sources: DemandSource[] = [];
  for (const r of inWindow) addSources(sources, r.sources);
  return {
    partId: part.id,
    code: part.code,
    name: part.name,
    kind: part.kind,
    supplier: part.supplier,
    currency: part.currency,
    unitCost: part.unitCost,
    minOrderQty: part.minOrderQty,
    onHand: part.onHand,
    onOrder: part.onOrder,
    leadTimeWeeks,
    leadTimeSdWeeks,
    meanWeeklyDemand: mean,
    weeklyDemandSd: s.weeklyDemandSd,
    safetyStock: s.safetyStockUnits,
    reorderPoint: s.reorderPointUnits,
    leadTimeWindowWeeks: s.windowWeeks,
    leadTimeDemand: s.leadTimeDemandUnits,
    rebuildsWithinLeadTime: s.rebuildsBackUnits,
    inventoryPosition: s.inventoryPositionUnits,
    orderQty: s.orderUnits,
    orderNow: s.orderUnits > 0,
    orderValue: s.orderUnits * part.unitCost,
    weeksOfCover: mean > 1e-9 ? part.onHand / mean : null,
    firstShortageWeek: shortage?.week ?? null,
    firstShortageDate: shortage?.weekStartDate ?? null,
    sources: sources.filter((x) => x.qty > 1e-9),
  };
}

/** Words for where a suggestion's demand comes from, e.g. "Stop at 0+350.0 …: 4; forecast without a stop: 1.3". */
export function sourcesText(sources: readonly DemandSource[], stopsById: ReadonlyMap<string, DemandStop<Date>>): string {
  const qty = (q: number) => (Number.isInteger(q) ? String(q) : q.toFixed(1));
  return sources
    .map(
      (s) =>
        `${s.kind === 'stop' ? (stopsById.get(s.stopId!)?.label ?? 'a stop') : s.kind === 'forecast' ? 'positions due without a stop' : 'sudden failures'}: ${qty(s.qty)}`,
    )
    .join('; ');
}

/** The suggestion table as CSV rows (header first), for the export and the digest. */
export function suggestionsCsvRows(demand: PartsDemand<Date>): (string | number)[][] {
  const stopsById = new Map(demand.stops.map((s) => [s.id, s]));
  const round = (v: number, d = 2) => Number(v.toFixed(d));
  return [
    [
      'code',
      'name',
      'supplier',
      'on_hand',
      'on_order',
      'lead_time_weeks',
      'mean_weekly_demand',
      'safety_stock',
      'reorder_point',
      'lead_time_demand',
      'order_now',
      'order_qty',
      'unit_cost',
      'currency',
      'order_value',
      'first_shortage_week_starting',
      'demand_from',
    ],
    ...demand.suggestions.map((s) => [
      s.code,
      s.name,
      s.supplier,
      s.onHand,
      s.onOrder,
      round(s.leadTimeWeeks),
      round(s.meanWeeklyDemand),
      round(s.safetyStock),
      round(s.reorderPoint),
      round(s.leadTimeDemand),
      s.orderNow ? 'yes' : 'no',
      s.orderQty,
      round(s.unitCost),
      s.currency,
      round(s.orderValue),
      s.firstShortageDate ?? '',
      sourcesText(s.sources, stopsById),
    ]),
  ];
}

/** Stock on hand of one part (sum of movements), with the part row locked for the rest of the transaction. */
export async function lockPartStock(tx: DbOrTx, projectId: string, partId: string) {
  const [part] = await tx
    .select()
    .from(parts)
    .where(and(eq(parts.id, partId), eq(parts.projectId, projectId)))
    .for('update');
  if (!part) return null;
  const [{ onHand }] = await tx
    .select({ onHand: sql<number>`coalesce(sum(${stockMovements.qty}), 0)::int` })
    .from(stockMovements)
    .where(eq(stockMovements.partId, partId));
  return { part, onHand };
}
