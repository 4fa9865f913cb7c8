/**
 * Wear fit and change-out forecast of a project. `loadForecastData` reads everything from the
 * database (layout, geology, advance log, inspections with their exposures, fitted periods);
 * `buildWearFit` and `buildForecast` compute from that with the pure functions in shared/domain.
 * Computed on request, so a forecast always reflects the latest inspections, imports and geology
 * (DEVELOPERS.md, decision 12). The split lets the benchmark time reading and computing apart.
 */
import { and, asc, eq, sql } from 'drizzle-orm';
import { discConditions, type DiscCondition, type PositionClass } from '../../shared/cutters';
import { cautiousRates, relativeScatter, type CautiousRate } from '../../shared/domain/cautious-rates';
import { classifyCai } from '../../shared/domain/cerchar';
import {
  estimateDriveRates,
  forecastChangeOut,
  modelledWearSinceMm,
  type ChangeOutForecast,
  type WearRateSet,
} from '../../shared/domain/forecast';
import { gehringPriorRateMmPerKm } from '../../shared/domain/gehring-prior';
import { findSectionAt } from '../../shared/domain/geology';
import { fitWearRates, suddenFailureRatesPer1000Km, type NormalWearObservation, type WearFit } from '../../shared/domain/wear-fit';
import type { DbOrTx } from '../db/client';
import {
  entryRolledKm,
  fittingRolledKm,
  forecastSettings,
  geologySections,
  groundTypes,
  inspectionEntries,
  inspectionRounds,
  positions,
  projects,
  strokes,
} from '../db/schema';
import { buildForecastInWorker } from '../workers/pool';
import { refreshRolledDistance, UNKNOWN_GROUND, usableTrackRadius } from './rolled-distance';
import { formatChainage } from '../../shared/domain/chainage';

/** Whether a stored geology section can be walked: finite ends, the end after the start. */
export function usableSection(s: { chainageFromM: number; chainageToM: number }): boolean {
  return Number.isFinite(s.chainageFromM) && Number.isFinite(s.chainageToM) && s.chainageToM > s.chainageFromM;
}

export const defaultForecastSettings = {
  // Common practice, no source: centre discs roll slowly and wear a little less per km, gauge discs more.
  classFactors: { centre: 0.8, face: 1 as const, gauge: 1.5 },
  gehringSiteFactor: 1,
  priorStrength: 5,
  tipWidthMm: 19, // DOMAIN.md §4: about 19 mm on 17″ rings (common practice)
  overcutMarginMm: 20,
  windowStrokes: 30,
  overrides: {} as Record<string, { penetrationMmPerRev?: number; advanceMPerDay?: number }>,
};
export type ForecastSettings = typeof defaultForecastSettings;

/** Settings of the cautious rates (shared/domain/cautious-rates.ts; DEVELOPERS.md, decision 13). */
export const cautiousRateOptions = { probability: 0.9, minPredictedMm: 5, priorMargin: 0.5 };

const abnormalKeys = new Set<string>(discConditions.filter((c) => c.abnormal).map((c) => c.key));

export async function loadForecastSettings(tx: DbOrTx, projectId: string): Promise<ForecastSettings> {
  const [row] = await tx.select().from(forecastSettings).where(eq(forecastSettings.projectId, projectId));
  return row ? { ...defaultForecastSettings, ...row } : defaultForecastSettings;
}

/** Everything the wear fit and the forecast read, as plain data. */
export async function loadForecastData(tx: DbOrTx, projectId: string) {
  const settings = await loadForecastSettings(tx, projectId);
  const [project] = await tx.select().from(projects).where(eq(projects.id, projectId));
  const grounds = await tx.select().from(groundTypes).where(eq(groundTypes.projectId, projectId)).orderBy(asc(groundTypes.name));
  const sections = await tx.select().from(geologySections).where(eq(geologySections.projectId, projectId));
  const strokeRows = await tx
    .select({
      ringNumber: strokes.ringNumber,
      endTime: strokes.endTime,
      from: strokes.chainageStartM,
      to: strokes.chainageEndM,
      revolutions: strokes.revolutions,
      penetration: strokes.penetrationMmPerRev,
    })
    .from(strokes)
    .where(eq(strokes.projectId, projectId))
    .orderBy(asc(strokes.ringNumber));
  // Each inspection's rolled km per ground, aggregated once for the drive and joined (a correlated
  // subquery per inspection cost a probe per row: 16 ms of 3,266 on the demo drive; decision 45).
  const exposures = tx
    .select({
      entryId: entryRolledKm.entryId,
      exposure: sql<Record<string, number>>`jsonb_object_agg(${entryRolledKm.groundKey}, ${entryRolledKm.rolledKm})`.as('exposure'),
    })
    .from(entryRolledKm)
    .where(eq(entryRolledKm.projectId, projectId))
    .groupBy(entryRolledKm.entryId)
    .as('exposures');
  const inspections = await tx
    .select({
      entryId: inspectionEntries.id,
      wearMm: inspectionEntries.wearMm,
      conditions: inspectionEntries.conditions,
      positionClass: positions.positionClass,
      positionNumber: positions.number,
      at: inspectionRounds.startedAt,
      chainageM: inspectionRounds.chainageM,
      exposure: exposures.exposure,
    })
    .from(inspectionEntries)
    .innerJoin(positions, eq(positions.id, inspectionEntries.positionId))
    .innerJoin(inspectionRounds, eq(inspectionRounds.id, inspectionEntries.roundId))
    .leftJoin(exposures, eq(exposures.entryId, inspectionEntries.id))
    .where(and(eq(inspectionEntries.projectId, projectId), sql`${inspectionEntries.fittingId} is not null`));
  const kmByGroundTotal = await tx
    .select({ groundKey: fittingRolledKm.groundKey, km: sql<number>`sum(${fittingRolledKm.rolledKm})::float8` })
    .from(fittingRolledKm)
    .where(eq(fittingRolledKm.projectId, projectId))
    .groupBy(fittingRolledKm.groundKey);
  const current = await tx.execute<{
    position_id: string;
    number: number;
    position_class: PositionClass;
    track_radius_mm: number;
    twin_disc: boolean;
    wear_limit_mm: number;
    tilt_deg: number | null;
    disc_size_in: number;
    fitting_id: string | null;
    serial: string | null;
    fitted_chainage_m: number | null;
    last_entry_id: string | null;
    last_wear_mm: number | null;
    last_chainage_m: number | null;
    last_at: Date | null;
  }>(sql`
    select p.id as position_id, p.number, p.position_class, p.track_radius_mm, p.twin_disc, p.wear_limit_mm, p.tilt_deg, p.disc_size_in,
           f.id as fitting_id, c.serial, f.fitted_chainage_m, w.id as last_entry_id, w.wear_mm as last_wear_mm, w.chainage_m as last_chainage_m, w.started_at as last_at
    from positions p
    left join fittings f on f.position_id = p.id and f.removed_at is null
    left join cutters c on c.id = f.cutter_id
    left join lateral (
      select e.id, e.wear_mm, r.chainage_m, r.started_at from inspection_entries e join inspection_rounds r on r.id = e.round_id
      where e.fitting_id = f.id and e.wear_mm is not null and e.action = 'none'
      order by r.started_at desc, e.recorded_at desc limit 1
    ) w on true
    where p.project_id = ${projectId} order by p.number`);
  const rolled = await tx.execute<{ key: string; ground_key: string; km: number }>(sql`
    select f.fitting_id::text as key, f.ground_key, f.rolled_km as km from fitting_rolled_km f
      join fittings x on x.id = f.fitting_id where f.project_id = ${projectId} and x.removed_at is null
    union all
    select k.entry_id::text, k.ground_key, k.rolled_km from entry_rolled_km k
      join (select distinct on (e.position_id) e.id from inspection_entries e join inspection_rounds r on r.id = e.round_id
            where e.project_id = ${projectId} and e.wear_mm is not null and e.action = 'none'
            order by e.position_id, r.started_at desc, e.recorded_at desc) latest on latest.id = k.entry_id`);
  return {
    settings,
    project,
    grounds,
    sections,
    strokes: strokeRows,
    inspections,
    kmByGroundTotal,
    positions: current.rows,
    rolled: rolled.rows,
  };
}
export type ForecastData = Awaited<ReturnType<typeof loadForecastData>>;

export interface WearFitReport {
  fit: WearFit;
  grounds: { id: string; name: string; cai: number | null; caiClass: ReturnType<typeof classifyCai> | null; priorMmPerKm: number | null }[];
  failures: ReturnType<typeof suddenFailureRatesPer1000Km>;
  abnormalEvents: { entryId: string; at: Date; positionNumber: number; conditions: DiscCondition[]; chainageM: number }[];
  observations: NormalWearObservation[];
  ringDiameterMm: number;
}

/** The wear fit: site observations (normal wear), Gehring priors per ground, sudden-failure rates. */
export function buildWearFit(data: ForecastData): WearFitReport {
  const { settings, grounds } = data;
  const sizes = data.positions.map((p) => p.disc_size_in);
  const commonSize = [...sizes].sort((a, b) => sizes.filter((s) => s === b).length - sizes.filter((s) => s === a).length)[0] ?? 17;
  const ringDiameterMm = commonSize * 25.4;
  const priors: Record<string, number> = {};
  for (const g of grounds) {
    // A site factor of 0 (refused since, maybe stored before) would make a 0 mm/km prior: no prior then.
    if (g.cai != null && settings.gehringSiteFactor > 0)
      priors[g.id] = gehringPriorRateMmPerKm({
        cai: g.cai,
        ringDiameterMm,
        tipWidthMm: settings.tipWidthMm,
        siteFactor: settings.gehringSiteFactor,
      });
  }
  const observations: NormalWearObservation[] = [];
  const abnormalEvents: WearFitReport['abnormalEvents'] = [];
  const eventsByGround: Record<string, number> = {};
  for (const r of data.inspections) {
    const exposure = Object.fromEntries(Object.entries(r.exposure ?? {}).filter(([k, km]) => k !== UNKNOWN_GROUND && km > 0));
    if (r.conditions.some((c) => abnormalKeys.has(c))) {
      abnormalEvents.push({
        entryId: r.entryId,
        at: r.at,
        positionNumber: r.positionNumber,
        conditions: r.conditions,
        chainageM: r.chainageM,
      });
      // Counted in the ground the disc rolled most in since it was fitted (DEVELOPERS.md, decision 13).
      const main = Object.entries(exposure).sort((a, b) => b[1] - a[1])[0]?.[0];
      if (main) eventsByGround[main] = (eventsByGround[main] ?? 0) + 1;
      continue;
    }
    if (r.wearMm == null || Object.keys(exposure).length === 0) continue;
    observations.push({ wearMm: r.wearMm, positionClass: r.positionClass, rolledKmByGround: exposure });
  }
  const fit = fitWearRates(observations, {
    classFactors: settings.classFactors,
    prior: Object.keys(priors).length > 0 ? { rateMmPerKmByGround: priors, strengthObservations: settings.priorStrength } : undefined,
  });
  const kmByGround = Object.fromEntries(data.kmByGroundTotal.filter((t) => t.groundKey !== UNKNOWN_GROUND).map((t) => [t.groundKey, t.km]));
  return {
    fit,
    grounds: grounds.map((g) => ({
      id: g.id,
      name: g.name,
      cai: g.cai,
      caiClass: g.cai == null ? null : classifyCai(g.cai),
      priorMmPerKm: priors[g.id] ?? null,
    })),
    failures: suddenFailureRatesPer1000Km(kmByGround, eventsByGround),
    abnormalEvents,
    observations,
    ringDiameterMm,
  };
}

/** Rates the forecast walks with: P50 and cautious P90 per ground (each saying where its P90 comes from), and the disc scatter. */
export type ForecastRates = WearRateSet & { byGround: Record<string, CautiousRate>; relativeScatter: number | null };

/** P50 and cautious P90 rates per ground for the forecast, with the disc scatter they rest on. */
export function forecastRates(report: WearFitReport): ForecastRates {
  const { fit, observations } = report;
  const rate = new Map(fit.rates.map((r) => [r.groundTypeId, r.rateMmPerKm]));
  const scatter = relativeScatter(
    observations.map((o) => ({
      measuredMm: o.wearMm,
      predictedMm:
        fit.classFactors[o.positionClass] * Object.entries(o.rolledKmByGround).reduce((sum, [g, km]) => sum + (rate.get(g) ?? 0) * km, 0),
    })),
    cautiousRateOptions.minPredictedMm,
  );
  return { byGround: cautiousRates(fit, scatter, cautiousRateOptions), classFactors: { ...fit.classFactors }, relativeScatter: scatter };
}

export interface PositionForecast extends ChangeOutForecast {
  serial: string | null;
  lastMeasuredAt: Date | null;
}

export interface ProjectForecast {
  now: Date;
  currentChainageM: number | null;
  currentRingNumber: number | null;
  rates: ForecastRates;
  driveRates: ReturnType<typeof estimateDriveRates>;
  positions: PositionForecast[];
  problems: string[];
  wearFit: WearFitReport;
}

/** The change-out forecast of every position, walking the geology ahead of the machine. */
export function buildForecast(data: ForecastData, now: Date): ProjectForecast {
  const { settings, project } = data;
  const wearFit = buildWearFit(data);
  const rates = forecastRates(wearFit);
  const domainSections = data.sections.map((s) => ({ ...s, stopReason: s.stopReason || null }));
  const driveRates = estimateDriveRates(
    data.strokes.map((s) => ({
      endedAt: s.endTime,
      fromChainageM: s.from,
      toChainageM: s.to,
      cutterheadRevolutions: s.revolutions,
      penetrationMmPerRev: s.penetration,
      groundTypeId: findSectionAt(domainSections, (s.from + s.to) / 2)?.groundTypeId ?? null,
    })),
    settings.overrides,
    settings.windowStrokes,
  );
  const last = data.strokes.at(-1);
  const problems: string[] = [];
  const base = { now, currentChainageM: last?.to ?? null, currentRingNumber: last?.ringNumber ?? null, rates, driveRates, wearFit };
  if (!last) return { ...base, positions: [], problems: ['No advance log yet: import the machine’s strokes to forecast.'] };
  if (Object.keys(rates.byGround).length === 0)
    return { ...base, positions: [], problems: ['No wear rate yet: give the ground types a CAI or record inspections.'] };
  if (Object.keys(driveRates.penetrationMmPerRevByGround).length === 0)
    return { ...base, positions: [], problems: ['No penetration known yet: the advance log has no strokes in mapped ground.'] };

  const km = new Map<string, Record<string, number>>();
  for (const r of data.rolled) km.set(r.key, { ...km.get(r.key), [r.ground_key]: r.km });
  // A stored section that ends where (or before) it starts cannot be walked: left out and named.
  for (const s of data.sections.filter((x) => !usableSection(x)))
    problems.push(
      `The geology section from ${formatChainage(s.chainageFromM)} to ${formatChainage(s.chainageToM)} has no length: it is left out of the forecast and the parts demand. Correct it in the drive data.`,
    );
  const geology = data.sections
    .filter(usableSection)
    .map((s) => ({ fromChainageM: s.chainageFromM, toChainageM: s.chainageToM, groundTypeId: s.groundTypeId }));
  const result: PositionForecast[] = [];
  for (const p of data.positions) {
    if (!p.fitting_id) {
      problems.push(`Position ${p.number} has no cutter fitted.`);
      continue;
    }
    // Stored values no computation can use: the position is skipped and named, never a 500 for the whole page.
    const unusable = [
      !usableTrackRadius(p.track_radius_mm) && `a track radius of ${p.track_radius_mm} mm`,
      !(p.wear_limit_mm > 0) && `a wear limit of ${p.wear_limit_mm} mm`,
    ].filter((x): x is string => !!x);
    if (unusable.length > 0) {
      problems.push(
        `Position ${p.number} has ${unusable.join(' and ')}, which no computation can use: it is left out of the forecast and the parts demand. Correct it in the cutterhead layout.`,
      );
      continue;
    }
    const sinceFit = km.get(p.fitting_id) ?? {};
    const atEntry = p.last_entry_id ? (km.get(p.last_entry_id) ?? {}) : {};
    const since = Object.entries(sinceFit).map(([g, total]) => ({
      groundTypeId: g === UNKNOWN_GROUND ? null : g,
      rolledKm: Math.max(0, total - (atEntry[g] ?? 0)),
    }));
    const modelled = modelledWearSinceMm(since, rates, p.position_class);
    let forecast: ReturnType<typeof forecastChangeOut>;
    try {
      forecast = forecastChangeOut({
        position: {
          positionId: p.position_id,
          positionNumber: p.number,
          positionClass: p.position_class,
          trackRadiusMm: p.track_radius_mm,
          discsPerPosition: p.twin_disc ? 2 : 1,
          allowableWearMm: p.wear_limit_mm,
          gaugeTiltDeg: p.position_class === 'gauge' ? (p.tilt_deg ?? 0) : null,
        },
        wearNow: {
          lastMeasuredWearMm: p.last_wear_mm ?? 0,
          measuredAtChainageM: p.last_chainage_m ?? p.fitted_chainage_m ?? last.to,
          modelledSinceMm: modelled.wearMm,
        },
        currentChainageM: last.to,
        currentRingNumber: last.ringNumber,
        ringLengthM: project.ringLengthM,
        driveDirection: project.driveDirection,
        geology,
        rates,
        penetrationMmPerRevByGround: driveRates.penetrationMmPerRevByGround,
        advanceMPerDayByGround: driveRates.advanceMPerDayByGround,
        overcutMarginMm: settings.overcutMarginMm,
        now,
      });
    } catch (err) {
      if (!(err instanceof RangeError)) throw err;
      problems.push(`Position ${p.number} is left out of the forecast and the parts demand: ${err.message}.`);
      continue;
    }
    result.push({ ...forecast, serial: p.serial, lastMeasuredAt: p.last_at });
  }
  result.sort((a, b) => a.p90.remainingM - b.p90.remainingM || a.position.positionNumber - b.position.positionNumber);
  return { ...base, positions: result, problems };
}

/** Brings rolled distances up to date, reads, and computes the forecast. */
export async function computeForecast(tx: DbOrTx, projectId: string, now: Date): Promise<ProjectForecast> {
  await refreshRolledDistance(tx, projectId);
  // Computed in a worker thread: a large drive's forecast must not stall other requests (decision 43).
  return buildForecastInWorker(await loadForecastData(tx, projectId), now);
}

/** Brings rolled distances up to date, reads, and computes the wear fit. */
export async function computeWearFit(tx: DbOrTx, projectId: string): Promise<WearFitReport> {
  await refreshRolledDistance(tx, projectId);
  return buildWearFit(await loadForecastData(tx, projectId));
}
