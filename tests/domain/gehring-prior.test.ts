import { describe, expect, it } from 'vitest';

import { gehringPriorRateMmPerKm, gehringSpecificWearMgPerM, radialWearRateMmPerKm } from '../../shared/domain/gehring-prior';

describe('gehringSpecificWearMgPerM', () => {
  it('matches the check values of DOMAIN.md §2', () => {
    // Check values derived from v_s = 0.74·CAI^1.93 (DOMAIN.md §2; Gehring, Felsbau 13(6) 1995,
    // formula and units from memory), stated to 3 decimals.
    const checks: [number, number][] = [
      [1, 0.74],
      [2, 2.82],
      [3, 6.167],
      [4, 10.745],
      [5, 16.529],
    ];
    for (const [cai, mgPerM] of checks) expect(gehringSpecificWearMgPerM(cai)).toBeCloseTo(mgPerM, 3);
  });

  it('rejects a non-positive CAI', () => {
    expect(() => gehringSpecificWearMgPerM(0)).toThrow(RangeError);
  });
});

describe('radialWearRateMmPerKm', () => {
  it('converts CAI 2 on a 17-inch ring by the hand-worked example', () => {
    // Hand-worked (as in the comment in gehring-prior.ts): 2.8198 mg/m = 2.8198 g/km;
    // ÷ 7.85 g/cm³ (common practice) = 0.35921 cm³ = 359.21 mm³ per km;
    // π·D·w = π·432·19 = 25,786.2 mm² (17″ ring, 19 mm tip: DOMAIN.md §4, common practice);
    // 359.21 / 25,786.2 = 0.013930 mm per km rolled.
    expect(radialWearRateMmPerKm(gehringSpecificWearMgPerM(2), 432, 19)).toBeCloseTo(0.01393, 6);
    expect(gehringPriorRateMmPerKm({ cai: 2, ringDiameterMm: 432, tipWidthMm: 19 })).toBeCloseTo(0.01393, 6);
  });

  it('agrees with the exact annulus volume for a small radial wear', () => {
    // derived: a ring R = 216 mm, w = 19 mm worn by h = 0.01 mm loses V = π·w·(R² − (R − h)²) mm³;
    // that mass over 1 km must give a rate of ≈ 0.01 mm/km (relative gap ≈ h/D ≈ 2e-5).
    const volumeMm3 = Math.PI * 19 * (216 ** 2 - (216 - 0.01) ** 2);
    const massLossMgPerM = (volumeMm3 / 1000) * 7.85; // g per km = mg per m
    expect(radialWearRateMmPerKm(massLossMgPerM, 432, 19)).toBeCloseTo(0.01, 6);
  });

  it('scales with the site factor and the steel density', () => {
    // derived: the rate is linear in the site factor and inversely proportional to the density.
    const base = gehringPriorRateMmPerKm({ cai: 3, ringDiameterMm: 483, tipWidthMm: 20 });
    expect(gehringPriorRateMmPerKm({ cai: 3, ringDiameterMm: 483, tipWidthMm: 20, siteFactor: 1.5 })).toBeCloseTo(1.5 * base, 12);
    expect(gehringPriorRateMmPerKm({ cai: 3, ringDiameterMm: 483, tipWidthMm: 20, steelDensityGPerCm3: 7.85 / 2 })).toBeCloseTo(
      2 * base,
      12,
    );
    expect(() => gehringPriorRateMmPerKm({ cai: 3, ringDiameterMm: 483, tipWidthMm: 20, siteFactor: -1 })).toThrow(RangeError);
    // A factor of 0 would claim the ground does not wear; the prior is switched off by its weight instead.
    expect(() => gehringPriorRateMmPerKm({ cai: 3, ringDiameterMm: 483, tipWidthMm: 20, siteFactor: 0 })).toThrow(RangeError);
  });
});
