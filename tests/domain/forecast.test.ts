import { describe, expect, it } from 'vitest';
import {
  estimateDriveRates,
  forecastChangeOut,
  modelledWearSinceMm,
  rolledKmPerMetre,
  type ForecastInput,
  type ForecastPosition,
  type LimitPoint,
  type StrokeRecord,
  type WearRateSet,
} from '../../shared/domain/forecast';

const NOW = new Date('2027-03-01T06:00:00Z');
const daysAfterNow = (p: LimitPoint) => (p.date.getTime() - NOW.getTime()) / 86_400_000;

const faceDisc: ForecastPosition = {
  positionId: 'pos-31',
  positionNumber: 31,
  positionClass: 'face',
  trackRadiusMm: 3000,
  discsPerPosition: 1,
  allowableWearMm: 25,
  gaugeTiltDeg: null,
};

const rates: WearRateSet = {
  byGround: {
    sandstone: { p50MmPerKm: 0.02, p90MmPerKm: 0.03 },
    quartzite: { p50MmPerKm: 0.05, p90MmPerKm: 0.08 },
  },
  classFactors: { centre: 1.2, face: 1, gauge: 1.5 },
};

/** Invented example inputs; each test overrides what it works through. */
function input(over: Partial<ForecastInput>): ForecastInput {
  return {
    position: faceDisc,
    wearNow: { lastMeasuredWearMm: 10, measuredAtChainageM: 980, modelledSinceMm: { p50: 0, p90: 0 } },
    currentChainageM: 1000,
    currentRingNumber: 400,
    ringLengthM: 1.5,
    driveDirection: 'increasing',
    geology: [{ fromChainageM: 0, toChainageM: 5000, groundTypeId: 'sandstone' }],
    rates,
    penetrationMmPerRevByGround: { sandstone: 8, quartzite: 6 },
    advanceMPerDayByGround: { sandstone: 20, quartzite: 12 },
    overcutMarginMm: 20,
    now: NOW,
    ...over,
  };
}

describe('rolledKmPerMetre', () => {
  it('matches the DOMAIN.md §1 check values', () => {
    // DOMAIN.md §1 [derived]: r = 3.0 m, p = 8 mm/rev → 2,356.19 m rolled per metre; p = 5 → 3,769.91 m
    expect(rolledKmPerMetre(3000, 8) * 1000).toBeCloseTo(2356.19, 2);
    expect(rolledKmPerMetre(3000, 5) * 1000).toBeCloseTo(3769.91, 2);
  });

  it('rejects a zero penetration', () => {
    expect(() => rolledKmPerMetre(3000, 0)).toThrow(RangeError);
  });
});

describe('forecastChangeOut', () => {
  it('one ground: hand-worked, using the DOMAIN.md §1 rolled distance', () => {
    // r = 3.0 m, p = 8 mm/rev → 2.35619449 km rolled per metre (DOMAIN.md §1, derived).
    // Face disc (factor 1), 10 mm worn, limit 25 mm → 15 mm to go.
    // P50: 0.02 mm/km × 2.35619449 = 0.0471238898 mm/m → 15 / 0.0471238898 = 318.309886 m
    //      → chainage 1318.309886; ring 400 + ceil(318.309886 / 1.5 = 212.21) = 613;
    //      20 m/day → 15.9154943 days.
    // P90: 0.03 mm/km → 0.0706858347 mm/m → 212.206591 m → chainage 1212.206591;
    //      ring 400 + ceil(141.47) = 542; 10.6103295 days.
    const f = forecastChangeOut(input({}));
    expect(f.explanation.sections[0].rolledKmPerM * 1000).toBeCloseTo(2356.19, 2); // DOMAIN.md §1
    expect(f.p50.status).toBe('reaches_limit');
    expect(f.p50.remainingM).toBeCloseTo(318.309886, 5);
    expect(f.p50.chainageM).toBeCloseTo(1318.309886, 5);
    expect(f.p50.ringNumber).toBe(613);
    expect(daysAfterNow(f.p50)).toBeCloseTo(15.9154943, 6);
    expect(f.p50.wearThereMm).toBe(25);
    expect(f.p90.remainingM).toBeCloseTo(212.206591, 5);
    expect(f.p90.chainageM).toBeCloseTo(1212.206591, 5);
    expect(f.p90.ringNumber).toBe(542);
    expect(daysAfterNow(f.p90)).toBeCloseTo(10.6103295, 6);
    // The explanation stops at the farther point (P50), all of it in sandstone, no fallback.
    expect(f.explanation.sections).toHaveLength(1);
    expect(f.explanation.sections[0]).toMatchObject({ fromChainageM: 1000, groundTypeId: 'sandstone', fallbacks: [] });
    expect(f.explanation.sections[0].toChainageM).toBeCloseTo(1318.309886, 5);
    expect(f.explanation.usesFallback).toBe(false);
    expect(f.gaugeBore).toBeNull();
  });

  it('crossing into a more abrasive ground: hand-worked', () => {
    // r = 2.0 m. Sandstone 1000–1100 at p = 10 → 2π·2/10 = 1.25663706 km/m;
    // quartzite from 1100 at p = 8 → 1.57079633 km/m. Limit 20 mm, 12 mm worn → 8 mm to go.
    // P50: sandstone 0.01 × 1.25663706 = 0.0125663706 mm/m × 100 m = 1.25663706 mm → 6.74336294 mm left;
    //      quartzite 0.05 × 1.57079633 = 0.0785398163 mm/m → 85.8591636 m → chainage 1185.8591636,
    //      remaining 185.8591636 m; days 100/25 + 85.8591636/10 = 12.5859164.
    // P90: sandstone 0.015 → 1.88495559 mm → 6.11504441 left; quartzite 0.08 → 0.125663706 mm/m
    //      → 48.6619772 m → chainage 1148.6619772; days 4 + 4.86619772 = 8.86619772.
    const f = forecastChangeOut(
      input({
        position: { ...faceDisc, trackRadiusMm: 2000, allowableWearMm: 20 },
        wearNow: { lastMeasuredWearMm: 12, measuredAtChainageM: 1000, modelledSinceMm: { p50: 0, p90: 0 } },
        geology: [
          { fromChainageM: 1100, toChainageM: 3000, groundTypeId: 'quartzite' },
          { fromChainageM: 0, toChainageM: 1100, groundTypeId: 'sandstone' },
        ],
        rates: {
          ...rates,
          byGround: { sandstone: { p50MmPerKm: 0.01, p90MmPerKm: 0.015 }, quartzite: { p50MmPerKm: 0.05, p90MmPerKm: 0.08 } },
        },
        penetrationMmPerRevByGround: { sandstone: 10, quartzite: 8 },
        advanceMPerDayByGround: { sandstone: 25, quartzite: 10 },
      }),
    );
    expect(f.p50.chainageM).toBeCloseTo(1185.8591636, 5);
    expect(f.p50.remainingM).toBeCloseTo(185.8591636, 5);
    expect(daysAfterNow(f.p50)).toBeCloseTo(12.5859164, 6);
    expect(f.p90.chainageM).toBeCloseTo(1148.6619772, 5);
    expect(daysAfterNow(f.p90)).toBeCloseTo(8.86619772, 6);
    expect(f.explanation.sections.map((s) => [s.groundTypeId, s.fromChainageM, s.lengthM])).toEqual([
      ['sandstone', 1000, 100],
      ['quartzite', 1100, expect.closeTo(85.8591636, 5)],
    ]);
    expect(f.explanation.sections[1].wearMmPerM.p50).toBeCloseTo(0.0785398163, 9);
  });

  it('decreasing chainage: walks downwards, rings still count up', () => {
    // Centre disc, factor 1.2, r = 0.5 m, p = 10 → 2π·0.5/10 = 0.314159265 km/m. Current 5000, decreasing.
    // Limit 25 mm, 5 mm worn → 20 mm to go.
    // P50: ground A 5000→4000 (1000 m) at 0.04 × 1.2 × 0.314159265 = 0.0150796447 mm/m = 15.0796447 mm
    //      → 4.92035526 mm left; ground B at 0.1 × 1.2 × 0.314159265 = 0.0376991118 mm/m → 130.516477 m
    //      → chainage 4000 − 130.516477 = 3869.483523; remaining 1130.516477 m;
    //      ring 100 + ceil(1130.516477 / 2 = 565.26) = 666; days 1000/10 + 130.516477/5 = 126.103295.
    // P90: ground A at 0.06 × 1.2 × 0.314159265 = 0.0226194671 mm/m → 20 / that = 884.194128 m, still in A
    //      → chainage 4115.805872; days 88.4194128.
    const f = forecastChangeOut(
      input({
        position: { ...faceDisc, positionClass: 'centre', trackRadiusMm: 500, discsPerPosition: 2 },
        wearNow: { lastMeasuredWearMm: 5, measuredAtChainageM: 5000, modelledSinceMm: { p50: 0, p90: 0 } },
        currentChainageM: 5000,
        currentRingNumber: 100,
        ringLengthM: 2,
        driveDirection: 'decreasing',
        geology: [
          { fromChainageM: 4000, toChainageM: 5200, groundTypeId: 'A' },
          { fromChainageM: 3000, toChainageM: 4000, groundTypeId: 'B' },
        ],
        rates: { ...rates, byGround: { A: { p50MmPerKm: 0.04, p90MmPerKm: 0.06 }, B: { p50MmPerKm: 0.1, p90MmPerKm: 0.15 } } },
        penetrationMmPerRevByGround: { A: 10, B: 10 },
        advanceMPerDayByGround: { A: 10, B: 5 },
      }),
    );
    expect(f.p50.chainageM).toBeCloseTo(3869.483523, 5);
    expect(f.p50.remainingM).toBeCloseTo(1130.516477, 5);
    expect(f.p50.ringNumber).toBe(666);
    expect(daysAfterNow(f.p50)).toBeCloseTo(126.103295, 5);
    expect(f.p90.chainageM).toBeCloseTo(4115.805872, 5);
    expect(daysAfterNow(f.p90)).toBeCloseTo(88.4194128, 6);
    expect(f.explanation.classFactor).toBe(1.2);
    expect(f.explanation.sections.map((s) => [s.groundTypeId, s.fromChainageM, s.toChainageM])).toEqual([
      ['A', 5000, 4000],
      ['B', 4000, expect.closeTo(3869.483523, 5)],
    ]);
  });

  it('already over the limit: says so, remaining 0, at the current point', () => {
    // 24 mm measured + 1.5 mm modelled = 25.5 mm ≥ 25 mm limit (P50); P90 24 + 2 = 26 mm.
    const f = forecastChangeOut(
      input({ wearNow: { lastMeasuredWearMm: 24, measuredAtChainageM: 960, modelledSinceMm: { p50: 1.5, p90: 2 } } }),
    );
    for (const p of [f.p50, f.p90]) {
      expect(p).toMatchObject({ status: 'over_limit', remainingM: 0, chainageM: 1000, ringNumber: 400 });
      expect(p.date.getTime()).toBe(NOW.getTime());
    }
    expect(f.p50.wearNowMm).toBe(25.5);
    expect(f.p90.wearNowMm).toBe(26);
    expect(f.explanation.sections).toEqual([]);
  });

  it('P90 before P50 on a gauge disc whose wear since the inspection is modelled', () => {
    // Since the inspection: 100 km in sandstone, 50 km in quartzite; gauge factor 1.5.
    // P50 modelled 1.5 × (0.02 × 100 + 0.05 × 50) = 6.75 mm; P90 1.5 × (0.03 × 100 + 0.08 × 50) = 10.5 mm.
    // Measured 3 mm → wear now P50 9.75, P90 13.5; limit 15 → 5.25 and 1.5 mm to go.
    // Ahead, sandstone at r = 3.0 m, p = 8 → 2.35619449 km/m (DOMAIN.md §1):
    // P50 0.02 × 1.5 × 2.35619449 = 0.0706858347 mm/m → 74.2723068 m;
    // P90 0.03 × 1.5 × 2.35619449 = 0.106028752 mm/m → 14.1471061 m.
    const since = modelledWearSinceMm(
      [
        { groundTypeId: 'sandstone', rolledKm: 100 },
        { groundTypeId: 'quartzite', rolledKm: 50 },
      ],
      rates,
      'gauge',
    );
    expect(since.wearMm.p50).toBeCloseTo(6.75, 12);
    expect(since.wearMm.p90).toBeCloseTo(10.5, 12);
    expect(since.fallbackGroundIds).toEqual([]);

    const f = forecastChangeOut(
      input({
        position: { ...faceDisc, positionClass: 'gauge', allowableWearMm: 15, gaugeTiltDeg: 30 },
        wearNow: { lastMeasuredWearMm: 3, measuredAtChainageM: 900, modelledSinceMm: since.wearMm },
        overcutMarginMm: 12,
      }),
    );
    expect(f.p50.remainingM).toBeCloseTo(74.2723068, 5);
    expect(f.p90.remainingM).toBeCloseTo(14.1471061, 5);
    expect(f.p90.chainageM).toBeLessThan(f.p50.chainageM);
    expect(f.p90.date.getTime()).toBeLessThan(f.p50.date.getTime());
    // Bore at the limit, derived: trigonometry — 2 × 15 mm × sin 30° = 15 mm > 12 mm overcut margin.
    expect(f.gaugeBore?.diameterLossMm).toBeCloseTo(15, 9);
    expect(f.gaugeBore?.exceedsOvercut).toBe(true);
  });

  it('unknown ground ahead takes the cautious extremes of the known grounds, flagged', () => {
    // Sandstone 1000–1050, a gap 1050–1100 (no section), then ground 'schist' that has no rate,
    // penetration or advance. Fallbacks: rates max(0.02, 0.05) = 0.05 and max(0.03, 0.08) = 0.08;
    // penetration min(8, 6) = 6; advance max(20, 12) = 20 m/day.
    // P50: sandstone 50 m × 0.0471238898 mm/m = 2.35619449 mm; the gap wears 0.05 × 2π·3/6 =
    //      0.05 × 3.14159265 = 0.157079633 mm/m. Wear now 25 − 2.35619449 − 15 × 0.157079633 = 20.2876110 mm,
    //      so the limit falls 15 m into the gap: chainage 1065.
    const f = forecastChangeOut(
      input({
        wearNow: { lastMeasuredWearMm: 20.287611, measuredAtChainageM: 1000, modelledSinceMm: { p50: 0, p90: 0 } },
        geology: [
          { fromChainageM: 900, toChainageM: 1050, groundTypeId: 'sandstone' },
          { fromChainageM: 1100, toChainageM: 2000, groundTypeId: 'schist' },
        ],
      }),
    );
    expect(f.p50.chainageM).toBeCloseTo(1065, 4);
    const gap = f.explanation.sections[1];
    expect(gap).toMatchObject({ groundTypeId: null, fromChainageM: 1050, penetrationMmPerRev: 6, advanceMPerDay: 20 });
    expect(gap.rateMmPerKm).toEqual({ p50: 0.05, p90: 0.08 });
    expect(gap.fallbacks).toEqual(['wear_rate', 'penetration', 'advance']);
    expect(f.explanation.usesFallback).toBe(true);

    // An unknown ground type id in the wear since the inspection is flagged too.
    expect(modelledWearSinceMm([{ groundTypeId: 'schist', rolledKm: 10 }], rates, 'face')).toEqual({
      wearMm: { p50: expect.closeTo(0.5, 12), p90: expect.closeTo(0.8, 12) },
      fallbackGroundIds: ['schist'],
    });
  });

  it('reports beyond_known_ground with what is known when the geology ends first', () => {
    // Geology ends at 1100: 100 m × 0.0471238898 mm/m = 4.71238898 mm → 14.71238898 mm at the end (P50);
    // ring 400 + ceil(100 / 1.5 = 66.7) = 467; 100 / 20 = 5 days.
    const f = forecastChangeOut(input({ geology: [{ fromChainageM: 0, toChainageM: 1100, groundTypeId: 'sandstone' }] }));
    expect(f.p50).toMatchObject({ status: 'beyond_known_ground', chainageM: 1100, remainingM: 100, ringNumber: 467 });
    expect(f.p50.wearThereMm).toBeCloseTo(14.71238898, 7);
    expect(daysAfterNow(f.p50)).toBeCloseTo(5, 9);
    expect(f.p90.status).toBe('beyond_known_ground');
  });

  it('rejects overlapping geology and a gauge position without a tilt', () => {
    expect(() =>
      forecastChangeOut(
        input({
          geology: [
            { fromChainageM: 0, toChainageM: 1200, groundTypeId: 'sandstone' },
            { fromChainageM: 1100, toChainageM: 2000, groundTypeId: 'quartzite' },
          ],
        }),
      ),
    ).toThrow(RangeError);
    expect(() => forecastChangeOut(input({ position: { ...faceDisc, positionClass: 'gauge' } }))).toThrow(RangeError);
  });
});

describe('estimateDriveRates', () => {
  const at = (iso: string) => new Date(`2027-02-10T${iso}:00Z`);
  const stroke = (endedAt: Date, fromChainageM: number, groundTypeId: string, revs: number | null, pen: number | null): StrokeRecord => ({
    endedAt,
    fromChainageM,
    toChainageM: fromChainageM + 1.5,
    groundTypeId,
    cutterheadRevolutions: revs,
    penetrationMmPerRev: pen,
  });
  // Given out of order on purpose. Calendar time runs from the previous stroke's end:
  // s1 sandstone ends 10 Feb 00:00 (first of the log: no time), s2 sandstone 06:00 (0.25 day),
  // s3 quartzite 18:00 (0.5 day), s4 sandstone 11 Feb 00:00 (0.25 day). 1.5 m each.
  const strokes = [
    stroke(new Date('2027-02-11T00:00:00Z'), 1004.5, 'sandstone', 150, null),
    stroke(at('06:00'), 1001.5, 'sandstone', 300, null),
    stroke(at('00:00'), 1000, 'sandstone', 150, null),
    stroke(at('18:00'), 1003, 'quartzite', null, 5),
  ];

  it('uses ratios of sums over the window, not medians', () => {
    // Sandstone: 4.5 m / 600 rev = 7.5 mm/rev (the median of 10, 5, 10 would be 10);
    // advance (s2 + s4) 3 m / 0.5 day = 6 m/day.
    // Quartzite: revolutions 1500 mm / 5 = 300 → 5 mm/rev; 1.5 m / 0.5 day = 3 m/day.
    const e = estimateDriveRates(strokes, {});
    expect(e.penetrationMmPerRevByGround.sandstone).toBeCloseTo(7.5, 12);
    expect(e.advanceMPerDayByGround.sandstone).toBeCloseTo(6, 12);
    expect(e.penetrationMmPerRevByGround.quartzite).toBeCloseTo(5, 12);
    expect(e.advanceMPerDayByGround.quartzite).toBeCloseTo(3, 12);
    expect(e.basis.sandstone).toEqual({
      penetration: { source: 'recent_strokes', strokeCount: 3, advanceM: 4.5 },
      advance: { source: 'recent_strokes', strokeCount: 2, advanceM: 3 },
    });
  });

  it('keeps to the window of the last N strokes in that ground', () => {
    // Last 2 sandstone strokes (s2, s4): 3000 mm / 450 rev = 6.6667 mm/rev; 3 m / 0.5 day = 6 m/day.
    const e = estimateDriveRates(strokes, {}, 2);
    expect(e.penetrationMmPerRevByGround.sandstone).toBeCloseTo(3000 / 450, 12);
    expect(e.advanceMPerDayByGround.sandstone).toBeCloseTo(6, 12);
    expect(() => estimateDriveRates(strokes, {}, 0)).toThrow(RangeError);
  });

  it('lets planner overrides win, per quantity', () => {
    const e = estimateDriveRates(strokes, { quartzite: { advanceMPerDay: 4 }, schist: { penetrationMmPerRev: 9 } });
    expect(e.advanceMPerDayByGround.quartzite).toBe(4);
    expect(e.penetrationMmPerRevByGround.quartzite).toBeCloseTo(5, 12);
    expect(e.basis.quartzite.advance).toEqual({ source: 'planner' });
    expect(e.penetrationMmPerRevByGround.schist).toBe(9);
    expect('schist' in e.advanceMPerDayByGround).toBe(false);
    expect(e.basis.schist).toEqual({ penetration: { source: 'planner' }, advance: null });
  });
});
