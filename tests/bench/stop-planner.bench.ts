/**
 * Benchmark of the stop planner on a drive-sized instance: 80 cutterhead positions, an allowed
 * stop place at every ring (1.5 m) over a 2 km horizon, three invented ground types. Target:
 * ≤ 500 ms per plan (issue 6). Invented data; no real project.
 */
import { planStops, type PlannerPosition, type StopPlace, type StopPlanInput } from '../../shared/domain/stop-planner';

const RING_LENGTH_M = 1.5;
const HORIZON_M = 2000;
const PENETRATION_MM_PER_REV = 8;
const TARGET_MS = 500;

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

function benchInput(wearFactor = 1): StopPlanInput {
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
      wearStretches: GROUND_AHEAD.map((g) => ({ fromAheadM: g.fromAheadM, wearMmPerM: wearFactor * g.mmPerKm * CLASS_FACTOR[positionClass] * rolledKmPerM })),
    };
  });
  // Every ring is an allowed place; 500–800 m ahead lies under high groundwater (compressed air).
  const stopPlaces: StopPlace[] = Array.from({ length: Math.floor(HORIZON_M / RING_LENGTH_M) + 1 }, (_, j) => ({
    chainageM: 12_000 + j * RING_LENGTH_M,
    compressedAir: j * RING_LENGTH_M >= 500 && j * RING_LENGTH_M <= 800,
  }));
  return {
    currentChainageM: 12_000,
    direction: 'increasing',
    horizonM: HORIZON_M,
    positions,
    stopPlaces,
    freeAirStopH: 6,
    compressedAirStopH: 18,
    changeHByClass: { centre: 1.5, face: 1, gauge: 1.25 },
    wastedRingLifeHPerMm: 0.03,
  };
}

/** The bench instance with its wear rates scaled (×3 makes a hard case), for tests of the search budget. */
export const benchInputForTests = (wearFactor: number) => benchInput(wearFactor);

/** Runs the planner a few times on the bench instance; returns the lines to print. */
export async function benchStopPlanner(): Promise<string[]> {
  const input = benchInput();
  const timesMs: number[] = [];
  let result = planStops(input);
  for (let run = 0; run < 5; run++) {
    const t0 = performance.now();
    result = planStops(input);
    timesMs.push(performance.now() - t0);
  }
  timesMs.sort((a, b) => a - b);
  const medianMs = timesMs[Math.floor(timesMs.length / 2)];
  const summary = result.feasible
    ? `${result.optimised.stops.length} stops, ${result.optimised.cost.totalH.toFixed(1)} h vs hand plan ${result.hand.stops.length} stops, ${result.hand.cost.totalH.toFixed(1)} h; ${result.statesExpanded} states`
    : `infeasible: ${result.problems.length} positions`;
  return [
    `stop planner: 80 positions, ${input.stopPlaces.length} places (every ${RING_LENGTH_M} m ring over ${HORIZON_M} m): ${summary}`,
    `stop planner: median ${medianMs.toFixed(1)} ms of ${timesMs.length} runs (target ≤ ${TARGET_MS} ms) ${medianMs <= TARGET_MS ? 'OK' : 'OVER TARGET'}`,
  ];
}
