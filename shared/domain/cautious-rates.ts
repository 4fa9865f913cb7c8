/**
 * Cautious (P90) wear rates for the change-out forecast.
 *
 * The standard errors of the fitted rates shrink as inspections pile up, but single discs keep
 * scattering about the fitted line (harder rock pockets, load sharing, gauge readings). So the
 * cautious rate of a ground carries both: its own relative standard error and the relative scatter
 * of discs about the fit, combined in quadrature and scaled by the one-sided Student t quantile:
 *
 *   rate_P90 = rate · (1 + t(P; dof) · √(cv² + (se / rate)²))          cautiousSource 'fit'
 *
 * where cv is the standard deviation of (measured − predicted) / predicted over inspections whose
 * predicted wear is at least `minPredictedMm` (small wear is dominated by the gauge's resolution).
 * A ground known only from its prior has no measured uncertainty: its cautious rate is the prior
 * times (1 + priorMargin) ('prior-margin'); so is a fitted rate without residual degrees of
 * freedom ('margin').
 *
 * A rate of 0 (held at 0 by the non-negative fit) would make the forecast expect no wear at all
 * in that ground. Its cautious rate is therefore never 0 while anything is known:
 *   - the ground's prior rate when it has one (a CAI) — 'prior';
 *   - else the rate the data cannot rule out: t(P; dof) · se, se being the standard error the
 *     ground's column would have were it free (wear-fit.ts, heldStandardErrorMmPerKm) —
 *     'fit-upper-bound';
 *   - else the largest cautious rate of the other grounds, as the forecast does for unmapped
 *     ground — 'largest-other'; 'none' only when no ground has any.
 * The cautious rate is never below the central one. Kerfwise's own choice, documented in
 * DEVELOPERS.md (decision 13).
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

/** Where a cautious rate comes from (see the method above). */
export type CautiousSource = 'fit' | 'margin' | 'prior-margin' | 'prior' | 'fit-upper-bound' | 'largest-other' | 'none';

export interface CautiousRate {
  p50MmPerKm: number;
  p90MmPerKm: number;
  cautiousSource: CautiousSource;
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

/** P50 and cautious rates (mm per km rolled) per ground type of a fit, given the relative scatter `cv`, each with its source. */
export function cautiousRates(fit: WearFit, cv: number | null, options: CautiousRateOptions): Record<string, CautiousRate> {
  if (!(options.probability > 0.5 && options.probability < 1)) throw new RangeError('probability must lie between 0.5 and 1');
  if (!(options.priorMargin >= 0)) throw new RangeError('the prior margin cannot be negative');
  const t = fit.residualDof > 0 ? jStat.studentt.inv(options.probability, fit.residualDof) : null;
  const out: Record<string, CautiousRate> = {};
  const zero: string[] = [];
  for (const r of fit.rates) {
    const rate = r.rateMmPerKm;
    let p90: number;
    let cautiousSource: CautiousSource;
    if (rate <= 0) {
      if (r.priorRateMmPerKm != null && r.priorRateMmPerKm > 0) {
        p90 = r.priorRateMmPerKm;
        cautiousSource = 'prior';
      } else if (t !== null && r.heldStandardErrorMmPerKm != null && r.heldStandardErrorMmPerKm > 0) {
        p90 = t * r.heldStandardErrorMmPerKm;
        cautiousSource = 'fit-upper-bound';
      } else {
        zero.push(r.groundTypeId);
        p90 = 0;
        cautiousSource = 'none';
      }
    } else if (r.source === 'prior') {
      p90 = rate * (1 + options.priorMargin);
      cautiousSource = 'prior-margin';
    } else if (t === null) {
      p90 = rate * (1 + options.priorMargin);
      cautiousSource = 'margin';
    } else {
      const relSe = (r.standardErrorMmPerKm ?? 0) / rate;
      p90 = rate * (1 + t * Math.sqrt((cv ?? 0) ** 2 + relSe ** 2));
      cautiousSource = 'fit';
    }
    out[r.groundTypeId] = { p50MmPerKm: rate, p90MmPerKm: Math.max(rate, p90), cautiousSource };
  }
  const largest = Math.max(0, ...Object.values(out).map((r) => r.p90MmPerKm));
  if (largest > 0) for (const g of zero) out[g] = { ...out[g], p90MmPerKm: largest, cautiousSource: 'largest-other' };
  return out;
}
