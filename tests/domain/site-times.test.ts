/**
 * `siteTimes`: site time for many times in one zone (the CSV reader's path, decision 46), which
 * caches the zone's offset per day and must answer exactly as the single-time functions.
 *
 * Outside references (IANA tz database rules, as in tests/domain/site-time.test.ts):
 * - Europe/Zurich follows the EU summer-time directive 2000/84/EC: in 2026 summer time runs from
 *   01:00 UTC on 29 March to 01:00 UTC on 25 October (02:00→03:00 and 03:00→02:00 local).
 * - America/New_York follows the US Energy Policy Act of 2005: in 2026 from 02:00 local on
 *   8 March (second Sunday) to 02:00 local on 1 November (first Sunday), UTC−5 / UTC−4.
 * - Australia/Lord_Howe (tzdb "australasia", rule LH): UTC+10:30, summer UTC+11 from 02:00 local
 *   on the first Sunday of October (02:00→02:30) to 02:00 local on the first Sunday of April
 *   (02:00→01:30): in 2026, 5 April and 4 October. Half-hour changes, so an hour holds a change.
 * Every other check value is "derived: equal to siteWallTimeToInstant / isoWithSiteOffset", the
 * single-time functions built on @date-fns/tz, minute by minute around each change.
 */
import { describe, expect, test } from 'vitest';
import { isoWithSiteOffset, siteTimes, siteWallTimeToInstant } from '../../shared/site-time';

const wall = (iso: string) => {
  const [y, mo, d, h, mi, s] = iso.split(/[-T:]/).map(Number);
  return [y, mo, d, h, mi, s ?? 0] as const;
};
const msOf = (zone: string, iso: string) => siteTimes(zone).wallTimeToMs(...wall(iso));

describe('siteTimes against the tz database rules', () => {
  test('Europe/Zurich 2026: the skipped hour does not exist, the repeated hour takes standard time', () => {
    expect(msOf('Europe/Zurich', '2026-03-29T02:30:00')).toBeNaN();
    expect(new Date(msOf('Europe/Zurich', '2026-03-29T03:30:00')).toISOString()).toBe('2026-03-29T01:30:00.000Z');
    expect(new Date(msOf('Europe/Zurich', '2026-10-25T02:30:00')).toISOString()).toBe('2026-10-25T01:30:00.000Z');
    const zurich = siteTimes('Europe/Zurich');
    expect(zurich.isoWithOffset(Date.parse('2026-03-29T00:59:59Z'))).toBe('2026-03-29T01:59:59+01:00');
    expect(zurich.isoWithOffset(Date.parse('2026-03-29T01:00:00Z'))).toBe('2026-03-29T03:00:00+02:00');
    expect(zurich.isoWithOffset(Date.parse('2026-10-25T00:59:59Z'))).toBe('2026-10-25T02:59:59+02:00');
    expect(zurich.isoWithOffset(Date.parse('2026-10-25T01:00:00Z'))).toBe('2026-10-25T02:00:00+01:00');
  });
  test('America/New_York 2026: 02:00–03:00 on 8 March is skipped; offsets −05:00 and −04:00', () => {
    expect(msOf('America/New_York', '2026-03-08T02:15:00')).toBeNaN();
    expect(new Date(msOf('America/New_York', '2026-03-08T03:00:00')).toISOString()).toBe('2026-03-08T07:00:00.000Z');
    expect(siteTimes('America/New_York').isoWithOffset(Date.parse('2026-11-01T06:00:00Z'))).toBe('2026-11-01T01:00:00-05:00');
    expect(siteTimes('America/New_York').isoWithOffset(Date.parse('2026-11-01T05:59:59Z'))).toBe('2026-11-01T01:59:59-04:00');
  });
  test('Australia/Lord_Howe 2026: a half-hour change inside an hour', () => {
    expect(msOf('Australia/Lord_Howe', '2026-10-04T02:15:00')).toBeNaN();
    // 02:30 local is the first minute of summer time, UTC+11.
    expect(new Date(msOf('Australia/Lord_Howe', '2026-10-04T02:30:00')).toISOString()).toBe('2026-10-03T15:30:00.000Z');
    expect(new Date(msOf('Australia/Lord_Howe', '2026-10-04T01:59:00')).toISOString()).toBe('2026-10-03T15:29:00.000Z');
    const lordHowe = siteTimes('Australia/Lord_Howe');
    expect(lordHowe.isoWithOffset(Date.parse('2026-10-03T15:29:59Z'))).toBe('2026-10-04T01:59:59+10:30');
    expect(lordHowe.isoWithOffset(Date.parse('2026-10-03T15:30:00Z'))).toBe('2026-10-04T02:30:00+11:00');
  });
  test('a date that is not in the calendar is refused, as by siteWallTimeToInstant', () => {
    const zurich = siteTimes('Europe/Zurich');
    expect(zurich.wallTimeToMs(2026, 2, 29, 6, 0, 0)).toBeNaN();
    expect(zurich.wallTimeToMs(2028, 2, 29, 6, 0, 0)).not.toBeNaN(); // 2028 is a leap year (Gregorian rule)
    expect(zurich.wallTimeToMs(2026, 4, 31, 6, 0, 0)).toBeNaN();
    expect(zurich.wallTimeToMs(2026, 4, 30, 24, 0, 0)).toBeNaN();
    expect(zurich.wallTimeToMs(2026, 13, 1, 6, 0, 0)).toBeNaN();
    expect(zurich.wallTimeToMs(2026, 4, 30, 6, 60, 0)).toBeNaN();
    expect(zurich.wallTimeToMs(99, 4, 30, 6, 0, 0)).toBeNaN();
    expect(siteWallTimeToInstant({ year: 99, month: 4, day: 30, hour: 6 }, 'Europe/Zurich')).toBeNull();
  });
});

/** Every minute from two days before to two days after each change, and a second before each minute. */
const changes: [string, string[]][] = [
  ['Europe/Zurich', ['2026-03-29T00:00:00Z', '2026-10-25T00:00:00Z']],
  ['America/New_York', ['2026-03-08T06:00:00Z', '2026-11-01T06:00:00Z']],
  ['Australia/Lord_Howe', ['2026-04-04T15:00:00Z', '2026-10-03T15:00:00Z']],
  ['UTC', ['2026-03-29T00:00:00Z']],
];

describe('siteTimes equals the single-time functions minute by minute around every change (derived)', () => {
  for (const [zone, around] of changes) {
    test(zone, () => {
      // One converter for the whole run: the caches must not carry a wrong offset from one day or hour to the next.
      const times = siteTimes(zone);
      let compared = 0;
      for (const at of around) {
        const centre = Date.parse(at);
        for (let ms = centre - 2 * 86_400_000; ms <= centre + 2 * 86_400_000; ms += 60_000) {
          for (const t of [ms, ms - 1000]) {
            expect(times.isoWithOffset(t)).toBe(isoWithSiteOffset(t, zone));
            // The same instant's UTC wall clock read as site time: crosses every wall time of the window.
            const d = new Date(t);
            const parts = [
              d.getUTCFullYear(),
              d.getUTCMonth() + 1,
              d.getUTCDate(),
              d.getUTCHours(),
              d.getUTCMinutes(),
              d.getUTCSeconds(),
            ] as const;
            const [year, month, day, hour, minute, second] = parts;
            const exact = siteWallTimeToInstant({ year, month, day, hour, minute, second }, zone);
            const fast = times.wallTimeToMs(...parts);
            if (exact === null) expect(fast).toBeNaN();
            else expect(fast).toBe(exact.getTime());
            compared += 1;
          }
        }
      }
      expect(compared).toBe(around.length * 2 * (4 * 24 * 60 + 1));
    });
  }
});
