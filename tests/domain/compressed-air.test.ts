import { describe, expect, it } from 'vitest';
import { COMPRESSED_AIR_CAUTION, needsCompressedAir, workingPressureFromHead } from '../../shared/domain/compressed-air';

describe('workingPressureFromHead (DOMAIN.md §7: p = ρ·g·h)', () => {
  it('uses standard gravity and fresh water by default', () => {
    // derived: standard gravity g_n = 9.80665 m/s² (3rd CGPM 1901, ISO 80000-3) × 1000 kg/m³
    // (fresh water, common practice, no source) × 1 m = 9806.65 Pa = 9.80665 kPa.
    expect(workingPressureFromHead(1).pressureKPa).toBeCloseTo(9.80665, 12);
    for (const headM of [0.3, 7, 41.25]) {
      expect(workingPressureFromHead(headM).pressureKPa).toBeCloseTo(workingPressureFromHead(headM, 1000).pressureKPa, 12);
    }
  });

  it('gives 0.980665 bar (98.0665 kPa) for 10 m of fresh water', () => {
    // derived: 1000 kg/m³ × 9.80665 m/s² × 10 m = 98 066.5 Pa = 98.0665 kPa = 0.980665 bar.
    const p = workingPressureFromHead(10);
    expect(p.pressureKPa).toBeCloseTo(98.0665, 10);
    expect(p.pressureBar).toBeCloseTo(0.980665, 12);
  });

  it('is about 0.0981 bar per metre, about 1 bar per 10 m', () => {
    expect(workingPressureFromHead(1).pressureBar).toBeCloseTo(0.0981, 4); // DOMAIN.md §7, "≈ 0.0981 bar per metre"
    expect(workingPressureFromHead(10).pressureBar).toBeCloseTo(1, 1); // DOMAIN.md §7, "≈ 1 bar per 10 m" (practice)
  });

  it('scales with the water density given', () => {
    // derived: 1025 kg/m³ (sea water, common practice, no source) × 9.80665 × 10 = 100 518.1625 Pa.
    expect(workingPressureFromHead(10, 1025).pressureBar).toBeCloseTo(1.005181625, 12);
    expect(workingPressureFromHead(23.5, 1000).pressureKPa).toBeCloseTo(230.456275, 9); // derived: 1000 × 9.80665 × 23.5 / 1000
  });

  it('gives 0 when the water table is at or below the axis, and rejects bad input', () => {
    expect(workingPressureFromHead(0).pressureBar).toBe(0);
    expect(workingPressureFromHead(-3).pressureBar).toBe(0);
    expect(() => workingPressureFromHead(Number.NaN)).toThrow(RangeError);
    expect(() => workingPressureFromHead(10, 0)).toThrow(RangeError);
  });
});

describe('needsCompressedAir', () => {
  it('by default asks for air wherever groundwater stands above the axis', () => {
    // Default threshold: any head above the axis (common practice, no source).
    expect(needsCompressedAir(0.5)).toBe(true);
    expect(needsCompressedAir(0.01)).toBe(true);
    expect(needsCompressedAir(0)).toBe(false);
    expect(needsCompressedAir(-2)).toBe(false);
  });

  it('follows a site threshold given as head', () => {
    expect(needsCompressedAir(4.9, { headAboveAxisM: 5 })).toBe(false);
    expect(needsCompressedAir(5, { headAboveAxisM: 5 })).toBe(false); // "above" the threshold, not at it
    expect(needsCompressedAir(5.1, { headAboveAxisM: 5 })).toBe(true);
  });

  it('follows a site threshold given as pressure, with the water density', () => {
    // derived: 0.5 bar = 50 000 Pa ↔ 50 000 / (1000 × 9.80665) = 5.0986 m fresh water, 4.9743 m at 1025 kg/m³.
    expect(needsCompressedAir(5.09, { pressureBar: 0.5 })).toBe(false);
    expect(needsCompressedAir(5.11, { pressureBar: 0.5 })).toBe(true);
    expect(needsCompressedAir(5.0, { pressureBar: 0.5 }, 1025)).toBe(true);
    expect(needsCompressedAir(4.96, { pressureBar: 0.5 }, 1025)).toBe(false);
  });
});

describe('COMPRESSED_AIR_CAUTION (DOMAIN.md §7)', () => {
  it('says indicative only, names the governing rules and the people, and disclaims decompression', () => {
    for (const phrase of [
      'Indicative only',
      'earth pressure',
      'Work in Compressed Air Regulations 1996',
      'BS 6164',
      '29 CFR 1926.803',
      'Druckluftverordnung',
      'ITA/BTS',
      'EN 16191',
      'EN 12110',
      'approved procedure',
      'competent supervisor',
      'medical adviser',
      'does not compute decompression schedules',
    ]) {
      expect(COMPRESSED_AIR_CAUTION).toContain(phrase);
    }
  });
});
