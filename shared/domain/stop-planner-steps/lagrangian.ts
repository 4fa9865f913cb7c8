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
 * subgradient steps (Polyak step length, shrunk when the bound stalls; Held, Wolfe & Crowder
 * 1974; Fisher 1981, "The Lagrangian relaxation method for solving integer programming
 * problems"). Any λ ≥ 0 gives a valid bound, so stopping early only makes the bound weaker.
 *
 * The multipliers are kept in {λ ≥ 0, Σ_i λ_ij ≤ s_j}: if Σ_i λ_ij > s_j, lowering some λ_ij by
 * δ ≤ Σ_i λ_ij − s_j raises the stop term by δ and lowers position i's shortest path by at most
 * δ (its chain pays λ_ij at most once at j), so L does not fall; the best λ lies in the set, and
 * in it the stop term is 0 (each stop's hours shared among the positions, as in the dual of
 * facility location). Steps start from the equal share s_j/n and are projected back onto the
 * set place by place (Euclidean projection onto a capped simplex; Michelot 1986). The best
 * this can reach is the LP bound of the same formulation (the subproblems are shortest paths,
 * whose LPs are integral; Geoffrion 1974).
 *
 * Plans from the relaxation: the places the positions' chains use form a stop set; for a fixed
 * stop set the cheapest plan splits into one shortest path per position (the same programme,
 * restricted to those places), so a stop set is priced exactly. A local search over stop sets
 * (drop, move anywhere, add; the first improving move taken) improves a plan within a time budget (not a proof).
 *
 * A stronger bound (decompositionBound, below): the same steps with some positions solved
 * together with a stop path of their own (./stop-path-copy.ts, where the bound is proven), started
 * from the plain bound's multipliers. It stays in the same set of multipliers, so the search's
 * rest bound accepts its multipliers too. Measured (decision 48): demo drive, from ≈ 1,415 h after
 * 600 plain steps to ≈ 1,460 h at the same multipliers (every position a copy; the whole gain is
 * on five gauge positions) and ≈ 1,490 h after 1.5 s with copies for the eight fastest; the demo drive cut to
 * 450 m gains only 0.3 % (222.1 → 222.9 h after 100 steps, every position a copy; optimum 227.7 h).
 */
import { lastReachable, type IndexPlan, type Prepared } from './model';
import { stopPathCopy } from './stop-path-copy';

/**
 * Position i's cheapest chain: a dynamic programme over the places with a sliding-window
 * minimum, O(m). Buffers are allocated once per prepared instance and reused (no allocation in
 * the inner loops; the bound runs it n times per step).
 */
export interface ChainSolver {
  /** Cheapest chain of position i with `extraH[k]` added per change at place k (all places); the chain is written to `out`, its length returned by `length()`. */
  full(i: number, extraH: Float64Array | null, out: Int32Array | null): number;
  /** Cheapest chain of position i using only the places `S[0…p)` (increasing); the chain to `out` if given. */
  restricted(i: number, S: Int32Array, p: number, out: Int32Array | null): number;
  /** Length of the chain last written to `out`. */
  length(): number;
  /** The cheapest plan using only the stops `S[0…p)` (increasing): its hours; `used[k]` = 1 for the stops it uses. */
  priceStops(S: Int32Array, p: number): number;
  used: Uint8Array;
}

export function chainSolver(prep: Prepared): ChainSolver {
  const m = prep.aheadM.length;
  const n = prep.input.positions.length;
  const { done, v } = prep;
  const r0 = Int32Array.from(prep.startBudgetMm, (b, i) => lastReachable(prep, i, b));
  const dist = new Float64Array(m);
  const pred = new Int32Array(m);
  // leaveH[a] = dist[a] + v·(budget of the ring fitted at a); a monotone deque of places a
  // (increasing a, increasing leaveH) whose new ring still reaches the place being priced.
  const leaveH = new Float64Array(m);
  const deque = new Int32Array(m);
  const tmp = new Int32Array(m);
  const used = new Uint8Array(m);
  let lastLength = 0;
  // One programme for both: over places S[a] (S null: place a itself).
  const run = (i: number, extraH: Float64Array | null, S: Int32Array | null, p: number, out: Int32Array | null): number => {
    lastLength = 0;
    if (r0[i] === done) return 0;
    const w = prep.wearAt[i];
    const reach = prep.reachNew[i];
    const c = prep.changeH[i];
    const startH = v * prep.startBudgetMm[i];
    const vLimitH = v * prep.limitMm[i];
    const ri = r0[i];
    let head = 0;
    let tail = 0;
    let bestH = Infinity;
    let bestLast = -1;
    for (let a = 0; a < p; a++) {
      const k = S === null ? a : S[a];
      if (a > 0 && dist[a - 1] < Infinity && reach[S === null ? a - 1 : S[a - 1]] >= k) {
        const val = leaveH[a - 1];
        while (tail > head && leaveH[deque[tail - 1]] >= val) tail--;
        deque[tail++] = a - 1;
      }
      while (tail > head && reach[S === null ? deque[head] : S[deque[head]]] < k) head++;
      let fromH = k <= ri ? startH : Infinity;
      let from = -1;
      if (tail > head && leaveH[deque[head]] < fromH) {
        fromH = leaveH[deque[head]];
        from = deque[head];
      }
      if (fromH === Infinity) {
        dist[a] = Infinity;
        continue;
      }
      const d = fromH + c - v * w[k] + (extraH === null ? 0 : extraH[k]);
      dist[a] = d;
      leaveH[a] = d + v * w[k] + vLimitH;
      pred[a] = from;
      if (reach[k] === done && d < bestH) {
        bestH = d;
        bestLast = a;
      }
    }
    if (out !== null && bestLast >= 0) {
      let len = 0;
      for (let a = bestLast; a >= 0; a = pred[a]) out[len++] = S === null ? a : S[a];
      out.subarray(0, len).reverse();
      lastLength = len;
    }
    return bestH;
  };
  // The programme over every place with per-place extra hours: `run` without the indirection
  // through S (the bound calls it n times per step, so it is most of the bound's time).
  const runFull = (i: number, extraH: Float64Array | null, out: Int32Array | null): number => {
    lastLength = 0;
    const ri = r0[i];
    if (ri === done) return 0;
    const w = prep.wearAt[i];
    const reach = prep.reachNew[i];
    const c = prep.changeH[i];
    const startH = v * prep.startBudgetMm[i];
    const vLimitH = v * prep.limitMm[i];
    let head = 0;
    let tail = 0;
    let bestH = Infinity;
    let bestLast = -1;
    let prevFinite = false;
    for (let k = 0; k < m; k++) {
      if (prevFinite && reach[k - 1] >= k) {
        const val = leaveH[k - 1];
        while (tail > head && leaveH[deque[tail - 1]] >= val) tail--;
        deque[tail++] = k - 1;
      }
      while (tail > head && reach[deque[head]] < k) head++;
      let fromH = k <= ri ? startH : Infinity;
      let from = -1;
      if (tail > head && leaveH[deque[head]] < fromH) {
        fromH = leaveH[deque[head]];
        from = deque[head];
      }
      if (fromH === Infinity) {
        dist[k] = Infinity;
        prevFinite = false;
        continue;
      }
      const wk = w[k];
      const d = fromH + c - v * wk + (extraH === null ? 0 : extraH[k]);
      dist[k] = d;
      leaveH[k] = d + v * wk + vLimitH;
      pred[k] = from;
      prevFinite = true;
      if (d < bestH && reach[k] === done) {
        bestH = d;
        bestLast = k;
      }
    }
    if (out !== null && bestLast >= 0) {
      let len = 0;
      for (let a = bestLast; a >= 0; a = pred[a]) out[len++] = a;
      out.subarray(0, len).reverse();
      lastLength = len;
    }
    return bestH;
  };
  return {
    full: runFull,
    restricted: (i, S, p, out) => run(i, null, S, p, out),
    length: () => lastLength,
    priceStops(S, p) {
      used.fill(0);
      let totalH = 0;
      for (let i = 0; i < n; i++) {
        const h = run(i, null, S, p, tmp);
        if (h === Infinity) return Infinity;
        totalH += h;
        for (let a = 0; a < lastLength; a++) used[tmp[a]] = 1;
      }
      for (let a = 0; a < p; a++) if (used[S[a]] === 1) totalH += prep.stopH[S[a]];
      return totalH;
    },
    used,
  };
}

/** Position i's cheapest chain with `extraH[j]` added per change at place j, using only `allowed` places (all when null). */
export function cheapestChain(
  prep: Prepared,
  i: number,
  extraH: Float64Array | null,
  allowed: Uint8Array | null,
): { costH: number; chain: number[] } {
  const solver = chainSolver(prep);
  const m = prep.aheadM.length;
  const out = new Int32Array(m);
  let costH: number;
  if (allowed === null) costH = solver.full(i, extraH, out);
  else {
    const S = Int32Array.from(allowed.keys()).filter((j) => allowed[j] === 1);
    if (extraH !== null) throw new RangeError('cheapestChain: extra hours with allowed places is not supported');
    costH = solver.restricted(i, S, S.length, out);
  }
  return { costH, chain: costH === Infinity ? [] : Array.from(out.subarray(0, solver.length())) };
}

/** The cheapest plan using only the stops in `allowed` (each position's changes searched, not assumed): hours and plan. */
export function cheapestPlanForStops(prep: Prepared, allowed: Uint8Array): { totalH: number; plan: IndexPlan } {
  const n = prep.input.positions.length;
  const solver = chainSolver(prep);
  const S = Int32Array.from(allowed.keys()).filter((j) => allowed[j] === 1);
  const out = new Int32Array(prep.aheadM.length);
  const byIdx = new Map<number, number[]>();
  let totalH = 0;
  for (let i = 0; i < n; i++) {
    const costH = solver.restricted(i, S, S.length, out);
    if (costH === Infinity) return { totalH: Infinity, plan: [] };
    totalH += costH;
    for (let a = 0; a < solver.length(); a++) byIdx.set(out[a], [...(byIdx.get(out[a]) ?? []), i]);
  }
  for (const j of byIdx.keys()) totalH += prep.stopH[j];
  const plan = [...byIdx.entries()].sort((a, b) => a[0] - b[0]).map(([idx, changed]) => ({ idx, changed }));
  return { totalH, plan };
}

/**
 * Local search over stop sets, each priced exactly (one cheapest chain per position restricted
 * to the set): drop a stop, move a stop to any other place, add a place, the first move that
 * lowers the total taken, until none does or `deadline` (performance.now(), ms) passes. Not a
 * proof: a local optimum.
 */
export function improveStops(prep: Prepared, plan: IndexPlan, deadline = Infinity): { totalH: number; plan: IndexPlan } {
  const m = prep.aheadM.length;
  const solver = chainSolver(prep);
  let S = Int32Array.from(new Set(plan.map((s) => s.idx))).sort();
  let bestH = solver.priceStops(S, S.length);
  const T = new Int32Array(m + 1);
  // T = S without S[skip] (−1: none) with place x inserted (−1: none); returns its length (0 if x is already in).
  const build = (skip: number, x: number): number => {
    let p = 0;
    let placed = x < 0;
    for (let a = 0; a < S.length; a++) {
      if (a === skip) continue;
      if (!placed && x <= S[a]) {
        if (x === S[a]) return 0;
        T[p++] = x;
        placed = true;
      }
      T[p++] = S[a];
    }
    if (!placed) T[p++] = x;
    return p;
  };
  // The first improving move is taken at once (a round over every move can outlast the time
  // budget on a long drive); the scan goes on from there, stop by stop, "add a place" last
  // (skip = S.length), and ends after a full round without a move.
  let sinceMove = 0;
  for (let skip = 0; sinceMove <= S.length && performance.now() < deadline;) {
    const drop = skip < S.length ? skip : -1;
    let moved = false;
    for (let x = drop < 0 ? 0 : -1; x < m && !moved; x++) {
      const p = build(drop, x);
      if (p === 0 && x >= 0) continue;
      const h = solver.priceStops(T, p);
      if (h < bestH - 1e-9 * (1 + bestH)) {
        S = T.slice(0, p);
        bestH = h;
        moved = true;
      }
    }
    sinceMove = moved ? 0 : sinceMove + 1;
    skip = skip + 1 > S.length ? 0 : skip + 1;
  }
  // Keep only the stops the cheapest plan on S uses (the same hours).
  const allowed = new Uint8Array(m);
  for (const j of S) allowed[j] = 1;
  return cheapestPlanForStops(prep, allowed);
}

/** Steps without a better bound before the step length is shrunk (tuned on the bench drives). */
const STALL_STEPS = 20;
/** Factor the step length is divided by when the bound stalls. */
const SHRINK = 1.5;
/** Share of the last direction added to the subgradient. */
const DEFLECTION = 0.7;
/** First step scale of the decomposition bound, which starts from good multipliers (tuned on the demo drive: 0.1 beat 1 and 0.02). */
const DECOMPOSITION_STEP_SCALE = 0.1;
/** Steps between plans built from the relaxed answer. */
const PLAN_EVERY = 10;

export interface LagrangianResult {
  /** A lower bound on the hours of every plan (the best L(λ) found). */
  lowerH: number;
  /** The best plan found from the relaxation, or null. */
  plan: IndexPlan | null;
  planH: number;
  iterations: number;
  /** The multipliers of the best bound. */
  lambda: Float64Array[];
  /** True when `deadline` ended the steps before `iterations` (not a target met or a step too small to matter). */
  timedOut: boolean;
}

/**
 * Deflected subgradient ascent on L(λ) for at most `iterations` steps, over the multipliers that
 * share each stop's hours among the positions (λ ≥ 0, Σ_i λ_ij ≤ s_j: the optimum has this form,
 * see the top of this file), stopping once the best plan is within `targetGap` (relative) of
 * the bound or `deadline` (performance.now(), ms) passes. `upperH` is the hours of a plan
 * already known.
 */
export function lagrangianBound(
  prep: Prepared,
  {
    iterations,
    upperH,
    targetGap,
    deadline = Infinity,
    localSearchUntil = -Infinity,
    copies = null,
    startLambda = null,
    stepScale = 1,
  }: {
    iterations: number;
    upperH: number;
    targetGap: number;
    deadline?: number;
    localSearchUntil?: number;
    /** Positions (1) solved with a stop path of their own (./stop-path-copy.ts): a stronger, slower bound. */
    copies?: Uint8Array | null;
    /** Multipliers to start from (in the set above), e.g. a plain bound's. */
    startLambda?: Float64Array[] | null;
    /** First step length scale (Polyak's θ; smaller when starting from good multipliers). */
    stepScale?: number;
  },
): LagrangianResult {
  const n = prep.input.positions.length;
  const m = prep.aheadM.length;
  const solver = chainSolver(prep);
  // Start from every stop's hours shared equally (a valid point of the set above).
  const lambda = Array.from({ length: n }, () => new Float64Array(m));
  for (let j = 0; j < m; j++) for (let i = 0; i < n; i++) lambda[i][j] = startLambda ? startLambda[i][j] : prep.stopH[j] / n;
  const copy = copies ? stopPathCopy(prep, copies) : null;
  const copyStops = copies ? Array.from({ length: n }, (_, i) => (copies[i] === 1 ? new Uint8Array(m) : null)) : [];
  let lowerH = -Infinity;
  const bestLambda: Float64Array[] = lambda.map((l) => l.slice());
  let bestPlan: IndexPlan | null = null;
  let bestH = upperH;
  let theta = stepScale;
  let sinceGain = 0;
  let it = 0;
  /** Set when the steps end on their own (target met, step too small, nothing to move). */
  let ended = false;
  const chains = Array.from({ length: n }, () => new Int32Array(m));
  const lengths = new Int32Array(n);
  const used = new Uint8Array(m);
  const mark = new Int32Array(n * m);
  const dir = new Float64Array(n * m);
  const stopSet = new Int32Array(m);
  const column = new Float64Array(n);
  // Σ_i λ_ij per place, kept up to date.
  const sumH = new Float64Array(m);
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) sumH[j] += lambda[i][j];
  for (; it < iterations && performance.now() < deadline; it++) {
    let valueH = 0;
    for (let i = 0; i < n; i++) {
      const chainH = solver.full(i, lambda[i], chains[i]);
      lengths[i] = solver.length();
      // A position with a copy: its changes with a stop path of its own (≥ chainH at the same λ).
      const own = copy && copyStops[i];
      valueH += own ? copy.solve(i, lambda[i], own) : chainH;
    }
    // The stop term Σ_j min(0, s_j − Σ_i λ_ij): zero inside the set, kept so any λ ≥ 0 is counted right.
    for (let j = 0; j < m; j++) if (prep.stopH[j] - sumH[j] < 0) valueH += prep.stopH[j] - sumH[j];
    if (it === 0 || valueH > lowerH + 1e-9 * (1 + Math.abs(lowerH))) {
      lowerH = valueH;
      for (let i = 0; i < n; i++) bestLambda[i].set(lambda[i]);
      sinceGain = 0;
    } else if (++sinceGain >= STALL_STEPS) {
      theta /= SHRINK;
      sinceGain = 0;
    }
    // A plan from the places this relaxed answer uses, priced exactly.
    if (it % PLAN_EVERY === 0) {
      used.fill(0);
      for (let i = 0; i < n; i++) for (let a = 0; a < lengths[i]; a++) used[chains[i][a]] = 1;
      let p = 0;
      for (let j = 0; j < m; j++) if (used[j] === 1) stopSet[p++] = j;
      const foundH = solver.priceStops(stopSet, p);
      if (foundH < bestH - 1e-9) {
        const allowed = new Uint8Array(m);
        for (let a = 0; a < p; a++) allowed[stopSet[a]] = 1;
        const found = cheapestPlanForStops(prep, allowed);
        bestH = found.totalH;
        bestPlan = found.plan;
      }
    }
    if (bestH - lowerH <= targetGap * Math.max(lowerH, 1e-9) || theta < 1e-6) {
      ended = true;
      break;
    }
    // Direction: the subgradient y_ij (the chains' places), deflected by a share of the last
    // direction (Camerini, Fratta & Maffioli 1975), which damps the zig-zag of plain steps;
    // zeroed where λ_ij = 0 and it points below 0.
    for (let i = 0; i < n; i++) {
      const own = copyStops[i];
      if (own) {
        for (let j = 0; j < m; j++) if (own[j] === 1) mark[i * m + j] = it + 1;
      } else for (let a = 0; a < lengths[i]; a++) mark[i * m + chains[i][a]] = it + 1;
    }
    let normSq = 0;
    for (let i = 0; i < n; i++) {
      const lam = lambda[i];
      for (let j = 0, k = i * m; j < m; j++, k++) {
        let g = (mark[k] === it + 1 ? 1 : 0) + DEFLECTION * dir[k];
        if (g < 0 && lam[j] <= 0) g = 0;
        dir[k] = g;
        normSq += g * g;
      }
    }
    if (normSq === 0) {
      ended = true;
      break;
    }
    const stepH = (theta * (bestH - valueH)) / normSq;
    sumH.fill(0);
    for (let i = 0; i < n; i++) {
      const lam = lambda[i];
      for (let j = 0, k = i * m; j < m; j++, k++) {
        const g = dir[k];
        if (g !== 0) lam[j] = Math.max(0, lam[j] + stepH * g);
        sumH[j] += lam[j];
      }
    }
    // Back onto Σ_i λ_ij ≤ s_j: Euclidean projection onto the capped simplex, place by place
    // (Michelot 1986: subtract the mean excess from the entries above it until none is left).
    // The place's column is gathered once into a contiguous buffer (the rows are per position).
    for (let j = 0; j < m; j++) {
      if (sumH[j] <= prep.stopH[j]) continue;
      for (let i = 0; i < n; i++) column[i] = lambda[i][j];
      let tauH = 0;
      for (let changed = true; changed;) {
        changed = false;
        let activeH = 0;
        let count = 0;
        for (let i = 0; i < n; i++) {
          const x = column[i];
          if (x > tauH) {
            activeH += x;
            count++;
          }
        }
        const t = (activeH - prep.stopH[j]) / count;
        if (t > tauH + 1e-15) {
          tauH = t;
          changed = true;
        }
      }
      let projectedH = 0;
      for (let i = 0; i < n; i++) {
        const x = column[i] > tauH ? column[i] - tauH : 0;
        if (x !== column[i]) lambda[i][j] = x;
        projectedH += x;
      }
      sumH[j] = projectedH;
    }
  }
  // The best plan found, improved by local search while time allows.
  if (bestPlan !== null && localSearchUntil > performance.now()) {
    const better = improveStops(prep, bestPlan, localSearchUntil);
    if (better.totalH < bestH - 1e-9) {
      bestH = better.totalH;
      bestPlan = better.plan;
    }
  }
  return { lowerH, plan: bestPlan, planH: bestH, iterations: it, lambda: bestLambda, timedOut: !ended && it < iterations };
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

/**
 * The stronger bound of ./stop-path-copy.ts from a plain bound's multipliers: the fast-wearing
 * positions get a stop path of their own, and the subgradient steps go on, small, until
 * `deadline` (performance.now(), ms). Any answer is a valid bound (every λ ≥ 0 gives one);
 * the time only decides how strong.
 */
export function decompositionBound(
  prep: Prepared,
  lambda: Float64Array[],
  { upperH, targetGap, deadline }: { upperH: number; targetGap: number; deadline: number },
): { lowerH: number; copies: number; iterations: number; lambda: Float64Array[] } {
  const n = prep.input.positions.length;
  const copies = new Uint8Array(n);
  let count = 0;
  // Copies for the fast-wearing positions (a ring in use over at most twice the fewest places of
  // any position): the stops they force are what the plain bound misses (on the demo drive the
  // gains are there), and their copies are cheap (a copy costs about places × places a ring
  // stays in use; the slowest cost ~7× the fastest and gained nothing there).
  const inUse = prep.reachNew.map((reach) => {
    let widest = 0;
    for (let f = 0; f < reach.length; f++) if (reach[f] !== prep.done) widest = Math.max(widest, reach[f] - f);
    return widest;
  });
  const fewest = Math.min(...inUse.filter((w) => w > 0));
  for (let i = 0; i < n; i++) {
    if (inUse[i] > 0 && inUse[i] <= 2 * fewest) {
      copies[i] = 1;
      count++;
    }
  }
  if (count === 0) return { lowerH: -Infinity, copies: 0, iterations: 0, lambda };
  const r = lagrangianBound(prep, {
    iterations: Infinity,
    upperH,
    targetGap,
    deadline,
    copies,
    startLambda: lambda,
    stepScale: DECOMPOSITION_STEP_SCALE,
  });
  return { lowerH: r.lowerH, copies: count, iterations: r.iterations, lambda: r.lambda };
}
