/**
 * Reading one cell by the type of its field: numbers, dates and times, yes/no, text.
 *
 * - Numbers: a decimal point, or in a decimal-comma file a decimal comma. A number written the
 *   other way is an error rather than a guess (1.250 could be 1250 or 1.25).
 * - Times: ISO 8601 date and time ("2026-03-14T06:30", "T" or a space, seconds and fraction
 *   optional, offset "Z"/"+01:00"/"+0100" optional) or day first "DD.MM.YYYY HH:mm[:ss]" (day,
 *   month and hour may have one digit). Without an offset the time is the site's wall time
 *   (shared/site-time.ts): one skipped by a clock change is an error naming the zone; one repeated
 *   by a clock change takes the later (standard-time) reading. Times come out in ISO 8601 with the
 *   site's offset, to the second. (A file mixing the two formats is refused in read.ts.)
 * - An empty cell is null; whether that is allowed is the row schema's business.
 */
import { isCalendarTime, type SiteTimes } from '../../../shared/site-time';
import type { CsvFieldInfo } from '../../../shared/csv-headers';

export type TimeFormat = 'iso' | 'dayFirst';
export const TIME_FORMAT_NAMES: Record<TimeFormat, string> = { iso: 'YYYY-MM-DD hh:mm (ISO 8601)', dayFirst: 'DD.MM.YYYY hh:mm' };

const POINT_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;
const COMMA_NUMBER = /^[+-]?(\d+(,\d*)?|,\d+)$/;
export const ISO_TIME = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d+))?)?\s*(Z|[+-]\d{2}(?::?\d{2})?)?$/i;
const DAY_FIRST_TIME = /^(\d{1,2})\.(\d{1,2})\.(\d{4}) +(\d{1,2}):(\d{2})(?::(\d{2}))?$/;
const TIME_EXAMPLES = '2026-03-14T06:30 (ISO 8601, optionally with an offset like +01:00) or 14.03.2026 06:30';

/** isoWithSiteOffset (shared/site-time.ts), with a zero offset written "+00:00" as the reader always has. */
function siteIso(ms: number, times: SiteTimes): string {
  const iso = times.isoWithOffset(ms);
  return iso.endsWith('Z') ? `${iso.slice(0, -1)}+00:00` : iso;
}

export type Cell = { ok: true; value: unknown; timeFormat?: TimeFormat } | { ok: false; message: string };

/**
 * What `readCellInto` read: one per file, filled anew for every cell (a file of 10,000 rows reads
 * 100,000 cells; no result object per cell). `message` when not ok, `timeFormat` for a time.
 */
export interface CellSlot {
  ok: boolean;
  value: unknown;
  message: string;
  timeFormat: TimeFormat | undefined;
}

export const cellSlot = (): CellSlot => ({ ok: true, value: null, message: '', timeFormat: undefined });

const filled = (slot: CellSlot, cell: Cell): boolean => {
  slot.ok = cell.ok;
  if (cell.ok) {
    slot.value = cell.value;
    slot.timeFormat = cell.timeFormat;
  } else slot.message = cell.message;
  return cell.ok;
};
const refused = (slot: CellSlot, message: string): boolean => {
  slot.ok = false;
  slot.message = message;
  return false;
};
const value = (slot: CellSlot, v: unknown): boolean => {
  slot.ok = true;
  slot.value = v;
  slot.timeFormat = undefined;
  return true;
};

function readNumber(raw: string, label: string, decimalComma: boolean): Cell {
  if (decimalComma ? COMMA_NUMBER.test(raw) : POINT_NUMBER.test(raw)) return { ok: true, value: Number(raw.replace(',', '.')) };
  if (decimalComma && POINT_NUMBER.test(raw)) {
    return {
      ok: false,
      message: `'${raw}' has a decimal point, but this file writes decimals with a comma (like 12,5): write ${raw.replace('.', ',')}.`,
    };
  }
  if (!decimalComma && /^[+-]?[\d,]+(\.\d+)?$/.test(raw)) {
    return {
      ok: false,
      message: `'${raw}' has a comma, but this file writes numbers with a decimal point and no thousands separator (like 12.5 or 16000).`,
    };
  }
  return { ok: false, message: `${label} must be a number; '${raw}' is not one.` };
}

/** The parts of a time cell; one object for the whole module, filled per cell (reading is synchronous). */
const parts = { year: 0, month: 0, day: 0, hour: 0, minute: 0, second: 0, offset: undefined as string | undefined };

const digitAt = (raw: string, i: number) => {
  const d = raw.charCodeAt(i) - 48;
  return d >= 0 && d <= 9 ? d : NaN;
};
const twoDigits = (raw: string, i: number) => digitAt(raw, i) * 10 + digitAt(raw, i + 1);

/**
 * The common shape of an ISO cell read without the regex: "YYYY-MM-DDThh:mm:ss" (T, t or a
 * space), an optional fraction, then nothing, Z/z or ±hh:mm. False for anything else, which
 * `ISO_TIME` then reads (or refuses) as before; where this says true, ISO_TIME matches with the
 * same parts (`tests/server/csv-time-cells.test.ts`).
 */
function quickIso(raw: string): boolean {
  const n = raw.length;
  if (n < 19) return false;
  if (raw.charCodeAt(4) !== 45 || raw.charCodeAt(7) !== 45 || raw.charCodeAt(13) !== 58 || raw.charCodeAt(16) !== 58) return false;
  const t = raw.charCodeAt(10);
  if (t !== 84 && t !== 116 && t !== 32) return false;
  const year = twoDigits(raw, 0) * 100 + twoDigits(raw, 2);
  const month = twoDigits(raw, 5);
  const day = twoDigits(raw, 8);
  const hour = twoDigits(raw, 11);
  const minute = twoDigits(raw, 14);
  const second = twoDigits(raw, 17);
  // NaN (a non-digit) fails every comparison.
  if (!(year >= 0 && month >= 0 && day >= 0 && hour >= 0 && minute >= 0 && second >= 0)) return false;
  let i = 19;
  const f = raw.charCodeAt(i);
  if (f === 46 || f === 44) {
    i += 1;
    if (!(digitAt(raw, i) >= 0)) return false;
    while (digitAt(raw, i) >= 0) i += 1;
  }
  let offset: string | undefined;
  if (i === n) offset = undefined;
  else if (i === n - 1 && (raw.charCodeAt(i) === 90 || raw.charCodeAt(i) === 122)) offset = raw[i];
  else if (i === n - 6 && (raw.charCodeAt(i) === 43 || raw.charCodeAt(i) === 45) && raw.charCodeAt(i + 3) === 58) {
    if (!(twoDigits(raw, i + 1) >= 0 && twoDigits(raw, i + 4) >= 0)) return false;
    offset = raw.slice(i);
  } else return false;
  parts.year = year;
  parts.month = month;
  parts.day = day;
  parts.hour = hour;
  parts.minute = minute;
  parts.second = second;
  parts.offset = offset;
  return true;
}

/** Reads an ISO or day-first time cell into `parts`: the format read, or undefined. */
function timeParts(raw: string): TimeFormat | undefined {
  if (quickIso(raw)) return 'iso';
  const iso = ISO_TIME.exec(raw);
  if (iso) {
    parts.year = +iso[1];
    parts.month = +iso[2];
    parts.day = +iso[3];
    parts.hour = +iso[4];
    parts.minute = +iso[5];
    parts.second = +(iso[6] ?? 0);
    parts.offset = iso[8];
    return 'iso';
  }
  const dayFirst = DAY_FIRST_TIME.exec(raw);
  if (dayFirst) {
    parts.day = +dayFirst[1];
    parts.month = +dayFirst[2];
    parts.year = +dayFirst[3];
    parts.hour = +dayFirst[4];
    parts.minute = +dayFirst[5];
    parts.second = +(dayFirst[6] ?? 0);
    parts.offset = undefined;
    return 'dayFirst';
  }
  return undefined;
}

/** For tests: the parts the quick reader takes from a cell (null when it leaves the cell to ISO_TIME). */
export const quickIsoParts = (raw: string) => (quickIso(raw) ? { ...parts } : null);

/** Reads a time cell into `slot` (true when read). */
function readTime(slot: CellSlot, raw: string, label: string, times: SiteTimes): boolean {
  const timeFormat = timeParts(raw);
  if (timeFormat === undefined) return refused(slot, `${label}: '${raw}' is not a date and time Kerfwise reads. Write ${TIME_EXAMPLES}.`);
  const { year, month, day, hour, minute, second, offset } = parts;
  // Fractions of a second are dropped: times are kept to the second.
  if (!isCalendarTime(year, month, day, hour, minute, second)) return refused(slot, `${label}: '${raw}' is not a real date and time.`);
  const calendarMs = Date.UTC(year, month - 1, day, hour, minute, second);
  let instantMs: number;
  if (offset) {
    // A written offset is arithmetic on the written wall time, not a time-zone rule.
    let offsetMin = 0;
    if (offset !== 'Z' && offset !== 'z') {
      const sign = offset.startsWith('-') ? -1 : 1;
      const digits = offset.replace(/[^0-9]/g, '');
      offsetMin = sign * (Number(digits.slice(0, 2)) * 60 + Number(digits.slice(2) || 0));
    }
    if (Math.abs(offsetMin) > 14 * 60) return refused(slot, `${label}: '${raw}' has a UTC offset beyond ±14:00.`);
    instantMs = calendarMs - offsetMin * 60_000;
  } else {
    instantMs = times.wallTimeToMs(year, month, day, hour, minute, second);
    if (Number.isNaN(instantMs)) {
      return refused(
        slot,
        `${label}: '${raw}' does not exist in ${times.timeZone} (the clocks jump forward over it). Give the time with its UTC offset, like 2026-03-29T02:30+01:00.`,
      );
    }
  }
  slot.ok = true;
  slot.value = siteIso(instantMs, times);
  slot.timeFormat = timeFormat;
  return true;
}

/**
 * Reads a trimmed cell as the field's type ('' is null) into `slot`; true when it was read, else
 * `slot.message` says why. No object is made for a number, an empty cell, yes/no or text.
 */
export function readCellInto(
  slot: CellSlot,
  info: CsvFieldInfo<string>,
  raw: string,
  decimalComma: boolean,
  times: SiteTimes | undefined,
): boolean {
  if (raw === '') return value(slot, null);
  switch (info.type) {
    case 'number':
      if (decimalComma ? COMMA_NUMBER.test(raw) : POINT_NUMBER.test(raw))
        return value(slot, Number(decimalComma ? raw.replace(',', '.') : raw));
      return filled(slot, readNumber(raw, info.label, decimalComma));
    case 'time':
      if (times === undefined) throw new Error(`No time zone given to read ${info.label}.`);
      return readTime(slot, raw, info.label, times);
    case 'yesNo':
      if (/^(yes|y|true|1)$/i.test(raw)) return value(slot, true);
      if (/^(no|n|false|0)$/i.test(raw)) return value(slot, false);
      return filled(slot, { ok: false, message: `${info.label}: write yes or no; '${raw}' is neither.` });
    case 'text':
      return value(slot, raw);
  }
}

/** Whether a header cell looks like a value (so the file has no header row). */
export const looksLikeValue = (cell: string) =>
  POINT_NUMBER.test(cell) || COMMA_NUMBER.test(cell) || ISO_TIME.test(cell) || DAY_FIRST_TIME.test(cell);
