/**
 * Bore lost to gauge-cutter wear.
 *
 * Tilt convention: θ is the angle between the tunnel axis (pointing towards the face) and the
 * disc's own radius through its cutting tip. θ = 0° is a face disc standing square to the face;
 * θ = 90° would be a disc whose tip points straight out at the bore wall. Gauge discs sit between.
 *
 * Derivation (trigonometry): radial ring wear h shortens the disc's radius, so the cutting tip
 * moves back towards the hub by h along the unit vector u = (cos θ along the axis, sin θ radially
 * outward). The radius the tip cuts therefore shrinks by h·sin θ; the axial part h·cos θ is taken
 * up by the advance. A constant-cross-section ring keeps its profile as it wears, so the tip stays
 * the point furthest along u. The cutterhead turns, so the shortfall is swept all round the ring
 * of gauge cutters: the bore diameter shrinks by 2·h·sin θ.
 */

/** Shrink of the excavated radius (mm) from radial ring wear `radialWearMm` on a disc tilted `tiltDeg` from the tunnel axis. */
export function boreRadiusLossMm(radialWearMm: number, tiltDeg: number): number {
  if (!(radialWearMm >= 0)) throw new RangeError(`radial wear must be >= 0 mm, got ${radialWearMm}`);
  if (!(tiltDeg >= 0 && tiltDeg <= 90)) throw new RangeError(`gauge tilt must be within 0..90°, got ${tiltDeg}`);
  return radialWearMm * Math.sin((tiltDeg * Math.PI) / 180);
}

/** Shrink of the excavated diameter (mm), 2·h·sin θ, from radial ring wear `radialWearMm` on a gauge disc tilted `tiltDeg`. */
export function boreDiameterLossMm(radialWearMm: number, tiltDeg: number): number {
  return 2 * boreRadiusLossMm(radialWearMm, tiltDeg);
}

export interface GaugeBoreCheck {
  radialWearMm: number;
  tiltDeg: number;
  diameterLossMm: number;
  /** Project overcut margin, on the diameter: excavated diameter with new gauge discs minus the largest shield diameter. */
  overcutMarginMm: number;
  /** True when the diameter loss is more than the overcut margin: the shield may bind. */
  exceedsOvercut: boolean;
}

/**
 * Diameter loss (mm) for a gauge disc at `radialWearMm` and tilt `tiltDeg`, with a warning flag when it
 * exceeds the project's diameter overcut margin `overcutMarginMm`. Judged per disc: the disc is
 * taken to cut the bore wall; where several do, the least worn sets the bore, so the flag is cautious.
 */
export function gaugeBoreCheck(radialWearMm: number, tiltDeg: number, overcutMarginMm: number): GaugeBoreCheck {
  if (!(overcutMarginMm >= 0)) throw new RangeError(`overcut margin must be >= 0 mm, got ${overcutMarginMm}`);
  const diameterLossMm = boreDiameterLossMm(radialWearMm, tiltDeg);
  return { radialWearMm, tiltDeg, diameterLossMm, overcutMarginMm, exceedsOvercut: diameterLossMm > overcutMarginMm };
}
