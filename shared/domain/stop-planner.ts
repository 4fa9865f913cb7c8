/**
 * Intervention-stop planner: where to stop along the drive, and which cutterhead positions to
 * change at each stop, so that no position passes its cautious (P90) wear limit inside the
 * planning horizon, at the least total cost. Exact.
 *
 * Model (distances in metres ahead of the current chainage, along the drive)
 * - Position i wears at a cautious rate given per stretch ahead (mm per m of advance, e.g. the
 *   forecast's P90 `wearMmPerM`); W_i(x) is the wear added from here to x. The ring fitted now
 *   carries wearNowMm + W_i(x) at x, a ring fitted at x0 carries W_i(x) − W_i(x0). A ring
 *   passes its limit where its wear first exceeds limitMm; it is "due" at the last point at or
 *   under the limit. A new ring wears like the old one (same position, same ground), so it falls
 *   due again later and may need changing again inside the horizon.
 * - Stops only at the allowed places; a ring must be changed at a stop at or before its due
 *   point unless it stays within its limit up to the horizon.
 * - Cost in hours: fixed hours per stop (free air or compressed air), hours per cutter changed
 *   by position class, and ring life thrown away, valued at `wastedRingLifeHPerMm` hours per mm
 *   of allowable wear left unused on a ring taken out (the site turns a ring's price into hours
 *   of boring time; 0 ignores it). Rings still fitted at the horizon are not charged.
 *
 * Why each ring is changed at the latest chosen stop at or before its due point
 * For one position changed at x1 < … < xk the unused wear sums to
 *   (limit − wearNow − W(x1)) + Σ_{j≥2} (limit − (W(xj) − W(x(j−1)))) = k·limit − wearNow − W(xk),
 * so the position costs k·(changeH + v·limit) − v·(wearNow + W(xk)): only the number of changes
 * and the place of the last one matter. For a fixed set of stops, "latest stop before due" gives
 * the fewest changes and, among those, the latest last change (stay-ahead: a later fitting never
 * brings the next due point earlier). More changes never pay: each costs changeH + v·limit,
 * while the last ring of that plan lasts to the horizon, so a later last change gains at most
 * v·(W(horizon) − W(xk)) ≤ v·limit. So a plan is a set of stops, each position's part of the
 * cost follows from it, and the positions changed at a stop are those that would pass their
 * limit before the next stop.
 *
 * Why the state is not just "the last stop"
 * Which positions would pass their limit before the next stop depends on where each ring was
 * fitted. Once a position can need two changes inside the horizon, that depends on earlier
 * stops too (two plans both stopping at 40 m may carry that position's ring from 10 m or from
 * 12 m), so a dynamic programme over "last stop" alone is not exact. A state here is the stop
 * plus, per position, the last allowed place its ring reaches.
 *
 * Search
 * 1. Normal form: a stop where nothing is changed can be dropped, and a stop can be moved later,
 *    up to the latest place every ring reaches, without losing feasibility (later rings fall due
 *    later) or raising cost (only last changes move, and later) unless that place needs
 *    compressed air. So the next stop is the latest place all rings reach or the latest free-air
 *    place before it, and the positions changed at a stop are the k due first, for some k.
 * 2. States are expanded place by place (every transition moves forward). States at one place
 *    with the same reach for every position have the same future apart from v·(ring budget)
 *    that each ring still to be changed will surely pay, so they merge on cost plus that term.
 *    A state is dropped when another at the same place reaches at least as far for every
 *    position at no more cost (counted the same way), or when its cost plus a lower bound on
 *    the rest cannot beat the best plan found. The bound is the larger of (a) every position on
 *    its own latest chain plus the least stop hours still needed (found by changing everything
 *    at every stop, as late as possible) and (b) own chains plus the least extra for sharing
 *    stops among the next change of every position (a dynamic programme over the positions in
 *    due order). A first pass expanding only a few states per place finds a good plan to bound
 *    the exact pass; the hand plan bounds the first pass.
 * Complexity: preparation O(n·(m + s)) for n positions, m allowed places and s wear stretches;
 * a state costs O(n²), and comparing the states at a place O(k²·n) for k states there. When no
 * new ring falls due inside the horizon all states at a place share one reach, so there is one
 * state per place: O(m·n²) in all. With repeated changes the number of states can grow
 * exponentially in the worst case (the problem then resembles joint replenishment; we know no
 * polynomial exact method for it): it grows with how often the fastest-wearing positions fall
 * due inside the horizon. Measured in tests/bench/stop-planner.bench.ts.
 *
 * Hand plan, for comparison: stop at the last allowed place before the first position is due,
 * change there only what would be due before the next such stop, repeat. That changes every
 * ring at its own latest place, so it is feasible exactly when any plan is; an instance is
 * infeasible exactly when some ring falls due before the next allowed place, reported per
 * position with the ring and the places around its due point.
 */
import { directionSign } from './chainage';
import type { DriveDirection, PositionClass } from './forecast';

/** Cautious wear growth from `fromAheadM` (m ahead) until the next stretch starts; the last one runs on. */
export interface WearStretch {
  fromAheadM: number;
  wearMmPerM: number;
}

export interface PlannerPosition {
  positionId: string;
  positionClass: PositionClass;
  wearNowMm: number;
  limitMm: number;
  /** Sorted by `fromAheadM`, the first starting at 0. */
  wearStretches: WearStretch[];
}

/** A chainage where a stop is allowed; `compressedAir` from the water head (see compressed-air.ts). */
export interface StopPlace {
  chainageM: number;
  compressedAir: boolean;
}

export interface StopPlanInput {
  currentChainageM: number;
  direction: DriveDirection;
  /** Plan this many metres ahead of the current chainage. */
  horizonM: number;
  positions: PlannerPosition[];
  stopPlaces: StopPlace[];
  freeAirStopH: number;
  compressedAirStopH: number;
  changeHByClass: Record<PositionClass, number>;
  /** Hours charged per mm of allowable wear left unused on a ring taken out. */
  wastedRingLifeHPerMm: number;
}

export interface PlannedChange {
  positionId: string;
  wearAtChangeMm: number;
  unusedWearMm: number;
}

export interface PlannedStop {
  chainageM: number;
  aheadM: number;
  compressedAir: boolean;
  changes: PlannedChange[];
  stopH: number;
  changeH: number;
  wastedRingLifeH: number;
}

export interface StopPlanCost {
  stopH: number;
  changeH: number;
  wastedRingLifeH: number;
  totalH: number;
}

export interface StopPlan {
  stops: PlannedStop[];
  cost: StopPlanCost;
}

/** Why a position cannot be kept within its limit: `ringNumber` 0 is the ring fitted now, 1 the next one, … */
export interface InfeasiblePosition {
  positionId: string;
  ringNumber: number;
  dueAheadM: number;
  dueChainageM: number;
  reason: string;
}

export type StopPlanResult =
  | {
      feasible: true;
      optimised: StopPlan;
      hand: StopPlan;
      /** Hand plan hours less optimised plan hours. */
      savingH: number;
      /** Search states expanded, a measure of the work done. */
      statesExpanded: number;
      /** False when the exact search hit `maxStates` and the plan is the best found, not proven cheapest. */
      provenOptimal: boolean;
    }
  | { feasible: false; problems: InfeasiblePosition[] };

/** Tolerance on wear comparisons, mm: absorbs rounding in the summed wear. */
const EPS_MM = 1e-9;
/** States expanded per place by the first, quick pass that finds a good plan to bound the exact pass. */
const QUICK_PASS_STATES = 8;

interface Prepared {
  aheadM: number[];
  compressedAir: boolean[];
  stopH: number[];
  /** Latest free-air place at or before each place, −1 if none. */
  prevFree: Int32Array;
  /** Per position: wear added from here to each place, and to the horizon. */
  wearAt: Float64Array[];
  wearAtHorizon: number[];
  /** Per position and place: last place a ring fitted there reaches, or `done`. */
  reachNew: Int32Array[];
  changeH: number[];
  /** "Lasts to the horizon", as a place index: the number of places. */
  done: number;
}

/** Wear added (mm) over [0, x] for each x of the sorted `xs` (m ahead), from the position's stretches. */
function cumulativeWearMm(stretches: WearStretch[], xs: number[]): Float64Array {
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
function aheadWhereWearExceedsM(stretches: WearStretch[], wearMm: number): number {
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

function validate(input: StopPlanInput): void {
  const hours = { freeAirStopH: input.freeAirStopH, compressedAirStopH: input.compressedAirStopH, wastedRingLifeHPerMm: input.wastedRingLifeHPerMm, ...input.changeHByClass };
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
      if (!(st.wearMmPerM >= 0 && Number.isFinite(st.wearMmPerM))) throw new RangeError(`position ${p.positionId}: wear per metre must be >= 0, got ${st.wearMmPerM}`);
      if (k > 0 && !(st.fromAheadM > s[k - 1].fromAheadM)) throw new RangeError(`position ${p.positionId}: wear stretches must be in increasing order`);
    });
  }
}

function prepare(input: StopPlanInput): Prepared {
  const sign = directionSign(input.direction);
  // Places behind the machine or beyond the horizon cannot be used; of two at one point keep the cheaper.
  const places = input.stopPlaces
    .map((p) => ({ aheadM: (p.chainageM - input.currentChainageM) * sign, compressedAir: p.compressedAir }))
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
    aheadM,
    compressedAir: places.map((p) => p.compressedAir),
    stopH: places.map((p) => (p.compressedAir ? input.compressedAirStopH : input.freeAirStopH)),
    prevFree,
    wearAt,
    wearAtHorizon,
    reachNew,
    changeH: input.positions.map((p) => input.changeHByClass[p.positionClass]),
    done: m,
  };
}

/**
 * Last place (index) the ring now fitted at position i reaches while the wear added from here
 * stays ≤ `budgetMm` (limit − wear now); `done` if it lasts to the horizon, −1 if it reaches no place.
 */
function lastReachable(prep: Prepared, i: number, budgetMm: number): number {
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

/** Per position: the places of its own latest chain (each ring changed at its last reachable place), or why it fails. */
function ownLatestChains(input: StopPlanInput, prep: Prepared): { chains: number[][]; problems: InfeasiblePosition[] } {
  const sign = directionSign(input.direction);
  const chains: number[][] = [];
  const problems: InfeasiblePosition[] = [];
  input.positions.forEach((p, i) => {
    const chain: number[] = [];
    let fitIdx = -1;
    let reach = lastReachable(prep, i, p.limitMm - p.wearNowMm);
    while (reach !== prep.done && reach > fitIdx) {
      chain.push(reach);
      fitIdx = reach;
      reach = prep.reachNew[i][reach];
    }
    chains.push(chain);
    if (reach === prep.done) return;
    const budgetMm = fitIdx < 0 ? p.limitMm - p.wearNowMm : prep.wearAt[i][fitIdx] + p.limitMm;
    const dueAheadM = aheadWhereWearExceedsM(p.wearStretches, budgetMm);
    const fittedAheadM = fitIdx < 0 ? -1 : prep.aheadM[fitIdx];
    const nextPlaceM = prep.aheadM.find((x) => x > fittedAheadM);
    const ring = fitIdx < 0 ? 'the ring fitted now' : `the ring fitted at ${fittedAheadM.toFixed(1)} m ahead`;
    const reason =
      budgetMm < 0
        ? `the ring fitted now is already past its limit (${p.wearNowMm} mm > ${p.limitMm} mm)`
        : `${ring} reaches its limit ${dueAheadM.toFixed(1)} m ahead, before the next allowed stop place` +
          (nextPlaceM === undefined ? ' (none left inside the horizon)' : ` (${nextPlaceM.toFixed(1)} m ahead)`);
    problems.push({ positionId: p.positionId, ringNumber: chain.length, dueAheadM, dueChainageM: input.currentChainageM + sign * dueAheadM, reason });
  });
  return { chains, problems };
}

/** Prices a plan given as (place index, positions changed there) in place order. */
function pricePlan(input: StopPlanInput, prep: Prepared, plan: { idx: number; changed: number[] }[]): StopPlan {
  const sign = directionSign(input.direction);
  const v = input.wastedRingLifeHPerMm;
  const budgetMm = input.positions.map((p) => p.limitMm - p.wearNowMm);
  const stops = plan.map(({ idx, changed }): PlannedStop => {
    const changes = [...changed].sort((a, b) => a - b).map((i): PlannedChange => {
      const unusedWearMm = Math.max(0, budgetMm[i] - prep.wearAt[i][idx]);
      budgetMm[i] = prep.wearAt[i][idx] + input.positions[i].limitMm;
      return { positionId: input.positions[i].positionId, wearAtChangeMm: input.positions[i].limitMm - unusedWearMm, unusedWearMm };
    });
    return {
      chainageM: input.currentChainageM + sign * prep.aheadM[idx],
      aheadM: prep.aheadM[idx],
      compressedAir: prep.compressedAir[idx],
      changes,
      stopH: prep.stopH[idx],
      changeH: changed.reduce((t, i) => t + prep.changeH[i], 0),
      wastedRingLifeH: v * changes.reduce((t, c) => t + c.unusedWearMm, 0),
    };
  });
  const stopH = stops.reduce((t, s) => t + s.stopH, 0);
  const changeH = stops.reduce((t, s) => t + s.changeH, 0);
  const wastedRingLifeH = stops.reduce((t, s) => t + s.wastedRingLifeH, 0);
  return { stops, cost: { stopH, changeH, wastedRingLifeH, totalH: stopH + changeH + wastedRingLifeH } };
}

/** A search state: at stop place `idx`, before its changes. */
interface Label {
  idx: number;
  costH: number;
  /** costH + v·Σ budget over rings still to be changed: states of equal reach compare on this. */
  keyH: number;
  /** Σ over positions of the own-chain cost from the fitted ring: a lower bound on the rest. */
  ownH: number;
  /** Two 32-bit hashes of `reach`, kept up to date change by change. */
  hashA: number;
  hashB: number;
  parent: Label | null;
  /** The positions changed at the parent's place are those whose reach there was ≤ this. */
  changedUpTo: number;
  /** Per position: last place the fitted ring reaches (`done` if it lasts to the horizon); filled when first needed. */
  reach: Int32Array | null;
  /** Per position: the fitted ring's budget, mm of W: limit − wear now, or W(fitting place) + limit. */
  budgetMm: Float64Array | null;
}

/**
 * Plans the intervention stops over the horizon: the cheapest plan (hours of stops + changes +
 * ring life thrown away), the hand plan for comparison and the saving in hours, or the
 * positions that no plan can keep within their limit. `quickPassStates` tunes the first pass
 * (0 skips it); the result is the same, only the time changes. `maxStates` caps the exact pass
 * (a server must answer in time): past it the best plan found so far is returned, marked
 * `provenOptimal: false`; it is never worse than the hand plan.
 */
export function planStops(
  input: StopPlanInput,
  { quickPassStates = QUICK_PASS_STATES, maxStates = Infinity }: { quickPassStates?: number; maxStates?: number } = {},
): StopPlanResult {
  validate(input);
  const prep = prepare(input);
  const n = input.positions.length;
  const m = prep.aheadM.length;
  const { done } = prep;
  const v = input.wastedRingLifeHPerMm;
  const limitMm = input.positions.map((p) => p.limitMm);

  const { chains, problems } = ownLatestChains(input, prep);
  if (problems.length > 0) return { feasible: false, problems };

  // Hand plan: the union of the positions' own latest chains.
  const handByIdx = new Map<number, number[]>();
  chains.forEach((chain, i) => chain.forEach((idx) => handByIdx.set(idx, [...(handByIdx.get(idx) ?? []), i])));
  const hand = pricePlan(input, prep, [...handByIdx.entries()].sort((a, b) => a[0] - b[0]).map(([idx, changed]) => ({ idx, changed })));

  // Next stops after place `afterIdx` when every ring reaches `limIdx`: the latest place, and the latest free-air place.
  const nextPlaces = (afterIdx: number, limIdx: number): number[] => {
    if (limIdx <= afterIdx) return [];
    const free = prep.prevFree[limIdx];
    return free > afterIdx && free !== limIdx ? [limIdx, free] : [limIdx];
  };
  // ownRestH[i][j]: least cost of position i after a ring is fitted at place j (its own latest
  // chain, every place available). changeThenRestH[i][j] = a change at j followed by that chain,
  // less the changeH + v·budget every change of the current ring pays wherever it is made.
  const ownRestH: Float64Array[] = [];
  const changeThenRestH: Float64Array[] = [];
  for (let i = 0; i < n; i++) {
    const rest = new Float64Array(m);
    const after = new Float64Array(m);
    for (let j = m - 1; j >= 0; j--) {
      const r = prep.reachNew[i][j];
      rest[j] = r === done ? 0 : prep.changeH[i] + v * (prep.wearAt[i][j] + limitMm[i] - prep.wearAt[i][r]) + rest[r];
      after[j] = rest[j] - v * prep.wearAt[i][j];
    }
    ownRestH.push(rest);
    changeThenRestH.push(after);
  }
  const ownTermH = (i: number, reach: number, budgetMm: number) =>
    reach === done ? 0 : prep.changeH[i] + v * (budgetMm - prep.wearAt[i][reach]) + ownRestH[i][reach];
  // Least stop hours after place j: everything fresh there and changed at every stop, each stop as late as allowed.
  const stopsAfterH = new Float64Array(m);
  for (let j = m - 1; j >= 0; j--) {
    let lim = done;
    for (let i = 0; i < n; i++) lim = Math.min(lim, prep.reachNew[i][j]);
    stopsAfterH[j] = lim === done ? 0 : Infinity;
    if (lim !== done) for (const t of nextPlaces(j, lim)) stopsAfterH[j] = Math.min(stopsAfterH[j], prep.stopH[t] + stopsAfterH[t]);
  }
  // Bound (b) of the top comment: own chains plus the least extra for putting the next change of
  // every position (`order`: those still to change, in due order) at shared stops. A group served
  // at stop t pays stopH(t) and, per position o, pen = a(t) − a(reach o) ≥ 0 (a = changeThenRestH
  // does not increase with t: a later change never needs more changes after it); the last group
  // also pays the stops still needed after it. restH[j]: least extra for positions j… when they
  // are served after the current place.
  const penH = (reach: Int32Array, o: number, t: number) => Math.max(0, changeThenRestH[o][t] - changeThenRestH[o][reach[o]]);
  const sharedRestH = (idx: number, reach: Int32Array, order: number[]) => {
    const p = order.length;
    const restH = new Float64Array(p + 1);
    restH[p] = stopsAfterH[idx];
    for (let j = p - 1; j >= 0; j--) {
      restH[j] = Infinity;
      for (const t of nextPlaces(idx, reach[order[j]])) {
        let accH = prep.stopH[t];
        for (let h = j; h < p && accH < restH[j]; h++) {
          accH += penH(reach, order[h], t);
          restH[j] = Math.min(restH[j], accH + (h + 1 === p ? stopsAfterH[t] : restH[h + 1]));
        }
      }
    }
    return restH;
  };

  const startReach = Int32Array.from(input.positions, (p, i) => lastReachable(prep, i, p.limitMm - p.wearNowMm));
  const startBudgetMm = Float64Array.from(input.positions, (p) => p.limitMm - p.wearNowMm);
  const firstLim = startReach.reduce((a, r) => Math.min(a, r), done);
  if (firstLim === done) return { feasible: true, optimised: pricePlan(input, prep, []), hand, savingH: 0, statesExpanded: 0, provenOptimal: true };
  // State hashes: Σ (reach + 1)·c_i over two sets of odd 32-bit multipliers, updated per change.
  const hashA = Int32Array.from({ length: n }, (_, i) => Math.imul(i + 1, 0x9e3779b1) | 1);
  const hashB = Int32Array.from({ length: n }, (_, i) => Math.imul(i + 1, 0x85ebca77) | 1);
  const hashKey = (a: number, b: number) => (a >>> 0) * 0x200000 + ((b >>> 0) & 0x1fffff);
  let startOwnH = 0;
  let startKeyH = 0;
  let startHashA = 0;
  let startHashB = 0;
  for (let i = 0; i < n; i++) {
    startOwnH += ownTermH(i, startReach[i], startBudgetMm[i]);
    if (startReach[i] !== done) startKeyH += v * startBudgetMm[i];
    startHashA = (startHashA + Math.imul(startReach[i] + 1, hashA[i])) | 0;
    startHashB = (startHashB + Math.imul(startReach[i] + 1, hashB[i])) | 0;
  }
  const reachOf = (l: Label, i: number): number => {
    if (l.reach !== null) return l.reach[i];
    const p = l.parent as Label;
    const r = (p.reach as Int32Array)[i];
    return r !== done && r <= l.changedUpTo ? prep.reachNew[i][p.idx] : r;
  };
  const fill = (l: Label): { reach: Int32Array; budgetMm: Float64Array } => {
    if (l.reach === null || l.budgetMm === null) {
      const p = l.parent as Label;
      const pReach = p.reach as Int32Array;
      l.reach = pReach.slice();
      l.budgetMm = (p.budgetMm as Float64Array).slice();
      for (let i = 0; i < n; i++) {
        if (pReach[i] !== done && pReach[i] <= l.changedUpTo) {
          l.reach[i] = prep.reachNew[i][p.idx];
          l.budgetMm[i] = prep.wearAt[i][p.idx] + limitMm[i];
        }
      }
    }
    return { reach: l.reach, budgetMm: l.budgetMm };
  };

  let statesExpanded = 0;
  let stoppedEarly = false;
  // One pass over the places in order; `beamWidth` caps the states expanded per place (Infinity:
  // exact). Returns the best plan costing less than `boundH`, if any.
  const search = (beamWidth: number, boundH: number) => {
    let bestH = boundH;
    let best: { last: Label; changedUpTo: number } | null = null;
    const tolH = 1e-9 * (1 + boundH);
    const buckets: Map<number, Label[]>[] = Array.from({ length: m }, () => new Map());
    // Adds a state, merged with one of equal reach (keeping the lower folded cost).
    const sameReach = (a: Label, b: Label) => {
      for (let i = 0; i < n; i++) if (reachOf(a, i) !== reachOf(b, i)) return false;
      return true;
    };
    const push = (label: Label) => {
      const key = hashKey(label.hashA, label.hashB);
      const held = buckets[label.idx].get(key) ?? [];
      const k = held.findIndex((h) => sameReach(h, label));
      if (k < 0) buckets[label.idx].set(key, [...held, label]);
      else if (label.keyH < held[k].keyH) held[k] = label;
    };
    for (const idx of nextPlaces(-1, firstLim)) {
      const costH = prep.stopH[idx];
      push({ idx, costH, keyH: costH + startKeyH, ownH: startOwnH, hashA: startHashA, hashB: startHashB, parent: null, changedUpTo: -1, reach: startReach, budgetMm: startBudgetMm });
    }

    for (let q = 0; q < m; q++) {
      if (beamWidth === Infinity && statesExpanded > maxStates) {
        stoppedEarly = true;
        break;
      }
      const entries = [...buckets[q].values()].flat().filter((l) => l.costH + stopsAfterH[q] + l.ownH < bestH - tolH);
      buckets[q].clear();
      const filled = new Map(entries.map((e) => [e, fill(e)]));
      // Dominance, comparing only the positions whose reach differs between the states here.
      const dims: number[] = [];
      for (let i = 0; i < n && entries.length > 1; i++) if (entries.some((e) => filled.get(e)!.reach[i] !== filled.get(entries[0])!.reach[i])) dims.push(i);
      const reachSum = new Map(entries.map((e) => [e, dims.reduce((t, i) => t + filled.get(e)!.reach[i], 0)]));
      const dominates = (a: Label, b: Label) => {
        if (reachSum.get(a)! < reachSum.get(b)!) return false;
        const ra = filled.get(a)!.reach;
        const { reach: rb, budgetMm: bb } = filled.get(b)!;
        let slackH = b.keyH - a.keyH;
        for (const i of dims) {
          if (ra[i] < rb[i]) return false;
          if (ra[i] === done && rb[i] !== done) slackH -= v * bb[i];
        }
        return slackH >= 0;
      };
      entries.sort((x, y) => x.keyH - y.keyH);
      const kept: Label[] = [];
      for (const e of entries) if (!kept.some((k) => dominates(k, e))) kept.push(e);
      kept.sort((x, y) => x.costH + x.ownH - (y.costH + y.ownH));

      for (const label of kept.slice(0, beamWidth)) {
        if (label.costH + stopsAfterH[q] + label.ownH >= bestH - tolH) break;
        const { reach, budgetMm } = filled.get(label)!;
        const order: number[] = [];
        for (let i = 0; i < n; i++) if (reach[i] !== done) order.push(i);
        order.sort((a, b) => reach[a] - reach[b]);
        // Bound (b): at least one position is changed here; the pens of those plus restH after.
        const restH = sharedRestH(q, reach, order);
        const baseH = label.costH + label.ownH;
        let extraH = Infinity;
        for (let k = 0, pensH = 0; k < order.length && baseH + pensH < bestH - tolH; k++) {
          pensH += penH(reach, order[k], q);
          extraH = Math.min(extraH, pensH + restH[k + 1]);
        }
        if (baseH + Math.max(extraH, stopsAfterH[q]) >= bestH - tolH) continue;
        statesExpanded++;
        // Change the k due first; the next stop must lie beyond the last of them.
        let changeCostH = 0;
        let penSumH = 0;
        let minNewReach = done;
        let { ownH, keyH } = label;
        let hA = 0;
        let hB = 0;
        for (let k = 0; k < order.length; k++) {
          const i = order[k];
          const newReach = prep.reachNew[i][q];
          const newBudgetMm = prep.wearAt[i][q] + limitMm[i];
          const thisChangeH = prep.changeH[i] + v * (budgetMm[i] - prep.wearAt[i][q]);
          changeCostH += thisChangeH;
          penSumH += penH(reach, i, q);
          ownH += ownTermH(i, newReach, newBudgetMm) - ownTermH(i, reach[i], budgetMm[i]);
          keyH += thisChangeH - v * budgetMm[i] + (newReach === done ? 0 : v * newBudgetMm);
          hA = (hA + Math.imul(newReach - reach[i], hashA[i])) | 0;
          hB = (hB + Math.imul(newReach - reach[i], hashB[i])) | 0;
          minNewReach = Math.min(minNewReach, newReach);
          const groupReach = reach[i];
          if (minNewReach <= groupReach) break; // a new ring would not get past this group, nor past any larger one
          if (k + 1 < order.length && reach[order[k + 1]] === groupReach) continue;
          const lim = Math.min(k + 1 < order.length ? reach[order[k + 1]] : done, minNewReach);
          if (lim === done) {
            if (label.costH + changeCostH < bestH - tolH) {
              bestH = label.costH + changeCostH;
              best = { last: label, changedUpTo: groupReach };
            }
            break; // changing more is never needed
          }
          if (baseH + penSumH + restH[k + 1] >= bestH - tolH) continue; // bound (b) for this choice
          for (const idx of nextPlaces(groupReach, lim)) {
            const costH = label.costH + changeCostH + prep.stopH[idx];
            if (costH + stopsAfterH[idx] + ownH >= bestH - tolH) continue;
            const hashes = { hashA: (label.hashA + hA) | 0, hashB: (label.hashB + hB) | 0 };
            push({ idx, costH, keyH: keyH + prep.stopH[idx], ownH, ...hashes, parent: label, changedUpTo: groupReach, reach: null, budgetMm: null });
          }
        }
      }
    }
    return { best, bestH };
  };

  const quick = search(quickPassStates, hand.cost.totalH);
  const best = search(Infinity, quick.bestH).best ?? quick.best;
  const provenOptimal = !stoppedEarly;
  if (best === null) return { feasible: true, optimised: hand, hand, savingH: 0, statesExpanded, provenOptimal };
  const plan: { idx: number; changed: number[] }[] = [];
  let changedUpTo = best.changedUpTo;
  for (let l: Label | null = best.last; l !== null; l = l.parent) {
    const reach = l.reach as Int32Array;
    plan.unshift({ idx: l.idx, changed: [...reach.keys()].filter((i) => reach[i] !== done && reach[i] <= changedUpTo) });
    changedUpTo = l.changedUpTo;
  }
  const optimised = pricePlan(input, prep, plan);
  return { feasible: true, optimised, hand, savingH: hand.cost.totalH - optimised.cost.totalH, statesExpanded, provenOptimal };
}
