/**
 * Site time against the IANA time zone database's rules for Europe/Zurich, which follow the EU
 * summer-time directive 2000/84/EC: summer time from 01:00 UTC on the last Sunday of March to
 * 01:00 UTC on the last Sunday of October (in 2026: 29 March and 25 October). ISO weeks after
 * ISO 8601 (2026-03-29, a Sunday, is in week 13).
 */
import { describe, expect, test } from 'vitest';
import {
  addSiteDays,
  formatSiteDateTime,
  fromSiteInput,
  isoWithSiteOffset,
  siteDay,
  siteIsoWeek,
  siteWallTimeToInstant,
} from '../../shared/site-time';

const ZONE = 'Europe/Zurich';

describe('site time (IANA tzdb, EU directive 2000/84/EC)', () => {
  test('a wall time skipped by the spring change does not exist', () => {
    expect(siteWallTimeToInstant({ year: 2026, month: 3, day: 29, hour: 2, minute: 30 }, ZONE)).toBeNull();
    expect(siteWallTimeToInstant({ year: 2026, month: 3, day: 29, hour: 3, minute: 30 }, ZONE)!.toISOString()).toBe(
      '2026-03-29T01:30:00.000Z',
    );
  });
  test('an autumn wall time that happens twice resolves to standard time', () => {
    expect(siteWallTimeToInstant({ year: 2026, month: 10, day: 25, hour: 2, minute: 30 }, ZONE)!.toISOString()).toBe(
      '2026-10-25T01:30:00.000Z',
    );
  });
  test('a date that is not in the calendar is refused', () => {
    expect(siteWallTimeToInstant({ year: 2026, month: 2, day: 30 }, ZONE)).toBeNull();
    expect(fromSiteInput('2026-02-30T06:00', ZONE)).toBeNull();
  });
  test('inputs and displays in the site zone, whatever the machine zone', () => {
    expect(fromSiteInput('2026-03-14T06:30', ZONE)).toBe('2026-03-14T05:30:00.000Z');
    expect(formatSiteDateTime('2026-03-14T05:30:00Z', ZONE, { withZone: true })).toBe('2026-03-14 06:30 Europe/Zurich');
    expect(formatSiteDateTime('2026-07-14T05:30:00Z', ZONE)).toBe('2026-07-14 07:30');
    expect(isoWithSiteOffset('2026-03-14T05:30:00Z', ZONE)).toBe('2026-03-14T06:30:00+01:00');
    expect(isoWithSiteOffset('2026-07-14T05:30:00Z', ZONE)).toBe('2026-07-14T07:30:00+02:00');
    // Either side of the spring change at 01:00 UTC (EU directive 2000/84/EC).
    expect(isoWithSiteOffset('2026-03-29T00:59:59Z', ZONE)).toBe('2026-03-29T01:59:59+01:00');
    expect(isoWithSiteOffset('2026-03-29T01:00:00Z', ZONE)).toBe('2026-03-29T03:00:00+02:00');
    expect(isoWithSiteOffset('2026-03-29T01:00:00Z', 'UTC')).toBe('2026-03-29T01:00:00Z');
  });
  test('calendar days and ISO weeks are the site’s', () => {
    expect(siteDay('2026-03-14T23:30:00Z', ZONE)).toBe('2026-03-15');
    expect(siteIsoWeek('2026-03-29T12:00:00Z', ZONE)).toBe('2026-W13');
    expect(siteIsoWeek('2026-03-29T22:30:00Z', ZONE)).toBe('2026-W14');
    expect(addSiteDays('2026-03-28', 2, ZONE)).toBe('2026-03-30');
  });
});
