/**
 * Step 3 of the stop planner: lower bounds on the hours still to come from a search state, used
 * by the exact search to drop states (bounds (a) and (b) of the comment at the top of
 * ../stop-planner.ts). The certificate's lower bound on the whole plan is ./lagrangian.ts.
 */
import { budgetAfterChangeMm, changeCostH, type Prepared } from './model';

export interface SearchBounds {
  /** Next stops after place `afterIdx` when every ring reaches `limIdx`: the latest place, and the latest free-air place. */
  nextPlaces(afterIdx: number, limIdx: number): number[];
  /** Least cost of position i's ring with reach `reach` and budget `budgetMm` from here on, alone (its own latest chain). */
  ownTermH(i: number, reach: number, budgetMm: number): number;
  /** Least stop hours after place j: everything fresh there and changed at every stop, each stop as late as allowed. */
  stopsAfterH: Float64Array;
  /** Extra hours (≥ 0) for changing position o, whose ring reaches `reach[o]`, at place t instead of its last reachable place. */
  penH(reach: Int32Array, o: number, t: number): number;
  /** Bound (b): least extra for positions order[j…] when served at shared stops after place `idx` (index j of the answer). */
  sharedRestH(idx: number, reach: Int32Array, order: number[]): Float64Array;
}

export function searchBounds(prep: Prepared): SearchBounds {
  const n = prep.input.positions.length;
  const m = prep.aheadM.length;
  const { done } = prep;
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
      rest[j] = r === done ? 0 : changeCostH(prep, i, budgetAfterChangeMm(prep, i, j), r) + rest[r];
      after[j] = rest[j] - prep.v * prep.wearAt[i][j];
    }
    ownRestH.push(rest);
    changeThenRestH.push(after);
  }
  const ownTermH = (i: number, reach: number, budgetMm: number) =>
    reach === done ? 0 : changeCostH(prep, i, budgetMm, reach) + ownRestH[i][reach];
  const stopsAfterH = new Float64Array(m);
  for (let j = m - 1; j >= 0; j--) {
    let lim = done;
    for (let i = 0; i < n; i++) lim = Math.min(lim, prep.reachNew[i][j]);
    stopsAfterH[j] = lim === done ? 0 : Infinity;
    if (lim !== done) for (const t of nextPlaces(j, lim)) stopsAfterH[j] = Math.min(stopsAfterH[j], prep.stopH[t] + stopsAfterH[t]);
  }
  // Bound (b): own chains plus the least extra for putting the next change of every position
  // (`order`: those still to change, in due order) at shared stops. A group served at stop t pays
  // stopH(t) and, per position o, pen = a(t) − a(reach o) ≥ 0 (a = changeThenRestH does not
  // increase with t: a later change never needs more changes after it); the last group also pays
  // the stops still needed after it. restH[j]: least extra for positions j… when they are served
  // after the current place.
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
  return { nextPlaces, ownTermH, stopsAfterH, penH, sharedRestH };
}
