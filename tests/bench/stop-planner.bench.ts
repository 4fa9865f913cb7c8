/**
 * Benchmark of the stop planner on a drive-sized instance: 80 cutterhead positions, an allowed
 * stop place at every ring (1.5 m) over a 2 km horizon, three invented ground types; and a harder
 * one with the wear rates × 3. Printed per instance: the time to a plan with the server's search
 * settings, the certified gap (target ≤ 2 % within 5 s, issue 15) and the saving against the
 * site-practice rule. Invented data; no real project.
 */
import { planStops, type PlannerPosition, type StopPlace, type StopPlanInput } from '../../shared/domain/stop-planner';

const RING_LENGTH_M = 1.5;
const HORIZON_M = 2000;
const PENETRATION_MM_PER_REV = 8;
const TARGET_MS = 5000;
const TARGET_GAP_PERCENT = 2;

/**
 * Cautious wear rate per ground stretch ahead, mm of radial wear per km rolled by a face disc
 * (invented; of the order of the Gehring prior for CAI ≈ 1, DOMAIN.md §2: derived, 0.740 mg/m
 * ÷ 7.85 g/cm³ ÷ (π × 432 mm × 19 mm) ≈ 0.0037 mm/km for a 17″ ring).
 */
const GROUND_AHEAD = [
  { fromAheadM: 0, mmPerKm: 0.002 },
  { fromAheadM: 350, mmPerKm: 0.004 },
  { fromAheadM: 800, mmPerKm: 0.0015 },
  { fromAheadM: 1150, mmPerKm: 0.004 },
  { fromAheadM: 1600, mmPerKm: 0.002 },
];
const CLASS_FACTOR = { centre: 1.2, face: 1, gauge: 1.6 } as const;

function benchInput(wearFactor = 1, horizonM = HORIZON_M): StopPlanInput {
  const positions: PlannerPosition[] = Array.from({ length: 80 }, (_, k) => {
    // 4 twin centre positions, 64 face positions, 12 gauge positions on a 10 m cutterhead.
    const positionClass = k < 4 ? 'centre' : k < 68 ? 'face' : 'gauge';
    const radiusM = k < 4 ? 0.1 * (k + 1) : k < 68 ? 0.5 + ((k - 4) * 3.95) / 63 : 4.5 + ((k - 68) * 0.48) / 11;
    const limitMm = positionClass === 'gauge' ? 15 : 25;
    const rolledKmPerM = (2 * Math.PI * radiusM) / PENETRATION_MM_PER_REV;
    return {
      positionId: `P${k + 1}`,
      positionClass,
      limitMm,
      // Spread of wear now without a random generator: a fixed permutation of 0…79.
      wearNowMm: (((k * 37) % 80) / 80) * 0.85 * limitMm,
      wearStretches: GROUND_AHEAD.map((g) => ({
        fromAheadM: g.fromAheadM,
        wearMmPerM: wearFactor * g.mmPerKm * CLASS_FACTOR[positionClass] * rolledKmPerM,
      })),
    };
  });
  // Every ring is an allowed place; 500–800 m ahead lies under high groundwater (compressed air).
  const stopPlaces: StopPlace[] = Array.from({ length: Math.floor(horizonM / RING_LENGTH_M) + 1 }, (_, j) => ({
    chainageM: 12_000 + j * RING_LENGTH_M,
    compressedAir: j * RING_LENGTH_M >= 500 && j * RING_LENGTH_M <= 800,
  }));
  return {
    currentChainageM: 12_000,
    direction: 'increasing',
    horizonM,
    positions,
    stopPlaces,
    freeAirStopH: 6,
    compressedAirStopH: 18,
    changeHByClass: { centre: 1.5, face: 1, gauge: 1.25 },
    wastedRingLifeHPerMm: 0.03,
  };
}

/** The bench instance with its wear rates scaled (×3 makes a hard case), for tests of the search budget. */
export const benchInputForTests = (wearFactor: number, horizonM = HORIZON_M) => benchInput(wearFactor, horizonM);

/**
 * The targets a plan's figures are held to, and whether they are met: issue 15's (time and gap),
 * or, past the horizons the settings were sized for, only a bounded time (`boundedMs`: the
 * planner's work limit and 1 s for the rest of the request).
 */
function verdict(ms: number, proven: boolean, gapPercent: number, boundedMs: number | null = null): string {
  const target = boundedMs === null ? `target ≤ ${TARGET_MS} ms, ≤ ${TARGET_GAP_PERCENT} %` : `target ≤ ${boundedMs} ms`;
  const met = boundedMs === null ? ms <= TARGET_MS && (proven || gapPercent <= TARGET_GAP_PERCENT) : ms <= boundedMs;
  return `(${target}) ${met ? 'OK' : 'OVER TARGET'}`;
}

/** One line of figures for a plan: time, certificate, saving against the practice rule and the fixed interval. */
export function planFigures(name: string, ms: number, r: ReturnType<typeof planStops>, boundedMs: number | null = null): string {
  if (!r.feasible) return `${name}: infeasible (${r.problems.length} positions), ${ms.toFixed(0)} ms`;
  const gapPercent = 100 * r.certificate.gap;
  const certificate = r.certificate.proven
    ? 'proven cheapest'
    : `at most ${gapPercent.toFixed(2)} % above the cheapest (lower bound ${r.certificate.lowerBoundH.toFixed(1)} h)`;
  const saving = (p: typeof r.practice) =>
    p ? `${(p.cost.totalH - r.optimised.cost.totalH).toFixed(1)} h (${p.stops.length} stops, ${p.cost.totalH.toFixed(1)} h)` : 'rule stuck';
  return `${name}: ${ms.toFixed(0)} ms, ${r.optimised.stops.length} stops, ${r.optimised.cost.totalH.toFixed(1)} h, ${certificate}; saving vs practice ${saving(r.practice)}, vs fixed interval ${saving(r.fixedInterval)} ${verdict(ms, r.certificate.proven, gapPercent, boundedMs)}`;
}

/** Runs the planner on the bench instance and the harder one with the server's settings; returns the lines to print. */
export async function benchStopPlanner(): Promise<string[]> {
  const {
    PLANNER_MAX_STATES,
    PLANNER_BOUND_ITERATIONS,
    PLANNER_LOCAL_SEARCH_MS,
    PLANNER_STRONG_BOUND_MS,
    PLANNER_ANSWER_WITHIN_MS,
    PLANNER_WORK_LIMIT_MS,
  } = await import('../../server/services/stops');
  const lines: string[] = [];
  // The two cases of the target, then the longest horizon a request accepts (20 km, every ring):
  // the answer must still come within the work limit, and the planner's tables must stay small.
  for (const [wearFactor, horizonM] of [
    [1, HORIZON_M],
    [3, HORIZON_M],
    [3, 20_000],
  ]) {
    const input = benchInput(wearFactor, horizonM);
    const buffers0 = process.memoryUsage().arrayBuffers;
    const t0 = performance.now();
    const cpu0 = process.cpuUsage();
    const result = planStops(input, {
      maxStates: PLANNER_MAX_STATES,
      boundIterations: PLANNER_BOUND_ITERATIONS,
      localSearchMs: PLANNER_LOCAL_SEARCH_MS,
      strongBoundMs: PLANNER_STRONG_BOUND_MS,
      answerWithinMs: PLANNER_ANSWER_WITHIN_MS,
      workLimitMs: PLANNER_WORK_LIMIT_MS,
    });
    const ms = performance.now() - t0;
    const cpu = process.cpuUsage(cpu0);
    // CPU time beside wall time: the machine's cores are shared, so wall time alone overstates.
    const cpuMs = (cpu.user + cpu.system) / 1000;
    // Typed-array memory right after the call, less before it: what the planner allocated and the
    // collector has not yet freed (about all of it when no collection ran in between).
    const buffersMb = (process.memoryUsage().arrayBuffers - buffers0) / 1e6;
    lines.push(
      planFigures(
        `stop planner, 80 positions, ${horizonM / 1000} km, ${input.stopPlaces.length} places, wear × ${wearFactor}`,
        ms,
        result,
        horizonM === HORIZON_M ? null : PLANNER_WORK_LIMIT_MS + 1000,
      ) + ` [CPU ${cpuMs.toFixed(0)} ms; typed arrays ${buffersMb.toFixed(0)} MB]`,
    );
  }
  return lines;
}

/** The demo drive (server/db/seed-demo.ts) planned through the service, as a request would: time and certificate. */
export async function benchDemoStopPlan(): Promise<string[]> {
  const { db } = await import('../../server/db/client');
  const { seedDemo } = await import('../../server/db/seed-demo');
  const { planForProject, PLANNER_WORK_LIMIT_MS } = await import('../../server/services/stops');
  const { projectId } = await seedDemo(db);
  const lines: string[] = [];
  // The default horizon (2 km) as the target asks, then shorter ones (where the certificate
  // holds), then the longest a request accepts, where only a bounded time is a target (the plan
  // covers the ground known ahead).
  for (const horizonM of [undefined, 450, 600, 1000, 20_000]) {
    const boundedMs = horizonM === undefined || horizonM <= HORIZON_M ? null : PLANNER_WORK_LIMIT_MS + 1000;
    const t0 = performance.now();
    const cpu0 = process.cpuUsage();
    const plan = await db.transaction((tx) => planForProject(tx, projectId, new Date(), horizonM ? { horizonM } : {}));
    const ms = performance.now() - t0;
    const cpu = process.cpuUsage(cpu0); // the whole process, the planner's worker thread included
    const cpuNote = ` [CPU ${((cpu.user + cpu.system) / 1000).toFixed(0)} ms]`;
    const name = `demo drive stop plan, ${horizonM ? `${horizonM} m` : 'default'} horizon (request incl. forecast)`;
    if (!plan.optimised || !plan.certificate) {
      lines.push(`${name}: none (${plan.problems.join(' ')}) in ${ms.toFixed(0)} ms`);
      continue;
    }
    const c = plan.certificate;
    const saving = (h: number | null) => (h == null ? 'rule stuck' : `${h.toFixed(1)} h`);
    lines.push(
      `${name}: ${ms.toFixed(0)} ms, ${plan.candidatePlaceCount} places, ${plan.optimised.stops.length} stops, ${plan.optimised.cost.totalH.toFixed(1)} h, ` +
        `${c.proven ? 'proven cheapest' : `at most ${c.gapPercent.toFixed(2)} % above the cheapest`}; saving vs practice ${saving(plan.savingVsPracticeH)}, vs fixed interval ${saving(plan.savingVsIntervalH)} ` +
        `${verdict(ms, c.proven, c.gapPercent, boundedMs)}${cpuNote}`,
    );
  }
  return lines;
}

/**
 * Where the certificate's bound falls short, in a case small enough to solve exactly: one gauge
 * disc whose ring lasts 32 m and ten face discs (rings lasting 88–296 m), uniform ground, every
 * ring a compressed-air place, 800 m. The gauge disc forces a stop about every 31.5 m; the face
 * discs must change at those stops, up to a stop spacing before they are due. The exact search
 * proves the optimum; the plain bound and the decomposition with a copy for every position
 * (decision 48), each run for 3,000 steps, are printed beside it (decision 50). Invented data.
 */
export function latticeCaseInput(horizonM = 800): StopPlanInput {
  const faceLivesM = [88, 101, 118, 126, 150, 177, 197, 222, 254, 296];
  const positions: PlannerPosition[] = [
    { positionId: 'G', positionClass: 'gauge', limitMm: 15, wearNowMm: 0, wearStretches: [{ fromAheadM: 0, wearMmPerM: 15 / 32 }] },
    ...faceLivesM.map((lifeM, k): PlannerPosition => ({
      positionId: `F${k + 1}`,
      positionClass: 'face',
      limitMm: 25,
      wearNowMm: ((k * 7) % 10) * 2.2,
      wearStretches: [{ fromAheadM: 0, wearMmPerM: 25 / lifeM }],
    })),
  ];
  return {
    currentChainageM: 0,
    direction: 'increasing',
    horizonM,
    positions,
    stopPlaces: Array.from({ length: Math.floor(horizonM / RING_LENGTH_M) }, (_, j) => ({
      chainageM: RING_LENGTH_M * (j + 1),
      compressedAir: true,
    })),
    freeAirStopH: 6,
    compressedAirStopH: 14,
    changeHByClass: { centre: 1.5, face: 1, gauge: 1.25 },
    wastedRingLifeHPerMm: 0.2,
  };
}

/** The lattice case's figures: the proven optimum and how far under it the two bounds stay. */
export async function benchLatticeCase(): Promise<string[]> {
  const { prepare } = await import('../../shared/domain/stop-planner-steps/model');
  const { lagrangianBound } = await import('../../shared/domain/stop-planner-steps/lagrangian');
  const input = latticeCaseInput();
  const t0 = performance.now();
  const r = planStops(input);
  const ms = performance.now() - t0;
  if (!r.feasible) return ['lattice case: infeasible'];
  const optH = r.optimised.cost.totalH;
  const prep = prepare(input);
  const plain = lagrangianBound(prep, { iterations: 3000, upperH: optH, targetGap: 0 });
  const copies = new Uint8Array(input.positions.length).fill(1);
  const split = lagrangianBound(prep, { iterations: 3000, upperH: optH, targetGap: 0, copies, startLambda: plain.lambda, stepScale: 0.1 });
  const under = (h: number) => `${h.toFixed(1)} h (${((100 * (optH - h)) / h).toFixed(2)} % under)`;
  return [
    `lattice case (1 gauge disc of 32 m, 10 face discs, 800 m, compressed air): ${r.certificate.proven ? 'proven' : 'NOT proven'} optimum ` +
      `${optH.toFixed(1)} h (${r.optimised.stops.length} stops, ${r.optimised.cost.wastedRingLifeH.toFixed(1)} h of ring life thrown away) in ${ms.toFixed(0)} ms; ` +
      `plain bound ${under(plain.lowerH)}, decomposition with every position copied ${under(split.lowerH)}, 3,000 steps each`,
  ];
}
