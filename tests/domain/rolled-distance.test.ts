import { describe, expect, it } from 'vitest';
import type { GeologySection } from '../../shared/domain/geology';
import {
  revolutionsByGround,
  revolutionsByGroundMs,
  rolledKm,
  rolledKmByStroke,
  rolledMPerAdvanceM,
  rolledMPerRevolution,
  strokeRevolutions,
  sumRolledKmByPeriod,
  sumRolledKmForPeriods,
  type CutterheadPosition,
  type FittedPeriod,
  type PeriodRolledKm,
  type Stroke,
} from '../../shared/domain/rolled-distance';

// All data invented (no real project).
function section(chainageFromM: number, chainageToM: number, groundTypeId: string): GeologySection {
  return { chainageFromM, chainageToM, groundTypeId, waterHeadM: null, stopAllowed: true, stopReason: null };
}

function stroke(
  id: string,
  chainageStartM: number,
  chainageEndM: number,
  revolutions: number | null,
  penetrationMmPerRev: number | null,
  hour = 1,
): Stroke {
  const hh = String(hour).padStart(2, '0');
  return {
    id,
    ringNumber: Number(id.replace(/\D/g, '')) || 0,
    chainageStartM,
    chainageEndM,
    revolutions,
    penetrationMmPerRev,
    startTime: `2027-03-01T${hh}:00:00Z`,
    endTime: `2027-03-01T${hh}:50:00Z`,
  };
}

describe('rolled distance per revolution and per metre (DOMAIN.md §1, derived from 2πr)', () => {
  it('matches the worked check for r = 3.0 m', () => {
    expect(rolledMPerRevolution(3.0)).toBeCloseTo(18.85, 3); // DOMAIN.md §1, derived from 2πr
    expect(rolledMPerAdvanceM(3.0, 8)).toBeCloseTo(2356.19, 2); // DOMAIN.md §1, derived from 2πr·1000/p
    expect(rolledMPerAdvanceM(3.0, 5)).toBeCloseTo(3769.91, 2); // DOMAIN.md §1, derived from 2πr·1000/p
  });

  it('gives km over a number of revolutions', () => {
    // derived: 125 revolutions (1 m at 8 mm/rev) × 18.850 m = 2356.19 m = 2.35619 km, the same as above.
    expect(rolledKm(3.0, 125)).toBeCloseTo(2.35619, 5);
  });
});

describe('strokeRevolutions', () => {
  it('prefers measured revolutions', () => {
    expect(strokeRevolutions(stroke('s1', 0, 1.5, 280, 5))).toEqual({ revolutions: 280, source: 'measured' });
  });

  it('falls back to advance / penetration, whichever way chainage runs', () => {
    // derived: 1.5 m = 1500 mm at 5 mm/rev → 300 revolutions.
    expect(strokeRevolutions(stroke('s1', 0, 1.5, null, 5))).toEqual({ revolutions: 300, source: 'penetration' });
    expect(strokeRevolutions(stroke('s1', 1.5, 0, null, 5))).toEqual({ revolutions: 300, source: 'penetration' });
  });

  it('reports a stroke it cannot compute instead of returning zero', () => {
    expect(strokeRevolutions(stroke('s1', 0, 1.5, null, null))).toEqual({ error: 'no_revolutions' });
    expect(strokeRevolutions(stroke('s1', 0, 1.5, null, 0))).toEqual({ error: 'no_revolutions' });
    expect(strokeRevolutions(stroke('s1', 0, 1.5, -3, 5))).toEqual({ error: 'invalid_revolutions' });
    expect(strokeRevolutions(stroke('s1', Number.NaN, 1.5, 300, 5))).toEqual({ error: 'invalid_chainage' });
  });
});

describe('rolledKmByStroke', () => {
  const sections = [section(100, 110, 'sandstone'), section(110, 130, 'granite')];
  const positions: CutterheadPosition[] = [
    { id: 'face-40', trackRadiusMm: 2000, discsPerPosition: 1 },
    { id: 'centre-1', trackRadiusMm: 250, discsPerPosition: 2 },
    { id: 'single-250', trackRadiusMm: 250, discsPerPosition: 1 },
  ];
  const km = (
    rows: { positionId: string; groundTypeId: string | null; rolledKm: number }[],
    positionId: string,
    groundTypeId: string | null,
  ) => rows.find((r) => r.positionId === positionId && r.groundTypeId === groundTypeId)?.rolledKm;

  // Hand-worked: stroke 109.0 → 110.5 m, 300 measured revolutions. Advance 1.5 m: 1.0 m in
  // sandstone, 0.5 m in granite, so 200 and 100 revolutions. At r = 2.0 m one revolution rolls
  // 4π m: 800π m = 2.513274 km and 400π m = 1.256637 km. At r = 0.25 m it rolls 0.5π m:
  // 100π m = 0.314159 km and 50π m = 0.157080 km, per disc, so a twin hub is not doubled.
  const expectCrossingSplit = (rows: { positionId: string; groundTypeId: string | null; rolledKm: number }[]) => {
    expect(rows).toHaveLength(6);
    expect(km(rows, 'face-40', 'sandstone')).toBeCloseTo(2.513274, 6);
    expect(km(rows, 'face-40', 'granite')).toBeCloseTo(1.256637, 6);
    expect(km(rows, 'centre-1', 'sandstone')).toBeCloseTo(0.314159, 6);
    expect(km(rows, 'centre-1', 'granite')).toBeCloseTo(0.15708, 6);
    expect(km(rows, 'single-250', 'sandstone')).toBe(km(rows, 'centre-1', 'sandstone'));
  };

  it('splits a stroke crossing a section boundary in proportion to advance', () => {
    const { rows, errors } = rolledKmByStroke([stroke('s1', 109.0, 110.5, 300, null)], positions, sections);
    expect(errors).toEqual([]);
    expectCrossingSplit(rows);
  });

  it('gives the same split for decreasing chainage with revolutions from penetration', () => {
    // derived: 110.5 → 109.0 is 1500 mm at 5 mm/rev = 300 revolutions, the same ground as above.
    const { rows, errors } = rolledKmByStroke([stroke('s1', 110.5, 109.0, null, 5)], positions, sections);
    expect(errors).toEqual([]);
    expectCrossingSplit(rows);
  });

  it('puts advance outside every section in unknown ground', () => {
    // 129 → 131: 1 m granite, 1 m beyond the last section; 200 revolutions → 100 each;
    // r = 2.0 m: 400π m = 1.256637 km each (derived by hand).
    const { rows } = rolledKmByStroke([stroke('s1', 129, 131, 200, null)], positions.slice(0, 1), sections);
    expect(rows.map((r) => [r.groundTypeId, Number(r.rolledKm.toFixed(6))])).toEqual([
      ['granite', 1.256637],
      [null, 1.256637],
    ]);
  });

  it('puts a stroke without advance into the ground at its chainage', () => {
    // 50 revolutions at 120 m (granite), r = 2.0 m: 200π m = 0.628319 km (derived by hand).
    const { rows } = rolledKmByStroke([stroke('s1', 120, 120, 50, null)], positions.slice(0, 1), sections);
    expect(rows).toHaveLength(1);
    expect(rows[0].groundTypeId).toBe('granite');
    expect(rows[0].rolledKm).toBeCloseTo(0.628319, 6);
  });

  it('reports strokes it cannot compute and leaves them out of the rows', () => {
    const noTimeZone = { ...stroke('s4', 104, 105, 100, null), startTime: '2027-03-01T04:00:00' };
    const { rows, errors } = rolledKmByStroke(
      [stroke('s1', 100, 101, 100, null), stroke('s2', 101, 102, null, null), stroke('s3', 102, 103, null, 0), noTimeZone],
      positions.slice(0, 1),
      sections,
    );
    expect(errors).toEqual([
      { strokeId: 's2', ringNumber: 2, reason: 'no_revolutions' },
      { strokeId: 's3', ringNumber: 3, reason: 'no_revolutions' },
      { strokeId: 's4', ringNumber: 4, reason: 'invalid_time' },
    ]);
    expect(rows.map((r) => r.strokeId)).toEqual(['s1']);
  });
});

describe('sumRolledKmByPeriod', () => {
  const sections = [section(0, 2.5, 'sandstone'), section(2.5, 100, 'granite')];
  const positions: CutterheadPosition[] = [
    { id: 'A', trackRadiusMm: 3000, discsPerPosition: 1 },
    { id: 'B', trackRadiusMm: 1500, discsPerPosition: 1 },
  ];
  // Five strokes of 1.5 m, 200 revolutions each (s4 from penetration: 1500 mm / 7.5 mm/rev = 200),
  // starting at 01:00, 02:00, … 05:00 and ending 50 minutes later.
  const strokes = [
    stroke('s1', 0, 1.5, 200, null, 1),
    stroke('s2', 1.5, 3.0, 200, null, 2),
    stroke('s3', 3.0, 4.5, 200, null, 3),
    stroke('s4', 4.5, 6.0, null, 7.5, 4),
    stroke('s5', 6.0, 7.5, 200, null, 5),
  ];
  const periods: FittedPeriod[] = [
    // Serial changed on A after s2 (at s2's end time).
    { id: 'P1', positionId: 'A', fromTime: '2027-03-01T00:00:00Z', toTime: strokes[1].endTime },
    { id: 'P2', positionId: 'A', fromTime: strokes[1].endTime, toTime: null },
    // Serial changed on B at exactly s4's start time: s4 belongs to the new period only.
    { id: 'P3', positionId: 'B', fromTime: '2027-03-01T00:00:00+00:00', toTime: '2027-03-01T04:00:00+00:00' },
    { id: 'P4', positionId: 'B', fromTime: '2027-03-01T04:00:00Z', toTime: null },
  ];
  const asRecord = (totals: PeriodRolledKm[]) => Object.fromEntries(totals.map((t) => [`${t.periodId}|${t.groundTypeId}`, t.rolledKm]));

  const full = () => {
    const { rows, errors } = rolledKmByStroke(strokes, positions, sections);
    expect(errors).toEqual([]);
    return sumRolledKmByPeriod(periods, strokes, rows);
  };

  it('sums each period over the strokes that start inside it (hand-worked)', () => {
    const totals = asRecord(full());
    // P1 = s1 + s2 at r = 3 m (6π m per revolution). s2 has 1.0 m of its 1.5 m in sandstone:
    // 133.33 + 66.67 revolutions. Sandstone 333.33 rev × 6π = 2000π m = 6.283185 km;
    // granite 66.67 × 6π = 400π m = 1.256637 km.
    expect(totals['P1|sandstone']).toBeCloseTo(6.283185, 6);
    expect(totals['P1|granite']).toBeCloseTo(1.256637, 6);
    // P2 = s3 + s4 + s5, all granite: 600 rev × 6π = 3600π m = 11.309734 km.
    expect(totals['P2|granite']).toBeCloseTo(11.309734, 6);
    // B has r = 1.5 m, 3π m per revolution. P3 = s1 + s2 + s3: sandstone 333.33 rev × 3π = 1000π m
    // = 3.141593 km, granite 266.67 × 3π = 800π m = 2.513274 km. P4 = s4 + s5 = 400 × 3π = 1200π m
    // = 3.769911 km.
    expect(totals['P3|sandstone']).toBeCloseTo(3.141593, 6);
    expect(totals['P3|granite']).toBeCloseTo(2.513274, 6);
    expect(totals['P4|granite']).toBeCloseTo(3.769911, 6);
    expect(Object.keys(totals).sort()).toEqual(['P1|granite', 'P1|sandstone', 'P2|granite', 'P3|granite', 'P3|sandstone', 'P4|granite']);
  });

  it('adding only the new strokes to stored totals equals a full recompute', () => {
    const oldStrokes = strokes.slice(0, 3);
    const newStrokes = strokes.slice(3);
    const stored = sumRolledKmByPeriod(periods, oldStrokes, rolledKmByStroke(oldStrokes, positions, sections).rows);
    const updated = sumRolledKmByPeriod(periods, newStrokes, rolledKmByStroke(newStrokes, positions, sections).rows, stored);

    const expected = asRecord(full());
    const actual = asRecord(updated);
    expect(Object.keys(actual).sort()).toEqual(Object.keys(expected).sort());
    for (const key of Object.keys(expected)) expect(actual[key]).toBeCloseTo(expected[key], 12);
    // P4 did not exist in the stored totals; P2 did (s3) and grew.
    expect(asRecord(stored)['P4|granite']).toBeUndefined();
    expect(asRecord(stored)['P2|granite']).toBeLessThan(actual['P2|granite']);
  });

  it('the shared-revolutions path (used by the server) gives the same totals, also incrementally', () => {
    const radius: Record<string, number> = { A: 3000, B: 1500 };
    const withRadius = periods.map((p) => ({ ...p, trackRadiusMm: radius[p.positionId] }));
    const expected = asRecord(full());
    const actual = asRecord(sumRolledKmForPeriods(withRadius, revolutionsByGround(strokes, sections).pieces));
    expect(Object.keys(actual).sort()).toEqual(Object.keys(expected).sort());
    for (const key of Object.keys(expected)) expect(actual[key]).toBeCloseTo(expected[key], 12);
    const stored = sumRolledKmForPeriods(withRadius, revolutionsByGround(strokes.slice(0, 3), sections).pieces);
    const updated = asRecord(sumRolledKmForPeriods(withRadius, revolutionsByGround(strokes.slice(3), sections).pieces, stored));
    for (const key of Object.keys(expected)) expect(updated[key]).toBeCloseTo(expected[key], 12);
  });

  it('pieces out of time order, strokes with times already read, and no periods (decision 46)', () => {
    const radius: Record<string, number> = { A: 3000, B: 1500 };
    const withRadius = periods.map((p) => ({ ...p, trackRadiusMm: radius[p.positionId] }));
    const { pieces } = revolutionsByGround(strokes, sections);
    // derived: the hand-worked totals above, whatever order the pieces come in.
    const expected = asRecord(full());
    const shuffled = asRecord(sumRolledKmForPeriods(withRadius, [...pieces].reverse()));
    for (const key of Object.keys(expected)) expect(shuffled[key]).toBeCloseTo(expected[key], 12);
    // derived: times as ms give the same pieces and errors as the ISO text they were read from.
    const bad = { ...strokes[0], id: 'bad', startTime: '2027-03-01T01:00' };
    const timed = [...strokes, bad].map((s) => ({ ...s, startMs: Date.parse(s.startTime) as number | null, endMs: Date.parse(s.endTime) }));
    timed[timed.length - 1].startMs = null;
    expect(revolutionsByGroundMs(timed, sections)).toEqual(revolutionsByGround([...strokes, bad], sections));
    expect(revolutionsByGround([bad], sections).errors).toEqual([{ strokeId: 'bad', ringNumber: bad.ringNumber, reason: 'invalid_time' }]);
    // No periods: only the previous totals come back.
    const previous = [{ periodId: 'P9', groundTypeId: 'granite', rolledKm: 1.25 }];
    expect(sumRolledKmForPeriods([], pieces, previous)).toEqual(previous);
  });

  it('rejects rows whose stroke is missing and periods with an unreadable time', () => {
    const { rows } = rolledKmByStroke(strokes, positions, sections);
    expect(() => sumRolledKmByPeriod(periods, strokes.slice(1), rows)).toThrow(/s1/);
    expect(() => sumRolledKmByPeriod([{ ...periods[0], fromTime: '1 March' }], strokes, rows)).toThrow(RangeError);
  });
});
