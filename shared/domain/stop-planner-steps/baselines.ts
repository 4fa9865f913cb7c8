/**
 * Step 2 of the stop planner: plans made by simple rules. The latest-change plan (each ring
 * changed at its own last reachable place) decides feasibility and gives the search a first
 * plan to beat; the site-practice rule and the fixed-interval rule are what the optimised plan is
 * compared with.
 */
import { chainageAhead } from '../chainage';
import type { InfeasiblePosition } from '../stop-planner';
import { aheadWhereWearExceedsM, budgetAfterChangeMm, lastReachable, type IndexPlan, type Prepared } from './model';

/**
 * Per position: the places of its own latest chain (each ring changed at its last reachable
 * place), or why it fails. An instance is infeasible exactly when some ring falls due before the
 * next allowed place on this chain (a later fitting never brings the next due point earlier).
 */
export function ownLatestChains(prep: Prepared): { chains: number[][]; problems: InfeasiblePosition[] } {
  const { input } = prep;
  const chains: number[][] = [];
  const problems: InfeasiblePosition[] = [];
  input.positions.forEach((p, i) => {
    const chain: number[] = [];
    let fitIdx = -1;
    let reach = lastReachable(prep, i, prep.startBudgetMm[i]);
    while (reach !== prep.done && reach > fitIdx) {
      chain.push(reach);
      fitIdx = reach;
      reach = prep.reachNew[i][reach];
    }
    chains.push(chain);
    if (reach === prep.done) return;
    const budgetMm = fitIdx < 0 ? prep.startBudgetMm[i] : budgetAfterChangeMm(prep, i, fitIdx);
    const dueAheadM = aheadWhereWearExceedsM(p.wearStretches, budgetMm);
    const fittedAheadM = fitIdx < 0 ? -1 : prep.aheadM[fitIdx];
    const nextPlaceM = prep.aheadM.find((x) => x > fittedAheadM);
    const ring = fitIdx < 0 ? 'the ring fitted now' : `the ring fitted at ${fittedAheadM.toFixed(1)} m ahead`;
    const reason =
      budgetMm < 0
        ? `the ring fitted now is already past its limit (${p.wearNowMm} mm > ${p.limitMm} mm)`
        : `${ring} reaches its limit ${dueAheadM.toFixed(1)} m ahead, before the next allowed stop place` +
          (nextPlaceM === undefined ? ' (none left inside the horizon)' : ` (${nextPlaceM.toFixed(1)} m ahead)`);
    problems.push({
      positionId: p.positionId,
      ringNumber: chain.length,
      dueAheadM,
      dueChainageM: chainageAhead(input.currentChainageM, dueAheadM, input.direction),
      reason,
    });
  });
  return { chains, problems };
}

/** The union of the positions' own latest chains: every ring changed at its own last reachable place. */
export function latestChangePlan(chains: number[][]): IndexPlan {
  const byIdx = new Map<number, number[]>();
  chains.forEach((chain, i) => chain.forEach((idx) => byIdx.set(idx, [...(byIdx.get(idx) ?? []), i])));
  return [...byIdx.entries()].sort((a, b) => a[0] - b[0]).map(([idx, changed]) => ({ idx, changed }));
}

/** Where a rule starts when it finishes a partial plan: after place `afterIdx`, with these rings fitted. */
export interface RuleStart {
  afterIdx: number;
  /** Per position: the fitted ring's budget (mm of W) and the last place it reaches (`done` if it lasts). */
  budgetMm: ArrayLike<number>;
  reach: ArrayLike<number>;
}

/**
 * A plan by a rule: walk the places in order; stop at the earlier of the next planned place
 * (`nextPlannedIdx`, `done` if none) and the last place before some ring would pass its limit;
 * there change every ring that would not last until `keepUntilIdx(stop)` and every ring worn to at
 * least `changeShare` of its limit. Null when the rule gets stuck (a ring just fitted would pass
 * its limit before the next allowed place).
 */
function rulePlan(
  prep: Prepared,
  changeShare: number,
  nextPlannedIdx: (afterIdx: number) => number,
  keepUntilIdx: (stopIdx: number) => number,
  from: RuleStart | null = null,
): IndexPlan | null {
  const n = prep.input.positions.length;
  const budgetMm = from ? Array.from(from.budgetMm) : [...prep.startBudgetMm];
  const reach = from ? Array.from(from.reach) : budgetMm.map((b, i) => lastReachable(prep, i, b));
  const plan: IndexPlan = [];
  let last = from ? from.afterIdx : -1;
  for (;;) {
    const q = Math.min(nextPlannedIdx(last), ...reach);
    if (q === prep.done) return plan;
    if (q <= last) return null;
    const keepUntil = keepUntilIdx(q);
    const changed: number[] = [];
    for (let i = 0; i < n; i++) {
      if (reach[i] === prep.done) continue;
      const unusedMm = budgetMm[i] - prep.wearAt[i][q];
      if (reach[i] < keepUntil || unusedMm <= (1 - changeShare) * prep.limitMm[i] + 1e-9) {
        changed.push(i);
        budgetMm[i] = budgetAfterChangeMm(prep, i, q);
        reach[i] = prep.reachNew[i][q];
      }
    }
    if (changed.length > 0) plan.push({ idx: q, changed });
    last = q;
  }
}

/**
 * The rule sites use (common practice, no source): stop at the last allowed place before the first
 * disc reaches its cautious limit; there change that disc and every disc worn to at least
 * `changeShare` (e.g. 0.8) of its limit. With `from`, the rule finishes a partial plan from there
 * (the stops it adds only).
 */
export function practicePlan(prep: Prepared, changeShare: number, from: RuleStart | null = null): IndexPlan | null {
  return rulePlan(
    prep,
    changeShare,
    () => prep.done,
    (q) => q + 1,
    from,
  );
}

/**
 * A stop every `intervalM` metres (at the last allowed place at or before each multiple of it);
 * there change every disc that would pass its limit before the next such stop and every disc worn
 * to at least `changeShare` of its limit. A disc that would pass its limit between two such stops
 * forces an extra stop at the last allowed place before it, as on site.
 */
export function fixedIntervalPlan(prep: Prepared, intervalM: number, changeShare: number): IndexPlan | null {
  const targets: number[] = [];
  for (let k = 1; k * intervalM <= prep.input.horizonM + 1e-9; k++) {
    let idx = -1;
    for (let j = 0; j < prep.aheadM.length && prep.aheadM[j] <= k * intervalM + 1e-9; j++) idx = j;
    if (idx >= 0 && idx !== targets[targets.length - 1]) targets.push(idx);
  }
  const nextPlanned = (after: number) => targets.find((t) => t > after) ?? prep.done;
  return rulePlan(prep, changeShare, nextPlanned, nextPlanned);
}
