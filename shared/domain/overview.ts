/**
 * The small rules behind each role's Overview (start of the day): when a disc is near its limit,
 * when drive data is stale, when an order line is due or late, and this week against last week.
 * Pure; the service server/services/overview.ts reads the data.
 */

/** A disc at or over this share of its wear limit is "near" (the stop plan's site-practice share, 80 %; common practice, no source). */
export const NEAR_LIMIT_SHARE = 0.8;
/** Drive data is stale when the newest stroke or inspection is older than this many days (common practice, no source). */
export const STALE_AFTER_DAYS = 7;
/** Order lines due within this many days from today count as "due" (one week; common practice, no source). */
export const ORDERS_DUE_WITHIN_DAYS = 7;
/** Items shown per list before "and N more". */
export const OVERVIEW_LIST_LIMIT = 8;

const DAY_MS = 86_400_000;

export type LimitBand = 'over' | 'near';

/** 'over' at or beyond the limit, 'near' from `nearShare` of it, else null. A limit that is not above 0 cannot be judged: null. */
export function limitBand(wearMm: number, limitMm: number, nearShare = NEAR_LIMIT_SHARE): LimitBand | null {
  if (!(limitMm > 0)) return null;
  if (wearMm >= limitMm) return 'over';
  if (wearMm >= nearShare * limitMm) return 'near';
  return null;
}

/** Whole and fractional days from `at` to `now`; null when `at` is null. */
export function daysSince(at: Date | null, now: Date): number | null {
  return at ? (now.getTime() - at.getTime()) / DAY_MS : null;
}

/** Stale when there is nothing at all, or the newest record is more than `days` days old. */
export function isStale(lastAt: Date | null, now: Date, days = STALE_AFTER_DAYS): boolean {
  const age = daysSince(lastAt, now);
  return age === null || age > days;
}

function dayNumber(isoDate: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(isoDate);
  if (!m) throw new RangeError(`expected a YYYY-MM-DD date, got ${isoDate}`);
  return Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])) / DAY_MS;
}

/** Calendar days from `today` to `dueDate` (both YYYY-MM-DD site days): negative when the date has passed. */
export function daysUntil(dueDate: string, today: string): number {
  return dayNumber(dueDate) - dayNumber(today);
}

/** An open order line's state: 'late' before today, 'due' from today up to `withinDays` ahead, else null. */
export function orderLineState(dueDate: string, today: string, withinDays = ORDERS_DUE_WITHIN_DAYS): 'late' | 'due' | null {
  const d = daysUntil(dueDate, today);
  if (d < 0) return 'late';
  if (d <= withinDays) return 'due';
  return null;
}

/** Change from last week to this week, or null when last week had nothing to compare with. */
export function changeShare(thisWeek: number, lastWeek: number): number | null {
  return lastWeek > 0 ? (thisWeek - lastWeek) / lastWeek : null;
}
