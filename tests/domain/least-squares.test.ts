import { describe, expect, it } from 'vitest';

import { fitNonNegative, linearTrend } from '../../shared/domain/least-squares';

const relativeError = (actual: number, expected: number) => Math.abs(actual / expected - 1);

// NIST Statistical Reference Datasets, linear regression, "Norris" (DOMAIN.md §5), pairs as (y, x).
const norrisYX: [number, number][] = [
  [0.1, 0.2],
  [338.8, 337.4],
  [118.1, 118.2],
  [888.0, 884.6],
  [9.2, 10.1],
  [228.1, 226.5],
  [668.5, 666.3],
  [998.5, 996.3],
  [449.1, 448.6],
  [778.9, 777.0],
  [559.2, 558.2],
  [0.3, 0.4],
  [0.1, 0.6],
  [778.1, 775.5],
  [668.8, 666.9],
  [339.3, 338.0],
  [448.9, 447.5],
  [10.8, 11.6],
  [557.7, 556.0],
  [228.3, 228.1],
  [998.0, 995.8],
  [888.8, 887.6],
  [119.6, 120.2],
  [0.3, 0.3],
  [0.6, 0.3],
  [557.6, 556.8],
  [339.3, 339.1],
  [888.0, 887.2],
  [998.5, 999.0],
  [778.9, 779.0],
  [10.2, 11.1],
  [117.6, 118.3],
  [228.9, 229.2],
  [668.4, 669.1],
  [449.2, 448.9],
  [0.2, 0.5],
];
/** Norris certified values (NIST StRD, DOMAIN.md §5), 15 significant digits. */
const norrisCertified = {
  b0: -0.262323073774029,
  sdB0: 0.232818234301152,
  b1: 1.00211681802045,
  sdB1: 4.29796848199937e-4,
  residualSd: 0.884796396144373,
};

/**
 * Ordinary least squares for the reference, written out here so it shares nothing with the code
 * (which uses ml-fcnnls and ml-matrix): the normal equations XᵀX·b = Xᵀy and (XᵀX)⁻¹ by
 * Gauss–Jordan elimination with partial pivoting (any linear-algebra text, e.g. Golub & Van Loan,
 * "Matrix Computations", §3.2 and §3.4).
 */
function referenceOls(design: number[][], response: number[]) {
  const p = design[0].length;
  const xtx = Array.from({ length: p }, (_, j) =>
    Array.from({ length: p }, (_, k) => design.reduce((sum, row) => sum + row[j] * row[k], 0)),
  );
  const xty = Array.from({ length: p }, (_, j) => design.reduce((sum, row, i) => sum + row[j] * response[i], 0));
  // Augment [XᵀX | I | Xᵀy] and reduce the left block to I: the middle becomes (XᵀX)⁻¹, the right b.
  const m = xtx.map((row, j) => [...row, ...Array.from({ length: p }, (_, k) => (j === k ? 1 : 0)), xty[j]]);
  for (let col = 0; col < p; col++) {
    let pivot = col;
    for (let r = col + 1; r < p; r++) if (Math.abs(m[r][col]) > Math.abs(m[pivot][col])) pivot = r;
    [m[col], m[pivot]] = [m[pivot], m[col]];
    const lead = m[col][col];
    m[col] = m[col].map((v) => v / lead);
    for (let r = 0; r < p; r++) {
      if (r === col) continue;
      const factor = m[r][col];
      m[r] = m[r].map((v, c) => v - factor * m[col][c]);
    }
  }
  const b = m.map((row) => row[2 * p]);
  const unscaledCovariance = m.map((row) => row.slice(p, 2 * p));
  const sse = design.reduce((sum, row, i) => sum + (response[i] - row.reduce((s, x, j) => s + x * b[j], 0)) ** 2, 0);
  const s2 = sse / (design.length - p);
  return { b, s2, covariance: unscaledCovariance.map((row) => row.map((v) => v * s2)) };
}

describe('linearTrend', () => {
  const norris = norrisYX.map(([y, x]): [number, number] => [x, y]);

  it('reproduces the NIST StRD Norris certified values', () => {
    const trend = linearTrend(norris);
    // Certified values, NIST StRD Norris (DOMAIN.md §5), given to 15 significant digits.
    // Tolerances: B1 and the SDs to a relative 1e-12 (we get ~1e-14); B0 to 1e-11 (we get ~4e-13)
    // because B0 = ȳ − B1·x̄ with x̄ ≈ ȳ ≈ 450 cancels about three digits (|B1·x̄ / B0| ≈ 1700)
    // and the regression package forms n·Σx² − (Σx)² in one pass.
    expect(relativeError(trend.slope, norrisCertified.b1)).toBeLessThan(1e-12);
    expect(relativeError(trend.intercept, norrisCertified.b0)).toBeLessThan(1e-11);
    expect(relativeError(trend.slopeStandardError!, norrisCertified.sdB1)).toBeLessThan(1e-12);
    expect(relativeError(trend.interceptStandardError!, norrisCertified.sdB0)).toBeLessThan(1e-12);
    expect(relativeError(trend.residualSd!, norrisCertified.residualSd)).toBeLessThan(1e-12);
  });

  it('gives no standard errors for two points and rejects a vertical line', () => {
    // derived: two points fit exactly, leaving n − 2 = 0 residual degrees of freedom.
    const trend = linearTrend([
      [0, 1],
      [2, 5],
    ]);
    expect(trend.slope).toBeCloseTo(2, 12);
    expect(trend.intercept).toBeCloseTo(1, 12);
    expect(trend.residualSd).toBeNull();
    expect(trend.slopeStandardError).toBeNull();
    expect(() =>
      linearTrend([
        [3, 1],
        [3, 2],
      ]),
    ).toThrow(RangeError);
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

  it('reproduces the NIST StRD NoInt1 certified values through the origin', () => {
    // NIST StRD NoInt1 (DOMAIN.md §5): y = B1·x, x = 60…70, y = 130…140. One coefficient, positive,
    // so the constraint is inactive and NNLS is the certified OLS fit.
    const x = Array.from({ length: 11 }, (_, i) => 60 + i);
    const fit = fitNonNegative(
      x.map((v) => [v]),
      x.map((v) => v + 70),
    );
    expect(relativeError(fit.coefficients[0], 2.07438016528926)).toBeLessThan(1e-12);
    expect(relativeError(fit.standardErrors[0]!, 1.65289256198347e-2)).toBeLessThan(1e-12);
    expect(relativeError(fit.residualSd!, 3.56753034006338)).toBeLessThan(1e-12);
    expect(fit.residualDof).toBe(10);
  });

  it('reproduces the NIST StRD Norris certified values with the intercept column negated', () => {
    // Norris's certified intercept is negative; the column −1 turns it into +0.262323… so both
    // coefficients are free and the NNLS fit must equal the certified OLS one (signs flipped back).
    // Tolerance 1e-9: the covariance comes from XᵀX, whose condition number here is ≈ 1e6.
    const fit = fitNonNegative(
      norrisYX.map(([, x]) => [-1, x]),
      norrisYX.map(([y]) => y),
    );
    expect(relativeError(-fit.coefficients[0], norrisCertified.b0)).toBeLessThan(1e-9);
    expect(relativeError(fit.coefficients[1], norrisCertified.b1)).toBeLessThan(1e-12);
    expect(relativeError(fit.standardErrors[0]!, norrisCertified.sdB0)).toBeLessThan(1e-9);
    expect(relativeError(fit.standardErrors[1]!, norrisCertified.sdB1)).toBeLessThan(1e-9);
    expect(relativeError(fit.residualSd!, norrisCertified.residualSd)).toBeLessThan(1e-9);
    expect(fit.residualDof).toBe(34);
  });

  it('equals ordinary least squares when every coefficient comes out positive', () => {
    // derived: with no constraint active NNLS is OLS; the reference is referenceOls above
    // (normal equations by hand-written Gauss–Jordan, no library). Invented data.
    const design = [
      [10, 0],
      [20, 5],
      [5, 30],
      [0, 40],
      [15, 15],
      [8, 2],
    ];
    const response = [1.3, 2.6, 2.0, 2.1, 2.4, 1.0];
    const fit = fitNonNegative(design, response);
    const ols = referenceOls(design, response);
    expect(ols.b.every((b) => b > 0)).toBe(true);
    fit.coefficients.forEach((b, j) => expect(relativeError(b, ols.b[j])).toBeLessThan(1e-10));
    expect(relativeError(fit.residualSd!, Math.sqrt(ols.s2))).toBeLessThan(1e-10);
    expect(relativeError(fit.covariance![0][1], ols.covariance[0][1])).toBeLessThan(1e-10);
    expect(relativeError(fit.standardErrors[1]!, Math.sqrt(ols.covariance[1][1]))).toBeLessThan(1e-10);
  });

  it('holds a coefficient at zero where OLS would make it negative, and refits the rest', () => {
    // derived: y = 2·x₁ − 1·x₂ exactly, so OLS gives b₂ < 0 (checked with referenceOls); NNLS
    // (Lawson & Hanson 1974, DOMAIN.md §5) sets b₂ = 0 and b₁ is the one-column fit
    // Σx₁y / Σx₁² of y on x₁ alone, checked with referenceOls on that column.
    const design = [
      [1, 1],
      [2, 1],
      [3, 2],
      [4, 1],
      [5, 3],
    ];
    const response = design.map(([a, b]) => 2 * a - b);
    expect(referenceOls(design, response).b[1]).toBeLessThan(0);
    const fit = fitNonNegative(design, response);
    expect(fit.coefficients[1]).toBe(0);
    expect(fit.atBound).toEqual([false, true]);
    const alone = referenceOls(
      design.map(([a]) => [a]),
      response,
    );
    expect(relativeError(fit.coefficients[0], alone.b[0])).toBeLessThan(1e-12);
    expect(fit.residualDof).toBe(4);
    expect(fit.standardErrors[1]).toBeNull();
  });

  it('fixes a coefficient known only from its prior without spending residual dof on it', () => {
    // derived: column 2 is zero in every observation row, so its only row is the prior
    // (weight 1, value 0.5) and b₂ = 0.5 exactly; column 1 is y = 2x exactly.
    const fit = fitNonNegative(
      [
        [1, 0],
        [2, 0],
        [3, 0],
      ],
      [2, 4, 6],
      { values: [0, 0.5], weights: [0, 1] },
    );
    expect(fit.coefficients[0]).toBeCloseTo(2, 14);
    expect(fit.coefficients[1]).toBeCloseTo(0.5, 14);
    expect(fit.informed).toEqual([true, false]);
    expect(fit.residualDof).toBe(2);
    expect(fit.standardErrors[1]).toBeNull();
  });
});
