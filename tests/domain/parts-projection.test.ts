import { describe, expect, it } from 'vitest';
import {
  type CutterRebuildSpec,
  type PartItem,
  type PartsProjectionInput,
  projectParts,
  weekIndexOf,
} from '../../shared/domain/parts-projection';

// Invented example data. One 17″ cutter assembly A17 and its parts:
//   R17 ring, SK seal kit, BK bearing kit, RR retaining ring (small part), HUB (no movement).
const parts: PartItem[] = [
  { partId: 'A17', kind: 'cutter-assembly', discSizeIn: 17 },
  { partId: 'R17', kind: 'ring', discSizeIn: 17 },
  { partId: 'SK', kind: 'seal-kit' },
  { partId: 'BK', kind: 'bearing-kit' },
  { partId: 'RR', kind: 'small-part' },
  { partId: 'HUB', kind: 'hub' },
];

// Rebuild rules: even wear → ring; seal leak → ring + seals; bearing failure → ring + bearings + seals;
// hub damage → scrap; scrap also after 3 rebuilds. Turnaround 10 days → ⌈10/7⌉ = 2 weeks.
const spec: CutterRebuildSpec = {
  assemblyPartId: 'A17',
  bomByCondition: {
    'even-wear': [
      { partId: 'R17', qty: 1 },
      { partId: 'RR', qty: 1 },
    ],
    'seal-leak': [
      { partId: 'R17', qty: 1 },
      { partId: 'SK', qty: 1 },
      { partId: 'RR', qty: 1 },
    ],
    'bearing-failure': [
      { partId: 'R17', qty: 1 },
      { partId: 'BK', qty: 1 },
      { partId: 'SK', qty: 1 },
      { partId: 'RR', qty: 1 },
    ],
    'hub-damage': 'scrap',
  },
  maxRebuilds: 3,
  turnaroundDays: 10,
};

const input: PartsProjectionInput = {
  startDate: '2026-03-02',
  horizonWeeks: 5,
  parts,
  onHand: { A17: 10, R17: 6, SK: 2, BK: 1, RR: 20, HUB: 2 },
  rebuildSpecs: [spec],
  changes: [
    {
      week: 0,
      stopId: 'S1',
      assemblyPartId: 'A17',
      count: 8,
      conditionMix: { 'even-wear': 0.5, 'seal-leak': 0.25, 'bearing-failure': 0.125, 'hub-damage': 0.125 },
    },
    { week: 2, stopId: 'S2', assemblyPartId: 'A17', count: 4, conditionMix: { 'even-wear': 1 }, priorRebuilds: 3 },
    { week: 3, stopId: 'S3', assemblyPartId: 'A17', count: 6, conditionMix: { 'even-wear': 1 }, priorRebuilds: 1 },
    { week: 7, stopId: 'S4', assemblyPartId: 'A17', count: 9, conditionMix: { 'even-wear': 1 } },
  ],
  suddenFailures: [{ week: 1, assemblyPartId: 'A17', count: 1, conditionMix: { 'bearing-failure': 1 } }],
  openOrders: [
    { partId: 'R17', dueWeek: 1, qty: 10 },
    { partId: 'A17', dueWeek: -1, qty: 4 },
    { partId: 'SK', dueWeek: 2, qty: 4 },
    { partId: 'BK', dueWeek: 6, qty: 3 },
  ],
  rebuildsInProgress: [{ assemblyPartId: 'A17', readyWeek: 1, qty: 2 }],
};

/*
 * Hand-worked, derived step by step (all numbers below are derived from the input above):
 *
 * Removals and what they draw
 *   w0 stop S1, 8 cutters: A17 −8. Conditions: even 4 (R17 4, RR 4); seal 2 (R17 2, SK 2, RR 2);
 *      bearing 1 (R17 1, BK 1, SK 1, RR 1); hub 1 → scrapped. 7 rebuilt → back in w0 + 2 = w2.
 *      w0 totals: A17 8, R17 7, SK 3, BK 1, RR 7, scrapped 1.
 *   w1 sudden failure, 1 cutter, bearing: A17 1, R17 1, BK 1, SK 1, RR 1 (stop null); back in w3.
 *   w2 stop S2, 4 cutters already rebuilt 3 times (= max) → A17 4, all 4 scrapped, no parts.
 *   w3 stop S3, 6 cutters, even wear: A17 6, R17 6, RR 6; back in w5 (outside the 5-week horizon).
 *   w7 stop S4: outside the horizon, ignored.
 * Receipts: R17 +10 in w1; A17 +4 overdue → w0; SK +4 in w2; BK due w6 → outside.
 * Rebuilds in progress: A17 +2 in w1.
 *
 * End-of-week stock = previous + receipts + rebuild returns − demand
 *   A17: 10 → w0 10+4−8 = 6 → w1 6+2−1 = 7 → w2 7+7−4 = 10 → w3 10+1−6 = 5 → w4 5
 *   R17:  6 → w0 6−7 = −1 → w1 −1+10−1 = 8 → w2 8 → w3 8−6 = 2 → w4 2
 *   SK:   2 → w0 2−3 = −1 → w1 −1−1 = −2 → w2 −2+4 = 2 → w3 2 → w4 2
 *   BK:   1 → w0 1−1 = 0 → w1 0−1 = −1 → w2..w4 −1
 *   RR:  20 → w0 13 → w1 12 → w2 12 → w3 6 → w4 6
 *   HUB:  2 every week
 */
describe('projectParts', () => {
  const rows = projectParts(input);
  const series = (partId: string, field: 'projectedStock' | 'demand' | 'receipts' | 'rebuildReturns' | 'scrapped') =>
    rows.filter((r) => r.partId === partId).map((r) => r[field]);
  const row = (partId: string, week: number) => rows.find((r) => r.partId === partId && r.week === week)!;

  it('gives one row per catalogue part per week, dated from the start', () => {
    expect(rows).toHaveLength(6 * 5); // derived: 6 parts × 5 weeks
    expect(row('HUB', 4).weekStartDate).toBe('2026-03-30'); // derived: 2026-03-02 + 28 days
  });

  it('projects demand, receipts and returns of the assemblies', () => {
    expect(series('A17', 'demand')).toEqual([8, 1, 4, 6, 0]); // derived: see comment
    expect(series('A17', 'receipts')).toEqual([4, 0, 0, 0, 0]); // derived: overdue order in w0
    expect(series('A17', 'rebuildReturns')).toEqual([0, 2, 7, 1, 0]); // derived: S3 returns fall outside
    expect(series('A17', 'scrapped')).toEqual([1, 0, 4, 0, 0]); // derived: hub damage; max rebuilds
    expect(series('A17', 'projectedStock')).toEqual([6, 7, 10, 5, 5]); // derived: see comment
  });

  it('projects the rebuild parts by condition', () => {
    expect(series('R17', 'demand')).toEqual([7, 1, 0, 6, 0]); // derived
    expect(series('R17', 'projectedStock')).toEqual([-1, 8, 8, 2, 2]); // derived
    expect(series('SK', 'projectedStock')).toEqual([-1, -2, 2, 2, 2]); // derived
    expect(series('BK', 'projectedStock')).toEqual([0, -1, -1, -1, -1]); // derived: w6 order outside
    expect(series('RR', 'projectedStock')).toEqual([13, 12, 12, 6, 6]); // derived
    expect(series('HUB', 'projectedStock')).toEqual([2, 2, 2, 2, 2]); // derived: no movement
  });

  it('records the stop each demand comes from', () => {
    expect(row('R17', 0).demandSources).toEqual([{ stopId: 'S1', qty: 7 }]); // derived
    expect(row('R17', 1).demandSources).toEqual([{ stopId: null, qty: 1 }]); // derived: sudden failure
    expect(row('A17', 2).demandSources).toEqual([{ stopId: 'S2', qty: 4 }]); // derived
    expect(row('HUB', 0).demandSources).toEqual([]);
  });

  it('rejects a condition mix that does not sum to 1 or names an unknown condition', () => {
    const bad = (conditionMix: Record<string, number>) => () =>
      projectParts({ ...input, changes: [{ week: 0, stopId: 'S1', assemblyPartId: 'A17', count: 1, conditionMix }] });
    expect(bad({ 'even-wear': 0.6, 'seal-leak': 0.3 })).toThrow(/sum to 1/);
    expect(bad({ 'lost-ring': 1 })).toThrow(/lost-ring/);
  });

  it('rejects BOM lines for parts outside the catalogue', () => {
    const withUnknown = { ...spec, bomByCondition: { 'even-wear': [{ partId: 'R19', qty: 1 }] } };
    expect(() => projectParts({ ...input, rebuildSpecs: [withUnknown] })).toThrow(/R19/);
  });
});

describe('weekIndexOf', () => {
  it('counts whole weeks from the start date', () => {
    expect(weekIndexOf('2026-03-02', '2026-03-02')).toBe(0); // derived
    expect(weekIndexOf('2026-03-15', '2026-03-02')).toBe(1); // derived: 13 days
    expect(weekIndexOf('2026-03-30', '2026-03-02')).toBe(4); // derived: 28 days, across the DST change
    expect(weekIndexOf('2026-03-01', '2026-03-02')).toBe(-1); // derived: the day before
  });
});
