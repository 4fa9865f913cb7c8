/**
 * A stronger subproblem for the certificate's bound: one position's changes chosen together with
 * a whole stop path of its own (a copy of the stops), the copy's stops paid at the position's
 * multipliers. Lagrangian decomposition (Guignard & Kim 1987, "Lagrangean decomposition: a model
 * yielding stronger Lagrangean bounds"): the plain relaxation lets a slow-wearing position change
 * at fractions of stops placed anywhere, so it never pays for changing early at the stops the
 * fast-wearing positions force; its copy of the stop path must be a real path, so it does.
 *
 * Which stop paths are possible (necessary conditions, true of every feasible plan's stops):
 * with lim(a) = min over positions of the last place a ring fitted at a reaches (`reachNew`), and
 * lim0 = min over positions of the last place the ring fitted now reaches:
 *  - the first stop is at or before lim0 (the first ring due is changed at a stop at or before
 *    its due point);
 *  - after a stop a the next stop is at or before lim(a) (every ring in use between them was
 *    fitted at a or earlier, and a ring fitted earlier reaches no further than one fitted at a);
 *  - after the last stop t every ring lasts to the horizon: lim(t) = done.
 * A position with no change inside the horizon (its ring now lasts) is not solved here.
 *
 * Validity of the bound that uses it (proof): for multipliers λ_ij ≥ 0, the relaxation
 *   L(λ) = Σ_j min(0, s_j − Σ_i λ_ij) + Σ_{i∉Q} min_chain (cost_i + Σ_{j∈chain} λ_ij)
 *        + Σ_{i∈Q} min over (stop path P, chain_i ⊆ P) of (cost_i + Σ_{j∈P} λ_ij)
 * is ≤ the cheapest plan: take that plan's stops S (a possible stop path, by the conditions
 * above) as every copy's path and its chains; each term is then at most the plan's own term,
 * and Σ_j s_j z_j = Σ_j (s_j − Σ_i λ_ij) z_j + Σ_j Σ_i λ_ij z_j, where the first sum is ≥ the
 * min(0, …) terms, the second is split among the positions: λ_ij z_j ≥ λ_ij y_ij for i ∉ Q
 * (y ≤ z, λ ≥ 0) and = λ_ij·[j ∈ S] for i ∈ Q.
 *
 * The programme, per position i: states (b, f) = a stop at place b with the ring fitted at f
 * (f = −1: the ring fitted now) reaching beyond b; from stop b the next stop b' ≤ lim(b) must be
 * reached by the ring in use, which is kept or changed at b'. The best predecessor stop of each
 * state is a sliding-window minimum (the window [first b with lim(b) ≥ b', b') moves forward), so
 * a call costs O(m · F) for F the places a ring can have been fitted at while still in use: cheap
 * for fast-wearing positions (F ≈ 70 on the demo drive), up to ~7× that for the slowest.
 * Checked against a brute force over every stop subset in tests/domain/stop-planner.test.ts.
 */
import { lastReachable, type Prepared } from './model';

export interface StopPathCopy {
  /** Least cost of position i's changes plus λ_i over a stop path containing them; `outStops[j]` = 1 on that path (if given). */
  solve(i: number, lambda: Float64Array, outStops: Uint8Array | null): number;
}

/**
 * The programme's tables, sized for the positions in `only` (all when null): they take
 * places × (widest gap + 1) entries, and a slow position's gap can be most of the horizon.
 */
export function stopPathCopy(prep: Prepared, only: Uint8Array | null = null): StopPathCopy {
  const m = prep.aheadM.length;
  const n = prep.input.positions.length;
  const { done, v } = prep;
  const r0 = Int32Array.from(prep.startBudgetMm, (b, i) => lastReachable(prep, i, b));
  let lim0 = done;
  for (let i = 0; i < n; i++) lim0 = Math.min(lim0, r0[i]);
  const lim = new Int32Array(m).fill(done);
  for (let i = 0; i < n; i++) if (r0[i] !== done) for (let a = 0; a < m; a++) lim[a] = Math.min(lim[a], prep.reachNew[i][a]);
  // theta[b']: first stop place b whose lim reaches b' (lim does not decrease).
  const theta = new Int32Array(m);
  for (let b = 0, bp = 0; bp < m; bp++) {
    while (b < bp && lim[b] < bp) b++;
    theta[bp] = b;
  }
  // Per position, the widest gap between a fitting place and the last place still in use.
  const widths = Array.from({ length: n }, (_, i) => {
    let w = 0;
    if (only !== null && only[i] !== 1) return 0;
    for (let f = 0; f < m; f++) if (prep.reachNew[i][f] !== done) w = Math.max(w, prep.reachNew[i][f] - f);
    return w;
  });
  const W = Math.max(1, ...widths) + 1;
  // V[b·W + d]: least cost with a stop at b (paid) and the ring fitted at f = b − d in use; Vo[b]: the ring fitted now.
  const V = new Float64Array(m * W);
  const predB = new Int32Array(m * W); // previous stop
  const predD = new Int32Array(m * W); // its state's d (−1: ring fitted now, −2: start)
  const Vo = new Float64Array(m);
  const predOB = new Int32Array(m);
  // tail[b]: least λ-cost of the stops after b (b itself excluded) to a valid end; Infinity if none.
  const tail = new Float64Array(m);
  const tailNext = new Int32Array(m);
  // Sliding-window minima (monotone deques): one per fitting place f over the stops b (kept in
  // dq[f·W …]), one for the ring fitted now, one for the tail; each place enters each once.
  const dq = new Int32Array(m * W);
  const hd = new Int32Array(m);
  const tl = new Int32Array(m);
  const dqo = new Int32Array(m);
  return {
    solve(i, lambda, outStops) {
      if (only !== null && only[i] !== 1) throw new RangeError(`stopPathCopy: position ${i} was not among those the tables were sized for`);
      const reach = prep.reachNew[i];
      const w = prep.wearAt[i];
      const c = prep.changeH[i];
      const limitMm = prep.limitMm[i];
      const ri = r0[i];
      if (ri === done) {
        if (outStops) outStops.fill(0);
        return 0;
      }
      // Backwards: window (b, lim(b)], whose upper end does not increase as b decreases.
      let th = 0;
      let tt = 0;
      for (let b = m - 1; b >= 0; b--) {
        tailNext[b] = -1;
        if (b + 1 < m) {
          const val = lambda[b + 1] + tail[b + 1];
          if (val < Infinity) {
            while (tt > th && lambda[dqo[tt - 1]] + tail[dqo[tt - 1]] >= val) tt--;
            dqo[tt++] = b + 1;
          }
        }
        if (lim[b] === done) {
          // The path may end here, or go on (a stop with negative multipliers can pay).
          tail[b] = tt > th ? Math.min(0, lambda[dqo[th]] + tail[dqo[th]]) : 0;
          if (tt > th && tail[b] < 0) tailNext[b] = dqo[th];
          continue;
        }
        while (tt > th && dqo[th] > lim[b]) th++;
        tail[b] = tt > th ? lambda[dqo[th]] + tail[dqo[th]] : Infinity;
        if (tt > th) tailNext[b] = dqo[th];
      }
      let bestH = Infinity;
      let bestB = -1;
      let bestD = -1;
      let oh = 0;
      let ot = 0;
      let fMin = 0;
      for (let bp = 0; bp < m; bp++) {
        const lo = theta[bp];
        const lamB = lambda[bp];
        const base = bp * W;
        // The ring fitted now, kept to bp.
        Vo[bp] = Infinity;
        let changeFromH = Infinity;
        let changeB = -1;
        let changeD = -1;
        // Vo over the window [lo, bp): its upper end grows by one per place, its lower end (lo) does not decrease.
        if (bp > 0 && Vo[bp - 1] < Infinity) {
          while (ot > oh && Vo[dqo[ot - 1]] >= Vo[bp - 1]) ot--;
          dqo[ot++] = bp - 1;
        }
        while (ot > oh && dqo[oh] < lo) oh++;
        if (ri >= bp) {
          let best = bp <= lim0 ? 0 : Infinity;
          let bb = -1;
          if (ot > oh && Vo[dqo[oh]] < best) {
            best = Vo[dqo[oh]];
            bb = dqo[oh];
          }
          if (best < Infinity) {
            Vo[bp] = lamB + best;
            predOB[bp] = bb;
            const viaH = best + v * prep.startBudgetMm[i];
            if (viaH < changeFromH) {
              changeFromH = viaH;
              changeB = bb;
              changeD = bb < 0 ? -2 : -1;
            }
          }
        }
        // Rings fitted at f < bp still in use at bp, kept.
        // Only f ≥ fMin can still be in use (a ring fitted later reaches at least as far).
        while (fMin < bp && reach[fMin] < bp) fMin++;
        const dMax = Math.min(W - 1, bp - fMin);
        for (let d = 1; d <= dMax; d++) {
          const f = bp - d;
          const k = base + d;
          V[k] = Infinity;
          if (reach[f] === done) continue;
          // The deque of f over the stops b in [max(lo, f), bp): bp − 1 enters now (f entered at bp = f + 1).
          const q = f * W;
          if (d === 1) hd[f] = tl[f] = 0;
          const val = V[(bp - 1) * W + (d - 1)];
          if (val < Infinity) {
            let t = tl[f];
            while (t > hd[f] && V[dq[q + t - 1] * W + (dq[q + t - 1] - f)] >= val) t--;
            dq[q + t] = bp - 1;
            tl[f] = t + 1;
          }
          let h = hd[f];
          while (h < tl[f] && dq[q + h] < lo) h++;
          hd[f] = h;
          const bb = h < tl[f] ? dq[q + h] : -1;
          const best = bb >= 0 ? V[bb * W + (bb - f)] : Infinity;
          if (best === Infinity) continue;
          V[k] = lamB + best;
          predB[k] = bb;
          predD[k] = bb - f;
          const viaH = best + v * (w[f] + limitMm);
          if (viaH < changeFromH) {
            changeFromH = viaH;
            changeB = bb;
            changeD = bb - f;
          }
        }
        // A change at bp.
        V[base] = Infinity;
        if (changeFromH < Infinity) {
          V[base] = lamB + changeFromH + c - v * w[bp];
          predB[base] = changeB;
          predD[base] = changeD;
          if (reach[bp] === done && V[base] + tail[bp] < bestH) {
            bestH = V[base] + tail[bp];
            bestB = bp;
            bestD = 0;
          }
        }
      }
      if (outStops && bestB >= 0) {
        outStops.fill(0);
        for (let b = tailNext[bestB]; b >= 0; b = tailNext[b]) outStops[b] = 1;
        for (let b = bestB, d = bestD; ;) {
          outStops[b] = 1;
          if (d >= 0) {
            const k = b * W + d;
            if (predD[k] === -2 || predB[k] < 0) break;
            d = predD[k];
            b = predB[k];
          } else {
            if (predOB[b] < 0) break;
            b = predOB[b];
          }
        }
      }
      return bestH;
    },
  };
}
