/**
 * What the stop planner's tests check it against, written apart from the planner (no import of
 * shared/domain/stop-planner-steps): the wear a position adds ahead, the usable places, the random
 * instances, and the problem as a linear (or mixed-integer) programme solved by HiGHS, a
 * general-purpose solver (Huangfu & Hall 2018, "Parallelizing the dual revised simplex method";
 * the `highs` package is HiGHS compiled to WebAssembly).
 */
import highsLoader, { type Highs } from 'highs';
import type { PositionClass } from '../../shared/domain/forecast';
import type { StopPlanInput, WearStretch } from '../../shared/domain/stop-planner';

/** Tolerance on wear comparisons, mm. */
export const EPS_MM = 1e-9;

/** Wear added from here to `aheadM` (mm), summed stretch by stretch; written apart from the planner's own. */
export function wearAddedMm(stretches: WearStretch[], aheadM: number): number {
  let mm = 0;
  for (let k = 0; k < stretches.length; k++) {
    const end = k + 1 < stretches.length ? Math.min(stretches[k + 1].fromAheadM, aheadM) : aheadM;
    if (end > stretches[k].fromAheadM) mm += stretches[k].wearMmPerM * (end - stretches[k].fromAheadM);
  }
  return mm;
}

export const aheadOf = (input: StopPlanInput, chainageM: number) =>
  (chainageM - input.currentChainageM) * (input.direction === 'increasing' ? 1 : -1);

/** Usable stop places as metres ahead, in order. */
export function placesAhead(input: StopPlanInput) {
  return input.stopPlaces
    .map((p) => ({ aheadM: aheadOf(input, p.chainageM), compressedAir: p.compressedAir }))
    .filter((p) => p.aheadM >= 0 && p.aheadM <= input.horizonM)
    .sort((a, b) => a.aheadM - b.aheadM);
}

/** A small random instance: 2–5 positions, 10–30 places, ring lives from a fifth of the horizon to all of it. */
export function randomInstance(rng: () => number): StopPlanInput {
  const horizonM = 100 + 100 * rng();
  const direction = rng() < 0.5 ? 'increasing' : 'decreasing';
  const sign = direction === 'increasing' ? 1 : -1;
  const currentChainageM = 2000 + 3000 * rng();
  const m = 10 + Math.floor(21 * rng());
  const stopPlaces = Array.from({ length: m }, () => ({
    chainageM: currentChainageM + sign * horizonM * rng(),
    compressedAir: rng() < 0.3,
  }));
  stopPlaces.push({ chainageM: currentChainageM - sign * 5, compressedAir: false }); // behind the machine: not usable
  const classes: PositionClass[] = ['centre', 'face', 'gauge'];
  const positions = Array.from({ length: 2 + Math.floor(4 * rng()) }, (_, i) => {
    const limitMm = 10 + 20 * rng();
    const lifeM = horizonM * (0.2 + 0.8 * rng());
    const cuts = Array.from({ length: Math.floor(3 * rng()) }, () => horizonM * rng()).sort((a, b) => a - b);
    return {
      positionId: `P${i + 1}`,
      positionClass: classes[Math.floor(3 * rng())],
      wearNowMm: limitMm * rng(),
      limitMm,
      wearStretches: [0, ...cuts].map((fromAheadM) => ({ fromAheadM, wearMmPerM: (limitMm / lifeM) * (0.5 + rng()) })),
    };
  });
  const freeAirStopH = 2 + 6 * rng();
  return {
    currentChainageM,
    direction,
    horizonM,
    positions,
    stopPlaces,
    freeAirStopH,
    compressedAirStopH: freeAirStopH + 12 * rng(),
    changeHByClass: { centre: 0.5 + 1.5 * rng(), face: 0.5 + rng(), gauge: 0.5 + 2 * rng() },
    wastedRingLifeHPerMm: 0.3 * rng(),
  };
}

/** A tiny random instance for the brute force: 1–3 positions, 2–7 places, ring lives from a fifth of the horizon to all of it. */
export function tinyInstance(rng: () => number): StopPlanInput {
  const input = randomInstance(rng);
  const places = input.stopPlaces.slice(0, 2 + Math.floor(6 * rng()));
  return { ...input, positions: input.positions.slice(0, 1 + Math.floor(3 * rng())), stopPlaces: places };
}

let loaded: Promise<Highs> | null = null;
const highs = () => (loaded ??= highsLoader());

/**
 * The least hours by HiGHS, from a model built here from the input alone:
 *   min Σ_j s_j·z_j + Σ_i Σ_arcs cost·x   subject to, per position i, one path of changes through
 *   the places (flow 1 from "now" to "horizon"; an arc is a ring from its fitting place, or now, to
 *   the place it is changed at, allowed while the wear added stays within the ring's budget; it
 *   costs the change hours plus v × the ring life left; the last arc, to the horizon, only if the
 *   ring lasts there and costs nothing), and at each place the changes made there ≤ z_j.
 * `integer`: z ∈ {0, 1} (the paths then come out whole too) — the optimum; otherwise z ∈ [0, 1]
 * — the linear relaxation, the best any Lagrangian bound of the coupling "a change needs a stop"
 * can reach (Geoffrion 1974: the positions' path problems have integral LPs).
 * Null when no plan keeps every ring within its limit.
 */
export async function highsMinH(input: StopPlanInput, { integer }: { integer: boolean }): Promise<number | null> {
  const places = placesAhead(input);
  const m = places.length;
  const v = input.wastedRingLifeHPerMm;
  const cost: number[] = places.map((p) => (p.compressedAir ? input.compressedAirStopH : input.freeAirStopH));
  // Columns as lists of (row, coefficient); the z_j columns' rows are filled as the coupling rows are made.
  const columns: [number, number][][] = places.map(() => []);
  const rowLower: number[] = [];
  const rowUpper: number[] = [];
  const addRow = (lo: number, up: number) => {
    rowLower.push(lo);
    rowUpper.push(up);
    return rowLower.length - 1;
  };
  for (const p of input.positions) {
    const budget0 = p.limitMm - p.wearNowMm;
    const wHorizon = wearAddedMm(p.wearStretches, input.horizonM);
    if (wHorizon <= budget0 + EPS_MM) continue; // the ring now fitted lasts: no change needed, none pays
    const w = places.map((pl) => wearAddedMm(p.wearStretches, pl.aheadM));
    const changeH = input.changeHByClass[p.positionClass];
    const start = addRow(1, 1); // flow 1 leaves "now"
    const balance = places.map(() => addRow(0, 0)); // in − out = 0 at each place
    const coupling = places.map((_, j) => {
      const r = addRow(-Infinity, 0); // changes here − z_j ≤ 0
      columns[j].push([r, -1]);
      return r;
    });
    const arc = (costH: number, entries: [number, number][]) => {
      cost.push(costH);
      columns.push(entries);
    };
    for (let b = 0; b < m; b++) {
      if (w[b] <= budget0 + EPS_MM)
        arc(changeH + v * (budget0 - w[b]), [
          [start, 1],
          [balance[b], 1],
          [coupling[b], 1],
        ]);
    }
    for (let f = 0; f < m; f++) {
      const budget = w[f] + p.limitMm;
      if (wHorizon <= budget + EPS_MM) arc(0, [[balance[f], -1]]);
      for (let b = f + 1; b < m; b++) {
        if (w[b] <= budget + EPS_MM)
          arc(changeH + v * (budget - w[b]), [
            [balance[f], -1],
            [balance[b], 1],
            [coupling[b], 1],
          ]);
      }
    }
  }
  const solver = await highs();
  const numCols = cost.length;
  const numRows = rowLower.length;
  if (numRows === 0) return 0; // nothing needs a change
  const starts = [0];
  const indices: number[] = [];
  const values: number[] = [];
  for (const col of columns) {
    for (const [r, a] of [...col].sort((x, y) => x[0] - y[0])) {
      indices.push(r);
      values.push(a);
    }
    starts.push(indices.length);
  }
  const model = solver.createModel({
    numCols,
    numRows,
    colCost: cost,
    colLower: new Float64Array(numCols),
    colUpper: new Float64Array(numCols).fill(1),
    rowLower: rowLower.map((x) => (x === -Infinity ? -solver.infinity : x)),
    rowUpper,
    matrix: { format: 'csc', numRows, numCols, starts, indices, values },
    ...(integer ? { integrality: Int32Array.from({ length: numCols }, (_, k) => (k < m ? 1 : 0)) } : {}),
  });
  try {
    model.options.set({ output_flag: false, mip_rel_gap: 0, mip_abs_gap: 1e-9 });
    model.run();
    const status = model.getModelStatus();
    if (status === 8) return null; // infeasible
    if (status !== 7) throw new Error(`HiGHS ended with model status ${status}, not optimal`);
    return model.getObjectiveValue();
  } finally {
    model.dispose();
  }
}
