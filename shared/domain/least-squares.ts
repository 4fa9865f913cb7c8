// Least-squares helpers shared by the wear fit and trend lines: a non-negative fit (ml-fcnnls)
// with its residual statistics, and a one-variable straight line (regression package) with
// standard errors. The method is described at the top of wear-fit.ts.
import { fcnnlsVector } from 'ml-fcnnls';
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import regression from 'regression';

/** Pseudo-observations pulling coefficient j towards `values[j]` with row weight `weights[j]` (0 = none). */
export interface CoefficientPrior {
  values: readonly number[];
  weights: readonly number[];
}

/** A non-negative least-squares fit with the statistics of its observation rows. */
export interface NonNegativeFit {
  coefficients: number[];
  /** True where the constraint holds the coefficient at 0. */
  atBound: boolean[];
  /** True where the coefficient has a non-zero entry in some observation row (not only in the prior). */
  informed: boolean[];
  /** Observations minus free, informed coefficients. */
  residualDof: number;
  /** √(SSE / residualDof) over the observation rows; null when residualDof ≤ 0. */
  residualSd: number | null;
  /** s²·(XᵀX)⁻¹ on the free, informed coefficients (prior rows included in XᵀX), zeros elsewhere; null when not estimable. */
  covariance: number[][] | null;
  /** √ of the covariance diagonal; null for coefficients at the bound, prior-only or not estimable. */
  standardErrors: (number | null)[];
}

/**
 * Fits `response ≈ design · b` with b ≥ 0 by non-negative least squares (ml-fcnnls), optionally
 * with one prior pseudo-row per coefficient (row `weights[j]` in column j, response
 * `weights[j]·values[j]`). Residual statistics use the observation rows only. Units: those of
 * the inputs (b in response units per design unit).
 */
export function fitNonNegative(
  design: readonly (readonly number[])[],
  response: readonly number[],
  prior?: CoefficientPrior,
): NonNegativeFit {
  const columnCount = prior ? prior.values.length : (design[0]?.length ?? 0);
  if (columnCount === 0) throw new RangeError('fitNonNegative needs at least one coefficient');
  if (design.length !== response.length) throw new RangeError('design and response lengths differ');
  if (design.some((row) => row.length !== columnCount)) throw new RangeError('design rows must all have one entry per coefficient');
  if (prior && prior.weights.length !== columnCount) throw new RangeError('prior values and weights lengths differ');

  const rows = design.map((row) => [...row]);
  const ys = [...response];
  prior?.weights.forEach((weight, j) => {
    if (weight === 0) return;
    const row = new Array<number>(columnCount).fill(0);
    row[j] = weight;
    rows.push(row);
    ys.push(weight * prior.values[j]);
  });

  const coefficients = fcnnlsVector(rows, ys).K.to1DArray();
  const atBound = coefficients.map((b) => b <= 0);
  const informed = coefficients.map((_, j) => design.some((row) => row[j] !== 0));
  const freeInformed = coefficients.map((_, j) => j).filter((j) => !atBound[j] && informed[j]);

  const sse = design.reduce((sum, row, i) => sum + (response[i] - dot(row, coefficients)) ** 2, 0);
  const residualDof = design.length - freeInformed.length;
  const residualSd = residualDof > 0 ? Math.sqrt(sse / residualDof) : null;

  const covariance = residualSd === null ? null : freeSetCovariance(rows, freeInformed, residualSd ** 2, columnCount);
  const standardErrors = coefficients.map((_, j) => (covariance && freeInformed.includes(j) ? Math.sqrt(covariance[j][j]) : null));
  return { coefficients, atBound, informed, residualDof, residualSd, covariance, standardErrors };
}

/** s²·(XᵀX)⁻¹ restricted to `free`, embedded in a columnCount² matrix; null if XᵀX there is singular. */
export function freeSetCovariance(rows: number[][], free: number[], variance: number, columnCount: number): number[][] | null {
  const covariance = Array.from({ length: columnCount }, () => new Array<number>(columnCount).fill(0));
  if (free.length === 0) return covariance;
  const x = new Matrix(rows.map((row) => free.map((j) => row[j])));
  const cholesky = new CholeskyDecomposition(x.transpose().mmul(x));
  if (!cholesky.isPositiveDefinite()) return null;
  const inverse = cholesky.solve(Matrix.eye(free.length));
  free.forEach((j, a) => free.forEach((k, b) => (covariance[j][k] = variance * inverse.get(a, b))));
  return covariance;
}

/** Σ a_i·b_i. */
export function dot(a: readonly number[], b: readonly number[]): number {
  return a.reduce((sum, value, i) => sum + value * b[i], 0);
}

/** A straight line y = slope·x + intercept with its standard errors. */
export interface LinearTrend {
  slope: number;
  intercept: number;
  slopeStandardError: number | null;
  interceptStandardError: number | null;
  /** √(SSE / (n − 2)); null when n < 3. */
  residualSd: number | null;
  r2: number;
}

/**
 * Ordinary least-squares line through (x, y) points, e.g. wear in mm against chainage in m;
 * coefficients from the regression package, standard errors from s/√Sxx and
 * s·√(1/n + x̄²/Sxx). Units: slope in y units per x unit, intercept in y units.
 */
export function linearTrend(points: readonly [number, number][]): LinearTrend {
  if (points.length < 2) throw new RangeError('linearTrend needs at least two points');
  const n = points.length;
  const meanX = points.reduce((sum, [x]) => sum + x, 0) / n;
  const sxx = points.reduce((sum, [x]) => sum + (x - meanX) ** 2, 0);
  if (sxx === 0) throw new RangeError('linearTrend needs at least two distinct x values');
  const fit = regression.linear(points, { precision: 15 });
  const [slope, intercept] = fit.equation;
  const sse = points.reduce((sum, [x, y]) => sum + (y - slope * x - intercept) ** 2, 0);
  const residualSd = n > 2 ? Math.sqrt(sse / (n - 2)) : null;
  return {
    slope,
    intercept,
    slopeStandardError: residualSd === null ? null : residualSd / Math.sqrt(sxx),
    interceptStandardError: residualSd === null ? null : residualSd * Math.sqrt(1 / n + meanX ** 2 / sxx),
    residualSd,
    r2: fit.r2,
  };
}
