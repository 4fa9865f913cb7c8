/**
 * Abrasivity classes of the Cerchar Abrasivity Index (CAI), CERCHAR 1986 as quoted in the ISRM
 * Suggested Method (Alber et al., Rock Mech. Rock Eng. 47:261–266, 2014); DOMAIN.md §3.
 *
 * The published table gives ranges that share their end points (0.5, 1.0, 2.0, 4.0, 6.0) and
 * says nothing about them. Kerfwise's rule: a value on a shared end point belongs to the higher
 * class, so every class is [fromCai, toCai) except the last, which is closed at 7.0. Values
 * below 0.3 or above 7.0 still get the lowest or highest class, flagged `outsideTabulatedRange`,
 * because a test result outside the table is real data, not an input error.
 */
export const cercharClasses = [
  { key: 'not_very_abrasive', label: 'Not very abrasive', fromCai: 0.3, toCai: 0.5 },
  { key: 'slightly_abrasive', label: 'Slightly abrasive', fromCai: 0.5, toCai: 1.0 },
  { key: 'medium_to_abrasive', label: 'Medium abrasiveness to abrasive', fromCai: 1.0, toCai: 2.0 },
  { key: 'very_abrasive', label: 'Very abrasive', fromCai: 2.0, toCai: 4.0 },
  { key: 'extremely_abrasive', label: 'Extremely abrasive', fromCai: 4.0, toCai: 6.0 },
  { key: 'quartzitic', label: 'Quartzitic', fromCai: 6.0, toCai: 7.0 },
] as const;

export type CercharClassKey = (typeof cercharClasses)[number]['key'];

export interface CercharClassification {
  key: CercharClassKey;
  label: string;
  /** True when the CAI lies below 0.3 or above 7.0, outside the published table. */
  outsideTabulatedRange: boolean;
}

/** Abrasivity class of a Cerchar Abrasivity Index `cai` (dimensionless, 0.1 mm of stylus wear flat). */
export function classifyCai(cai: number): CercharClassification {
  if (!Number.isFinite(cai) || cai < 0) throw new RangeError(`CAI must be a finite number ≥ 0, got ${cai}`);
  const first = cercharClasses[0];
  const last = cercharClasses[cercharClasses.length - 1];
  const found = cercharClasses.find((c) => cai >= c.fromCai && cai < c.toCai) ?? (cai < first.fromCai ? first : last);
  return {
    key: found.key,
    label: found.label,
    outsideTabulatedRange: cai < first.fromCai || cai > last.toCai,
  };
}
