import quantile from '@stdlib/stats-base-dists-normal-quantile';
import { describe, expect, it } from 'vitest';
import { reorderPointUnits, safetyStockUnits, serviceLevelZ, suggestOrder, suggestOrderFromWeeks } from '../../shared/domain/inventory';

describe('serviceLevelZ', () => {
  it.each([0.9, 0.95, 0.99, 0.975, 0.5])('matches an independent normal quantile at %s', (level) => {
    // source: @stdlib/stats-base-dists-normal-quantile, a separate implementation of Φ⁻¹
    expect(serviceLevelZ(level)).toBeCloseTo(quantile(level, 0, 1), 12);
  });

  it('gives the DOMAIN.md z values to 4 decimals', () => {
    // source: standard normal quantiles as listed in DOMAIN.md §6
    expect(serviceLevelZ(0.9)).toBeCloseTo(1.2816, 4);
    expect(serviceLevelZ(0.95)).toBeCloseTo(1.6449, 4);
    expect(serviceLevelZ(0.99)).toBeCloseTo(2.3263, 4);
  });

  it('refuses levels that give a negative or infinite z', () => {
    expect(() => serviceLevelZ(0.4)).toThrow(RangeError);
    expect(() => serviceLevelZ(1)).toThrow(RangeError);
  });
});

describe('safety stock and reorder point', () => {
  it("reproduces Taylor's worked example", () => {
    // source: Taylor, Introduction to Management Science, ch. 16 (DOMAIN.md §6):
    // d̄ = 30/day, σ_d = 5, L = 10 days, z = 1.65 → SS = 1.65·5·√10 = 26.09, ROP = 300 + 26.09 = 326.09
    const demand = { meanDemandPerPeriod: 30, demandSdPerPeriod: 5, leadTimePeriods: 10 };
    expect(safetyStockUnits(demand, 1.65)).toBeCloseTo(26.09, 2);
    expect(reorderPointUnits(demand, 1.65)).toBeCloseTo(326.09, 2);
  });

  it('adds lead-time variability', () => {
    // derived: SS = z·√(L·σ_d² + d̄²·σ_L²) with d̄ = 4 rings/week, σ_d = 2, L = 4 weeks, σ_L = 1:
    // √(4·4 + 16·1) = √32 = 5.65685; ·1.65 = 9.33381; ROP = 4·4 + 9.33381 = 25.33381
    const demand = { meanDemandPerPeriod: 4, demandSdPerPeriod: 2, leadTimePeriods: 4, leadTimeSdPeriods: 1 };
    expect(safetyStockUnits(demand, 1.65)).toBeCloseTo(9.33381, 5);
    expect(reorderPointUnits(demand, 1.65)).toBeCloseTo(25.33381, 5);
  });

  it('rejects negative inputs', () => {
    expect(() => safetyStockUnits({ meanDemandPerPeriod: 4, demandSdPerPeriod: -1, leadTimePeriods: 4 }, 1.65)).toThrow(RangeError);
  });
});

describe('suggestOrder', () => {
  // derived: position = 12 on hand + 5 on order = 17; required = 20.4 demand + 9.33 safety = 29.73;
  // shortfall 12.73 → 13 whole units.
  const base = { onHandUnits: 12, onOrderUnits: 5, projectedDemandUnits: 20.4, safetyStockUnits: 9.33 };

  it('orders the whole-unit shortfall when it exceeds the minimum order', () => {
    const s = suggestOrder({ ...base, minOrderUnits: 10 });
    expect(s.inventoryPositionUnits).toBe(17); // derived: 12 + 5
    expect(s.requiredUnits).toBeCloseTo(29.73, 10); // derived: 20.4 + 9.33
    expect(s.orderUnits).toBe(13); // derived: ⌈12.73⌉
  });

  it('raises the order to the minimum order quantity', () => {
    expect(suggestOrder({ ...base, minOrderUnits: 20 }).orderUnits).toBe(20); // derived: max(13, 20)
  });

  it('rounds up to whole packs', () => {
    expect(suggestOrder({ ...base, minOrderUnits: 10, orderMultipleUnits: 5 }).orderUnits).toBe(15); // derived: 13 → 3 packs of 5
  });

  it('orders nothing when the position covers demand and safety stock', () => {
    // derived: 25 + 5 = 30 ≥ 29.73
    expect(suggestOrder({ ...base, onHandUnits: 25, minOrderUnits: 10 }).orderUnits).toBe(0);
  });

  it('does not let float noise in summed expected demand add a unit', () => {
    // derived: 1.1 + 1.3 + 0.6 evaluates to 3.0000000000000004 in IEEE doubles; the shortfall is 3
    const demand = 1.1 + 1.3 + 0.6;
    expect(demand).toBeGreaterThan(3);
    const s = suggestOrder({ onHandUnits: 0, onOrderUnits: 0, projectedDemandUnits: demand, safetyStockUnits: 0, minOrderUnits: 1 });
    expect(s.orderUnits).toBe(3);
  });
});

describe('suggestOrderFromWeeks', () => {
  // Hand-worked example (derived: DOMAIN.md §6 formulas worked on paper):
  // weekly demand 4, 0, 2, 2 → d̄ = 8/4 = 2; σ_d = √((2² + 2² + 0 + 0)/4) = √2 = 1.414214.
  // L = 2 weeks, σ_L = 0, z = 1.6449 → SS = z·σ_d·√L = 1.6449·√2·√2 = 3.2898; ROP = 2·2 + 3.2898 = 7.2898.
  // Window = 2 weeks: demand 4 + 0 = 4; 1 rebuilt assembly back in week 1.
  // 3 on hand, minimum order 6.
  const weeks = [
    { demand: 4, rebuildReturns: 0 },
    { demand: 0, rebuildReturns: 1 },
    { demand: 2, rebuildReturns: 0 },
    { demand: 2, rebuildReturns: 0 },
  ];
  const base = { weeks, onHandUnits: 3, leadTimeWeeks: 2, leadTimeSdWeeks: 0, z: 1.6449, minOrderUnits: 6 };

  it('works the example with nothing on order', () => {
    const s = suggestOrderFromWeeks({ ...base, openOrderUnits: 0 });
    expect(s.meanWeeklyDemand).toBe(2); // derived: 8 / 4
    expect(s.weeklyDemandSd).toBeCloseTo(1.414214, 6); // derived: √2
    expect(s.safetyStockUnits).toBeCloseTo(3.2898, 4); // derived: 1.6449 · 2
    expect(s.reorderPointUnits).toBeCloseTo(7.2898, 4); // derived: 4 + 3.2898
    expect(s.windowWeeks).toBe(2); // derived: ⌈2⌉
    expect(s.leadTimeDemandUnits).toBe(4); // derived: 4 + 0
    expect(s.rebuildsBackUnits).toBe(1); // derived: the one in week 1
    expect(s.inventoryPositionUnits).toBe(4); // derived: 3 + 0 + 1
    // derived: required 4 + 3.2898 = 7.2898; short 3.2898 → 4 whole units, raised to the minimum 6.
    expect(s.orderUnits).toBe(6);
  });

  it('counts an order on the way whatever its due date, so the same parts are not suggested again', () => {
    // derived: the 6 just ordered (due in week 9, after the 2-week window and the 4-week horizon) make
    // the position 3 + 6 + 1 = 10 ≥ 7.2898 → nothing more to order.
    const s = suggestOrderFromWeeks({ ...base, openOrderUnits: 6 });
    expect(s.inventoryPositionUnits).toBe(10);
    expect(s.orderUnits).toBe(0);
    // derived: 2 on order → position 6, short 1.2898 → 2 units, raised to the minimum 6.
    expect(suggestOrderFromWeeks({ ...base, openOrderUnits: 2 }).orderUnits).toBe(6);
    // derived: 3 on order → position 7, short 0.2898 → still an order of at least 1, raised to 6.
    expect(suggestOrderFromWeeks({ ...base, openOrderUnits: 3 }).orderUnits).toBe(6);
    // derived: 4 on order → position 8 ≥ 7.2898 → none.
    expect(suggestOrderFromWeeks({ ...base, openOrderUnits: 4 }).orderUnits).toBe(0);
  });

  it('fills a lead time beyond the horizon at the mean demand', () => {
    // derived: L = 6 weeks over a 4-week horizon: window 6, demand 8 + 2 · 2 = 12.
    const s = suggestOrderFromWeeks({ ...base, leadTimeWeeks: 6, openOrderUnits: 0 });
    expect(s.windowWeeks).toBe(6);
    expect(s.leadTimeDemandUnits).toBe(12);
  });

  it('refuses an empty projection', () => {
    expect(() => suggestOrderFromWeeks({ ...base, weeks: [], openOrderUnits: 0 })).toThrow(RangeError);
  });
});
