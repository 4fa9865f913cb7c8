import { describe, expect, it } from 'vitest';
import { boreDiameterLossMm, boreRadiusLossMm, gaugeBoreCheck } from '../../shared/domain/gauge-bore';

describe('boreRadiusLossMm', () => {
  it('loses the whole wear at 90° tilt', () => {
    // derived: trigonometry — h·sin 90° = h·1
    expect(boreRadiusLossMm(12, 90)).toBeCloseTo(12, 12);
  });

  it('loses half the wear at 30° tilt', () => {
    // derived: trigonometry — h·sin 30° = h·0.5
    expect(boreRadiusLossMm(12, 30)).toBeCloseTo(6, 12);
  });

  it('loses nothing on a disc square to the face (0°)', () => {
    // derived: trigonometry — sin 0° = 0
    expect(boreRadiusLossMm(12, 0)).toBe(0);
  });

  it('rejects a tilt outside 0..90° and negative wear', () => {
    expect(() => boreRadiusLossMm(5, 95)).toThrow(RangeError);
    expect(() => boreRadiusLossMm(5, -1)).toThrow(RangeError);
    expect(() => boreRadiusLossMm(-1, 30)).toThrow(RangeError);
  });
});

describe('boreDiameterLossMm', () => {
  it('is twice the radius loss: 2·h·sin θ', () => {
    // derived: trigonometry — 2 × 10 mm × sin 30° = 10 mm; 2 × 10 mm × sin 90° = 20 mm
    expect(boreDiameterLossMm(10, 30)).toBeCloseTo(10, 12);
    expect(boreDiameterLossMm(10, 90)).toBeCloseTo(20, 12);
  });
});

describe('gaugeBoreCheck', () => {
  it('warns only when the diameter loss exceeds the overcut margin', () => {
    // derived: trigonometry — 15 mm at 30° loses 2 × 15 × 0.5 = 15 mm of diameter
    expect(gaugeBoreCheck(15, 30, 12)).toMatchObject({ exceedsOvercut: true, overcutMarginMm: 12 });
    expect(gaugeBoreCheck(15, 30, 12).diameterLossMm).toBeCloseTo(15, 12);
    // 12 mm at 30° loses 12 mm: equal to the margin, not beyond it
    expect(gaugeBoreCheck(12, 30, 12.000001).exceedsOvercut).toBe(false);
    expect(gaugeBoreCheck(12, 30, 11.999999).exceedsOvercut).toBe(true);
  });

  it('rejects a negative overcut margin', () => {
    expect(() => gaugeBoreCheck(5, 30, -1)).toThrow(RangeError);
  });
});
