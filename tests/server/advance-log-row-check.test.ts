/**
 * isAdvanceLogRow, the quick check the CSV reader runs before the zod row schema (decision 46).
 * Check values: derived — it may only say yes where advanceLogRowSchema accepts the candidate
 * unchanged, so every message a refused row gets is still the schema's; and it must say yes to the
 * rows a machine export holds, or the fast path would never be taken.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { advanceLogRowSchema, isAdvanceLogRow } from '../../shared/schemas/advance-log';

const good = {
  ringNumber: 101,
  startTime: '2026-03-14T06:00:00+01:00',
  endTime: '2026-03-14T06:50:00+01:00',
  chainageStartM: 2450,
  chainageEndM: 2451.5,
  revolutions: 187.5,
  penetrationMmPerRev: 8,
  rpm: 5.5,
  thrustKn: 12000,
  torqueKnm: 2500,
  extra: { Shift: 'B' },
};

const number = fc.oneof(
  fc.constantFrom(null, 0, -0, 1, -1, 0.5, 2_147_483_647, 2_147_483_648, 1e6, 1_000_000.5, -1e6, Infinity, -Infinity, NaN, 1e20),
  fc.double(),
  fc.integer(),
);
const time = fc.oneof(
  fc.constantFrom(
    null,
    '2026-03-14T06:00:00+01:00',
    '2026-03-14T06:50:00+01:00',
    '2026-03-14T05:00:00Z',
    '2026-03-14T06:00:00+00:00',
    '2026-02-29T06:00:00+01:00',
    '2028-02-29T06:00:00+01:00',
    '2026-03-14T06:00+01:00',
    '2026-03-14 06:00:00+01:00',
    '1989-12-31T23:00:00+00:00',
    '1989-12-31T23:30:00-01:00',
    '2101-01-01T13:00:00+14:00',
    '2026-03-14T24:00:00+01:00',
    '2026-03-14T06:00:00.5+01:00',
    'soon',
  ),
  fc
    .date({ min: new Date('1985-01-01'), max: new Date('2105-01-01'), noInvalidDate: true })
    .map((d) => d.toISOString().replace('.000Z', '+00:00')),
);
const text = fc.oneof(
  fc.constantFrom('', 'B', ' B', 'B ', 'a\u0000b', 'tab\there', 'line\nbreak', '\u00a0B', 'x'.repeat(10_000), 'x'.repeat(10_001)),
  fc.string({ maxLength: 20 }),
);
const candidate = fc.record({
  ringNumber: fc.oneof(number, fc.constant(undefined)),
  startTime: fc.oneof(time, fc.constant(undefined)),
  endTime: fc.oneof(time, fc.constant(undefined)),
  chainageStartM: number,
  chainageEndM: number,
  revolutions: number,
  penetrationMmPerRev: number,
  rpm: number,
  thrustKn: number,
  torqueKnm: number,
  extra: fc.dictionary(fc.constantFrom('Shift', 'Remarks', 'column 9'), text, { maxKeys: 3 }),
});

describe('isAdvanceLogRow', () => {
  it('says yes only where the schema accepts the candidate unchanged (random candidates)', () => {
    // Nearly all of these are refused (the next test covers the yes side); any wrong yes fails here.
    fc.assert(
      fc.property(candidate, (c) => {
        const row = c as Record<string, unknown>;
        if (!isAdvanceLogRow(row)) return;
        const parsed = advanceLogRowSchema.safeParse(row);
        expect(parsed.success).toBe(true);
        expect(parsed.data).toEqual(row);
      }),
      { seed: 46, numRuns: 20_000 },
    );
  });

  it('says yes only where the schema accepts (one field of a good row changed at a time)', () => {
    let yes = 0;
    const fields: [keyof typeof good, fc.Arbitrary<unknown>][] = [
      ['ringNumber', number],
      ['startTime', time],
      ['endTime', time],
      ['chainageStartM', number],
      ['chainageEndM', number],
      ['revolutions', number],
      ['penetrationMmPerRev', number],
      ['rpm', number],
      ['thrustKn', number],
      ['torqueKnm', number],
      ['extra', fc.dictionary(fc.constantFrom('Shift', 'Remarks'), text, { maxKeys: 2 })],
    ];
    for (const [field, values] of fields) {
      fc.assert(
        fc.property(values, (value) => {
          const row: Record<string, unknown> = { ...good, [field]: value };
          if (!isAdvanceLogRow(row)) return;
          yes += 1;
          const parsed = advanceLogRowSchema.safeParse(row);
          expect(parsed.success, `${field} = ${JSON.stringify(value)}`).toBe(true);
          expect(parsed.data).toEqual(row);
        }),
        { seed: 4646, numRuns: 2000 },
      );
    }
    expect(yes).toBeGreaterThan(1000);
  });

  it('says yes to the rows of a machine export, so the reader skips the schema for them', () => {
    expect(isAdvanceLogRow({ ...good })).toBe(true);
    expect(isAdvanceLogRow({ ...good, revolutions: null })).toBe(true);
    expect(isAdvanceLogRow({ ...good, penetrationMmPerRev: null, rpm: null, thrustKn: null, torqueKnm: null, extra: {} })).toBe(true);
    expect(isAdvanceLogRow({ ...good, startTime: '2026-03-14T05:00:00+00:00', endTime: '2026-03-14T05:50:00+00:00' })).toBe(true);
  });

  it('says no where the schema refuses, and the schema gives the message (examples)', () => {
    const refused: [Record<string, unknown>, string][] = [
      [{ ...good, endTime: good.startTime }, 'The end time is not after the start time; check both times of this stroke.'],
      [
        { ...good, revolutions: null, penetrationMmPerRev: null },
        'Neither revolutions nor penetration is given; the rolled distance needs one of them.',
      ],
      [{ ...good, ringNumber: 1.5 }, 'The ring number must be a whole number.'],
      [{ ...good, chainageEndM: 1_000_001 }, 'The chainage at the end of the stroke must be within ±1,000,000 m.'],
      [
        { ...good, extra: { Remarks: 'a\u0000b' } },
        'An extra column contains a control character (such as NUL or a tab); remove it and try again.',
      ],
    ];
    for (const [row, message] of refused) {
      expect(isAdvanceLogRow(row)).toBe(false);
      const parsed = advanceLogRowSchema.safeParse(row);
      expect(parsed.success).toBe(false);
      expect(parsed.error!.issues.map((i) => i.message)).toEqual([message]);
    }
  });
});
