/**
 * The advance expected ahead of the machine week by week, and the km a disc rolls over it
 * (shared/domain/advance-ahead.ts). Values derived by hand from DOMAIN.md §1 (rolled distance
 * 2·π·r per revolution, revolutions = advance / penetration), noted at each check.
 */
import { describe, expect, it } from 'vitest';
import { advanceAheadByWeek, weightedRolledKm } from '../../shared/domain/advance-ahead';

describe('the estimate of advance, rolled km and sudden failures ahead', () => {
  it('walks the long section week by week and stops where the mapped geology ends', () => {
    // derived by hand: from 50 m, ground A to 100 m at 10 m/day takes 5 days; the other 2 days of week 0
    // go 40 m into ground B at 20 m/day; week 1 has the last 60 m of B (3 days), then the geology ends.
    const walk = advanceAheadByWeek({
      currentChainageM: 50,
      direction: 'increasing',
      sections: [
        { fromChainageM: 0, toChainageM: 100, groundTypeId: 'A' },
        { fromChainageM: 100, toChainageM: 200, groundTypeId: 'B' },
      ],
      penetrationMmPerRevByGround: { A: 8, B: 5 },
      advanceMPerDayByGround: { A: 10, B: 20 },
      weeks: 2,
    })!;
    expect(walk.weeks[0]).toEqual([
      { groundTypeId: 'A', metres: 50, penetrationMmPerRev: 8 },
      { groundTypeId: 'B', metres: 40, penetrationMmPerRev: 5 },
    ]);
    expect(walk.weeks[1]).toEqual([{ groundTypeId: 'B', metres: 60, penetrationMmPerRev: 5 }]);
    expect(walk.geologyEndsWeek).toBe(1);
    // DOMAIN.md §1 [derived]: at r = 3.0 m a disc rolls 2,356.19 m per metre at 8 mm/rev and 3,769.91 m at 5 mm/rev.
    expect(weightedRolledKm(walk.weeks[0], 3000, () => 1)).toBeCloseTo(50 * 2.35619 + 40 * 3.76991, 3);
    // Failures: 2 and 5 per 1,000 km in A and B → 0.002·117.81 + 0.005·150.80 = 0.9896 per disc in week 0.
    const perKm: Record<string, number> = { A: 0.002, B: 0.005 };
    expect(weightedRolledKm(walk.weeks[0], 3000, (g) => perKm[g!])).toBeCloseTo(0.9896, 4);
  });

  it('takes the lowest penetration and fastest advance in a gap of the long section, walking a decreasing drive', () => {
    // derived by hand: from 300 m going down, 300 → 250 is a gap (unknown ground: 5 mm/rev, 20 m/day) = 2.5 days,
    // then ground A at 10 m/day for the remaining 4.5 days = 45 m.
    const walk = advanceAheadByWeek({
      currentChainageM: 300,
      direction: 'decreasing',
      sections: [
        { fromChainageM: 0, toChainageM: 250, groundTypeId: 'A' },
        { fromChainageM: 250, toChainageM: 260, groundTypeId: null },
      ],
      penetrationMmPerRevByGround: { A: 8, B: 5 },
      advanceMPerDayByGround: { A: 10, B: 20 },
      weeks: 1,
    })!;
    expect(walk.weeks[0][0]).toEqual({ groundTypeId: null, metres: 50, penetrationMmPerRev: 5 });
    expect(walk.weeks[0][1].groundTypeId).toBe('A');
    expect(walk.weeks[0][1].metres).toBeCloseTo(45, 9);
    expect(walk.geologyEndsWeek).toBeNull();
  });
});
