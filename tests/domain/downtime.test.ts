import { describe, expect, it } from 'vitest';
import {
  type DowntimeEvent,
  cutterWorkShare,
  downtimeHoursByCauseAndShift,
  downtimeHoursByCauseAndWeek,
  findEventsEndingBeforeStart,
  findOverlappingEvents,
  isoWeeksTouching,
  metresPerDay,
  proposeDowntimeFromGaps,
  uncoveredParts,
  utilisation,
} from '../../shared/domain/downtime';

// Instants are written in UTC so the expected values do not depend on the code's own time-zone
// handling. Europe/Zurich is CET (UTC+1) in winter and CEST (UTC+2) in summer; in 2026 the clocks
// change at 01:00 UTC on 29 March (02:00 CET → 03:00 CEST) and on 25 October (03:00 CEST → 02:00 CET).
// derived: EU summer-time rules, Directive 2000/84/EC (last Sunday of March / October, 01:00 UTC).
const ZONE = 'Europe/Zurich';
const TWO_SHIFTS = [
  { name: 'day', startLocal: '06:00' },
  { name: 'night', startLocal: '18:00' },
];
const ev = (id: string, cause: string, startUtc: string, endUtc: string): DowntimeEvent => ({
  id,
  cause,
  start: new Date(startUtc),
  end: new Date(endUtc),
});
// 'cause|period' → hours, so the tests do not depend on row order.
const weeks = (events: DowntimeEvent[]) =>
  Object.fromEntries(downtimeHoursByCauseAndWeek(events, ZONE).map((r) => [`${r.cause}|${r.isoWeek}`, r.hours]));
const shifts = (events: DowntimeEvent[], pattern = TWO_SHIFTS) =>
  Object.fromEntries(downtimeHoursByCauseAndShift(events, pattern, ZONE).map((r) => [`${r.cause}|${r.shift}`, r.hours]));

describe('downtime by cause and ISO week', () => {
  it('splits at local Monday 00:00, not at UTC midnight', () => {
    // derived: Sun 2026-03-08 22:00 CET (21:00Z) → Mon 03:00 CET (02:00Z) = 5 h.
    // Local Monday 00:00 CET = 23:00Z: 2 h in 2026-W10 (Sunday), 3 h in 2026-W11.
    // (A UTC split would give 3 h / 2 h.)
    expect(weeks([ev('E1', 'cutter change', '2026-03-08T21:00Z', '2026-03-09T02:00Z')])).toEqual({
      'cutter change|2026-W10': 2,
      'cutter change|2026-W11': 3,
    });
  });

  it('sums events per cause and week', () => {
    // derived: 2 h + 1.5 h of the same cause in W11; another cause kept apart
    expect(
      weeks([
        ev('E1', 'cutter change', '2026-03-10T08:00Z', '2026-03-10T10:00Z'),
        ev('E2', 'cutter change', '2026-03-11T08:00Z', '2026-03-11T09:30Z'),
        ev('E3', 'grout line', '2026-03-11T10:00Z', '2026-03-11T10:45Z'),
      ]),
    ).toEqual({ 'cutter change|2026-W11': 3.5, 'grout line|2026-W11': 0.75 });
  });

  it('refuses an event that ends before it starts', () => {
    expect(() => weeks([ev('X', 'cutter change', '2026-03-10T10:00Z', '2026-03-10T09:00Z')])).toThrow(/X/);
  });
});

describe('downtime by cause and shift', () => {
  it('splits at a shift change', () => {
    // derived: 05:30 CET (04:30Z) → 08:00 CET (07:00Z): night until 06:00 CET = 0.5 h, then day 2 h
    expect(shifts([ev('E1', 'breakdown', '2026-03-10T04:30Z', '2026-03-10T07:00Z')])).toEqual({
      'breakdown|night': 0.5,
      'breakdown|day': 2,
    });
  });

  it('gives an 11-hour night shift over the spring change (2026-03-29)', () => {
    // derived: night shift Sat 18:00 CET (17:00Z) → Sun 06:00 CEST (04:00Z) = 11 real hours.
    // Event Sat 12:00 CET (11:00Z) → Sun 12:00 CEST (10:00Z) = 23 h: day 11:00Z–17:00Z 6 h,
    // night 17:00Z–04:00Z 11 h, day 04:00Z–10:00Z 6 h → day 12, night 11.
    // (A fixed UTC+1 offset would give night 12, day 11.)
    expect(shifts([ev('E1', 'cutter change', '2026-03-28T11:00Z', '2026-03-29T10:00Z')])).toEqual({
      'cutter change|day': 12,
      'cutter change|night': 11,
    });
  });

  it('gives a 13-hour night shift over the autumn change (2026-10-25)', () => {
    // derived: night shift Sat 18:00 CEST (16:00Z) → Sun 06:00 CET (05:00Z) = 13 real hours.
    // Event Sat 12:00 CEST (10:00Z) → Sun 12:00 CET (11:00Z) = 25 h → day 6 + 6 = 12, night 13.
    expect(shifts([ev('E1', 'cutter change', '2026-10-24T10:00Z', '2026-10-25T11:00Z')])).toEqual({
      'cutter change|day': 12,
      'cutter change|night': 13,
    });
    // derived: same event all in ISO week 2026-W43 (Sat 24 and Sun 25 October)
    expect(weeks([ev('E1', 'cutter change', '2026-10-24T10:00Z', '2026-10-25T11:00Z')])).toEqual({
      'cutter change|2026-W43': 25,
    });
  });

  it('handles three shifts listed out of order, across midnight', () => {
    // derived: shifts A 06:00, B 14:00, C 22:00 local. Event 21:00 CET (20:00Z) → next day 07:00 CET
    // (06:00Z): B 21:00–22:00 = 1 h, C 22:00–06:00 = 8 h (over midnight), A 06:00–07:00 = 1 h.
    const pattern = [
      { name: 'C', startLocal: '22:00' },
      { name: 'A', startLocal: '06:00' },
      { name: 'B', startLocal: '14:00' },
    ];
    expect(shifts([ev('E1', 'breakdown', '2026-03-10T20:00Z', '2026-03-11T06:00Z')], pattern)).toEqual({
      'breakdown|B': 1,
      'breakdown|C': 8,
      'breakdown|A': 1,
    });
  });

  it('rejects a malformed shift start', () => {
    expect(() => shifts([], [{ name: 'day', startLocal: '6:00' }])).toThrow(RangeError);
  });
});

describe('utilisation, cutter-work share, metres per day', () => {
  it('clips boring time to the period', () => {
    // derived: period 2026-03-10 00:00Z–24:00Z (24 h). Strokes inside it: 1 h (of one starting the
    // evening before), 6 h, 5 h, 1 h (of one running past midnight) = 13 h → 13/24 = 0.541667
    const strokes = [
      { start: new Date('2026-03-09T23:00Z'), end: new Date('2026-03-10T01:00Z') },
      { start: new Date('2026-03-10T03:00Z'), end: new Date('2026-03-10T09:00Z') },
      { start: new Date('2026-03-10T12:00Z'), end: new Date('2026-03-10T17:00Z') },
      { start: new Date('2026-03-10T23:00Z'), end: new Date('2026-03-11T02:00Z') },
    ];
    expect(utilisation(strokes, new Date('2026-03-10T00:00Z'), new Date('2026-03-11T00:00Z'))).toBeCloseTo(13 / 24, 12);
  });

  it('gives the share of downtime that is cutter work', () => {
    // derived: cutter change 5 h + cutter inspection 2 h of 10 h in all = 0.7
    const events = [
      ev('E1', 'cutter change', '2026-03-10T00:00Z', '2026-03-10T05:00Z'),
      ev('E2', 'cutter inspection', '2026-03-10T06:00Z', '2026-03-10T08:00Z'),
      ev('E3', 'breakdown', '2026-03-10T09:00Z', '2026-03-10T12:00Z'),
    ];
    expect(cutterWorkShare(events, ['cutter change', 'cutter inspection'])).toBeCloseTo(0.7, 12);
    expect(cutterWorkShare([], ['cutter change'])).toBe(0); // no downtime, by definition 0
  });

  it('gives metres per day', () => {
    // derived: 36 m over 48 h = 18 m/day
    expect(metresPerDay(36, new Date('2026-03-09T00:00Z'), new Date('2026-03-11T00:00Z'))).toBe(18);
  });
});

describe('proposeDowntimeFromGaps', () => {
  it('proposes gaps longer than the threshold from the latest stroke end so far', () => {
    // derived, threshold 30 min: A 08:00–09:00, B 09:10–10:00 (10-min gap, no), C 11:30–12:45
    // (gap 10:00–11:30 = 1.5 h, yes), D 11:40–12:00 inside C, E 13:05–14:00 (gap from C's end
    // 12:45 = 20 min, no; from D's end it would wrongly be 65 min), F 14:45–15:00 (45 min, yes),
    // G 15:30 (exactly 30 min, not longer, no).
    const at = (hhmm: string) => new Date(`2026-03-10T${hhmm}Z`);
    const stroke = (from: string, to: string) => ({ start: at(from), end: at(to) });
    const strokes = [
      stroke('13:05', '14:00'),
      stroke('08:00', '09:00'),
      stroke('09:10', '10:00'),
      stroke('11:30', '12:45'),
      stroke('11:40', '12:00'),
      stroke('14:45', '15:00'),
      stroke('15:30', '16:00'),
    ];
    expect(proposeDowntimeFromGaps(strokes, 30)).toEqual([
      { start: at('10:00'), end: at('11:30'), hours: 1.5 },
      { start: at('14:00'), end: at('14:45'), hours: 0.75 },
    ]);
  });
});

describe('event validation', () => {
  const events = [
    ev('a', 'breakdown', '2026-03-10T08:00Z', '2026-03-10T10:00Z'),
    ev('b', 'cutter change', '2026-03-10T09:00Z', '2026-03-10T11:00Z'),
    ev('c', 'grout line', '2026-03-10T11:00Z', '2026-03-10T12:00Z'),
    ev('d', 'breakdown', '2026-03-10T07:00Z', '2026-03-10T07:30Z'),
    ev('e', 'cutter inspection', '2026-03-10T08:30Z', '2026-03-10T08:45Z'),
    ev('f', 'breakdown', '2026-03-10T14:00Z', '2026-03-10T13:00Z'),
  ];

  it('finds events ending before (or when) they start', () => {
    expect(findEventsEndingBeforeStart([...events, ev('g', 'breakdown', '2026-03-10T15:00Z', '2026-03-10T15:00Z')])).toEqual(['f', 'g']);
  });

  it('reports which events overlap and by how much', () => {
    // derived: a/e overlap 08:30–08:45 = 0.25 h; a/b 09:00–10:00 = 1 h; b/c only touch at 11:00;
    // d lies before all; f is reversed and overlaps nothing
    expect(findOverlappingEvents(events)).toEqual([
      { firstId: 'a', secondId: 'e', hours: 0.25 },
      { firstId: 'a', secondId: 'b', hours: 1 },
    ]);
  });
});

describe('report weeks and uncovered standstills', () => {
  it('lists every ISO week of site time a period touches, split at local Monday 00:00', () => {
    // derived: Sunday 2026-03-22 23:30 CET (22:30 UTC) is in ISO week 12; Monday 30 March 00:00 CEST (29 March 22:00 UTC)
    // starts week 14 (ISO 8601 weeks; EU summer-time rule as above).
    expect(isoWeeksTouching(new Date('2026-03-22T22:30:00Z'), new Date('2026-03-29T22:00:00Z'), ZONE)).toEqual(['2026-W12', '2026-W13']);
    expect(isoWeeksTouching(new Date('2026-03-22T22:30:00Z'), new Date('2026-03-29T22:00:01Z'), ZONE)).toEqual([
      '2026-W12',
      '2026-W13',
      '2026-W14',
    ]);
    // derived: 2026-12-31 is a Thursday, so 2027-01-03 (Sunday) still belongs to 2026-W53 (ISO 8601: week 1 holds the first Thursday).
    expect(isoWeeksTouching(new Date('2027-01-03T10:00:00Z'), new Date('2027-01-04T10:00:00Z'), ZONE)).toEqual(['2026-W53', '2027-W01']);
  });

  it('keeps the parts of a standstill no recorded event covers', () => {
    const at = (h: number) => new Date(Date.UTC(2026, 2, 2, h));
    // derived by hand: gap 00–10 h less events 02–04 and 03–05 (overlapping) and 08–12 leaves 00–02 and 05–08.
    const parts = uncoveredParts({ start: at(0), end: at(10) }, [
      { start: at(2), end: at(4) },
      { start: at(3), end: at(5) },
      { start: at(8), end: at(12) },
    ]);
    expect(parts).toEqual([
      { start: at(0), end: at(2) },
      { start: at(5), end: at(8) },
    ]);
    expect(uncoveredParts({ start: at(0), end: at(10) }, [])).toEqual([{ start: at(0), end: at(10) }]);
    expect(uncoveredParts({ start: at(1), end: at(3) }, [{ start: at(0), end: at(4) }])).toEqual([]);
  });
});
