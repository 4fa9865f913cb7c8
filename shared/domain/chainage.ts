/**
 * Chainage along the drive, in one place. Chainage is the survey distance along the tunnel axis
 * (m); a drive bores towards increasing or decreasing chainage. "Ahead" is the distance the
 * machine still has to advance to reach a chainage (negative: already passed).
 */

export type DriveDirection = 'increasing' | 'decreasing';

/** +1 when chainage grows as the machine advances, −1 when it falls. */
export function directionSign(direction: DriveDirection): 1 | -1 {
  return direction === 'increasing' ? 1 : -1;
}

/** Metres of advance from `fromChainageM` to `toChainageM` (negative when `to` is behind). */
export function aheadM(fromChainageM: number, toChainageM: number, direction: DriveDirection): number {
  return (toChainageM - fromChainageM) * directionSign(direction);
}

/** The chainage reached after advancing `aheadByM` metres from `fromChainageM`. */
export function chainageAhead(fromChainageM: number, aheadByM: number, direction: DriveDirection): number {
  return fromChainageM + directionSign(direction) * aheadByM;
}

/** True when `a` is before `b` in the direction of travel (the machine reaches `a` first). */
export function isBefore(aChainageM: number, bChainageM: number, direction: DriveDirection): boolean {
  return aheadM(aChainageM, bChainageM, direction) > 0;
}

/** Sorts chainages in the direction of travel (nearest to the start of the drive first). */
export function compareAlongDrive(direction: DriveDirection): (a: number, b: number) => number {
  const sign = directionSign(direction);
  return (a, b) => (a - b) * sign;
}

/** Tolerance for chainages that land on a ring boundary after floating-point arithmetic (m). */
const RING_EPS = 1e-9;

/**
 * The ring being built when the machine has advanced `aheadByM` metres past the end of ring
 * `currentRingNumber`: each `ringLengthM` of advance completes one more ring, and a point just
 * past a boundary belongs to the next ring. Never before the current ring.
 */
export function ringAtAhead(currentRingNumber: number, aheadByM: number, ringLengthM: number): number {
  if (!(ringLengthM > 0)) throw new RangeError(`ring length must be > 0 m, got ${ringLengthM}`);
  return currentRingNumber + Math.max(0, Math.ceil(aheadByM / ringLengthM - RING_EPS));
}

/** Chainage in metres as `km+mmm.m`, the trade's way of writing it (e.g. 1234.5 → "1+234.5"); '—' when unknown. */
export function formatChainage(chainageM: number | null | undefined): string {
  if (chainageM == null || !Number.isFinite(chainageM)) return '—';
  // Round to the decimetre first, so 999.96 m reads 1+000.0, not 0+1000.0.
  const dm = Math.round(Math.abs(chainageM) * 10);
  const km = Math.floor(dm / 10_000);
  const rest = ((dm - km * 10_000) / 10).toFixed(1).padStart(5, '0');
  return `${chainageM < 0 && dm > 0 ? '-' : ''}${km}+${rest}`;
}
