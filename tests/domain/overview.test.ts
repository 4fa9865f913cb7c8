/** The small rules behind each role's Overview (shared/domain/overview.ts), on hand-worked values. */
import { describe, expect, it } from 'vitest';
import { changeShare, daysUntil, isStale, limitBand, orderLineState } from '../../shared/domain/overview';

describe('the small rules (shared/domain/overview.ts)', () => {
  it('bands a disc by its share of the limit, stale data by age, order lines by due date', () => {
    // derived: 80 % of a 25 mm limit is 20 mm; 19.9 mm is below it; at 25 mm the disc is at its limit.
    expect(limitBand(19.9, 25)).toBeNull();
    expect(limitBand(20, 25)).toBe('near');
    expect(limitBand(25, 25)).toBe('over');
    expect(limitBand(3, 0)).toBeNull();
    const now = new Date('2026-03-10T12:00:00Z');
    // derived: 7 days exactly is not yet "more than 7 days"; 7 days and 1 hour is.
    expect(isStale(new Date('2026-03-03T12:00:00Z'), now, 7)).toBe(false);
    expect(isStale(new Date('2026-03-03T11:00:00Z'), now, 7)).toBe(true);
    expect(isStale(null, now, 7)).toBe(true);
    // derived: 2026-02-28 → 2026-03-02 crosses the end of a 28-day February: 2 days.
    expect(daysUntil('2026-03-02', '2026-02-28')).toBe(2);
    expect(orderLineState('2026-03-09', '2026-03-10', 7)).toBe('late');
    expect(orderLineState('2026-03-17', '2026-03-10', 7)).toBe('due');
    expect(orderLineState('2026-03-18', '2026-03-10', 7)).toBeNull();
    // derived: from 4 h to 5 h is +25 %; nothing last week gives nothing to compare.
    expect(changeShare(5, 4)).toBeCloseTo(0.25, 12);
    expect(changeShare(5, 0)).toBeNull();
  });
});
