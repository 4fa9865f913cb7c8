// Prior wear rate from rock abrasivity, used before a ground type has site data (DOMAIN.md §2).
//
// Gehring's relation v_s = 0.74 · CAI^1.93 gives ring mass lost in mg per metre rolled
// [K. Gehring, Felsbau 13(6), 1995; formula and units from memory, hence the site factor].
// Mass per km → volume → radial wear: a ring of diameter D and constant tip width w that loses
// radial height h loses V = π·w·(R² − (R − h)²) = π·w·h·(D − h) ≈ π·D·w·h; dV/dh at h = 0 is
// exactly π·D·w, so the initial radial rate is (volume per km) / (π·D·w).
//
// Hand-worked, CAI 2 on a 17″ ring (D = 432 mm, w = 19 mm), steel 7.85 g/cm³:
//   v_s = 0.74 · 2^1.93 = 2.8198 mg/m = 2.8198 g/km (1000 m/km, 1000 mg/g)
//   volume = 2.8198 g / 7.85 g/cm³ = 0.35921 cm³ = 359.21 mm³ per km
//   π·D·w = π · 432 · 19 = 25,786.2 mm²
//   radial rate = 359.21 / 25,786.2 = 0.013930 mm per km rolled.

/** Steel density in g/cm³ (common practice, DOMAIN.md §2). */
export const STEEL_DENSITY_G_PER_CM3 = 7.85;

/** Gehring's specific ring wear in mg of ring mass per metre rolled for Cerchar index `cai`. */
export function gehringSpecificWearMgPerM(cai: number): number {
  if (!(cai > 0)) throw new RangeError('CAI must be positive');
  return 0.74 * cai ** 1.93;
}

/**
 * Initial radial wear rate in mm per km rolled of a ring (`ringDiameterMm`, constant tip width
 * `tipWidthMm`) that loses `massLossMgPerM` mg of steel per metre rolled.
 */
export function radialWearRateMmPerKm(
  massLossMgPerM: number,
  ringDiameterMm: number,
  tipWidthMm: number,
  steelDensityGPerCm3: number = STEEL_DENSITY_G_PER_CM3,
): number {
  if (!(ringDiameterMm > 0 && tipWidthMm > 0 && steelDensityGPerCm3 > 0)) {
    throw new RangeError('ring diameter, tip width and density must be positive');
  }
  const massLossGPerKm = massLossMgPerM; // mg/m × 1000 m/km ÷ 1000 mg/g
  const volumeMm3PerKm = (massLossGPerKm / steelDensityGPerCm3) * 1000; // cm³ → mm³
  return volumeMm3PerKm / (Math.PI * ringDiameterMm * tipWidthMm);
}

/**
 * Input of the Gehring prior; `siteFactor` (default 1, must be > 0) scales the result to match
 * the site. A factor of 0 would give a prior of 0 mm/km, i.e. "this ground does not wear": to
 * leave the prior out, give it no weight in the fit instead (wear-fit.ts, strength 0).
 */
export interface GehringPriorInput {
  cai: number;
  ringDiameterMm: number;
  tipWidthMm: number;
  siteFactor?: number;
  steelDensityGPerCm3?: number;
}

/** Prior radial wear rate in mm per km rolled from CAI and ring geometry (Gehring × site factor). */
export function gehringPriorRateMmPerKm(input: GehringPriorInput): number {
  const siteFactor = input.siteFactor ?? 1;
  if (!(siteFactor > 0)) throw new RangeError('site factor must be positive');
  return (
    siteFactor *
    radialWearRateMmPerKm(gehringSpecificWearMgPerM(input.cai), input.ringDiameterMm, input.tipWidthMm, input.steelDensityGPerCm3)
  );
}
