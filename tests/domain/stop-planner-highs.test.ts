import { describe, expect, it } from 'vitest';
import { planStops } from '../../shared/domain/stop-planner';
import { lagrangianBound } from '../../shared/domain/stop-planner-steps/lagrangian';
import { prepare } from '../../shared/domain/stop-planner-steps/model';
import { mulberry32 } from '../support/random';
import { highsMinH, randomInstance } from '../support/stop-reference';

// All data invented (no real project). The reference is HiGHS, a general-purpose LP/MIP solver,
// on a model built in tests/support/stop-reference.ts from the input alone: it shares neither the
// planner's code nor its search, bound or pricing (the brute force in stop-planner.test.ts stops
// at ~8 places; this goes to 30).

describe('stop planner against HiGHS (mixed-integer and linear programmes)', () => {
  it('proves the optimum HiGHS finds, and reports infeasible where HiGHS does (60 seeded instances of 10–30 places)', async () => {
    const rng = mulberry32(20261203);
    let feasible = 0;
    let beyondBruteForce = 0;
    for (let k = 0; k < 60; k++) {
      const input = randomInstance(rng);
      const label = `instance ${k}`;
      const optimumH = await highsMinH(input, { integer: true });
      const r = planStops(input);
      if (!r.feasible) {
        expect(optimumH, label).toBeNull();
        continue;
      }
      expect(optimumH, label).not.toBeNull();
      feasible++;
      if (input.stopPlaces.length > 12) beyondBruteForce++;
      expect(r.certificate.proven, label).toBe(true);
      expect(r.optimised.cost.totalH, label).toBeCloseTo(optimumH!, 6);
    }
    expect(feasible).toBeGreaterThanOrEqual(30);
    expect(beyondBruteForce).toBeGreaterThanOrEqual(20);
  });

  it('the Lagrangian bound never exceeds the linear relaxation, and after 3,000 steps is within 0.5 % of it', async () => {
    // Weak duality: every bound of this relaxation is ≤ the LP optimum of the same coupling; the
    // steps converge towards it (Geoffrion 1974). The second check is what says the certificate's
    // bound is as strong as its relaxation allows (measured: at most 0.29 % under on these seeds).
    const rng = mulberry32(20261203);
    let checked = 0;
    let strictlyBelowOptimum = 0;
    for (let k = 0; k < 60; k++) {
      const input = randomInstance(rng);
      const relaxedH = await highsMinH(input, { integer: false });
      if (relaxedH === null) continue;
      const optimumH = (await highsMinH(input, { integer: true }))!;
      const label = `instance ${k}`;
      const lag = lagrangianBound(prepare(input), { iterations: 3000, upperH: optimumH, targetGap: 0 });
      expect(lag.lowerH, label).toBeLessThanOrEqual(relaxedH + 1e-6 * (1 + relaxedH));
      expect(lag.lowerH, label).toBeGreaterThanOrEqual(relaxedH * (1 - 0.005));
      checked++;
      if (relaxedH < optimumH - 1e-6) strictlyBelowOptimum++;
    }
    expect(checked).toBeGreaterThanOrEqual(30);
    // Some instances have a relaxation below the optimum (else the check above says little).
    expect(strictlyBelowOptimum).toBeGreaterThanOrEqual(5);
  });

  it('with an answer time, a search stopped at its cap goes on when the plan is within 3 % of the bound, and proves the HiGHS optimum', async () => {
    const rng = mulberry32(20261203);
    let searchedOn = 0;
    let leftAlone = 0;
    for (let k = 0; k < 60; k++) {
      const input = randomInstance(rng);
      const label = `instance ${k}`;
      const capped = planStops(input, { maxStates: 0 });
      if (!capped.feasible || capped.certificate.proven) continue;
      // A minute is far more than these need: the outcome does not depend on the machine's speed.
      const timed = planStops(input, { maxStates: 0, answerWithinMs: 60_000 });
      if (!timed.feasible) throw new Error(label);
      if (capped.certificate.gap <= 0.03) {
        searchedOn++;
        expect(timed.certificate.proven, label).toBe(true);
        expect(timed.optimised.cost.totalH, label).toBeCloseTo((await highsMinH(input, { integer: true }))!, 6);
      } else {
        leftAlone++;
        expect(timed.statesExpanded, label).toBe(capped.statesExpanded);
        expect(timed.certificate.proven, label).toBe(false);
      }
    }
    expect(searchedOn).toBeGreaterThanOrEqual(10);
    expect(leftAlone).toBeGreaterThanOrEqual(1);
  });
});
