import { describe, expect, it } from 'vitest';
import { backupsToKeep } from '../../shared/domain/backup-retention';

/*
 * The rule is restic's `forget --keep-daily n --keep-weekly m` (restic documentation, "Removing
 * snapshots according to a policy"): for the last n days / m weeks that have one or more backups,
 * keep the newest backup of each. Weeks are ISO 8601 weeks (Monday to Sunday; week 1 holds the
 * year's first Thursday). The weekdays and ISO weeks below were worked out by hand and checked with
 * GNU date (`date -u -d 2026-03-16 +'%a %G-W%V'` → "Mon 2026-W12").
 */
const b = (iso: string) => ({ name: iso, takenAt: new Date(iso) });

describe('backupsToKeep (hand-worked calendar)', () => {
  // March 2026:  Mo Tu We Th Fr Sa Su
  //   W08        16 17 18 19 20 21 22  (February)   backup Fri 20 Feb
  //   W09        23 24 25 26 27 28  1               backups Fri 27 Feb, Sun 1 Mar
  //   W10         2  3  4  5  6  7  8               backups Tue 3, Sun 8
  //   W11         9 10 11 12 13 14 15               none (the server was off)
  //   W12        16 17 18 19 20 21 22               backups Mon 16, Wed 18, Thu 19 (two), Fri 20; Sat 21 is after "now"
  const all = [
    '2026-02-20T02:15:00Z',
    '2026-02-27T02:15:00Z',
    '2026-03-01T02:15:00Z',
    '2026-03-03T02:15:00Z',
    '2026-03-08T02:15:00Z',
    '2026-03-16T02:15:00Z',
    '2026-03-18T02:15:00Z',
    '2026-03-19T02:15:00Z',
    '2026-03-19T14:00:00Z',
    '2026-03-20T02:15:00Z',
    '2026-03-21T02:15:00Z',
  ].map(b);
  const now = new Date('2026-03-20T12:00:00Z');

  it('keeps the newest of the 3 latest days and of the 3 latest weeks that have backups', () => {
    const keep = backupsToKeep(all, now, { daily: 3, weekly: 3 });
    expect([...keep].sort()).toEqual([
      '2026-03-01T02:15:00Z', // weekly: newest of W09
      '2026-03-08T02:15:00Z', // weekly: newest of W10 (W11 has none, so W09 is the third week)
      '2026-03-18T02:15:00Z', // daily: Wed 18
      '2026-03-19T14:00:00Z', // daily: the later of Thu 19's two
      '2026-03-20T02:15:00Z', // daily: Fri 20, and weekly: newest of W12
      '2026-03-21T02:15:00Z', // after now: never deleted
    ]);
  });

  it('does not depend on the order of the list', () => {
    const keep = backupsToKeep([...all].reverse(), now, { daily: 3, weekly: 3 });
    expect(keep.size).toBe(6);
    expect(keep.has('2026-03-19T02:15:00Z')).toBe(false);
  });

  it('daily only: 5 days', () => {
    const keep = backupsToKeep(all, now, { daily: 5, weekly: 0 });
    // Days with backups, newest first: 20, 19, 18, 16 Mar, 8 Mar — plus the future one.
    expect([...keep].sort()).toEqual([
      '2026-03-08T02:15:00Z',
      '2026-03-16T02:15:00Z',
      '2026-03-18T02:15:00Z',
      '2026-03-19T14:00:00Z',
      '2026-03-20T02:15:00Z',
      '2026-03-21T02:15:00Z',
    ]);
  });

  it('an ISO week that spans the new year counts once (2026 has 53 ISO weeks)', () => {
    // Sun 27 Dec 2026 is 2026-W52; Thu 31 Dec 2026 and Sun 3 Jan 2027 are both 2026-W53; Mon 4 Jan 2027 is 2027-W01.
    const list = ['2026-12-27T02:15:00Z', '2026-12-31T02:15:00Z', '2027-01-03T02:15:00Z', '2027-01-04T02:15:00Z'].map(b);
    const keep = backupsToKeep(list, new Date('2027-01-05T08:00:00Z'), { daily: 1, weekly: 2 });
    expect([...keep].sort()).toEqual(['2027-01-03T02:15:00Z', '2027-01-04T02:15:00Z']);
  });

  it('days are counted in the time zone given (Pacific/Auckland is UTC+13 in January)', () => {
    // 2027-01-03T20:00Z is already 4 Jan 09:00 in Auckland, the same day as 2027-01-04T02:15Z (15:15 there).
    const list = ['2027-01-03T20:00:00Z', '2027-01-04T02:15:00Z'].map(b);
    expect([...backupsToKeep(list, new Date('2027-01-05T00:00:00Z'), { daily: 2, weekly: 0 }, 'Pacific/Auckland')]).toEqual([
      '2027-01-04T02:15:00Z',
    ]);
    expect(backupsToKeep(list, new Date('2027-01-05T00:00:00Z'), { daily: 2, weekly: 0 }).size).toBe(2);
  });
});
