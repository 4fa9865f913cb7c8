/**
 * Site time, in one place. Every date a person reads or types is in the site's IANA time zone
 * (the project's `siteTimeZone`), whatever zone the server or the browser runs in; instants
 * cross the wire as ISO 8601 strings. Built on @date-fns/tz (TZDate), never on offset arithmetic
 * of our own.
 */
import { TZDate, tzOffset } from '@date-fns/tz';
import { addDays, addWeeks, format, getISOWeek, getISOWeekYear, startOfISOWeek } from 'date-fns';

type Instant = string | number | Date;

const toDate = (at: Instant) => (at instanceof Date ? at : new Date(at));

/** The site calendar day (YYYY-MM-DD) of an instant. */
export function siteDay(at: Instant, timeZone: string): string {
  return format(new TZDate(toDate(at).getTime(), timeZone), 'yyyy-MM-dd');
}

/** ISO week ('2026-W13') of an instant in the site's zone. */
export function siteIsoWeek(at: Instant, timeZone: string): string {
  const local = new TZDate(toDate(at).getTime(), timeZone);
  return `${getISOWeekYear(local)}-W${String(getISOWeek(local)).padStart(2, '0')}`;
}

/** The instant of local 00:00 of a site calendar day (YYYY-MM-DD). */
export function siteMidnight(day: string, timeZone: string): Date {
  const [y, m, d] = day.split('-').map(Number);
  return new Date(new TZDate(y, m - 1, d, 0, 0, timeZone).getTime());
}

/** The site calendar day `days` after `day` (negative: before). */
export function addSiteDays(day: string, days: number, timeZone: string): string {
  const [y, m, d] = day.split('-').map(Number);
  return siteDay(addDays(new TZDate(y, m - 1, d, 12, 0, timeZone), days), timeZone);
}

/** The instant the ISO week containing `at` starts (Monday 00:00 site time), plus `weeks` whole weeks. */
export function siteWeekStart(at: Instant, timeZone: string, weeks = 0): Date {
  return new Date(addWeeks(startOfISOWeek(new TZDate(toDate(at).getTime(), timeZone)), weeks).getTime());
}

/**
 * The instant at which clocks in `timeZone` show the given wall time; null when that wall time
 * does not exist there (skipped by a spring daylight-saving change) or is not a calendar date.
 * An autumn wall time that happens twice resolves to the later one (standard time), as TZDate does.
 */
export function siteWallTimeToInstant(
  wall: { year: number; month: number; day: number; hour?: number; minute?: number; second?: number },
  timeZone: string,
): Date | null {
  const { year, month, day, hour = 0, minute = 0, second = 0 } = wall;
  const local = new TZDate(year, month - 1, day, hour, minute, second, timeZone);
  if (Number.isNaN(local.getTime())) return null;
  const back = [local.getFullYear(), local.getMonth() + 1, local.getDate(), local.getHours(), local.getMinutes(), local.getSeconds()];
  const asked = [year, month, day, hour, minute, second];
  return back.every((v, i) => v === asked[i]) ? new Date(local.getTime()) : null;
}

/** The site's UTC offset at an instant, in minutes (east positive). */
export function siteOffsetMinutes(at: Instant, timeZone: string): number {
  return tzOffset(timeZone, toDate(at));
}

/**
 * ISO 8601 to the second with the site's offset then, e.g. 2026-03-14T06:00:00+01:00 ("Z" when the
 * offset is zero). The offset is the zone's at that very instant, so times next to a clock change
 * are right; worked from the offset alone (no formatting library), as CSV imports and exports call
 * this once a cell.
 */
export function isoWithSiteOffset(at: Instant, timeZone: string): string {
  const ms = toDate(at).getTime();
  const offsetMin = Math.round(tzOffset(timeZone, new Date(ms)));
  const wall = new Date(Math.floor(ms / 1000) * 1000 + offsetMin * 60_000).toISOString().slice(0, 19);
  if (offsetMin === 0) return `${wall}Z`;
  const abs = Math.abs(offsetMin);
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${wall}${offsetMin < 0 ? '-' : '+'}${pad(Math.floor(abs / 60))}:${pad(abs % 60)}`;
}

/** A date as YYYY-MM-DD in the site's zone; '—' when unknown. */
export function formatSiteDate(at: Instant | null | undefined, timeZone: string): string {
  if (at == null) return '—';
  return siteDay(at, timeZone);
}

/**
 * A date and time as YYYY-MM-DD HH:mm in the site's zone; with `withZone`, the zone is named
 * after it ("2026-03-14 06:30 Europe/Zurich") — for mail, exports and screens seen from elsewhere.
 */
export function formatSiteDateTime(at: Instant | null | undefined, timeZone: string, options: { withZone?: boolean } = {}): string {
  if (at == null) return '—';
  const text = format(new TZDate(toDate(at).getTime(), timeZone), 'yyyy-MM-dd HH:mm');
  return options.withZone ? `${text} ${timeZone}` : text;
}

/** An instant as the value of a datetime-local input (YYYY-MM-DDTHH:mm) in the site's zone. */
export function toSiteInput(at: Instant, timeZone: string): string {
  return format(new TZDate(toDate(at).getTime(), timeZone), "yyyy-MM-dd'T'HH:mm");
}

/**
 * A datetime-local value (YYYY-MM-DDTHH:mm[:ss]) read as site time, as an ISO instant (UTC, "Z");
 * null when it is not a date and time. A wall time skipped by the spring change comes out an
 * hour later, as a wall clock would show it.
 */
export function fromSiteInput(value: string, timeZone: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(value);
  if (!m) return null;
  const [y, mo, d, h, mi, s] = m.slice(1).map((v) => Number(v ?? 0));
  const at = new TZDate(y, mo - 1, d, h, mi, s, timeZone);
  if (Number.isNaN(at.getTime()) || at.getMonth() !== mo - 1 || at.getDate() !== d) return null;
  return new Date(at.getTime()).toISOString();
}

const HOUR_MS = 3_600_000;
/** "00" to "59". */
const TWO_DIGITS = Array.from({ length: 60 }, (_, n) => String(n).padStart(2, '0'));
const DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/** Whether the parts name a real wall time (Gregorian calendar; years from 100, as Date reads 0–99 as 1900–1999). */
export function isCalendarTime(year: number, month: number, day: number, hour: number, minute: number, second: number): boolean {
  const whole = Number.isInteger;
  if (!(whole(year) && whole(month) && whole(day) && whole(hour) && whole(minute) && whole(second))) return false;
  if (year < 100 || month < 1 || month > 12 || day < 1 || hour < 0 || hour > 23 || minute < 0 || minute > 59 || second < 0 || second > 59) {
    return false;
  }
  const leap = year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0);
  return day <= (month === 2 && leap ? 29 : DAYS_IN_MONTH[month - 1]);
}

/** Site time for many instants in one zone (a CSV file of thousands of rows): see `siteTimes`. */
export interface SiteTimes {
  readonly timeZone: string;
  /** As `siteWallTimeToInstant`, in ms since the epoch (NaN for null: skipped or not a date). */
  wallTimeToMs(year: number, month: number, day: number, hour: number, minute: number, second: number): number;
  /** As `isoWithSiteOffset`. */
  isoWithOffset(ms: number): string;
}

/**
 * Site-time conversions for many times in one zone, with the same answers as
 * `siteWallTimeToInstant` and `isoWithSiteOffset` at a fraction of the cost: the zone's offset is
 * asked once per day seen (UTC day for instants, site calendar day for wall times), not once per
 * time. A day is answered from its offset only when the zone gives the same offset at its first and
 * its last second (for wall times: both ends exist and lie 86,399 s apart); a day that holds a
 * clock change is looked at hour by hour the same way, and the hour holding the change itself —
 * a skipped or repeated wall time, a half-hour change — is worked out per time exactly as the
 * single-time functions do. (This assumes no zone changes its clocks twice within one day and back
 * to the first offset, which no zone does.) Keep one per file or request: the cache grows with the
 * days seen.
 */
export function siteTimes(timeZone: string): SiteTimes {
  const DAY_MS = 24 * HOUR_MS;
  // Offset (minutes) per UTC day, then per UTC hour on days with a change; NaN: not constant there.
  const offsetByUtcDay = new Map<number, number>();
  const offsetByUtcHour = new Map<number, number>();
  // Wall ms − instant ms per site day, then per wall hour on days with a change; NaN: not constant.
  const deltaByWallDay = new Map<number, number>();
  const deltaByWallHour = new Map<number, number>();
  const offsetOver = (fromMs: number, lengthMs: number) => {
    const first = Math.round(tzOffset(timeZone, new Date(fromMs)));
    const last = Math.round(tzOffset(timeZone, new Date(fromMs + lengthMs - 1)));
    return first === last ? first : NaN;
  };
  // The offset at the start of each UTC day seen: a day whose start and the next day's start share
  // an offset keeps it all day (the next day's start stands in for the day's last moment, so a run
  // of days asks the zone once per day, not twice; a change at midnight UTC only sends that day
  // to the hour-by-hour path).
  const offsetAtDayStart = new Map<number, number>();
  const dayStartOffset = (day: number) => {
    let offset = offsetAtDayStart.get(day);
    if (offset === undefined) offsetAtDayStart.set(day, (offset = Math.round(tzOffset(timeZone, new Date(day * DAY_MS)))));
    return offset;
  };
  const offsetMinutesAt = (ms: number): number => {
    const day = Math.floor(ms / DAY_MS);
    let offset = offsetByUtcDay.get(day);
    if (offset === undefined) {
      const first = dayStartOffset(day);
      offsetByUtcDay.set(day, (offset = first === dayStartOffset(day + 1) ? first : NaN));
    }
    if (!Number.isNaN(offset)) return offset;
    const hour = Math.floor(ms / HOUR_MS);
    offset = offsetByUtcHour.get(hour);
    if (offset === undefined) offsetByUtcHour.set(hour, (offset = offsetOver(hour * HOUR_MS, HOUR_MS)));
    return Number.isNaN(offset) ? Math.round(tzOffset(timeZone, new Date(ms))) : offset;
  };
  const wallDelta = (wallFromMs: number, lengthMs: number): number => {
    const from = new Date(wallFromMs);
    const to = new Date(wallFromMs + lengthMs - 1000);
    const wall = (d: Date) => ({
      year: d.getUTCFullYear(),
      month: d.getUTCMonth() + 1,
      day: d.getUTCDate(),
      hour: d.getUTCHours(),
      minute: d.getUTCMinutes(),
      second: d.getUTCSeconds(),
    });
    const first = siteWallTimeToInstant(wall(from), timeZone);
    const last = siteWallTimeToInstant(wall(to), timeZone);
    return first && last && last.getTime() - first.getTime() === lengthMs - 1000 ? wallFromMs - first.getTime() : NaN;
  };
  const pad = (n: number) => (n < 10 ? `0${n}` : String(n));
  const datePrefixByWallDay = new Map<number, string>();
  const suffixByOffset = new Map<number, string>();
  return {
    timeZone,
    wallTimeToMs(year, month, day, hour, minute, second) {
      if (!isCalendarTime(year, month, day, hour, minute, second)) return NaN;
      const wallMs = Date.UTC(year, month - 1, day, hour, minute, second);
      const wallDay = Date.UTC(year, month - 1, day);
      let delta = deltaByWallDay.get(wallDay);
      if (delta === undefined) deltaByWallDay.set(wallDay, (delta = wallDelta(wallDay, DAY_MS)));
      if (!Number.isNaN(delta)) return wallMs - delta;
      const wallHour = wallDay + hour * HOUR_MS;
      delta = deltaByWallHour.get(wallHour);
      if (delta === undefined) deltaByWallHour.set(wallHour, (delta = wallDelta(wallHour, HOUR_MS)));
      if (!Number.isNaN(delta)) return wallMs - delta;
      const exact = siteWallTimeToInstant({ year, month, day, hour, minute, second }, timeZone);
      return exact === null ? NaN : exact.getTime();
    },
    isoWithOffset(ms) {
      const offsetMin = offsetMinutesAt(ms);
      const wallMs = Math.floor(ms / 1000) * 1000 + offsetMin * 60_000;
      // The wall day's "YYYY-MM-DDT" once per day, the offset's text once per offset; the time of day from a table.
      const wallDay = Math.floor(wallMs / DAY_MS);
      let date = datePrefixByWallDay.get(wallDay);
      if (date === undefined) datePrefixByWallDay.set(wallDay, (date = new Date(wallDay * DAY_MS).toISOString().slice(0, 11)));
      let suffix = suffixByOffset.get(offsetMin);
      if (suffix === undefined) {
        const abs = Math.abs(offsetMin);
        suffix = offsetMin === 0 ? 'Z' : `${offsetMin < 0 ? '-' : '+'}${pad(Math.floor(abs / 60))}:${pad(abs % 60)}`;
        suffixByOffset.set(offsetMin, suffix);
      }
      // Years outside 0000–9999 are written with six digits and a sign: the whole text from Date then.
      if (date.length !== 11) return `${new Date(wallMs).toISOString().slice(0, 19)}${suffix}`;
      const seconds = (wallMs - wallDay * DAY_MS) / 1000;
      const minutes = Math.floor(seconds / 60);
      return `${date}${TWO_DIGITS[Math.floor(minutes / 60)]}:${TWO_DIGITS[minutes % 60]}:${TWO_DIGITS[seconds % 60]}${suffix}`;
    },
  };
}
