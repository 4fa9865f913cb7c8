/**
 * Cautious (P90) wear rates for the change-out forecast.
 *
 * The standard errors of the fitted rates shrink as inspections pile up, but single discs keep
 * scattering about the fitted line (harder rock pockets, load sharing, gauge readings). So the
 * cautious rate of a ground carries both: its own relative standard error and the relative scatter
 * of discs about the fit, combined in quadrature and scaled by the one-sided Student t quantile:
 *
 *   rate_P90 = rate · (1 + t(P; dof) · √(cv² + (se / rate)²))
 *
 * where cv is the standard deviation of (measured − predicted) / predicted over inspections whose
 * predicted wear is at least `minPredictedMm` (small wear is dominated by the gauge's resolution).
 * A ground known only from its prior has no measured uncertainty: its cautious rate is the prior
 * times (1 + priorMargin). Kerfwise's own choice, documented in DEVELOPERS.md (decision 13).
 */
import jStat from 'jstat';
import type { WearFit } from './wear-fit';

export interface CautiousRateOptions {
  /** One-sided probability of the cautious bound, e.g. 0.9 for P90. */
  probability: number;
  /** Inspections with less predicted wear (mm) do not inform the scatter. */
  minPredictedMm: number;
  /** Relative margin on a prior-only rate, e.g. 0.5 for +50 %. */
  priorMargin: number;
}

export interface ScatterObservation {
  measuredMm: number;
  predictedMm: number;
}

/** Relative scatter of discs about the fit: sample SD of (measured − predicted)/predicted; null with fewer than 2 usable inspections. */
export function relativeScatter(observations: readonly ScatterObservation[], minPredictedMm: number): number | null {
  const ratios = observations.filter((o) => o.predictedMm >= minPredictedMm).map((o) => (o.measuredMm - o.predictedMm) / o.predictedMm);
  if (ratios.length < 2) return null;
  const mean = ratios.reduce((a, b) => a + b, 0) / ratios.length;
  return Math.sqrt(ratios.reduce((a, r) => a + (r - mean) ** 2, 0) / (ratios.length - 1));
}

/** P50 and cautious rates (mm per km rolled) per ground type of a fit, given the relative scatter `cv`. */
export function cautiousRates(fit: WearFit, cv: number | null, options: CautiousRateOptions): Record<string, { p50MmPerKm: number; p90MmPerKm: number }> {
  if (!(options.probability > 0.5 && options.probability < 1)) throw new RangeError('probability must lie between 0.5 and 1');
  const t = fit.residualDof > 0 ? jStat.studentt.inv(options.probability, fit.residualDof) : null;
  const out: Record<string, { p50MmPerKm: number; p90MmPerKm: number }> = {};
  for (const r of fit.rates) {
    const rate = r.rateMmPerKm;
    let p90: number;
    if (r.source === 'prior' || t === null || rate === 0) {
      p90 = rate * (1 + options.priorMargin);
    } else {
      const relSe = (r.standardErrorMmPerKm ?? 0) / rate;
      p90 = rate * (1 + t * Math.sqrt((cv ?? 0) ** 2 + relSe ** 2));
    }
    out[r.groundTypeId] = { p50MmPerKm: rate, p90MmPerKm: p90 };
  }
  return out;
}
