/**
 * Compressed-air work at the face (DOMAIN.md §7): the working pressure that balances the
 * groundwater head above the tunnel axis, p = ρ·g·h, and whether a stop needs compressed air.
 * Indicative only: the real support pressure also carries earth pressure and a margin, and the
 * site's approved procedure sets it. Kerfwise never computes decompression schedules.
 */

/** Standard acceleration of gravity, m/s² (3rd CGPM 1901; ISO 80000-3). */
export const STANDARD_GRAVITY_M_PER_S2 = 9.80665;

/** Fresh water, kg/m³. Use about 1025 kg/m³ for sea water. */
export const FRESH_WATER_DENSITY_KG_PER_M3 = 1000;

const PA_PER_BAR = 100_000;

/** Shown wherever compressed air or work in the cutterhead appears. */
export const COMPRESSED_AIR_CAUTION =
  'Indicative only. The pressure shown balances the groundwater head alone; the real support pressure ' +
  'also carries earth pressure and a margin. Work in compressed air and in the cutterhead is governed by ' +
  'local regulations (for example the UK Work in Compressed Air Regulations 1996 and BS 6164, US OSHA ' +
  "29 CFR 1926.803, Germany's Druckluftverordnung, the ITA/BTS guidelines for good practice in " +
  'high-pressure compressed air work, and EN 16191 and EN 12110 for the machine and its air locks), an ' +
  'approved procedure, a competent supervisor and a medical adviser. Kerfwise does not compute ' +
  'decompression schedules.';

export interface WorkingPressure {
  pressureKPa: number;
  pressureBar: number;
}

/**
 * Working pressure (gauge, kPa and bar) balancing `headAboveAxisM` metres of groundwater above
 * the tunnel axis: ρ·g·h with ρ = `waterDensityKgPerM3`. A water table below the axis
 * (head ≤ 0) gives 0.
 */
export function workingPressureFromHead(
  headAboveAxisM: number,
  waterDensityKgPerM3: number = FRESH_WATER_DENSITY_KG_PER_M3,
): WorkingPressure {
  if (!Number.isFinite(headAboveAxisM)) throw new RangeError(`water head must be a finite number of metres, got ${headAboveAxisM}`);
  if (!(waterDensityKgPerM3 > 0 && Number.isFinite(waterDensityKgPerM3)))
    throw new RangeError(`water density must be > 0 kg/m³, got ${waterDensityKgPerM3}`);
  const pa = waterDensityKgPerM3 * STANDARD_GRAVITY_M_PER_S2 * Math.max(0, headAboveAxisM);
  return { pressureKPa: pa / 1000, pressureBar: pa / PA_PER_BAR };
}

/** Site rule: the face is entered under compressed air above this water head (m) or working pressure (bar). */
export type CompressedAirThreshold = { headAboveAxisM: number } | { pressureBar: number };

/**
 * Default rule: any groundwater above the tunnel axis. Common practice, no source: a face below
 * the water table that is not drained or treated is entered under air. Each site sets its own.
 */
export const DEFAULT_COMPRESSED_AIR_THRESHOLD: CompressedAirThreshold = { headAboveAxisM: 0 };

/** Whether a stop with `headAboveAxisM` metres of groundwater above the axis needs compressed air under the site rule. */
export function needsCompressedAir(
  headAboveAxisM: number,
  threshold: CompressedAirThreshold = DEFAULT_COMPRESSED_AIR_THRESHOLD,
  waterDensityKgPerM3: number = FRESH_WATER_DENSITY_KG_PER_M3,
): boolean {
  const { pressureBar } = workingPressureFromHead(headAboveAxisM, waterDensityKgPerM3);
  return 'pressureBar' in threshold ? pressureBar > threshold.pressureBar : headAboveAxisM > threshold.headAboveAxisM;
}
