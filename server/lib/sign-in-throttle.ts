/**
 * Sign-in throttling after the OWASP Authentication Cheat Sheet ("Protect against automated
 * attacks": throttle rather than lock, per account and source, with growing delays) and its
 * device-cookie scheme: failures are counted per account and per source, a source being the
 * known device (a device cookie this account was signed in with before) or, without one, the
 * client address. A few failures are free; after that each further attempt waits longer. An
 * attacker hammering an account from elsewhere therefore slows down only unknown devices — the
 * owner's usual device keeps its own count. (DEVELOPERS.md, decision 29.)
 */

export const signInThrottle = {
  /** Failures allowed per account and source within the window before delays start. */
  freeFailures: 5,
  /** The first delay (s); it doubles with every further failure. */
  firstDelayS: 30,
  /** No single wait is longer than this (s). */
  maxDelayS: 15 * 60,
  /** Failures older than this no longer count (min). */
  windowMinutes: 15,
  /** Failures from all unknown devices together before unknown devices are slowed for the account. */
  accountUnknownFailures: 20,
  /** Failures from one client address across all accounts before that address is slowed. */
  perAddressFailures: 30,
} as const;

/**
 * Seconds an attempt must wait after the last failure, given `failures` recent failures in one
 * count, with `free` failures allowed before delays start: 0, then firstDelay · 2^(failures − free),
 * capped at maxDelay.
 */
export function throttleDelayS(failures: number, free: number = signInThrottle.freeFailures): number {
  if (failures < free) return 0;
  return Math.min(signInThrottle.maxDelayS, signInThrottle.firstDelayS * 2 ** (failures - free));
}

/** Seconds still to wait at `nowMs` for a count whose last failure was at `lastFailureMs`; 0 when none. */
export function waitS(failures: number, lastFailureMs: number | null, nowMs: number, free?: number): number {
  if (lastFailureMs == null) return 0;
  const delay = throttleDelayS(failures, free);
  return Math.max(0, Math.ceil(delay - (nowMs - lastFailureMs) / 1000));
}
