/** Chainage conventions of the trade (common practice, no source): "km+metres", rings counted along the drive. */
import { describe, expect, test } from 'vitest';
import { aheadM, chainageAhead, formatChainage, ringAtAhead } from '../../shared/domain/chainage';

describe('chainage', () => {
  test('written as km+mmm.m (common practice, no source)', () => {
    expect(formatChainage(5011.74)).toBe('5+011.7');
    expect(formatChainage(999.96)).toBe('1+000.0');
    expect(formatChainage(-12.5)).toBe('-0+012.5');
    expect(formatChainage(null)).toBe('—');
    expect(formatChainage(Number.NaN)).toBe('—');
  });
  test('ahead is measured in the direction of travel', () => {
    expect(aheadM(1000, 1012, 'increasing')).toBe(12);
    expect(aheadM(1000, 1012, 'decreasing')).toBe(-12);
    expect(chainageAhead(1000, 12, 'decreasing')).toBe(988);
  });
  test('a point just past a ring boundary belongs to the next ring (derived: ceil of advance over ring length)', () => {
    expect(ringAtAhead(100, 0, 1.5)).toBe(100);
    expect(ringAtAhead(100, 1.5, 1.5)).toBe(101);
    expect(ringAtAhead(100, 0.1 + 0.2 + 1.2, 1.5)).toBe(101); // 1.5000000000000002 stays on ring 101
    expect(ringAtAhead(100, 1.51, 1.5)).toBe(102);
    expect(ringAtAhead(100, -3, 1.5)).toBe(100);
    expect(() => ringAtAhead(100, 3, 0)).toThrow(RangeError);
  });
});
