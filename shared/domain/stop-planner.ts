/**
 * Intervention-stop planner: where to stop along the drive, and which cutterhead positions to
 * change at each stop, so that no position passes its cautious (P90) wear limit inside the
 * planning horizon, at the least total cost, with a certificate: proven cheapest, or at most X %
 * above the cheapest possible plan (X from a lower bound, ./stop-planner-steps/lagrangian.ts).
 *
 * Steps, one file each under ./stop-planner-steps/: model.ts (prepare the input; the cost model, written
 * once), baselines.ts (the latest-change plan, the site-practice rule, the fixed-interval rule),
 * bounds.ts (lower bounds for the search), lagrangian.ts (the certificate's lower bound and plans
 * found from it), search.ts (the exact search).
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
 * Certificate: the Lagrangian bound L ≤ cheapest plan; a plan of H hours is then at most
 * (H − L)/L above the cheapest. When the exact search runs to the end, the plan is proven cheapest.
 * Order of work: the search's quick pass (2 states per place; its plan aims the bound's steps), a
 * short exact search without the bound (300 states: it proves easy drives at once, so the bound's
 * steps are skipped there), the bound, a second quick pass (3 states per place) that keeps the
 * states whose cost plus the bound's rest is least, the exact search (pruned with the bound's
 * multipliers; with an answer time, it goes on past its state cap while the plan is within 3 % of
 * the bound), then, when nothing proved the plan, the stronger decomposition bound for a time budget
 * (./stop-planner-steps/stop-path-copy.ts) and a local search over stop sets, each set priced
 * exactly (./stop-planner-steps/lagrangian.ts). The stronger bound and the local search end by the
 * answer time (`answerWithinMs`); the steps before them are cut only at the work limit
 * (`workLimitMs`, reached by inputs far larger than the settings were sized for), and the
 * certificate says when that happened.
 * Where the gap comes from (measured, DEVELOPERS.md decision 48): on the bench drive with wear × 3
 * the bound was the loose part (converged, it is within 1 % of the plan, and with it the search
 * proves the plan). On the demo drive the plain bound stays ≈ 19 % under the best plan even
 * converged: eight gauge positions whose rings last 32–35 m force a stop about every 32 m, and a
 * position whose ring lasts 87–110 m must then change every second or third stop (63–95 m) — the
 * plain relaxation lets it change at fractions of stops placed anywhere, so it never pays for
 * that (in the best plan the positions' chains cost 283 h more than their own best chains, about
 * the whole gap). The decomposition bound gives the fast-wearing positions a stop path of their
 * own, which must be a real path (each stop within reach of every ring fitted at the one before),
 * and so recovers part of it (≈ 22 % → 16 % in 1.5 s; the gain is on gauge positions whose rings
 * last 33–35 m, held to the stops the 32 m rings set). Copies for the slower positions gain
 * nothing at the plain bound's multipliers and little after many steps; closing the gap to 2 %
 * would need every position's copy to agree with the others (branching on stops, or far more
 * steps than a request allows). The relaxation itself is the limit: its linear programme, solved
 * exactly by HiGHS, is 1.4 % under the proven optimum on the demo drive cut to 450 m and 1.8 % at
 * 600 m, and on a lattice case 2.6 % at 400 m and 5.8 % at 800 m; the gap grows with the horizon,
 * so at 2 km no bound of this relaxation is likely to come within 2 % (decision 51,
 * tests/bench/relaxation.bench.ts).
 *
 * Feasibility: changing every ring at its own latest place (the latest-change plan) is feasible
 * exactly when any plan is; an instance is infeasible exactly when some ring falls due before the
 * next allowed place, reported per position with the ring and the places around its due point.
 *
 * Comparisons: the site-practice rule (stop when the first disc reaches its cautious limit, change
 * every disc worn past a share of its limit, default 80 %) and a stop every N metres; both are
 * priced with the same cost model, so the saving can be checked from the plans' own tables.
 */
import type { DriveDirection, PositionClass } from './forecast';
import { fixedIntervalPlan, latestChangePlan, ownLatestChains, practicePlan } from './stop-planner-steps/baselines';
import { searchBounds } from './stop-planner-steps/bounds';
import { decompositionBound, improveStops, lagrangianBound, lagrangianRestBound } from './stop-planner-steps/lagrangian';
import { prepare, pricePlan, validate } from './stop-planner-steps/model';
import { exactSearch } from './stop-planner-steps/search';

/** States expanded per place by the first, quick pass that finds a good plan to bound the exact pass. */
const QUICK_PASS_STATES = 2;
/**
 * States expanded per place by the second quick pass, run after the bound and ranked by cost plus
 * the bound's rest (decision 50): on the demo drive cut to 450 m it finds the cheapest plan, which
 * the exact search then proves (the first pass's plan was 0.5 % above it).
 */
const RANKED_PASS_STATES = 3;
/** States of the short exact search run before the bound (it proves easy drives at once: the bench drive in under 100). */
const PROBE_STATES = 300;
/** Subgradient steps of the Lagrangian bound (about 1 s on an 80-position, 1,300-place drive; tests/bench). */
const BOUND_ITERATIONS = 400;
/** Under a work limit (`workLimitMs`), the bound may take this share of the time left; the exact search gets the rest. */
const BOUND_TIME_SHARE = 0.75;
/** The bound stops improving once the plan is certified within this share. */
const TARGET_GAP = 0.005;
/**
 * When the capped exact search did not prove the plan and an answer time is set, the search goes
 * on past its cap for at most this share of the time left before the answer (the rest to the
 * stronger bound and the local search; decision 51).
 */
const SEARCH_ON_SHARE = 0.5;
/**
 * The search goes on past its cap only when the plan is then within this share of the bound
 * (nearer, it may finish; farther, it rarely does): measured on the demo drive,
 * cut to 600 m (2.2 %) the search proves the plan with about 6,000 more states; cut to 700 m (4.4 %)
 * it does not in 20 s, and time taken from the stronger bound leaves a wider gap.
 */
const SEARCH_ON_GAP = 0.03;

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

/** How close the plan is to the cheapest possible one. */
export interface PlanCertificate {
  /** Every plan of this instance costs at least this many hours. */
  lowerBoundH: number;
  /** True when the plan is proven the cheapest (exact search run to the end, or bound reached). */
  proven: boolean;
  /** (plan hours − lower bound) / lower bound: the plan is at most this share above the cheapest; 0 when proven. */
  gap: number;
  /**
   * True when the work limit (`workLimitMs`) stopped the search or the bound before the work the
   * other options allow: the plan and the bound still hold, but less was tried.
   */
  cutForTime: boolean;
}

export type StopPlanResult =
  | {
      feasible: true;
      optimised: StopPlan;
      certificate: PlanCertificate;
      /** The site-practice rule's plan (null if the rule gets stuck: a new ring would pass its limit before the next place). */
      practice: StopPlan | null;
      /** A stop every `intervalM` metres (null if the rule gets stuck). */
      fixedInterval: StopPlan | null;
      /** Search states expanded, a measure of the work done. */
      statesExpanded: number;
      /** Same as certificate.proven. */
      provenOptimal: boolean;
    }
  | { feasible: false; problems: InfeasiblePosition[] };

/** The rules the optimised plan is compared with (planner settings). */
export interface ComparisonRules {
  /** Site practice: at a stop, change every disc worn to at least this share of its limit. Common practice, no source. */
  changeShare: number;
  /** Fixed interval: a stop every this many metres. */
  intervalM: number;
}

/** Defaults of the comparison rules: 80 % of the limit (common practice, no source), a stop every 250 m (common practice, no source). */
export const DEFAULT_COMPARISON_RULES: ComparisonRules = { changeShare: 0.8, intervalM: 250 };

export interface PlanStopsOptions {
  /** States expanded per place by the quick first pass of the search (0 skips it); only the time changes. */
  quickPassStates?: number;
  /**
   * Cap on the exact search (a server must answer in time); past it the plan is the best found,
   * with its certificate. With `answerWithinMs`, a search stopped at the cap goes on for a share of
   * the time left when the plan is within 3 % of the bound (SEARCH_ON_GAP).
   */
  maxStates?: number;
  /** Steps of the Lagrangian bound (0 skips it; the certificate is then the search's only). */
  boundIterations?: number;
  /** The bound stops improving once the plan is within this share of it. */
  targetGap?: number;
  /**
   * Milliseconds for the stronger bound (Lagrangian decomposition, ./stop-planner-steps/stop-path-copy.ts)
   * after the exact search, when it did not prove the plan and the gap is above `targetGap` (0: none).
   */
  strongBoundMs?: number;
  /** Milliseconds of local search over stop sets after the exact search, when it did not prove the plan (0: none). Not a proof; only the plan can improve. */
  localSearchMs?: number;
  /**
   * The answer is due this many milliseconds after the call: the exact search past its cap, the
   * stronger bound and the local search (the steps that run for a time, not for a fixed amount of
   * work) end by then. Default: no limit (and no search past the cap).
   */
  answerWithinMs?: number;
  /**
   * The fixed-work steps after the baseline plans are cut this many milliseconds after the call:
   * the quick passes end with what they found, the bound takes at most three quarters of the time
   * left when it starts, the exact search ends as past `maxStates` (not proven). Only inputs far
   * larger than the other options were sized for reach it; only the certificate and the plan's
   * cost can suffer, never the plan's validity. Default: no limit (the answer then does not depend
   * on the machine's speed, apart from the timed steps above).
   */
  workLimitMs?: number;
  rules?: ComparisonRules;
}

/**
 * Plans the intervention stops over the horizon: the cheapest plan found (hours of stops + changes
 * + ring life thrown away) with its certificate, the site-practice and fixed-interval plans for
 * comparison, or the positions that no plan can keep within their limit.
 */
export function planStops(input: StopPlanInput, options: PlanStopsOptions = {}): StopPlanResult {
  const {
    quickPassStates = QUICK_PASS_STATES,
    maxStates = Infinity,
    boundIterations = BOUND_ITERATIONS,
    targetGap = TARGET_GAP,
    localSearchMs = 0,
    strongBoundMs = 0,
    answerWithinMs = Infinity,
    workLimitMs = Infinity,
    rules = DEFAULT_COMPARISON_RULES,
  } = options;
  const answerBy = performance.now() + answerWithinMs;
  const workBy = performance.now() + workLimitMs;
  if (!(rules.changeShare > 0 && rules.changeShare <= 1)) throw new RangeError(`change share must be in (0, 1], got ${rules.changeShare}`);
  if (!(rules.intervalM > 0)) throw new RangeError(`interval must be > 0 m, got ${rules.intervalM}`);
  // Step 1: prepare.
  validate(input);
  const prep = prepare(input);
  // Step 2: baseline plans; the latest-change plan decides feasibility.
  const { chains, problems } = ownLatestChains(prep);
  if (problems.length > 0) return { feasible: false, problems };
  const practiceIdx = practicePlan(prep, rules.changeShare);
  const intervalIdx = fixedIntervalPlan(prep, rules.intervalM, rules.changeShare);
  const practice = practiceIdx && pricePlan(prep, practiceIdx);
  const fixedInterval = intervalIdx && pricePlan(prep, intervalIdx);
  let best = [pricePlan(prep, latestChangePlan(chains)), practice, fixedInterval]
    .filter((p): p is StopPlan => p !== null)
    .reduce((a, b) => (b.cost.totalH < a.cost.totalH ? b : a));
  // Step 3: the quick pass of the search first, when the bound runs: its plan steers the bound's
  // step lengths (Polyak steps aim at the best plan's hours; a far target slows the ascent).
  const bounds = searchBounds(prep);
  // A quick pass cut by the work limit finishes its best states by the site-practice rule.
  const finish = (afterIdx: number, reach: Int32Array, budgetMm: Float64Array) =>
    practicePlan(prep, rules.changeShare, { afterIdx, reach, budgetMm });
  let quickStates = 0;
  let cutForTime = false;
  const quickFirst = quickPassStates > 0 && boundIterations > 0 && best.cost.totalH > 0;
  if (quickFirst) {
    const quick = exactSearch(prep, bounds, { quickPassStates, maxStates: 0, boundH: best.cost.totalH, deadline: workBy, finish });
    quickStates = quick.statesExpanded;
    cutForTime ||= quick.timedOut;
    if (quick.plan !== null) {
      const quickPlan = pricePlan(prep, quick.plan);
      if (quickPlan.cost.totalH < best.cost.totalH) best = quickPlan;
    }
  }
  // Step 4: a short exact search without the bound (PROBE_STATES): on easy drives it proves the
  // plan at once, and the bound's steps (most of the time on a long drive) are not needed.
  let probeStates = 0;
  let probed: ReturnType<typeof exactSearch> | null = null;
  if (quickFirst) {
    probed = exactSearch(prep, bounds, {
      quickPassStates: 0,
      maxStates: Math.min(maxStates, PROBE_STATES),
      boundH: best.cost.totalH,
      deadline: workBy,
    });
    probeStates = probed.statesExpanded;
    cutForTime ||= probed.timedOut;
    if (probed.plan !== null) {
      const probePlan = pricePlan(prep, probed.plan);
      if (probePlan.cost.totalH < best.cost.totalH) best = probePlan;
    }
  }
  const probeProven = probed !== null && probed.complete;
  // Step 5: the lower bound, and plans found from it.
  const relaxed =
    !probeProven && best.cost.totalH > 0 && boundIterations > 0
      ? lagrangianBound(prep, {
          iterations: boundIterations,
          upperH: best.cost.totalH,
          targetGap,
          deadline: performance.now() + BOUND_TIME_SHARE * Math.max(0, workBy - performance.now()),
        })
      : null;
  cutForTime ||= relaxed?.timedOut ?? false;
  if (relaxed?.plan && relaxed.planH < best.cost.totalH) best = pricePlan(prep, relaxed.plan);
  // Step 6: the exact search, bounded by the best plan so far; first a quick pass that keeps the
  // states whose cost plus the bound's rest is least (the rest counts the stops still to come).
  const proven0 = relaxed !== null && best.cost.totalH - relaxed.lowerH <= 1e-9 * (1 + best.cost.totalH);
  const restBoundH = relaxed ? lagrangianRestBound(prep, relaxed.lambda) : undefined;
  const searched0 =
    probeProven && probed !== null
      ? { ...probed, plan: null, statesExpanded: 0 }
      : proven0
        ? { plan: null, statesExpanded: 0, complete: true, lowerH: best.cost.totalH, timedOut: false }
        : exactSearch(prep, bounds, {
            quickPassStates: quickFirst ? RANKED_PASS_STATES : quickPassStates,
            maxStates,
            boundH: best.cost.totalH,
            restBoundH,
            deadline: workBy,
            finish,
          });
  cutForTime ||= searched0.timedOut;
  // Step 6b: past the cap, the search goes on for a share of the time before the answer (a timed
  // step, like the stronger bound: its end is no cut of the fixed work). It starts again from the
  // first place, bounded by the best plan so far, so "complete" still proves that plan cheapest.
  let searchedOn: ReturnType<typeof exactSearch> | null = null;
  if (!searched0.complete && !searched0.timedOut && answerWithinMs < Infinity) {
    if (searched0.plan !== null) {
      const searched = pricePlan(prep, searched0.plan);
      if (searched.cost.totalH < best.cost.totalH) best = searched;
    }
    const lower0H = Math.max(0, relaxed?.lowerH ?? 0, searched0.lowerH, probed?.lowerH ?? 0);
    const until = Math.min(workBy, performance.now() + SEARCH_ON_SHARE * Math.max(0, answerBy - localSearchMs - performance.now()));
    if (best.cost.totalH - lower0H <= SEARCH_ON_GAP * lower0H && until > performance.now()) {
      searchedOn = exactSearch(prep, bounds, {
        quickPassStates: 0,
        maxStates: Infinity,
        boundH: best.cost.totalH,
        restBoundH,
        deadline: until,
      });
    }
  }
  const found = {
    ...searched0,
    statesExpanded: searched0.statesExpanded + quickStates + probeStates + (searchedOn?.statesExpanded ?? 0),
    ...(searchedOn && {
      plan: searchedOn.plan, // the capped search's plan is already in `best`
      complete: searchedOn.complete,
      lowerH: Math.max(searched0.lowerH, searchedOn.lowerH),
    }),
  };
  if (found.plan !== null) {
    const searched = pricePlan(prep, found.plan);
    if (searched.cost.totalH < best.cost.totalH) best = searched;
  }
  // Step 7: the stronger bound, when the search did not prove the plan and the gap is still wide.
  let strongH = 0;
  const lowerSoFar0H = Math.max(0, relaxed?.lowerH ?? 0, found.lowerH, probed?.lowerH ?? 0);
  const strongBy = Math.min(performance.now() + strongBoundMs, answerBy - localSearchMs);
  if (!found.complete && relaxed !== null && strongBy > performance.now() && best.cost.totalH - lowerSoFar0H > targetGap * lowerSoFar0H) {
    const strong = decompositionBound(prep, relaxed.lambda, {
      upperH: best.cost.totalH,
      targetGap,
      deadline: strongBy,
    });
    strongH = Math.max(0, strong.lowerH);
  }
  // Step 8: local search over stop sets from the best plan, each set priced exactly.
  const lowerSoFarH = Math.max(lowerSoFar0H, strongH);
  if (!found.complete && localSearchMs > 0 && best.cost.totalH - lowerSoFarH > targetGap * lowerSoFarH) {
    const stopIdx = (s: PlannedStop) => prep.aheadM.indexOf(s.aheadM);
    const improved = improveStops(
      prep,
      best.stops.map((s) => ({ idx: stopIdx(s), changed: [] })),
      Math.min(performance.now() + localSearchMs, answerBy),
    );
    if (improved.totalH < best.cost.totalH - 1e-9) best = pricePlan(prep, improved.plan);
  }
  const totalH = best.cost.totalH;
  const lowerBoundH = found.complete ? totalH : Math.min(totalH, Math.max(lowerSoFar0H, strongH));
  const gap = found.complete || totalH <= lowerBoundH ? 0 : lowerBoundH > 0 ? (totalH - lowerBoundH) / lowerBoundH : Infinity;
  return {
    feasible: true,
    optimised: best,
    certificate: { lowerBoundH, proven: found.complete, gap, cutForTime },
    practice,
    fixedInterval,
    statesExpanded: found.statesExpanded,
    provenOptimal: found.complete,
  };
}
