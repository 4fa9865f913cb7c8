/**
 * Intervention-stop planner: where to stop along the drive, and which cutterhead positions to
 * change at each stop, so that no position passes its cautious (P90) wear limit inside the
 * planning horizon, at the least total cost. Exact.
 *
 * Model (all distances in metres ahead of the current chainage, along the drive)
 * - Position i wears at a cautious rate given per stretch ahead (mm per m of advance, e.g. the
 *   forecast's P90 `wearMmPerM`); W_i(x) is the wear added from here to x. A ring fitted at x0
 *   carries W_i(x) − W_i(x0) at x, the ring fitted now wearNowMm + W_i(x). A ring passes its
 *   limit where its wear first exceeds limitMm; "due" is the last point at or under the limit.
 *   A new ring wears like the old one (same position, same ground), so it falls due again later.
 * - Stops only at the allowed places; a change at a stop must come at or before the ring's due
 *   point; a position needs no change when its ring is still within the limit at the horizon.
 * - Cost in hours: fixed hours per stop (free air or compressed air), hours per cutter changed
 *   by position class, and ring life thrown away, valued at `wastedRingLifeHPerMm` hours per mm
 *   of allowable wear left unused on a ring taken out (the site converts a ring's price into
 *   hours of boring time; 0 ignores it). Rings still fitted at the horizon are not charged.
 *
 * Why each position is changed at the latest chosen stop before it is due ("latest change")
 * For one position with changes at x1 < … < xk, the unused wear sums to
 *   (limit − wearNow − W(x1)) + Σ_{j≥2} (limit − (W(xj) − W(x(j−1)))) = k·limit − wearNow − W(xk),
 * so its cost is k·(changeH + v·limit) − v·(wearNow + W(xk)): only the number of changes and the
 * place of the last one matter. Given the set of stops, changing each ring at the latest stop at
 * or before its due point gives, by the usual stay-ahead argument (a later fitting never makes
 * the next due point earlier), the fewest changes and, among those, the latest last change. A
 * plan with more changes cannot win: each extra change costs changeH + v·limit, while the latest
 * ring of the "latest change" plan is within its limit at the horizon, so moving the last change
 * later gains at most v·(W(horizon) − W(xk)) ≤ v·limit. Hence, for a fixed set of stops, the
 * cost of each position is fixed, and the plan is a choice of stops.
 *
 * Why the state is not just "the last stop"
 * The positions changed at a stop are those that would pass their limit before the next stop,
 * which depends on where each ring was fitted. When a position can need more than one change
 * in the horizon, its fitting place depends on the earlier stops, not only on the last one (two
 * plans both stopping at 40 m can carry a ring fitted at 10 m or at 12 m), so a dynamic
 * programme over "last stop" alone would be wrong. The state is the last stop plus, for every
 * position that still needs a change, the last allowed place it can reach.
 *
 * Search (exact)
 * 1. A stop at which nothing is changed can be dropped. Each stop can be moved later, up to the
 *    latest allowed place that every position reaches, without losing feasibility (later rings
 *    fall due later) or raising cost (only the last change of a position moves, and later);
 *    it may only cost more if that place needs compressed air. So, after stop p, the next stop
 *    is either the latest place all positions reach or the latest free-air place before it.
 * 2. At a stop, the positions changed are the k due first (a prefix in due order, changed
 *    exactly when the next stop lies beyond them), and the next stop follows from step 1.
 * 3. States are expanded in chainage order (every transition moves forward). States with the
 *    same stop and the same reachable places of the positions still needing a change have the
 *    same future except for a cost term v·Σ fitting wear that every position still needing a
 *    change pays for sure, so they are merged keeping the least cost plus that term. A state is
 *    dropped when its cost plus a lower bound on the rest (each position changed at its own
 *    latest places, plus the fewest further stops, found by changing everything at every stop)
 *    cannot beat the best complete plan so far, which starts as the hand plan below.
 * Complexity: preparation O(n·(m + s) + n·m·log m) for n positions, m allowed places and s wear
 * stretches; each state costs O(n log n). When no new ring falls due inside the horizon there is
 * at most one state per place, O(m·n log n) in all. With repeated changes the number of states
 * can in the worst case grow exponentially with the number of positions changed more than once
 * (the problem then resembles joint replenishment, which is NP-hard); the merging and the bound
 * keep it small on drive-sized inputs (see tests/bench/stop-planner.bench.ts).
 *
 * Hand plan, for comparison: stop at the last allowed place before the first position is due,
 * change there only what would be due before the next such stop, repeat. That changes every
 * position at its own latest place, so it is feasible exactly when any plan is; an instance is
 * infeasible exactly when some ring is due before the next allowed place, reported per position.
 */
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
  | { feasible: true; optimised: StopPlan; hand: StopPlan; savingH: number; statesExpanded: number }
  | { feasible: false; problems: InfeasiblePosition[] };

/** Tolerance on wear comparisons, mm: absorbs rounding in the summed wear. */
const EPS_MM = 1e-9;

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
  /** Sentinel "reaches the horizon" = number of places. */
  done: number;
}

/** Wear added (mm) over [0, x] for each sorted x, from the position's stretches. */
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

/** Metres ahead (sup) where the wear added first exceeds `wearMm`; Infinity if never. */
function aheadWhereWearExceedsM(stretches: WearStretch[], wearMm: number): number {
  if (wearMm < 0) return 0;
  let cumMm = 0;
  for (let k = 0; k < stretches.length; k++) {
    const { fromAheadM, wearMmPerM } = stretches[k];
    const lengthM = k + 1 < stretches.length ? stretches[k + 1].fromAheadM - fromAheadM : Infinity;
    if (wearMmPerM > 0 && cumMm + wearMmPerM * lengthM > wearMm) return fromAheadM + Math.max(0, wearMm - cumMm) / wearMmPerM;
    cumMm += wearMmPerM * lengthM;
  }
  return Infinity;
}

function validate(input: StopPlanInput): void {
  const nonNegative = { freeAirStopH: input.freeAirStopH, compressedAirStopH: input.compressedAirStopH, wastedRingLifeHPerMm: input.wastedRingLifeHPerMm, ...input.changeHByClass };
  for (const [name, value] of Object.entries(nonNegative)) {
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
  const sign = input.direction === 'increasing' ? 1 : -1;
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
  const prep: Prepared = {
    aheadM,
    compressedAir: places.map((p) => p.compressedAir),
    stopH: places.map((p) => (p.compressedAir ? input.compressedAirStopH : input.freeAirStopH)),
    prevFree,
    wearAt,
    wearAtHorizon,
    reachNew: [],
    changeH: input.positions.map((p) => input.changeHByClass[p.positionClass]),
    done: m,
  };
  prep.reachNew = input.positions.map((p, i) => Int32Array.from(wearAt[i], (w) => lastReachable(prep, i, w + p.limitMm)));
  return prep;
}

/**
 * Last place (index) position i reaches while its wear added from here stays ≤ `budgetMm`
 * (= limit − wear now for the ring fitted now, W(fit place) + limit for a new ring);
 * `done` when it stays within the limit to the horizon, −1 when it reaches no place.
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

/** Per position: the changes of the "each ring at its own latest place" chain, or where it fails. */
function ownLatestChains(input: StopPlanInput, prep: Prepared): { chains: number[][]; problems: InfeasiblePosition[] } {
  const sign = input.direction === 'increasing' ? 1 : -1;
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
    const nextPlace = prep.aheadM.find((x) => x > (fitIdx < 0 ? -1 : prep.aheadM[fitIdx]));
    const ring = fitIdx < 0 ? 'the ring fitted now' : `the ring fitted at ${prep.aheadM[fitIdx].toFixed(1)} m ahead`;
    problems.push({
      positionId: p.positionId,
      ringNumber: chain.length,
      dueAheadM,
      dueChainageM: input.currentChainageM + sign * dueAheadM,
      reason:
        `${ring} reaches its limit ${dueAheadM.toFixed(1)} m ahead, before the next allowed stop place` +
        (nextPlace === undefined ? ' (none left inside the horizon)' : ` (${nextPlace.toFixed(1)} m ahead)`),
    });
  });
  return { chains, problems };
}

/** Prices a plan given as (place index, positions changed there) pairs in order. */
function pricePlan(input: StopPlanInput, prep: Prepared, plan: { idx: number; changed: number[] }[]): StopPlan {
  const sign = input.direction === 'increasing' ? 1 : -1;
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

/** A search state: at place `idx`, before its changes. */
interface Label {
  idx: number;
  /** Per position: last place the fitted ring reaches (`done` if it lasts the horizon). */
  reach: Int32Array;
  /** Per position: wear budget of the fitted ring, mm of W (see lastReachable). */
  budgetMm: Float64Array;
  costH: number;
  parent: Label | null;
  /** Positions changed at the parent's place. */
  changedAtParent: number[];
}

/**
 * Plans the intervention stops over the horizon: the cheapest plan (hours: stops + changes +
 * ring life thrown away), the hand plan for comparison and the saving, or the positions that
 * no plan can keep within their limit.
 */
export function planStops(input: StopPlanInput): StopPlanResult {
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
  const handPlan = [...handByIdx.entries()].sort((a, b) => a[0] - b[0]).map(([idx, changed]) => ({ idx, changed }));
  const hand = pricePlan(input, prep, handPlan);

  // Lower bounds. ownRestH[i][j]: least cost of position i after a ring is fitted at place j
  // (its own latest chain, all places available). fewestStops[j]: stops still needed after
  // place j if everything were changed there (everything changed at every stop, as late as possible).
  const ownRestH = input.positions.map((_, i) => {
    const rest = new Float64Array(m);
    for (let j = m - 1; j >= 0; j--) {
      const r = prep.reachNew[i][j];
      rest[j] = r === done ? 0 : prep.changeH[i] + v * (prep.wearAt[i][j] + limitMm[i] - prep.wearAt[i][r]) + rest[r];
    }
    return rest;
  });
  const fewestStops = new Int32Array(m);
  for (let j = m - 1; j >= 0; j--) {
    let r = done;
    for (let i = 0; i < n; i++) r = Math.min(r, prep.reachNew[i][j]);
    fewestStops[j] = r === done ? 0 : 1 + fewestStops[r];
  }
  const minStopH = Math.min(input.freeAirStopH, input.compressedAirStopH);
  const lowerBoundRestH = (l: Label) => {
    let h = fewestStops[l.idx] * minStopH;
    for (let i = 0; i < n; i++) {
      const r = l.reach[i];
      if (r !== done) h += prep.changeH[i] + v * (l.budgetMm[i] - prep.wearAt[i][r]) + ownRestH[i][r];
    }
    return h;
  };

  let bestH = hand.cost.totalH;
  let best: { last: Label; changed: number[] } | null = null;
  const buckets: Map<string, { label: Label; keyH: number }>[] = Array.from({ length: m }, () => new Map());
  const tolH = 1e-9 * (1 + bestH);

  // Adds a state at place `idx`: merged with an equal one, dropped if it cannot beat the best plan.
  const push = (label: Label) => {
    if (label.costH + lowerBoundRestH(label) >= bestH - tolH) return;
    const key = label.reach.join(',');
    let keyH = label.costH;
    for (let i = 0; i < n; i++) if (label.reach[i] !== done) keyH += v * label.budgetMm[i];
    const held = buckets[label.idx].get(key);
    if (held === undefined || keyH < held.keyH) buckets[label.idx].set(key, { label, keyH });
  };
  // Next stops after place `afterIdx` when all positions reach `limIdx`: the latest place, and the latest free-air place.
  const nextPlaces = (afterIdx: number, limIdx: number) => {
    const free = prep.prevFree[limIdx];
    return free > afterIdx && free !== limIdx ? [limIdx, free] : [limIdx];
  };

  const start: Label = {
    idx: -1,
    reach: Int32Array.from(input.positions, (p, i) => lastReachable(prep, i, p.limitMm - p.wearNowMm)),
    budgetMm: Float64Array.from(input.positions, (p) => p.limitMm - p.wearNowMm),
    costH: 0,
    parent: null,
    changedAtParent: [],
  };
  const firstLim = start.reach.reduce((a, r) => Math.min(a, r), done);
  if (firstLim === done) {
    return { feasible: true, optimised: pricePlan(input, prep, []), hand, savingH: 0, statesExpanded: 0 };
  }
  for (const idx of nextPlaces(-1, firstLim)) push({ ...start, idx, costH: prep.stopH[idx], parent: null });

  let statesExpanded = 0;
  for (let q = 0; q < m; q++) {
    for (const { label } of buckets[q].values()) {
      if (label.costH + lowerBoundRestH(label) >= bestH - tolH) continue;
      statesExpanded++;
      const order: number[] = [];
      for (let i = 0; i < n; i++) if (label.reach[i] !== done) order.push(i);
      order.sort((a, b) => label.reach[a] - label.reach[b]);
      let changeCostH = 0;
      let minNewReach = done;
      for (let k = 0; k < order.length; k++) {
        const i = order[k];
        changeCostH += prep.changeH[i] + v * (label.budgetMm[i] - prep.wearAt[i][q]);
        minNewReach = Math.min(minNewReach, prep.reachNew[i][q]);
        const groupReach = label.reach[i];
        if (minNewReach <= groupReach) break; // a new ring would not get past this group: larger groups fail too
        if (k + 1 < order.length && label.reach[order[k + 1]] === groupReach) continue;
        const lim = Math.min(k + 1 < order.length ? label.reach[order[k + 1]] : done, minNewReach);
        const changed = order.slice(0, k + 1);
        if (lim === done) {
          if (label.costH + changeCostH < bestH - tolH) {
            bestH = label.costH + changeCostH;
            best = { last: label, changed };
          }
          break; // changing more than this is never needed
        }
        const reach = label.reach.slice();
        const budgetMm = label.budgetMm.slice();
        for (const c of changed) {
          reach[c] = prep.reachNew[c][q];
          budgetMm[c] = prep.wearAt[c][q] + limitMm[c];
        }
        for (const idx of nextPlaces(groupReach, lim)) {
          push({ idx, reach, budgetMm, costH: label.costH + changeCostH + prep.stopH[idx], parent: label, changedAtParent: changed });
        }
      }
    }
    buckets[q].clear();
  }

  if (best === null) return { feasible: true, optimised: hand, hand, savingH: 0, statesExpanded };
  const plan: { idx: number; changed: number[] }[] = [];
  let changed = best.changed;
  for (let l: Label | null = best.last; l !== null; l = l.parent) {
    plan.unshift({ idx: l.idx, changed });
    changed = l.changedAtParent;
  }
  const optimised = pricePlan(input, prep, plan);
  return { feasible: true, optimised, hand, savingH: hand.cost.totalH - optimised.cost.totalH, statesExpanded };
}
