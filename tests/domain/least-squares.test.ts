import { inverse, Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';

import { fitNonNegative, linearTrend } from '../../shared/domain/least-squares';

const relativeError = (actual: number, expected: number) => Math.abs(actual / expected - 1);

describe('linearTrend', () => {
  // NIST Statistical Reference Datasets, linear regression, "Norris" (DOMAIN.md §5), pairs as (y, x).
  const norrisYX: [number, number][] = [
    [0.1, 0.2], [338.8, 337.4], [118.1, 118.2], [888.0, 884.6], [9.2, 10.1], [228.1, 226.5],
    [668.5, 666.3], [998.5, 996.3], [449.1, 448.6], [778.9, 777.0], [559.2, 558.2], [0.3, 0.4],
    [0.1, 0.6], [778.1, 775.5], [668.8, 666.9], [339.3, 338.0], [448.9, 447.5], [10.8, 11.6],
    [557.7, 556.0], [228.3, 228.1], [998.0, 995.8], [888.8, 887.6], [119.6, 120.2], [0.3, 0.3],
    [0.6, 0.3], [557.6, 556.8], [339.3, 339.1], [888.0, 887.2], [998.5, 999.0], [778.9, 779.0],
    [10.2, 11.1], [117.6, 118.3], [228.9, 229.2], [668.4, 669.1], [449.2, 448.9], [0.2, 0.5],
  ];
  const norris = norrisYX.map(([y, x]): [number, number] => [x, y]);

  it('reproduces the NIST StRD Norris certified values', () => {
    const trend = linearTrend(norris);
    // Certified values, NIST StRD Norris (DOMAIN.md §5), given to 15 significant digits.
    // Tolerances: B1 and the SDs to a relative 1e-12 (we get ~1e-14); B0 to 1e-11 (we get ~4e-13)
    // because B0 = ȳ − B1·x̄ with x̄ ≈ ȳ ≈ 450 cancels about three digits (|B1·x̄ / B0| ≈ 1700)
    // and the regression package forms n·Σx² − (Σx)² in one pass.
    expect(relativeError(trend.slope, 1.00211681802045)).toBeLessThan(1e-12);
    expect(relativeError(trend.intercept, -0.262323073774029)).toBeLessThan(1e-11);
    expect(relativeError(trend.slopeStandardError!, 4.29796848199937e-4)).toBeLessThan(1e-12);
    expect(relativeError(trend.interceptStandardError!, 0.232818234301152)).toBeLessThan(1e-12);
    expect(relativeError(trend.residualSd!, 0.884796396144373)).toBeLessThan(1e-12);
  });

  it('gives no standard errors for two points and rejects a vertical line', () => {
    // derived: two points fit exactly, leaving n − 2 = 0 residual degrees of freedom.
    const trend = linearTrend([[0, 1], [2, 5]]);
    expect(trend.slope).toBeCloseTo(2, 12);
    expect(trend.intercept).toBeCloseTo(1, 12);
    expect(trend.residualSd).toBeNull();
    expect(trend.slopeStandardError).toBeNull();
    expect(() => linearTrend([[3, 1], [3, 2]])).toThrow(RangeError);
  });
});

describe('fitNonNegative', () => {
  it('blends a prior pseudo-row by hand-worked weights and keeps it out of the residuals', () => {
    // Hand-worked: x = 1, 2, 3; y = 2, 4, 7 → Σx² = 14, Σxy = 31. Prior value 1 with row weight 2
    // adds 2² = 4 to Σx² and 2·(2·1) = 4 to Σxy: b = (31 + 4) / (14 + 4) = 35/18.
    // Residuals (observation rows only): 2 − 35/18 = 1/18, 4 − 70/18 = 2/18, 7 − 105/18 = 21/18,
    // SSE = 446/324, dof = 3 − 1 = 2, s² = 223/324; SE² = s² / 18 = 223/5832.
    const fit = fitNonNegative([[1], [2], [3]], [2, 4, 7], { values: [1], weights: [2] });
    expect(fit.coefficients[0]).toBeCloseTo(35 / 18, 14);
    expect(fit.residualDof).toBe(2);
    expect(fit.residualSd).toBeCloseTo(Math.sqrt(223 / 324), 14);
    expect(fit.standardErrors[0]).toBeCloseTo(Math.sqrt(223 / 5832), 14);
  });

  it('equals ordinary least squares when every coefficient comes out positive', () => {
    // derived: with no constraint active NNLS is OLS; reference via ml-matrix solve (QR) and
    // s²·(XᵀX)⁻¹ via ml-matrix inverse. Invented data.
    const design = [[10, 0], [20, 5], [5, 30], [0, 40], [15, 15], [8, 2]];
    const response = [1.3, 2.6, 2.0, 2.1, 2.4, 1.0];
    const fit = fitNonNegative(design, response);
    const x = new Matrix(design);
    const ols = solve(x, Matrix.columnVector(response)).to1DArray();
    expect(ols.every((b) => b > 0)).toBe(true);
    fit.coefficients.forEach((b, j) => expect(relativeError(b, ols[j])).toBeLessThan(1e-12));
    const residuals = design.map((row, i) => response[i] - row[0] * ols[0] - row[1] * ols[1]);
    const s2 = residuals.reduce((sum, r) => sum + r * r, 0) / (6 - 2);
    const unscaled = inverse(x.transpose().mmul(x));
    expect(relativeError(fit.residualSd!, Math.sqrt(s2))).toBeLessThan(1e-12);
    expect(relativeError(fit.covariance![0][1], s2 * unscaled.get(0, 1))).toBeLessThan(1e-10);
    expect(relativeError(fit.standardErrors[1]!, Math.sqrt(s2 * unscaled.get(1, 1)))).toBeLessThan(1e-12);
  });

  it('fixes a coefficient known only from its prior without spending residual dof on it', () => {
    // derived: column 2 is zero in every observation row, so its only row is the prior
    // (weight 1, value 0.5) and b₂ = 0.5 exactly; column 1 is y = 2x exactly.
    const fit = fitNonNegative([[1, 0], [2, 0], [3, 0]], [2, 4, 6], { values: [0, 0.5], weights: [0, 1] });
    expect(fit.coefficients[0]).toBeCloseTo(2, 14);
    expect(fit.coefficients[1]).toBeCloseTo(0.5, 14);
    expect(fit.informed).toEqual([true, false]);
    expect(fit.residualDof).toBe(2);
    expect(fit.standardErrors[1]).toBeNull();
  });
});
