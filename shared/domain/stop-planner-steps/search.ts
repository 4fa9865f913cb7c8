/**
 * Step 4 of the stop planner: the exact search over normal-form plans (the comment at the top of
 * ../stop-planner.ts explains the states, merging, dominance and bounds). A first pass expanding
 * only a few states per place finds a good plan to bound the exact pass.
 */
import type { SearchBounds } from './bounds';
import { budgetAfterChangeMm, changeCostH, lastReachable, pricePlan, type IndexPlan, type Prepared } from './model';

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

export interface SearchOptions {
  /** States expanded per place by the quick first pass (0 skips it). */
  quickPassStates: number;
  /** Cap on the states the exact pass expands; past it the best plan found is returned, not proven. */
  maxStates: number;
  /** Hours of a plan already known (the search looks only for cheaper ones). */
  boundH: number;
  /**
   * A lower bound on the rest from a state at place q (./lagrangian.ts), if known. The quick pass
   * then keeps the states whose cost plus this bound is least (it includes the stops still to
   * come), not those whose cost plus their own chains is least.
   */
  restBoundH?: (q: number, reach: Int32Array, budgetMm: Float64Array) => number;
  /**
   * performance.now() (ms) by which the search ends: the exact pass then stops as past `maxStates`
   * (not proven, with the least bound over the states left), the quick pass with what it found —
   * and, with `finish`, with its most promising states finished by a rule.
   */
  deadline?: number;
  /**
   * A rule that finishes a partial plan from a state (the stops after `afterIdx`; null if it gets
   * stuck): when the deadline cuts the quick pass before the horizon, its states with the least
   * bound are finished with it, so a cut pass still answers a whole plan (decision 51).
   */
  finish?: (afterIdx: number, reach: Int32Array, budgetMm: Float64Array) => IndexPlan | null;
}

/** States of a quick pass cut by the deadline that are finished by the rule (the least bound first). */
const FINISHED_STATES = 20;

export interface SearchResult {
  /** The cheapest plan found below `boundH`, or null if none was found. */
  plan: IndexPlan | null;
  bestH: number;
  statesExpanded: number;
  /** True when the exact pass ran to the end: no plan cheaper than `bestH` exists. */
  complete: boolean;
  /** No plan costs less than this: `bestH` when complete, else the least bound over the states left. */
  lowerH: number;
  /** True when `deadline` stopped a pass (the quick pass or the exact one) before its end. */
  timedOut: boolean;
}

export function exactSearch(
  prep: Prepared,
  bounds: SearchBounds,
  { quickPassStates, maxStates, boundH, restBoundH, deadline = Infinity, finish }: SearchOptions,
): SearchResult {
  const n = prep.input.positions.length;
  const m = prep.aheadM.length;
  const { done } = prep;
  const { nextPlaces, ownTermH, stopsAfterH, penH, sharedRestH } = bounds;

  const startReach = Int32Array.from(prep.startBudgetMm, (b, i) => lastReachable(prep, i, b));
  const startBudgetMm = Float64Array.from(prep.startBudgetMm);
  const firstLim = startReach.reduce((a, r) => Math.min(a, r), done);
  if (firstLim === done) return { plan: [], bestH: 0, statesExpanded: 0, complete: true, lowerH: 0, timedOut: false };
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
    if (startReach[i] !== done) startKeyH += prep.v * startBudgetMm[i];
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
          l.budgetMm[i] = budgetAfterChangeMm(prep, i, p.idx);
        }
      }
    }
    return { reach: l.reach, budgetMm: l.budgetMm };
  };

  // The stops of the plan that ends at `last`'s place with the positions of reach ≤ changedUpTo changed there.
  const planOf = (last: Label, changedUpTo: number): IndexPlan => {
    const plan: IndexPlan = [];
    for (let l: Label | null = last; l !== null; l = l.parent) {
      const reach = fill(l).reach;
      plan.unshift({ idx: l.idx, changed: [...reach.keys()].filter((i) => reach[i] !== done && reach[i] <= changedUpTo) });
      changedUpTo = l.changedUpTo;
    }
    return plan;
  };
  let statesExpanded = 0;
  /** States the exact pass has expanded (the cap is on these; the quick pass's come on top). */
  let exactStates = 0;
  let stoppedEarly = false;
  let timedOut = false;
  let frontierH = Infinity;
  const boundOf = new WeakMap<Label, number>();
  const stateBoundH = (l: Label) => {
    if (!restBoundH) return l.costH + stopsAfterH[l.idx] + l.ownH;
    const known = boundOf.get(l);
    if (known !== undefined) return known;
    const { reach, budgetMm } = fill(l);
    const boundH = Math.max(l.costH + stopsAfterH[l.idx] + l.ownH, l.costH + restBoundH(l.idx, reach, budgetMm));
    boundOf.set(l, boundH);
    return boundH;
  };
  // One pass over the places in order; `beamWidth` caps the states expanded per place (Infinity:
  // exact). Returns the best plan costing less than `boundH`, if any.
  const pass = (beamWidth: number, passBoundH: number) => {
    let bestH = passBoundH;
    let best: { last: Label; changedUpTo: number } | null = null;
    /** A whole plan made by `finish` from a state of a cut quick pass, and its hours. */
    let finished: { plan: IndexPlan; h: number } | null = null;
    const tolH = 1e-9 * (1 + passBoundH);
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
      push({
        idx,
        costH,
        keyH: costH + startKeyH,
        ownH: startOwnH,
        hashA: startHashA,
        hashB: startHashB,
        parent: null,
        changedUpTo: -1,
        reach: startReach,
        budgetMm: startBudgetMm,
      });
    }

    for (let q = 0; q < m; q++) {
      const late = performance.now() >= deadline;
      if (late) timedOut = true;
      if (late && beamWidth !== Infinity) {
        // Finish the states left with the least bound by the rule, from just before their stop:
        // their rings all reach that place, and the rule stops at the latest place it allows.
        if (finish && best === null) {
          const left: Label[] = [];
          for (let r = q; r < m; r++) for (const held of buckets[r].values()) left.push(...held);
          left.sort((x, y) => stateBoundH(x) - stateBoundH(y));
          for (const l of left.slice(0, FINISHED_STATES)) {
            const { reach, budgetMm } = fill(l);
            const rest = finish(l.idx - 1, reach, budgetMm);
            if (rest === null) continue;
            const plan = [...(l.parent ? planOf(l.parent, l.changedUpTo) : []), ...rest];
            const h = pricePlan(prep, plan).cost.totalH;
            if (h < bestH - tolH && (finished === null || h < finished.h)) finished = { plan, h };
          }
        }
        break;
      }
      if (beamWidth === Infinity && (exactStates > maxStates || late)) {
        stoppedEarly = true;
        // Every plan cheaper than the best found passes through a state left here.
        for (let r = q; r < m; r++)
          for (const held of buckets[r].values()) for (const l of held) frontierH = Math.min(frontierH, stateBoundH(l));
        break;
      }
      const entries = [...buckets[q].values()].flat().filter((l) => stateBoundH(l) < bestH - tolH);
      buckets[q].clear();
      const filled = new Map(entries.map((e) => [e, fill(e)]));
      // Dominance, comparing only the positions whose reach differs between the states here.
      const dims: number[] = [];
      for (let i = 0; i < n && entries.length > 1; i++)
        if (entries.some((e) => filled.get(e)!.reach[i] !== filled.get(entries[0])!.reach[i])) dims.push(i);
      const reachSum = new Map(entries.map((e) => [e, dims.reduce((t, i) => t + filled.get(e)!.reach[i], 0)]));
      const dominates = (a: Label, b: Label) => {
        if (reachSum.get(a)! < reachSum.get(b)!) return false;
        const ra = filled.get(a)!.reach;
        const { reach: rb, budgetMm: bb } = filled.get(b)!;
        let slackH = b.keyH - a.keyH;
        for (const i of dims) {
          if (ra[i] < rb[i]) return false;
          if (ra[i] === done && rb[i] !== done) slackH -= prep.v * bb[i];
        }
        return slackH >= 0;
      };
      entries.sort((x, y) => x.keyH - y.keyH);
      const kept: Label[] = [];
      for (const e of entries) if (!kept.some((k) => dominates(k, e))) kept.push(e);
      // The quick pass keeps the states that look cheapest in the end: cost plus the rest bound when
      // one is known (it counts the stops still to come), else cost plus the own chains.
      if (beamWidth !== Infinity && restBoundH) kept.sort((x, y) => stateBoundH(x) - stateBoundH(y));
      else kept.sort((x, y) => x.costH + x.ownH - (y.costH + y.ownH));

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
        if (beamWidth === Infinity) exactStates++;
        // Change the k due first; the next stop must lie beyond the last of them.
        let changeSumH = 0;
        let penSumH = 0;
        let minNewReach = done;
        let { ownH, keyH } = label;
        let hA = 0;
        let hB = 0;
        for (let k = 0; k < order.length; k++) {
          const i = order[k];
          const newReach = prep.reachNew[i][q];
          const newBudgetMm = budgetAfterChangeMm(prep, i, q);
          const thisChangeH = changeCostH(prep, i, budgetMm[i], q);
          changeSumH += thisChangeH;
          penSumH += penH(reach, i, q);
          ownH += ownTermH(i, newReach, newBudgetMm) - ownTermH(i, reach[i], budgetMm[i]);
          keyH += thisChangeH - prep.v * budgetMm[i] + (newReach === done ? 0 : prep.v * newBudgetMm);
          hA = (hA + Math.imul(newReach - reach[i], hashA[i])) | 0;
          hB = (hB + Math.imul(newReach - reach[i], hashB[i])) | 0;
          minNewReach = Math.min(minNewReach, newReach);
          const groupReach = reach[i];
          if (minNewReach <= groupReach) break; // a new ring would not get past this group, nor past any larger one
          if (k + 1 < order.length && reach[order[k + 1]] === groupReach) continue;
          const lim = Math.min(k + 1 < order.length ? reach[order[k + 1]] : done, minNewReach);
          if (lim === done) {
            if (label.costH + changeSumH < bestH - tolH) {
              bestH = label.costH + changeSumH;
              best = { last: label, changedUpTo: groupReach };
            }
            break; // changing more is never needed
          }
          if (baseH + penSumH + restH[k + 1] >= bestH - tolH) continue; // bound (b) for this choice
          for (const idx of nextPlaces(groupReach, lim)) {
            const costH = label.costH + changeSumH + prep.stopH[idx];
            if (costH + stopsAfterH[idx] + ownH >= bestH - tolH) continue;
            const hashes = { hashA: (label.hashA + hA) | 0, hashB: (label.hashB + hB) | 0 };
            push({
              idx,
              costH,
              keyH: keyH + prep.stopH[idx],
              ownH,
              ...hashes,
              parent: label,
              changedUpTo: groupReach,
              reach: null,
              budgetMm: null,
            });
          }
        }
      }
    }
    return { best, bestH, finished };
  };

  const quick = pass(quickPassStates, boundH);
  const quickFinished = quick.finished;
  const exact = pass(Infinity, quickFinished?.h ?? quick.bestH);
  const best = exact.best ?? quick.best;
  const bestH = exact.best ? exact.bestH : (quickFinished?.h ?? quick.bestH);
  const lowerH = stoppedEarly ? Math.min(bestH, frontierH) : bestH;
  const plan = exact.best
    ? planOf(exact.best.last, exact.best.changedUpTo)
    : (quickFinished?.plan ?? (best ? planOf(best.last, best.changedUpTo) : null));
  return { plan, bestH, statesExpanded, complete: !stoppedEarly, lowerH, timedOut };
}
