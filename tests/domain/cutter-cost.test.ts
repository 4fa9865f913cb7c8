import { describe, expect, it } from 'vitest';
import {
  type ChangePartKind,
  changePartsCost,
  type CutterCostEntry,
  cutterCostBy,
  excavatedM3,
  faceAreaM2,
} from '../../shared/domain/cutter-cost';

describe('face area and excavated volume', () => {
  it('gives π·D²/4 and area × advance', () => {
    // derived: π·D²/4 with D = 6.2 m → π·38.44/4 = 30.1907 m²
    expect(faceAreaM2(6.2)).toBeCloseTo(30.1907, 4);
    // derived: 10 m of advance × 30.1907 m² = 301.907 m³
    expect(excavatedM3(10, 6.2)).toBeCloseTo(301.907, 3);
  });

  it('rejects a non-positive diameter', () => {
    expect(() => faceAreaM2(0)).toThrow(RangeError);
  });
});

describe('cutterCostBy', () => {
  // Invented example data, D = 6.2 m (face 30.190705 m²), labour at 60 per hour.
  const entries: CutterCostEntry[] = [
    { week: '2026-W10', groundType: 'granite', advanceM: 12, partsCost: 4800, labourHours: 20, ringsUsed: 8 },
    { week: '2026-W10', groundType: 'schist', advanceM: 18, partsCost: 1200, labourHours: 5, ringsUsed: 2 },
    { week: '2026-W11', groundType: 'granite', advanceM: 10, partsCost: 3000, labourHours: 10, ringsUsed: 5 },
    { week: '2026-W12', groundType: 'granite', advanceM: 0, partsCost: 500, labourHours: 4, ringsUsed: 1 },
  ];

  it('costs a week per metre and per m³ (hand-worked)', () => {
    // derived: W10 advance 12 + 18 = 30 m → 30 × 30.190705 = 905.7212 m³;
    // parts 4800 + 1200 = 6000, labour (20 + 5) h × 60 = 1500, total 7500;
    // per m 7500 / 30 = 250; per m³ 7500 / 905.7212 = 8.2807; rings 10 / 905.7212 × 1000 = 11.0409
    const w10 = cutterCostBy(entries, 'week', 6.2, 60).find((r) => r.key === '2026-W10')!;
    expect(w10.excavatedM3).toBeCloseTo(905.7212, 4);
    expect(w10.labourCost).toBe(1500);
    expect(w10.totalCost).toBe(7500);
    expect(w10.costPerM).toBeCloseTo(250, 10);
    expect(w10.costPerM3).toBeCloseTo(8.2807, 4);
    expect(w10.ringsPer1000M3).toBeCloseTo(11.0409, 4);
  });

  it('costs a ground type over all its weeks (hand-worked)', () => {
    // derived: granite advance 12 + 10 + 0 = 22 m → 664.1955 m³; parts 4800 + 3000 + 500 = 8300,
    // labour (20 + 10 + 4) h × 60 = 2040, total 10340; per m 470; per m³ 15.5677;
    // rings 14 / 664.1955 × 1000 = 21.0781
    const rows = cutterCostBy(entries, 'groundType', 6.2, 60);
    expect(rows.map((r) => r.key)).toEqual(['granite', 'schist']);
    const granite = rows[0];
    expect(granite.totalCost).toBe(10340);
    expect(granite.costPerM).toBeCloseTo(470, 10);
    expect(granite.costPerM3).toBeCloseTo(15.5677, 4);
    expect(granite.ringsPer1000M3).toBeCloseTo(21.0781, 4);
  });

  it('gives no rates for a week without advance', () => {
    // derived: W12 has cost 500 + 4 × 60 = 740 but 0 m of advance
    const w12 = cutterCostBy(entries, 'week', 6.2, 60).find((r) => r.key === '2026-W12')!;
    expect(w12.totalCost).toBe(740);
    expect(w12.costPerM).toBeNull();
    expect(w12.costPerM3).toBeNull();
    expect(w12.ringsPer1000M3).toBeNull();
  });
});

describe('changePartsCost: every change uses parts', () => {
  // Invented prices of one disc size: ring 400, bearing kit 900, seal kit 150, assembly 2400.
  const prices: Record<ChangePartKind, number> = { ring: 400, 'bearing-kit': 900, 'seal-kit': 150, 'cutter-assembly': 2400 };
  const all = (kind: ChangePartKind) => prices[kind];

  it('costs a rebuild by what was renewed, a scrap as a new assembly (hand-worked)', () => {
    // derived: ring 400 + seal kit 150 = 550, one ring used
    expect(changePartsCost({ kind: 'rebuilt', newRing: true, newBearings: false, newSeals: true }, all)).toEqual({
      partsCost: 550,
      ringsUsed: 1,
      missing: [],
      estimated: false,
    });
    // derived: bearings only: 900, no ring used
    expect(changePartsCost({ kind: 'rebuilt', newRing: false, newBearings: true, newSeals: false }, all)).toMatchObject({
      partsCost: 900,
      ringsUsed: 0,
    });
    // derived: the new assembly 2400; its ring counts as used
    expect(changePartsCost({ kind: 'scrapped' }, all)).toMatchObject({ partsCost: 2400, ringsUsed: 1, estimated: false });
  });

  it('costs a change whose outcome is not recorded as a rebuild with a new ring, marked estimated', () => {
    // common practice, no source: a rebuild at least renews the ring → 400
    expect(changePartsCost({ kind: 'not-recorded' }, all)).toEqual({ partsCost: 400, ringsUsed: 1, missing: [], estimated: true });
  });

  it('names the kinds without a price instead of costing them at 0', () => {
    const noSeals = (kind: ChangePartKind) => (kind === 'seal-kit' ? null : prices[kind]);
    // derived: ring 400 priced, seal kit missing → 400 and the seal kit named
    expect(changePartsCost({ kind: 'rebuilt', newRing: true, newBearings: false, newSeals: true }, noSeals)).toMatchObject({
      partsCost: 400,
      missing: ['seal-kit'],
    });
    expect(changePartsCost({ kind: 'not-recorded' }, () => null)).toMatchObject({ partsCost: 0, missing: ['ring'], estimated: true });
  });

  it('groups changes, estimates and missing prices by week', () => {
    const rows = cutterCostBy(
      [
        {
          week: 'W1',
          groundType: 'g',
          advanceM: 5,
          partsCost: 400,
          labourHours: 2,
          ringsUsed: 1,
          changes: 1,
          estimatedChanges: 1,
          missingPrices: [],
        },
        { week: 'W1', groundType: 'g', advanceM: 0, partsCost: 0, labourHours: 0, ringsUsed: 0, changes: 1, missingPrices: ['19″ ring'] },
        { week: 'W1', groundType: 'g', advanceM: 0, partsCost: 0, labourHours: 0, ringsUsed: 0, changes: 1, missingPrices: ['19″ ring'] },
      ],
      'week',
      6.2,
      60,
    );
    // derived: 3 changes, 1 estimated, the missing price named once
    expect(rows[0]).toMatchObject({ changes: 3, estimatedChanges: 1, missingPrices: ['19″ ring'], partsCost: 400 });
  });
});
