import { describe, expect, it } from 'vitest';
import { cautiousRates, relativeScatter } from '../../shared/domain/cautious-rates';
import { fitWearRates, type GroundWearRate, type NormalWearObservation, type WearFit } from '../../shared/domain/wear-fit';

const extra = {
  priorRateMmPerKm: null,
  siteOnlyRateMmPerKm: null,
  effectiveSiteWeight: null,
  sharesInspections: false,
  heldStandardErrorMmPerKm: null,
};
const options = { probability: 0.9, minPredictedMm: 5, priorMargin: 0.5 };

const fit = (over: Partial<WearFit> = {}): WearFit => ({
  rates: [
    {
      ...extra,
      groundTypeId: 'a',
      rateMmPerKm: 0.02,
      standardErrorMmPerKm: 0.0006,
      observationCount: 40,
      heldAtZero: false,
      source: 'blended',
      siteWeight: 0.9,
    },
    {
      ...extra,
      groundTypeId: 'b',
      rateMmPerKm: 0.05,
      standardErrorMmPerKm: null,
      observationCount: 0,
      heldAtZero: false,
      source: 'prior',
      siteWeight: 0,
      priorRateMmPerKm: 0.05,
    },
  ],
  residualSdMm: 0.5,
  residualDof: 38,
  classFactors: { centre: 1, face: 1, gauge: 1 },
  rateCovariance: [[0.0006 ** 2]],
  ...over,
});

describe('relative scatter of discs about the fit', () => {
  it('is the sample SD of relative residuals, ignoring small predicted wear', () => {
    // Hand-worked: ratios (11−10)/10 = 0.1, (9−10)/10 = −0.1, (20−20)/20 = 0 → mean 0,
    // sample SD = √((0.01 + 0.01 + 0)/2) = 0.1. The 1 mm prediction is below the 5 mm floor.
    const sd = relativeScatter(
      [
        { measuredMm: 11, predictedMm: 10 },
        { measuredMm: 9, predictedMm: 10 },
        { measuredMm: 20, predictedMm: 20 },
        { measuredMm: 3, predictedMm: 1 },
      ],
      5,
    );
    expect(sd).toBeCloseTo(0.1, 12);
  });

  it('is null with fewer than two usable inspections', () => {
    expect(relativeScatter([{ measuredMm: 5, predictedMm: 6 }], 5)).toBeNull();
  });
});

describe('cautious rates', () => {
  it('combine disc scatter and rate error with the one-sided t quantile', () => {
    // t(0.90; 38) = 1.3042 (NIST/SEMATECH e-Handbook §1.3.6.7.2 table: 1.304 for 38–40 dof).
    // rate 0.02, se/rate = 0.03, cv = 0.04 → √(0.0016 + 0.0009) = 0.05 → 0.02·(1 + 1.3042·0.05) = 0.0213042.
    const r = cautiousRates(fit(), 0.04, { probability: 0.9, minPredictedMm: 5, priorMargin: 0.5 });
    expect(r.a.p50MmPerKm).toBe(0.02);
    expect(r.a.p90MmPerKm).toBeCloseTo(0.0213042, 5);
  });

  it('put a prior-only ground at the prior plus its margin', () => {
    const r = cautiousRates(fit(), 0.04, { probability: 0.9, minPredictedMm: 5, priorMargin: 0.5 });
    expect(r.b).toEqual({ p50MmPerKm: 0.05, p90MmPerKm: 0.05 * 1.5, cautiousSource: 'prior-margin' });
    expect(r.a.cautiousSource).toBe('fit');
  });

  it('are never below the central rate, and grow with the probability', () => {
    const p90 = cautiousRates(fit(), 0.1, { probability: 0.9, minPredictedMm: 5, priorMargin: 0.5 }).a.p90MmPerKm;
    const p95 = cautiousRates(fit(), 0.1, { probability: 0.95, minPredictedMm: 5, priorMargin: 0.5 }).a.p90MmPerKm;
    expect(p90).toBeGreaterThan(0.02);
    expect(p95).toBeGreaterThan(p90);
  });

  describe('of a ground whose rate is held at 0', () => {
    // The held-at-0 example of wear-fit.test.ts (invented): unconstrained least squares gives b < 0.
    const face = (wearMm: number, rolledKmByGround: Record<string, number>): NormalWearObservation => ({
      wearMm,
      positionClass: 'face',
      rolledKmByGround,
    });
    const held = [face(1.0, { a: 100 }), face(2.1, { a: 200 }), face(0.9, { a: 100, b: 100 }), face(0.4, { a: 50, b: 150 })];
    const faceOnly = { centre: 1, face: 1, gauge: 1 };

    it('take the ground’s prior when it has one', () => {
      // Invented prior 0.005 mm/km for b (as from a CAI); weight 0, so b stays held at 0.
      const heldFit = fitWearRates(held, { classFactors: faceOnly, prior: { rateMmPerKmByGround: { b: 0.005 }, strengthObservations: 0 } });
      expect(heldFit.rates[1]).toMatchObject({ rateMmPerKm: 0, heldAtZero: true });
      const r = cautiousRates(heldFit, 0.1, options);
      expect(r.b).toEqual({ p50MmPerKm: 0, p90MmPerKm: 0.005, cautiousSource: 'prior' });
    });

    it('take the rate the data cannot rule out, t(0.9; dof)·se, without a prior', () => {
      // Hand computation (wear-fit.test.ts): se_b were it free = √((0.0296 / 3)·(62,500 / 1.725e9))
      // = 5.979e-4 mm/km; t(0.90; 3) = 1.638 (NIST/SEMATECH e-Handbook §1.3.6.7.2 table, 3 decimals,
      // hence the tolerance 0.0005·5.979e-4 ≈ 3e-7 mm/km).
      const r = cautiousRates(fitWearRates(held, { classFactors: faceOnly }), 0.1, options);
      const se = Math.sqrt((0.0296 / 3) * (62500 / 1.725e9));
      expect(r.b.p50MmPerKm).toBe(0);
      expect(r.b.cautiousSource).toBe('fit-upper-bound');
      expect(Math.abs(r.b.p90MmPerKm - 1.638 * se)).toBeLessThan(3e-7);
    });

    it('fall back to the largest cautious rate of the other grounds when nothing else is known', () => {
      // derived: a zero rate without prior or standard error takes the largest P90 of the others (as
      // the forecast does for unmapped ground), here the prior-only b: 0.05·1.5.
      const zero: GroundWearRate = {
        ...extra,
        groundTypeId: 'c',
        rateMmPerKm: 0,
        standardErrorMmPerKm: null,
        observationCount: 2,
        heldAtZero: true,
        source: 'site',
        siteWeight: 1,
      };
      const withZero = fit({ rates: [...fit().rates, zero] });
      expect(cautiousRates(withZero, 0.04, options).c).toEqual({ p50MmPerKm: 0, p90MmPerKm: 0.05 * 1.5, cautiousSource: 'largest-other' });
      expect(cautiousRates(fit({ rates: [zero] }), 0.04, options).c).toEqual({ p50MmPerKm: 0, p90MmPerKm: 0, cautiousSource: 'none' });
    });
  });

  it('put a fitted rate without residual degrees of freedom at the rate plus the margin', () => {
    // derived: no dof, no t quantile — the prior margin (+50 %) is the only caution left.
    const r = cautiousRates(fit({ residualDof: 0, residualSdMm: null }), 0.04, options);
    expect(r.a).toEqual({ p50MmPerKm: 0.02, p90MmPerKm: 0.02 * 1.5, cautiousSource: 'margin' });
  });
});
