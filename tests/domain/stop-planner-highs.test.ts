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
});
