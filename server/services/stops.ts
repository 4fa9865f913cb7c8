/**
 * Intervention stops: the plan (where to stop and what to change, from the forecast and the long
 * section), and the work pack of a stop (what to change, which serials to take from the store, the
 * parts kit, the crew, the cautions). The pure optimiser is shared/domain/stop-planner.ts.
 */
import { and, asc, desc, eq, inArray, isNull, sql } from 'drizzle-orm';
import { CUTTERHEAD_ENTRY_CAUTION } from '../../shared/cautions';
import { aheadM, chainageAhead, formatChainage, ringAtAhead } from '../../shared/domain/chainage';
import { COMPRESSED_AIR_CAUTION, needsCompressedAir, workingPressureFromHead } from '../../shared/domain/compressed-air';
import type { PositionClass } from '../../shared/domain/forecast';
import {
  buildStopPlanInput,
  expectedAtAhead,
  knownGroundAheadM,
  PLACE_EPS_M,
  stopPlaceAt,
  type DriveGeology,
} from '../../shared/domain/stop-plan-input';
import type { StopPlan, StopPlanInput } from '../../shared/domain/stop-planner';
import { planStopsInWorker } from '../workers/pool';
import { partsKit } from '../../shared/domain/work-pack';
import type { PlanView, StopPlanQuery, StopPlanSettings, StopPlanView, StopStatus } from '../../shared/schemas/stop';
import type { DbOrTx } from '../db/client';
import {
  crewMembers,
  crews,
  cutters,
  fittings,
  geologySections,
  groundTypes,
  inspectionRounds,
  positions,
  projects,
  stopPositions,
  stops,
  strokes,
} from '../db/schema';
import { NotFoundError } from '../lib/errors';
import { computeForecast } from './forecast';

/**
 * The plan's assumptions. Common practice, no source; site-adjustable (every one can be overridden
 * per request): plan 2 km ahead; a stop costs 6 h in free air and 14 h in compressed air (locking
 * in and out, slower work); changing one cutter takes 1.5 h at the centre (twin hubs), 1.0 h on
 * the face and 1.25 h at the gauge; each mm of allowable wear thrown away by an early change is
 * charged 0.2 h of boring time (the price of ring life turned into hours).
 */
/** States the exact stop search may expand in one request (about 1–2 s on the project’s 2-core machine). */
export const PLANNER_MAX_STATES = 3_000;
/** Steps of the lower bound per request (about 1.5 s on the demo drive; `npm run bench`; DEVELOPERS.md, decision 48). */
export const PLANNER_BOUND_ITERATIONS = 600;
/** Milliseconds of local search over stop sets when the plan is not proven (DEVELOPERS.md, decision 48). */
export const PLANNER_LOCAL_SEARCH_MS = 500;
/** Milliseconds for the stronger bound (Lagrangian decomposition) when the plan is not proven; demo drive: gap ≈ 22 % → 16 % (DEVELOPERS.md, decision 48). */
export const PLANNER_STRONG_BOUND_MS = 1_500;
/**
 * The planner's answer is due this many milliseconds after it starts: the stronger bound and the
 * local search end by then, so a request (forecast first, then the plan) answers within 5 s on
 * the demo drive (`npm run bench`; DEVELOPERS.md, decision 50).
 */
export const PLANNER_ANSWER_WITHIN_MS = 3_800;
/**
 * The planner's fixed-work steps (search passes, bound) are cut this many milliseconds after it
 * starts, and the plan says so: reached only by inputs far larger than the settings above were
 * sized for, such as a 20 km horizon at every ring (decision 50).
 */
export const PLANNER_WORK_LIMIT_MS = 8_000;

export const defaultStopPlanSettings = {
  horizonM: 2000,
  freeAirStopH: 6,
  compressedAirStopH: 14,
  changeHByClass: { centre: 1.5, face: 1.0, gauge: 1.25 } as Record<PositionClass, number>,
  wastedRingLifeHPerMm: 0.2,
  /** Site-practice rule: change every disc past 80 % of its limit at a stop (common practice, no source). */
  practiceChangeSharePercent: 80,
  /** Fixed-interval rule: a stop every 250 m (common practice, no source). */
  fixedIntervalM: 250,
};

/** Chainage tolerance, m: absorbs rounding when a stop is matched to a plan place. */
const EPS_M = PLACE_EPS_M;

/** Indicative working pressure (bar) from the water head; null where there is no head above the axis. */
const pressureBar = (waterHeadM: number | null) =>
  waterHeadM != null && waterHeadM > 0 ? workingPressureFromHead(waterHeadM).pressureBar : null;

export type ProjectStopPlan = StopPlanView<Date>;

/** The cautions of work in the cutterhead, and of compressed air when it is needed. */
export const stopCautions = (compressedAir: boolean) =>
  compressedAir ? [CUTTERHEAD_ENTRY_CAUTION, COMPRESSED_AIR_CAUTION] : [CUTTERHEAD_ENTRY_CAUTION];

const openStatuses: StopStatus[] = ['proposed', 'scheduled', 'in_progress'];

/** The project's settings with the request's overrides. */
function planSettings(project: { compressedAirAboveHeadM: number }, overrides: StopPlanQuery): StopPlanSettings {
  const d = defaultStopPlanSettings;
  return {
    horizonM: overrides.horizonM ?? d.horizonM,
    freeAirStopH: overrides.freeAirStopH ?? d.freeAirStopH,
    compressedAirStopH: overrides.compressedAirStopH ?? d.compressedAirStopH,
    changeHByClass: {
      centre: overrides.changeHCentre ?? d.changeHByClass.centre,
      face: overrides.changeHFace ?? d.changeHByClass.face,
      gauge: overrides.changeHGauge ?? d.changeHByClass.gauge,
    },
    wastedRingLifeHPerMm: overrides.wastedRingLifeHPerMm ?? d.wastedRingLifeHPerMm,
    compressedAirAboveHeadM: overrides.compressedAirAboveHeadM ?? project.compressedAirAboveHeadM,
    practiceChangeSharePercent: overrides.practiceChangeSharePercent ?? d.practiceChangeSharePercent,
    fixedIntervalM: overrides.fixedIntervalM ?? d.fixedIntervalM,
  };
}

/** What a stop plan is built from: the project, its settings with the request's overrides, the forecast and the geology. */
async function planContext(tx: DbOrTx, projectId: string, now: Date, overrides: StopPlanQuery) {
  const [project] = await tx.select().from(projects).where(eq(projects.id, projectId));
  if (!project) throw new NotFoundError('That project');
  const settings = planSettings(project, overrides);
  const forecast = await computeForecast(tx, projectId, now);
  const geology = await loadDriveGeology(tx, project);
  return { project, settings, forecast, geology };
}

/**
 * The planner's input exactly as planForProject builds it (before any shortening for an
 * infeasible horizon), or null when there is nothing to plan: for the bench's relaxation figures.
 */
export async function stopPlanInputFor(
  tx: DbOrTx,
  projectId: string,
  now: Date,
  overrides: StopPlanQuery = {},
): Promise<StopPlanInput | null> {
  const { settings, forecast, geology } = await planContext(tx, projectId, now, overrides);
  if (forecast.currentChainageM == null || forecast.positions.length === 0) return null;
  if (knownGroundAheadM(geology, forecast.currentChainageM) <= 0) return null;
  return buildStopPlanInput(forecast, geology, settings);
}

async function loadDriveGeology(tx: DbOrTx, project: typeof projects.$inferSelect): Promise<DriveGeology> {
  const sections = await tx
    .select()
    .from(geologySections)
    .where(eq(geologySections.projectId, project.id))
    .orderBy(asc(geologySections.chainageFromM));
  return { sections, ringLengthM: project.ringLengthM, direction: project.driveDirection };
}

/**
 * The optimised stop plan of a project against the hand plan, each stop with its chainage, ring,
 * compressed-air flag and indicative working pressure, the positions changed there with their
 * expected (P90) wear, and the cautions.
 */
export async function planForProject(tx: DbOrTx, projectId: string, now: Date, overrides: StopPlanQuery = {}): Promise<ProjectStopPlan> {
  const { settings, forecast, geology } = await planContext(tx, projectId, now, overrides);
  const empty: ProjectStopPlan = {
    now,
    currentChainageM: forecast.currentChainageM,
    currentRingNumber: forecast.currentRingNumber,
    settings,
    horizonEndChainageM: null,
    candidatePlaceCount: 0,
    longSection: [],
    compressedAirAboveHeadM: settings.compressedAirAboveHeadM,
    problems: [...forecast.problems],
    infeasible: [],
    optimised: null,
    certificate: null,
    practice: null,
    fixedInterval: null,
    savingVsPracticeH: null,
    savingVsIntervalH: null,
    cautions: [CUTTERHEAD_ENTRY_CAUTION],
  };
  if (forecast.currentChainageM == null || forecast.positions.length === 0) return empty;
  const knownM = knownGroundAheadM(geology, forecast.currentChainageM);
  if (knownM <= 0)
    return { ...empty, problems: [...empty.problems, 'No geology is known ahead of the machine: import the long section to plan stops.'] };
  const fullInput = buildStopPlanInput(forecast, geology, settings);
  const problems0: string[] = [];
  const byId = new Map(forecast.positions.map((p) => [p.position.positionId, p.position]));
  // The exact search can grow fast on abrasive ground; a request must answer in seconds, so the
  // server caps it (DEVELOPERS.md, decision 24) and says when the plan is not proven cheapest.
  const options = {
    maxStates: PLANNER_MAX_STATES,
    boundIterations: PLANNER_BOUND_ITERATIONS,
    localSearchMs: PLANNER_LOCAL_SEARCH_MS,
    strongBoundMs: PLANNER_STRONG_BOUND_MS,
    answerWithinMs: PLANNER_ANSWER_WITHIN_MS,
    workLimitMs: PLANNER_WORK_LIMIT_MS,
    rules: { changeShare: settings.practiceChangeSharePercent / 100, intervalM: settings.fixedIntervalM },
  };
  const first = await planStopsInWorker(fullInput, options);
  const infeasible = first.feasible
    ? []
    : first.problems
        .map((p) => ({
          positionId: p.positionId,
          positionNumber: byId.get(p.positionId)!.positionNumber,
          dueChainageM: p.dueChainageM,
          reason: p.reason,
        }))
        .sort((a, b) => a.positionNumber - b.positionNumber);
  // When no plan covers the horizon, plan up to the first point no plan can pass: the crews still
  // need the stops before it, and the problem is shown beside them.
  const reachM = first.feasible ? fullInput.horizonM : Math.min(...first.problems.map((p) => p.dueAheadM)) - 1e-3;
  const input = first.feasible ? fullInput : { ...fullInput, horizonM: reachM };
  const result = first.feasible ? first : reachM > 0 ? await planStopsInWorker(input, options) : first;
  const horizonEndChainageM = chainageAhead(forecast.currentChainageM, Math.max(0, input.horizonM), geology.direction);
  const problems = [...empty.problems, ...problems0];
  if (knownM < settings.horizonM)
    problems.push(
      `The long section ends ${knownM.toFixed(0)} m ahead of the machine: the plan stops there, short of the ${settings.horizonM} m horizon.`,
    );
  if (infeasible.length > 0) {
    problems.push(
      `No plan keeps position${infeasible.length === 1 ? '' : 's'} ${infeasible.map((p) => p.positionNumber).join(', ')} within the cautious wear limit ` +
        `past ${formatChainage(horizonEndChainageM)} (why, below). ` +
        (result.feasible
          ? 'The plan stops short of that point; decide with the site how to pass it.'
          : 'Decide with the site how to pass it.'),
    );
  }
  const candidatePlaceCount = input.stopPlaces.filter(
    (p) => aheadM(forecast.currentChainageM!, p.chainageM, geology.direction) <= input.horizonM,
  ).length;
  const names = new Map(
    (await tx.select({ id: groundTypes.id, name: groundTypes.name }).from(groundTypes).where(eq(groundTypes.projectId, projectId))).map(
      (g) => [g.id, g.name],
    ),
  );
  const [lowM, highM] = [
    Math.min(forecast.currentChainageM, horizonEndChainageM),
    Math.max(forecast.currentChainageM, horizonEndChainageM),
  ];
  const longSection = geology.sections
    .filter((s) => s.chainageToM > lowM && s.chainageFromM < highM)
    .map((s) => ({
      chainageFromM: Math.max(s.chainageFromM, lowM),
      chainageToM: Math.min(s.chainageToM, highM),
      groundName: s.groundTypeId ? (names.get(s.groundTypeId) ?? null) : null,
      waterHeadM: s.waterHeadM,
      stopAllowed: s.stopAllowed,
      stopReason: s.stopReason,
    }));
  const base = { ...empty, horizonEndChainageM, candidatePlaceCount, longSection, problems, infeasible };
  if (!result.feasible) return base;

  const open = await tx
    .select({ id: stops.id, chainageM: stops.chainageM })
    .from(stops)
    .where(and(eq(stops.projectId, projectId), inArray(stops.status, openStatuses)));
  const view = (plan: StopPlan | null): PlanView | null =>
    plan && {
      cost: plan.cost,
      stops: plan.stops.map((s) => {
        const { waterHeadM } = stopPlaceAt(geology.sections, s.chainageM);
        return {
          chainageM: s.chainageM,
          aheadM: s.aheadM,
          ringNumber: ringAtAhead(forecast.currentRingNumber!, s.aheadM, geology.ringLengthM),
          compressedAir: s.compressedAir,
          waterHeadM,
          workingPressureBar: pressureBar(waterHeadM),
          stopH: s.stopH,
          changeH: s.changeH,
          wastedRingLifeH: s.wastedRingLifeH,
          changes: s.changes
            .map((c) => {
              const p = byId.get(c.positionId)!;
              return {
                positionId: c.positionId,
                positionNumber: p.positionNumber,
                positionClass: p.positionClass,
                limitMm: p.allowableWearMm,
                wearAtChangeMm: c.wearAtChangeMm,
                unusedWearMm: c.unusedWearMm,
              };
            })
            .sort((a, b) => a.positionNumber - b.positionNumber),
          existingStopId: open.find((o) => Math.abs(o.chainageM - s.chainageM) < EPS_M)?.id ?? null,
          expectedAt: expectedAtAhead(forecast, geology, s.aheadM)?.toISOString() ?? null,
        };
      }),
    };
  const optimised = view(result.optimised)!;
  const practice = view(result.practice);
  const fixedInterval = view(result.fixedInterval);
  const { certificate } = result;
  return {
    ...base,
    optimised,
    certificate: {
      proven: certificate.proven,
      gapPercent: 100 * certificate.gap,
      lowerBoundH: certificate.lowerBoundH,
      cutAfterS: certificate.cutForTime ? PLANNER_WORK_LIMIT_MS / 1000 : null,
    },
    practice,
    fixedInterval,
    savingVsPracticeH: practice && practice.cost.totalH - optimised.cost.totalH,
    savingVsIntervalH: fixedInterval && fixedInterval.cost.totalH - optimised.cost.totalH,
    cautions: stopCautions([optimised, practice, fixedInterval].some((p) => p?.stops.some((s) => s.compressedAir))),
  };
}

/** Where the machine stands: the end of the last stroke, and its ring; null before the first stroke. */
export async function machinePosition(tx: DbOrTx, projectId: string): Promise<{ chainageM: number; ringNumber: number } | null> {
  const [last] = await tx
    .select({ chainageM: strokes.chainageEndM, ringNumber: strokes.ringNumber })
    .from(strokes)
    .where(eq(strokes.projectId, projectId))
    .orderBy(desc(strokes.ringNumber))
    .limit(1);
  return last ?? null;
}

/** Where a new stop at `chainageM` stands: whether the ground allows it, its ring, water head and pressure. */
export async function describeStopPlace(tx: DbOrTx, project: typeof projects.$inferSelect, chainageM: number) {
  const geology = await loadDriveGeology(tx, project);
  const place = stopPlaceAt(geology.sections, chainageM);
  const machine = await machinePosition(tx, project.id);
  const ahead = machine ? aheadM(machine.chainageM, chainageM, geology.direction) : null;
  return {
    ...place,
    machine,
    aheadM: ahead,
    // The stop lies in the ring during whose stroke the machine reaches it (as in the forecast).
    ringNumber: machine && ahead != null && ahead >= 0 ? ringAtAhead(machine.ringNumber, ahead, project.ringLengthM) : null,
    workingPressureBar: pressureBar(place.waterHeadM),
  };
}

/**
 * Where the nightly job proposes a stop for positions due `dueAheadM` metres ahead: the last ring
 * boundary at or before that point where a stop is allowed (the planner's candidate places, the
 * rule of `stopPlaceAt`), walking back towards the machine; the machine's own place when there is
 * none. With its ring, water head, compressed air (the site's rule) and working pressure; null
 * before the first stroke.
 */
export async function proposalStopPlace(tx: DbOrTx, project: typeof projects.$inferSelect, dueAheadM: number) {
  const machine = await machinePosition(tx, project.id);
  if (!machine) return null;
  const geology = await loadDriveGeology(tx, project);
  let chainageM = machine.chainageM;
  for (let k = Math.floor(Math.max(0, dueAheadM) / project.ringLengthM + 1e-9); k >= 0; k--) {
    const at = chainageAhead(machine.chainageM, k * project.ringLengthM, project.driveDirection);
    if (stopPlaceAt(geology.sections, at).allowed) {
      chainageM = at;
      break;
    }
  }
  const place = await describeStopPlace(tx, project, chainageM);
  return {
    ...place,
    chainageM,
    compressedAir: needsCompressedAir(place.waterHeadM ?? 0, { headAboveAxisM: project.compressedAirAboveHeadM }),
  };
}

const hoursBetween = (from: Date | null, to: Date | null) => (from && to ? (to.getTime() - from.getTime()) / 3_600_000 : null);

/**
 * The work pack of a stop: the positions to change with their expected wear and the serial on each
 * now, the serials to take from the store (for an open stop: cutters in store of the matching disc
 * size, as many as positions, fewest rebuilds first, then the longest in store), any shortage, the
 * parts kit, the crew, the linked inspection round and the cautions.
 */
export async function loadWorkPack(tx: DbOrTx, projectId: string, stopId: string) {
  const [stop] = await tx
    .select()
    .from(stops)
    .where(and(eq(stops.id, stopId), eq(stops.projectId, projectId)));
  if (!stop) throw new NotFoundError('That stop');
  const changes = await tx
    .select({
      positionId: positions.id,
      number: positions.number,
      positionClass: positions.positionClass,
      trackRadiusMm: positions.trackRadiusMm,
      discSizeIn: positions.discSizeIn,
      twinDisc: positions.twinDisc,
      wearLimitMm: positions.wearLimitMm,
      expectedWearMm: stopPositions.expectedWearMm,
      fittedSerial: cutters.serial,
    })
    .from(stopPositions)
    .innerJoin(positions, eq(positions.id, stopPositions.positionId))
    .leftJoin(fittings, and(eq(fittings.positionId, positions.id), isNull(fittings.removedAt)))
    .leftJoin(cutters, eq(cutters.id, fittings.cutterId))
    .where(eq(stopPositions.stopId, stopId))
    .orderBy(asc(positions.number));

  const bySize = new Map<number, number>();
  for (const c of changes) bySize.set(c.discSizeIn, (bySize.get(c.discSizeIn) ?? 0) + 1);
  const isOpen = openStatuses.includes(stop.status);
  const inStore =
    isOpen && bySize.size > 0
      ? await tx
          .select({ cutterId: cutters.id, serial: cutters.serial, discSizeIn: cutters.discSizeIn, rebuildCount: cutters.rebuildCount })
          .from(cutters)
          .where(and(eq(cutters.projectId, projectId), eq(cutters.status, 'in_store'), inArray(cutters.discSizeIn, [...bySize.keys()])))
          .orderBy(asc(cutters.rebuildCount), asc(cutters.createdAt), asc(cutters.serial))
      : [];
  const storeSerials = [...bySize.entries()].flatMap(([size, n]) => inStore.filter((c) => c.discSizeIn === size).slice(0, n));
  const shortages = isOpen
    ? [...bySize.entries()]
        .map(([discSizeIn, needed]) => ({ discSizeIn, needed, inStore: inStore.filter((c) => c.discSizeIn === discSizeIn).length }))
        .filter((s) => s.inStore < s.needed)
    : [];

  const [crew] = stop.crewId ? await tx.select({ id: crews.id, name: crews.name }).from(crews).where(eq(crews.id, stop.crewId)) : [];
  const members = crew
    ? await tx
        .select({ name: crewMembers.name, email: crewMembers.email, userId: crewMembers.userId })
        .from(crewMembers)
        .where(eq(crewMembers.crewId, crew.id))
        .orderBy(asc(crewMembers.name))
    : [];
  const [round] = stop.roundId
    ? await tx
        .select({
          id: inspectionRounds.id,
          startedAt: inspectionRounds.startedAt,
          chainageM: inspectionRounds.chainageM,
          ringNumber: inspectionRounds.ringNumber,
        })
        .from(inspectionRounds)
        .where(eq(inspectionRounds.id, stop.roundId))
    : [];

  return {
    stop: { ...stop, actualHours: hoursBetween(stop.actualStart, stop.actualEnd) },
    positions: changes,
    storeSerials,
    shortages,
    partsKit: partsKit(bySize),
    crew: crew ? { ...crew, members } : null,
    round: round ?? null,
    cautions: stopCautions(stop.compressedAir),
  };
}
export type WorkPack = Awaited<ReturnType<typeof loadWorkPack>>;

/** The stops of a project in drive order, with crew, position count and planned against actual hours. */
export async function listStops(tx: DbOrTx, projectId: string, status?: StopStatus) {
  const [project] = await tx.select({ direction: projects.driveDirection }).from(projects).where(eq(projects.id, projectId));
  const rows = await tx
    .select({
      stop: stops,
      crewName: crews.name,
      positionCount: sql<number>`(select count(*)::int from stop_positions sp where sp.stop_id = ${stops.id})`,
    })
    .from(stops)
    .leftJoin(crews, eq(crews.id, stops.crewId))
    .where(and(eq(stops.projectId, projectId), status ? eq(stops.status, status) : undefined))
    .orderBy(project?.direction === 'decreasing' ? desc(stops.chainageM) : asc(stops.chainageM), asc(stops.createdAt));
  return rows.map((r) => ({
    ...r.stop,
    crewName: r.crewName,
    positionCount: r.positionCount,
    actualHours: hoursBetween(r.stop.actualStart, r.stop.actualEnd),
  }));
}
