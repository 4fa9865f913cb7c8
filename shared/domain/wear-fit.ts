/*
 * Wear-rate fit: method
 *
 * Model. Each inspection of a disc that wore normally gives its radial wear since it was
 * fitted, wear_i (mm), its position class c_i (centre / face / gauge) and the km it rolled in
 * each ground type g since it was fitted, km_ig. Archard's law (worn volume ∝ sliding
 * distance within one ground; DOMAIN.md §2) gives
 *     wear_i = f(c_i) · Σ_g rate_g · km_ig + ε_i,   rate_g ≥ 0 in mm per km rolled,
 * with no intercept (a new ring has no wear). The class factors f are input, set by the
 * planner relative to face cutters (f(face) = 1); they are not estimated here. With design
 * row x_ig = f(c_i) · km_ig the rates solve a non-negative least-squares problem (Lawson &
 * Hanson, "Solving Least Squares Problems", 1974), solved with ml-fcnnls.
 *
 * Prior. For a ground type with a prior rate p_g (e.g. Gehring, gehring-prior.ts) one
 * pseudo-observation row a_g · rate_g = a_g · p_g is added, with a_g = √(n0 · m_g): n0 is the
 * prior strength as an equivalent number of inspections and m_g the mean of x_ig² over the n_g
 * inspections with exposure in g (a_g = 1 when n_g = 0; the rate is then p_g whatever a_g).
 * This is mixed estimation in the sense of Theil & Goldberger (Int. Econ. Rev. 2, 1961; from
 * memory). Where a ground's inspections saw only that ground the result is exactly
 *     rate_g = (n_g · siteRate_g + n0 · p_g) / (n_g + n0)
 * (site rate = its through-origin least-squares rate). n0 = 0 turns the blend off: the rates of
 * grounds with inspections are then exactly the site-only NNLS fit (source 'site'); a ground
 * without any inspection still takes its prior (source 'prior'), there being nothing to blend.
 *
 * Site-only rate and effective weight. With a prior in the fit the same NNLS is also solved
 * without the prior rows (`siteOnlyRateMmPerKm`), and the weight the fit actually gave the
 * site data is read off the two: w_g = (rate_g − p_g) / (siteOnly_g − p_g), so that
 * rate_g = w_g · siteOnly_g + (1 − w_g) · p_g. For a ground inspected alone this is
 * n_g / (n_g + n0) (closed form above; used as such when siteOnly_g = p_g leaves the quotient
 * undefined). Where inspections span several grounds the prior of one ground moves the rates
 * of the others, so the quotient can fall outside [0, 1] (or be undefined): the effective weight
 * is then null, meaning "grounds share inspections, no single weight applies". The nominal
 * n_g / (n_g + n0) stays in `siteWeight` for callers that read it.
 * Grounds without a prior are 'site' (weight 1). Rates stay ≥ 0 either way.
 *
 * Statistics. Residuals use the real inspections only: s² = SSE / (n − p), where p counts the
 * rates that are free (> 0) and have site exposure; rates held at 0 by the constraint and
 * prior-only rates use no degrees of freedom. Covariance C = s²·(XᵀX)⁻¹ over those free rates,
 * XᵀX including the prior rows, so a prior narrows a blended rate's standard error. Rates at
 * 0 and prior-only rates have no standard error (null). As usual for constrained fits the
 * standard errors take the set of free rates as given.
 *
 * A rate held at 0 still gets `heldStandardErrorMmPerKm`: the standard error its column would
 * have in the same covariance if it were free (free set plus that column). t·se of it is the
 * rate the data cannot rule out, used by cautious-rates.ts when the ground has no prior.
 *
 * Prediction. For a new disc with row x0 (f(c) · km_g): mean x0·rate, variance s² + x0ᵀ·C·x0,
 * and a ONE-SIDED upper bound mean + t(P; n − p) · √variance (Student t quantile, jstat), so
 * that the new wear lies below it with probability P: P = 0.9 is the cautious P90 of the
 * change-out forecast. (The two-sided central interval of coverage q has this upper end at
 * P = (1 + q) / 2.) No upper bound (null) without residual degrees of freedom or when the
 * exposure includes a prior-only ground, whose uncertainty the site has not measured.
 *
 * Abnormal wear (flat spot, chipped, cracked, lost ring, deformed edge) stays out of the fit
 * and is counted as a sudden-failure rate per ground: events per 1,000 km rolled there.
 */
import jStat from 'jstat';

import { dot, fitNonNegative, freeSetCovariance } from './least-squares';

export type PositionClass = 'centre' | 'face' | 'gauge';

/** Wear multiplier per position class, relative to face cutters (face = 1). */
export type ClassFactors = Readonly<Record<PositionClass, number>>;

/** One inspection of a disc that wore normally. */
export interface NormalWearObservation {
  /** Radial ring wear since the ring was fitted, mm. */
  wearMm: number;
  positionClass: PositionClass;
  /** Km rolled since fitted, per ground type id. */
  rolledKmByGround: Readonly<Record<string, number>>;
}

/** Prior rates and how many inspections the prior is worth (0: no blend, see method). */
export interface WearPrior {
  rateMmPerKmByGround: Readonly<Record<string, number>>;
  strengthObservations: number;
}

export interface WearFitOptions {
  classFactors: ClassFactors;
  prior?: WearPrior;
}

export type RateSource = 'prior' | 'site' | 'blended';

/** The fitted wear rate of one ground type. */
export interface GroundWearRate {
  groundTypeId: string;
  rateMmPerKm: number;
  /** Null when held at 0, prior-only or not estimable. */
  standardErrorMmPerKm: number | null;
  /** Inspections with exposure in this ground. */
  observationCount: number;
  /** The constraint holds the rate at 0 (the unconstrained fit would go negative). */
  heldAtZero: boolean;
  source: RateSource;
  /** Nominal weight of site data, n / (n + n0) (0 for prior, 1 for site); see effectiveSiteWeight. */
  siteWeight: number;
  /** The ground's prior rate, mm/km; null without a prior. */
  priorRateMmPerKm: number | null;
  /** The rate of the same fit without any prior rows, mm/km; null without inspections in this ground. */
  siteOnlyRateMmPerKm: number | null;
  /**
   * The weight the fit gave the site data: rate = w·siteOnly + (1 − w)·prior (method above).
   * Null when grounds share inspections and no single weight in [0, 1] applies.
   */
  effectiveSiteWeight: number | null;
  /** Some inspection with exposure in this ground also rolled in another ground. */
  sharesInspections: boolean;
  /** Only for a rate held at 0: its standard error were it free (method above); null otherwise or not estimable. */
  heldStandardErrorMmPerKm: number | null;
}

export interface WearFit {
  /** One entry per ground type with site exposure or a prior, sorted by id. */
  rates: GroundWearRate[];
  /** Residual standard deviation of inspections about the fit, mm; null without residual dof. */
  residualSdMm: number | null;
  residualDof: number;
  classFactors: ClassFactors;
  /** Covariance of the rates in `rates` order, (mm/km)²; null when not estimable. */
  rateCovariance: number[][] | null;
}

/** Fits wear rates in mm per km rolled per ground type from normal-wear inspections (method above). */
export function fitWearRates(observations: readonly NormalWearObservation[], options: WearFitOptions): WearFit {
  const { classFactors, prior } = options;
  checkClassFactors(classFactors);
  const priorRates = prior?.rateMmPerKmByGround ?? {};
  if (prior && !(prior.strengthObservations >= 0 && Number.isFinite(prior.strengthObservations))) {
    throw new RangeError('prior strength must be a finite number of inspections, 0 or more');
  }
  // A prior of 0 mm/km would claim the ground does not wear; leave the ground out of the prior instead.
  if (Object.values(priorRates).some((rate) => !(rate > 0 && Number.isFinite(rate)))) throw new RangeError('prior rates must be positive');
  for (const observation of observations) {
    if (!Number.isFinite(observation.wearMm)) throw new RangeError('wear must be a finite number of mm');
    checkRolledKm(observation.rolledKmByGround);
  }

  const exposedGrounds = observations.flatMap((o) => Object.keys(o.rolledKmByGround).filter((g) => o.rolledKmByGround[g] > 0));
  const groundIds = [...new Set([...Object.keys(priorRates), ...exposedGrounds])].sort();
  if (groundIds.length === 0) return { rates: [], residualSdMm: null, residualDof: 0, classFactors, rateCovariance: null };

  const design = observations.map((o) => groundIds.map((g) => classFactors[o.positionClass] * (o.rolledKmByGround[g] ?? 0)));
  const counts = groundIds.map((_, j) => design.filter((row) => row[j] > 0).length);
  const strength = prior?.strengthObservations ?? 0;
  const hasPrior = groundIds.map((g) => g in priorRates);
  const priorWeights = groundIds.map((_, j) => {
    if (!hasPrior[j]) return 0;
    if (counts[j] === 0) return 1;
    const meanSquare = design.reduce((sum, row) => sum + row[j] ** 2, 0) / counts[j];
    return Math.sqrt(strength * meanSquare);
  });

  const withPrior = prior ? { values: groundIds.map((g) => priorRates[g] ?? 0), weights: priorWeights } : undefined;
  const response = observations.map((o) => o.wearMm);
  const fit = fitNonNegative(design, response, withPrior);
  const siteOnly = siteOnlyRates(design, response, counts, withPrior ? null : fit.coefficients);
  const shares = groundIds.map((_, j) => design.some((row) => row[j] > 0 && row.some((x, k) => k !== j && x > 0)));
  const heldSe = heldStandardErrors(design, withPrior, fit);

  const rates = groundIds.map((groundTypeId, j): GroundWearRate => {
    const blendsPrior = hasPrior[j] && priorWeights[j] > 0;
    const source: RateSource = !blendsPrior ? 'site' : counts[j] === 0 ? 'prior' : 'blended';
    const priorRate = hasPrior[j] ? priorRates[groundTypeId] : null;
    const nominal = source === 'site' ? 1 : source === 'prior' ? 0 : counts[j] / (counts[j] + strength);
    return {
      groundTypeId,
      rateMmPerKm: fit.coefficients[j],
      standardErrorMmPerKm: fit.standardErrors[j],
      observationCount: counts[j],
      heldAtZero: fit.atBound[j] && fit.informed[j],
      source,
      siteWeight: nominal,
      priorRateMmPerKm: priorRate,
      siteOnlyRateMmPerKm: siteOnly[j],
      effectiveSiteWeight:
        source === 'blended' ? effectiveWeight(fit.coefficients[j], siteOnly[j]!, priorRate!, shares[j] ? null : nominal) : nominal,
      sharesInspections: shares[j],
      heldStandardErrorMmPerKm: heldSe[j],
    };
  });
  return { rates, residualSdMm: fit.residualSd, residualDof: fit.residualDof, classFactors, rateCovariance: fit.covariance };
}

/** Rates of the NNLS fit without prior rows (`known` when the fit had none), null for grounds without inspections. */
function siteOnlyRates(design: number[][], response: number[], counts: number[], known: number[] | null): (number | null)[] {
  if (known) return known.map((rate, j) => (counts[j] > 0 ? rate : null));
  const exposed = counts.map((_, j) => j).filter((j) => counts[j] > 0);
  const out = counts.map((): number | null => null);
  if (exposed.length === 0) return out;
  const coefficients = fitNonNegative(
    design.map((row) => exposed.map((j) => row[j])),
    response,
  ).coefficients;
  exposed.forEach((j, a) => (out[j] = coefficients[a]));
  return out;
}

/**
 * w with rate = w·site + (1 − w)·prior, when that is defined and in [0, 1]; `closedForm` (a ground
 * inspected alone: n/(n + n0)) where site = prior leaves it undefined; else null (method above).
 */
function effectiveWeight(rate: number, site: number, prior: number, closedForm: number | null): number | null {
  const scale = Math.max(Math.abs(site), Math.abs(prior));
  const tolerance = 1e-9;
  if (Math.abs(site - prior) <= tolerance * scale) return closedForm;
  const w = (rate - prior) / (site - prior);
  if (w < -tolerance || w > 1 + tolerance) return null;
  return Math.min(1, Math.max(0, w));
}

/** For each rate held at 0: √ of its diagonal in s²·(XᵀX)⁻¹ over the free set plus its column (prior rows included). */
function heldStandardErrors(
  design: number[][],
  prior: { values: number[]; weights: number[] } | undefined,
  fit: ReturnType<typeof fitNonNegative>,
): (number | null)[] {
  const columnCount = fit.coefficients.length;
  const rows = design.map((row) => [...row]);
  prior?.weights.forEach((weight, j) => {
    if (weight === 0) return;
    const row = new Array<number>(columnCount).fill(0);
    row[j] = weight;
    rows.push(row);
  });
  const free = fit.coefficients.map((_, j) => j).filter((j) => !fit.atBound[j] && fit.informed[j]);
  return fit.coefficients.map((_, j) => {
    if (!(fit.atBound[j] && fit.informed[j]) || fit.residualSd === null) return null;
    const covariance = freeSetCovariance(rows, [...free, j], fit.residualSd ** 2, columnCount);
    return covariance ? Math.sqrt(covariance[j][j]) : null;
  });
}

/** Predicted radial wear of a new disc, mm, with its one-sided upper bound at the given probability. */
export interface WearPrediction {
  predictedWearMm: number;
  /** P(wear ≤ upperWearMm) = probability; null when not estimable (see method). */
  upperWearMm: number | null;
}

/**
 * Predicts the radial wear in mm of a disc of `positionClass` after rolling `rolledKmByGround`
 * (km per ground type), with the one-sided upper prediction bound at `probability` (e.g. 0.9 for P90).
 */
export function predictWear(
  fit: WearFit,
  rolledKmByGround: Readonly<Record<string, number>>,
  positionClass: PositionClass,
  probability: number,
): WearPrediction {
  if (!(probability > 0 && probability < 1)) throw new RangeError('probability must lie strictly between 0 and 1');
  checkRolledKm(rolledKmByGround);
  for (const [groundTypeId, km] of Object.entries(rolledKmByGround)) {
    if (km > 0 && !fit.rates.some((rate) => rate.groundTypeId === groundTypeId)) {
      throw new RangeError(`no wear rate for ground type ${groundTypeId}`);
    }
  }
  const x0 = fit.rates.map((rate) => fit.classFactors[positionClass] * (rolledKmByGround[rate.groundTypeId] ?? 0));
  const predictedWearMm = dot(
    x0,
    fit.rates.map((rate) => rate.rateMmPerKm),
  );

  const touchesPriorOnly = fit.rates.some((rate, j) => rate.source === 'prior' && x0[j] > 0);
  const { residualSdMm, rateCovariance } = fit;
  if (residualSdMm === null || rateCovariance === null || touchesPriorOnly) return { predictedWearMm, upperWearMm: null };

  const variance =
    residualSdMm ** 2 +
    dot(
      x0,
      rateCovariance.map((row) => dot(row, x0)),
    );
  const t = jStat.studentt.inv(probability, fit.residualDof);
  return { predictedWearMm, upperWearMm: predictedWearMm + t * Math.sqrt(variance) };
}

/** Sudden failures (abnormal wear events) of one ground type per 1,000 km rolled there. */
export interface SuddenFailureRate {
  groundTypeId: string;
  eventCount: number;
  rolledKm: number;
  /** Null when nothing has rolled in this ground yet. */
  ratePer1000Km: number | null;
}

/**
 * Sudden-failure rates per 1,000 km rolled per ground type, from the total km rolled by all
 * discs in each ground and the count of abnormal-wear events (flat spot, chipped, cracked,
 * lost ring, deformed edge) found there.
 */
export function suddenFailureRatesPer1000Km(
  rolledKmByGround: Readonly<Record<string, number>>,
  abnormalEventCountByGround: Readonly<Record<string, number>>,
): SuddenFailureRate[] {
  checkRolledKm(rolledKmByGround);
  if (Object.values(abnormalEventCountByGround).some((count) => !(Number.isInteger(count) && count >= 0))) {
    throw new RangeError('event counts must be non-negative integers');
  }
  const groundIds = [...new Set([...Object.keys(rolledKmByGround), ...Object.keys(abnormalEventCountByGround)])].sort();
  return groundIds.map((groundTypeId) => {
    const eventCount = abnormalEventCountByGround[groundTypeId] ?? 0;
    const rolledKm = rolledKmByGround[groundTypeId] ?? 0;
    return { groundTypeId, eventCount, rolledKm, ratePer1000Km: rolledKm > 0 ? (eventCount / rolledKm) * 1000 : null };
  });
}

function checkClassFactors(classFactors: ClassFactors): void {
  if (classFactors.face !== 1) throw new RangeError('class factors are relative to face cutters: face must be 1');
  if (!(classFactors.centre > 0 && classFactors.gauge > 0)) throw new RangeError('class factors must be positive');
}

function checkRolledKm(rolledKmByGround: Readonly<Record<string, number>>): void {
  if (Object.values(rolledKmByGround).some((km) => !(km >= 0 && Number.isFinite(km)))) {
    throw new RangeError('rolled km must be finite and non-negative');
  }
}
