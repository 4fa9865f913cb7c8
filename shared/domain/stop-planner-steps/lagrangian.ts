/**
 * The certificate's lower bound, and plans found from it: Lagrangian relaxation of the coupling
 * "a position may be changed at place j only if the machine stops at j".
 *
 * The problem is: choose stops z_j ∈ {0, 1} and, per position i, a chain of change places (which
 * stop each ring is changed at — any chain that keeps every ring within its limit), minimising
 * Σ_j s_j·z_j + Σ_i cost_i(chain_i) subject to y_ij ≤ z_j (y_ij = 1 when i is changed at j).
 * Moving the coupling into the objective with multipliers λ_ij ≥ 0 gives, for every λ,
 *   L(λ) = Σ_j min(0, s_j − Σ_i λ_ij) + Σ_i min over chains of (cost_i(chain) + Σ_{j∈chain} λ_ij)
 *        ≤ the cheapest plan
 * (weak duality: for the cheapest plan's own z, y the added terms λ_ij·(y_ij − z_j) are ≤ 0).
 * Each position's part is a shortest path over the places, solved exactly in O(m) by a dynamic
 * programme with a sliding-window minimum (a ring fitted at a later place reaches at least as
 * far, so the places a ring can be changed from form a window). λ is improved by projected
 * subgradient steps (Polyak step length, halved when the bound stalls; Held, Wolfe & Crowder
 * 1974; Fisher 1981, "The Lagrangian relaxation method for solving integer programming
 * problems"). Any λ gives a valid bound, so stopping early only makes the bound weaker.
 *
 * Plans from the relaxation: the places the positions' chains use form a stop set; for a fixed
 * stop set the cheapest plan splits into one shortest path per position (the same programme,
 * restricted to those places), so a stop set is priced exactly; stops are then dropped one at a
 * time while that lowers the total (a local search, not a proof).
 */
import { lastReachable, type IndexPlan, type Prepared } from './model';

/** Position i's cheapest chain with `extraH[j]` added per change at place j, using only `allowed` places (all when null). */
export function cheapestChain(
  prep: Prepared,
  i: number,
  extraH: Float64Array | null,
  allowed: Uint8Array | null,
): { costH: number; chain: number[] } {
  const m = prep.aheadM.length;
  const { done, v } = prep;
  const r0 = lastReachable(prep, i, prep.startBudgetMm[i]);
  if (r0 === done) return { costH: 0, chain: [] };
  const w = prep.wearAt[i];
  const reach = prep.reachNew[i];
  const c = prep.changeH[i];
  const dist = new Float64Array(m).fill(Infinity);
  const pred = new Int32Array(m).fill(-1);
  // leaveH[j] = dist[j] + v·(budget of the ring fitted at j); a monotone deque of places j
  // (increasing j, increasing leaveH) whose new ring still reaches the place being priced.
  const leaveH = new Float64Array(m);
  const deque = new Int32Array(m);
  let head = 0;
  let tail = 0;
  const startH = v * prep.startBudgetMm[i];
  const vLimitH = v * prep.limitMm[i];
  let bestH = Infinity;
  let bestLast = -1;
  for (let k = 0; k < m; k++) {
    if (k > 0 && dist[k - 1] < Infinity && reach[k - 1] >= k) {
      const val = leaveH[k - 1];
      while (tail > head && leaveH[deque[tail - 1]] >= val) tail--;
      deque[tail++] = k - 1;
    }
    while (tail > head && reach[deque[head]] < k) head++;
    if (allowed !== null && allowed[k] === 0) continue;
    let fromH = k <= r0 ? startH : Infinity;
    let from = -1;
    if (tail > head && leaveH[deque[head]] < fromH) {
      fromH = leaveH[deque[head]];
      from = deque[head];
    }
    if (fromH === Infinity) continue;
    const d = fromH + c - v * w[k] + (extraH === null ? 0 : extraH[k]);
    dist[k] = d;
    leaveH[k] = d + v * w[k] + vLimitH;
    pred[k] = from;
    if (reach[k] === done && d < bestH) {
      bestH = d;
      bestLast = k;
    }
  }
  if (bestLast < 0) return { costH: Infinity, chain: [] };
  const chain: number[] = [];
  for (let k = bestLast; k >= 0; k = pred[k]) chain.unshift(k);
  return { costH: bestH, chain };
}

/** The cheapest plan using only the stops in `allowed` (each position's changes searched, not assumed): hours and plan. */
export function cheapestPlanForStops(prep: Prepared, allowed: Uint8Array): { totalH: number; plan: IndexPlan } {
  const n = prep.input.positions.length;
  const byIdx = new Map<number, number[]>();
  let totalH = 0;
  for (let i = 0; i < n; i++) {
    const { costH, chain } = cheapestChain(prep, i, null, allowed);
    if (costH === Infinity) return { totalH: Infinity, plan: [] };
    totalH += costH;
    for (const j of chain) byIdx.set(j, [...(byIdx.get(j) ?? []), i]);
  }
  for (const j of byIdx.keys()) totalH += prep.stopH[j];
  const plan = [...byIdx.entries()].sort((a, b) => a[0] - b[0]).map(([idx, changed]) => ({ idx, changed }));
  return { totalH, plan };
}

/** Drops stops one at a time while the total falls, then tries each stop one place earlier or later. */
export function improveStops(prep: Prepared, plan: IndexPlan): { totalH: number; plan: IndexPlan } {
  const m = prep.aheadM.length;
  const allowed = new Uint8Array(m);
  for (const s of plan) allowed[s.idx] = 1;
  let best = cheapestPlanForStops(prep, allowed);
  for (let improved = true; improved;) {
    improved = false;
    for (const { idx } of [...best.plan]) {
      allowed[idx] = 0;
      const tried = cheapestPlanForStops(prep, allowed);
      if (tried.totalH < best.totalH - 1e-9) {
        best = tried;
        improved = true;
        continue;
      }
      let moved = false;
      for (const to of [idx - 1, idx + 1]) {
        if (to < 0 || to >= m || allowed[to] === 1) continue;
        allowed[to] = 1;
        const shifted = cheapestPlanForStops(prep, allowed);
        if (shifted.totalH < best.totalH - 1e-9) {
          best = shifted;
          improved = moved = true;
          break;
        }
        allowed[to] = 0;
      }
      if (!moved) allowed[idx] = 1;
    }
    for (let j = 0; j < m; j++) allowed[j] = 0;
    for (const s of best.plan) allowed[s.idx] = 1;
  }
  return best;
}

/** Steps without a better bound before the step length is halved (tuned on the bench drive). */
const STALL_STEPS = 30;
/** Share of the last direction added to the subgradient. */
const DEFLECTION = 0.5;

export interface LagrangianResult {
  /** A lower bound on the hours of every plan (the best L(λ) found). */
  lowerH: number;
  /** The best plan found from the relaxation, or null. */
  plan: IndexPlan | null;
  planH: number;
  iterations: number;
  /** The multipliers of the best bound. */
  lambda: Float64Array[];
}

/**
 * Subgradient ascent on L(λ) for at most `iterations` steps, stopping once the best plan is
 * within `targetGap` (relative) of the bound. `upperH` is the hours of a plan already known.
 */
export function lagrangianBound(
  prep: Prepared,
  { iterations, upperH, targetGap }: { iterations: number; upperH: number; targetGap: number },
): LagrangianResult {
  const n = prep.input.positions.length;
  const m = prep.aheadM.length;
  const lambda = Array.from({ length: n }, () => new Float64Array(m));
  let lowerH = -Infinity;
  let bestLambda: Float64Array[] = lambda;
  let bestPlan: IndexPlan | null = null;
  let bestH = upperH;
  let theta = 2;
  let sinceGain = 0;
  let it = 0;
  const used = new Uint8Array(m);
  const count = new Int32Array(m);
  const mark = new Int32Array(n * m);
  const dir = new Float64Array(n * m);
  for (; it < iterations; it++) {
    count.fill(0);
    let valueH = 0;
    const chains: number[][] = [];
    for (let i = 0; i < n; i++) {
      const { costH, chain } = cheapestChain(prep, i, lambda[i], null);
      valueH += costH;
      chains.push(chain);
      for (const j of chain) count[j]++;
    }
    const open = new Uint8Array(m);
    for (let j = 0; j < m; j++) {
      let sigmaH = 0;
      for (let i = 0; i < n; i++) sigmaH += lambda[i][j];
      if (prep.stopH[j] - sigmaH < 0) {
        valueH += prep.stopH[j] - sigmaH;
        open[j] = 1;
      }
    }
    if (it === 0 || valueH > lowerH + 1e-9 * (1 + Math.abs(lowerH))) {
      lowerH = valueH;
      bestLambda = lambda.map((l) => l.slice());
      sinceGain = 0;
    } else if (++sinceGain >= STALL_STEPS) {
      theta /= 2;
      sinceGain = 0;
    }
    // A plan from the places this relaxed answer uses.
    if (it % 5 === 0) {
      used.fill(0);
      for (const chain of chains) for (const j of chain) used[j] = 1;
      const found = cheapestPlanForStops(prep, used);
      if (found.totalH < bestH - 1e-9) {
        const better = improveStops(prep, found.plan);
        bestH = better.totalH;
        bestPlan = better.plan;
      }
    }
    if (bestH - lowerH <= targetGap * Math.max(lowerH, 1e-9) || theta < 1e-4) break;
    // Direction: the subgradient y_ij − z_j (projected where λ_ij = 0 and it points below 0),
    // deflected by a share of the last direction (Camerini, Fratta & Maffioli 1975), which
    // damps the zig-zag of plain subgradient steps.
    for (let i = 0; i < n; i++) for (const j of chains[i]) mark[i * m + j] = it + 1;
    let normSq = 0;
    for (let i = 0; i < n; i++) {
      const lam = lambda[i];
      for (let j = 0; j < m; j++) {
        const k = i * m + j;
        let g = (mark[k] === it + 1 ? 1 : 0) - open[j];
        g += DEFLECTION * dir[k];
        if (g < 0 && lam[j] <= 0) g = 0;
        dir[k] = g;
        normSq += g * g;
      }
    }
    if (normSq === 0) break; // the relaxed answer is a plan: the bound is reached
    const stepH = (theta * (bestH - valueH)) / normSq;
    for (let i = 0; i < n; i++) {
      const lam = lambda[i];
      for (let j = 0; j < m; j++) {
        const g = dir[i * m + j];
        if (g !== 0) lam[j] = Math.max(0, lam[j] + stepH * g);
      }
    }
  }
  return { lowerH, plan: bestPlan, planH: bestH, iterations: it, lambda: bestLambda };
}

/**
 * The Lagrangian bound on the rest of a plan from a search state, for multipliers λ: at place q
 * (whose stop is already paid, so changes there carry no λ), with each position's fitted ring
 * reaching `reach[i]` with budget `budgetMm[i]`, every completion costs at least
 *   Σ_{j>q} min(0, s_j − Σ_i λ_ij) + Σ_i min over chains from that ring (cost_i + Σ_{j>q} λ_ij)
 * (the same weak-duality argument as above, for the stops still to choose). Per position the
 * cheapest chain after a ring fitted at j is precomputed backwards (togo), and the first change
 * is a range minimum (sparse table), so a state costs O(n).
 */
export function lagrangianRestBound(
  prep: Prepared,
  lambda: Float64Array[],
): (q: number, reach: Int32Array, budgetMm: Float64Array) => number {
  const n = prep.input.positions.length;
  const m = prep.aheadM.length;
  const { done, v } = prep;
  const stopAfterH = new Float64Array(m + 1);
  for (let j = m - 1; j >= 0; j--) {
    let sigmaH = 0;
    for (let i = 0; i < n; i++) sigmaH += lambda[i][j];
    stopAfterH[j] = stopAfterH[j + 1] + Math.min(0, prep.stopH[j] - sigmaH);
  }
  // stopAfterH[j] sums places ≥ j; the bound at q needs places > q: stopAfterH[q + 1].
  const levels = Math.max(1, Math.ceil(Math.log2(m + 1)) + 1);
  const togo: Float64Array[] = [];
  const tables: Float64Array[][] = [];
  for (let i = 0; i < n; i++) {
    const reach = prep.reachNew[i];
    const w = prep.wearAt[i];
    const lam = lambda[i];
    const t = new Float64Array(m);
    const h = new Float64Array(m); // h(k) = −v·W(k) + λ_ik + togo(k): what a change at k adds, less its fixed part
    const deque = new Int32Array(m);
    let front = m;
    let back = m; // deque occupies [front, back): smallest k at the front
    const fixedH = prep.changeH[i] + v * prep.limitMm[i];
    for (let j = m - 1; j >= 0; j--) {
      if (j + 1 < m && h[j + 1] < Infinity) {
        const val = h[j + 1];
        while (back > front && h[deque[front]] >= val) front++;
        deque[--front] = j + 1;
      }
      if (reach[j] === done) t[j] = 0;
      else {
        while (back > front && deque[back - 1] > reach[j]) back--;
        t[j] = back > front ? fixedH + v * w[j] + h[deque[back - 1]] : Infinity;
      }
      h[j] = -v * w[j] + lam[j] + t[j];
    }
    togo.push(t);
    const table = [h];
    for (let l = 1; l < levels; l++) {
      const prev = table[l - 1];
      const span = 1 << (l - 1);
      const cur = new Float64Array(m);
      for (let k = 0; k < m; k++) cur[k] = k + span < m ? Math.min(prev[k], prev[k + span]) : prev[k];
      table.push(cur);
    }
    tables.push(table);
  }
  const rangeMin = (i: number, lo: number, hi: number) => {
    if (lo > hi) return Infinity;
    const l = 31 - Math.clz32(hi - lo + 1);
    const t = tables[i][l];
    return Math.min(t[lo], t[hi - (1 << l) + 1]);
  };
  return (q, reach, budgetMm) => {
    let restH = stopAfterH[q + 1];
    for (let i = 0; i < n; i++) {
      const r = reach[i];
      if (r === done) continue;
      const atQ = r >= q ? -v * prep.wearAt[i][q] + togo[i][q] : Infinity;
      const later = rangeMin(i, q + 1, Math.min(r, m - 1));
      restH += prep.changeH[i] + v * budgetMm[i] + Math.min(atQ, later);
    }
    return restH;
  };
}
