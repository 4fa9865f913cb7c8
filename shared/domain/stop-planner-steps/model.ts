/**
 * Step 1 of the stop planner: checking the input, turning it into arrays over the usable stop
 * places, and the cost model — written once here and used by every other step (baseline plans,
 * bounds, search, pricing). Model and proofs: the comment at the top of ../stop-planner.ts.
 */
import { aheadM as aheadOfM, chainageAhead } from '../chainage';
import type { PlannedChange, PlannedStop, StopPlan, StopPlanInput, WearStretch } from '../stop-planner';

/** Tolerance on wear comparisons, mm: absorbs rounding in the summed wear. */
export const EPS_MM = 1e-9;

/** The input over the usable places (index j, in drive order) and the cost model's numbers. */
export interface Prepared {
  input: StopPlanInput;
  aheadM: number[];
  compressedAir: boolean[];
  /** Hours of a stop at each place (free air or compressed air). */
  stopH: number[];
  /** Latest free-air place at or before each place, −1 if none. */
  prevFree: Int32Array;
  /** Per position: wear added from here to each place, and to the horizon. */
  wearAt: Float64Array[];
  wearAtHorizon: number[];
  /** Per position and place: last place a ring fitted there reaches, or `done`. */
  reachNew: Int32Array[];
  /** Per position: hours of one change (by class), the limit, and the budget of the ring fitted now (limit − wear now). */
  changeH: number[];
  limitMm: number[];
  startBudgetMm: number[];
  /** Hours per mm of ring life thrown away. */
  v: number;
  /** "Lasts to the horizon", as a place index: the number of places. */
  done: number;
}

/**
 * The cost model. A ring's budget is the wear added from here (W) at which it reaches its limit:
 * limit − wear now for the ring fitted now, W(fitting place) + limit for a later one.
 * Changing position i's ring of budget `budgetMm` at place j costs the change hours plus the ring
 * life thrown away, v·(budget − W_i(j)); a stop costs its place's hours; nothing else is charged.
 */
export const changeCostH = (prep: Prepared, i: number, budgetMm: number, j: number): number =>
  prep.changeH[i] + prep.v * (budgetMm - prep.wearAt[i][j]);

/** Budget (mm of W) of a ring fitted at place j on position i. */
export const budgetAfterChangeMm = (prep: Prepared, i: number, j: number): number => prep.wearAt[i][j] + prep.limitMm[i];

/** Wear added (mm) over [0, x] for each x of the sorted `xs` (m ahead), from the position's stretches. */
export function cumulativeWearMm(stretches: WearStretch[], xs: number[]): Float64Array {
  const out = new Float64Array(xs.length);
  let k = 0;
  let cumMm = 0;
  xs.forEach((x, j) => {
    while (k + 1 < stretches.length && stretches[k + 1].fromAheadM <= x) {
      cumMm += stretches[k].wearMmPerM * (stretches[k + 1].fromAheadM - stretches[k].fromAheadM);
      k++;
    }
    out[j] = cumMm + stretches[k].wearMmPerM * (x - stretches[k].fromAheadM);
  });
  return out;
}

/** Metres ahead where the wear added first exceeds `wearMm`; Infinity if never. */
export function aheadWhereWearExceedsM(stretches: WearStretch[], wearMm: number): number {
  if (wearMm < 0) return 0;
  let cumMm = 0;
  for (let k = 0; k < stretches.length; k++) {
    const { fromAheadM, wearMmPerM } = stretches[k];
    const lengthM = k + 1 < stretches.length ? stretches[k + 1].fromAheadM - fromAheadM : Infinity;
    if (wearMmPerM > 0 && cumMm + wearMmPerM * lengthM > wearMm) return fromAheadM + (wearMm - cumMm) / wearMmPerM;
    cumMm += wearMmPerM * lengthM;
  }
  return Infinity;
}

export function validate(input: StopPlanInput): void {
  const hours = {
    freeAirStopH: input.freeAirStopH,
    compressedAirStopH: input.compressedAirStopH,
    wastedRingLifeHPerMm: input.wastedRingLifeHPerMm,
    ...input.changeHByClass,
  };
  for (const [name, value] of Object.entries(hours)) {
    if (!(value >= 0 && Number.isFinite(value))) throw new RangeError(`${name} must be a finite number >= 0, got ${value}`);
  }
  if (!(input.horizonM > 0 && Number.isFinite(input.horizonM))) throw new RangeError(`horizon must be > 0 m, got ${input.horizonM}`);
  for (const p of input.positions) {
    if (!(p.limitMm > 0)) throw new RangeError(`position ${p.positionId}: limit must be > 0 mm, got ${p.limitMm}`);
    if (!(p.wearNowMm >= 0)) throw new RangeError(`position ${p.positionId}: wear now must be >= 0 mm, got ${p.wearNowMm}`);
    const s = p.wearStretches;
    if (s.length === 0 || s[0].fromAheadM !== 0) throw new RangeError(`position ${p.positionId}: wear stretches must start at 0 m ahead`);
    s.forEach((st, k) => {
      if (!(st.wearMmPerM >= 0 && Number.isFinite(st.wearMmPerM)))
        throw new RangeError(`position ${p.positionId}: wear per metre must be >= 0, got ${st.wearMmPerM}`);
      if (k > 0 && !(st.fromAheadM > s[k - 1].fromAheadM))
        throw new RangeError(`position ${p.positionId}: wear stretches must be in increasing order`);
    });
  }
}

export function prepare(input: StopPlanInput): Prepared {
  // Places behind the machine or beyond the horizon cannot be used; of two at one point keep the cheaper.
  const places = input.stopPlaces
    .map((p) => ({ aheadM: aheadOfM(input.currentChainageM, p.chainageM, input.direction), compressedAir: p.compressedAir }))
    .filter((p) => p.aheadM >= 0 && p.aheadM <= input.horizonM)
    .sort((a, b) => a.aheadM - b.aheadM || Number(a.compressedAir) - Number(b.compressedAir))
    .filter((p, j, all) => j === 0 || p.aheadM !== all[j - 1].aheadM);
  const aheadM = places.map((p) => p.aheadM);
  const m = aheadM.length;
  const prevFree = new Int32Array(m);
  places.forEach((p, j) => (prevFree[j] = p.compressedAir ? (j > 0 ? prevFree[j - 1] : -1) : j));

  const wearAt = input.positions.map((p) => cumulativeWearMm(p.wearStretches, aheadM));
  const wearAtHorizon = input.positions.map((p) => cumulativeWearMm(p.wearStretches, [input.horizonM])[0]);
  // A ring fitted at a later place reaches at least as far: one sweep per position.
  const reachNew = input.positions.map((p, i) => {
    const w = wearAt[i];
    const reach = new Int32Array(m);
    let r = 0;
    for (let j = 0; j < m; j++) {
      const budgetMm = w[j] + p.limitMm + EPS_MM;
      if (wearAtHorizon[i] <= budgetMm) {
        reach.fill(m, j);
        break;
      }
      r = Math.max(r, j);
      while (r + 1 < m && w[r + 1] <= budgetMm) r++;
      reach[j] = r;
    }
    return reach;
  });
  return {
    input,
    aheadM,
    compressedAir: places.map((p) => p.compressedAir),
    stopH: places.map((p) => (p.compressedAir ? input.compressedAirStopH : input.freeAirStopH)),
    prevFree,
    wearAt,
    wearAtHorizon,
    reachNew,
    changeH: input.positions.map((p) => input.changeHByClass[p.positionClass]),
    limitMm: input.positions.map((p) => p.limitMm),
    startBudgetMm: input.positions.map((p) => p.limitMm - p.wearNowMm),
    v: input.wastedRingLifeHPerMm,
    done: m,
  };
}

/**
 * Last place (index) the ring now fitted at position i reaches while the wear added from here
 * stays ≤ `budgetMm` (limit − wear now); `done` if it lasts to the horizon, −1 if it reaches no place.
 */
export function lastReachable(prep: Prepared, i: number, budgetMm: number): number {
  if (prep.wearAtHorizon[i] <= budgetMm + EPS_MM) return prep.done;
  const w = prep.wearAt[i];
  let lo = -1;
  let hi = w.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (w[mid] <= budgetMm + EPS_MM) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}

/** A plan as the steps build it: place indexes in order, each with the positions changed there. */
export type IndexPlan = { idx: number; changed: number[] }[];

/** Prices a plan given as (place index, positions changed there) in place order, with the cost model above. */
export function pricePlan(prep: Prepared, plan: IndexPlan): StopPlan {
  const { input } = prep;
  const budgetMm = [...prep.startBudgetMm];
  const stops = plan.map(({ idx, changed }): PlannedStop => {
    let changeH = 0;
    let wastedRingLifeH = 0;
    const changes = [...changed]
      .sort((a, b) => a - b)
      .map((i): PlannedChange => {
        const costH = changeCostH(prep, i, budgetMm[i], idx);
        changeH += prep.changeH[i];
        wastedRingLifeH += costH - prep.changeH[i];
        const unusedWearMm = Math.max(0, budgetMm[i] - prep.wearAt[i][idx]);
        budgetMm[i] = budgetAfterChangeMm(prep, i, idx);
        return { positionId: input.positions[i].positionId, wearAtChangeMm: prep.limitMm[i] - unusedWearMm, unusedWearMm };
      });
    return {
      chainageM: chainageAhead(input.currentChainageM, prep.aheadM[idx], input.direction),
      aheadM: prep.aheadM[idx],
      compressedAir: prep.compressedAir[idx],
      changes,
      stopH: prep.stopH[idx],
      changeH,
      wastedRingLifeH,
    };
  });
  const stopH = stops.reduce((t, s) => t + s.stopH, 0);
  const changeH = stops.reduce((t, s) => t + s.changeH, 0);
  const wastedRingLifeH = stops.reduce((t, s) => t + s.wastedRingLifeH, 0);
  return { stops, cost: { stopH, changeH, wastedRingLifeH, totalH: stopH + changeH + wastedRingLifeH } };
}
