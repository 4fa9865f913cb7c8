import { describe, expect, it } from 'vitest';
import { cautiousRates, relativeScatter } from '../../shared/domain/cautious-rates';
import type { WearFit } from '../../shared/domain/wear-fit';

const fit = (over: Partial<WearFit> = {}): WearFit => ({
  rates: [
    { groundTypeId: 'a', rateMmPerKm: 0.02, standardErrorMmPerKm: 0.0006, observationCount: 40, heldAtZero: false, source: 'blended', siteWeight: 0.9 },
    { groundTypeId: 'b', rateMmPerKm: 0.05, standardErrorMmPerKm: null, observationCount: 0, heldAtZero: false, source: 'prior', siteWeight: 0 },
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
    const sd = relativeScatter([
      { measuredMm: 11, predictedMm: 10 }, { measuredMm: 9, predictedMm: 10 }, { measuredMm: 20, predictedMm: 20 }, { measuredMm: 3, predictedMm: 1 },
    ], 5);
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
    expect(r.b).toEqual({ p50MmPerKm: 0.05, p90MmPerKm: 0.05 * 1.5 });
  });

  it('are never below the central rate, and grow with the probability', () => {
    const p90 = cautiousRates(fit(), 0.1, { probability: 0.9, minPredictedMm: 5, priorMargin: 0.5 }).a.p90MmPerKm;
    const p95 = cautiousRates(fit(), 0.1, { probability: 0.95, minPredictedMm: 5, priorMargin: 0.5 }).a.p90MmPerKm;
    expect(p90).toBeGreaterThan(0.02);
    expect(p95).toBeGreaterThan(p90);
  });
});
