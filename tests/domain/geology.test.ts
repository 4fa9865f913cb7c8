import { describe, expect, it } from 'vitest';
import { findSectionAt, splitChainageBySection, validateGeologySections, type GeologySection } from '../../shared/domain/geology';

// Invented long section (no real project). All check values are derived by hand from these
// chainages; the half-open [from, to) boundary rule is Kerfwise's own (shared/domain/geology.ts).
function section(chainageFromM: number, chainageToM: number, groundTypeId: string): GeologySection {
  return { chainageFromM, chainageToM, groundTypeId, waterHeadM: null, stopAllowed: true, stopReason: null };
}

const longSection = [section(0, 100, 'marl'), section(100, 250, 'sandstone'), section(250, 400, 'granite')];

describe('validateGeologySections', () => {
  it('accepts a continuous long section', () => {
    expect(validateGeologySections(longSection)).toEqual({ errors: [], warnings: [] });
  });

  it('reports overlaps with the indices of both sections, in input order', () => {
    // Input unsorted on purpose: index 0 = [200, 300), index 1 = [0, 100), index 2 = [90, 210).
    // [90, 210) overlaps [0, 100) on [90, 100) and [200, 300) on [200, 210) (derived by hand).
    const result = validateGeologySections([section(200, 300, 'a'), section(0, 100, 'b'), section(90, 210, 'c')]);
    expect(result.errors).toEqual([
      { kind: 'overlap', indexA: 1, indexB: 2, fromM: 90, toM: 100 },
      { kind: 'overlap', indexA: 2, indexB: 0, fromM: 200, toM: 210 },
    ]);
    expect(result.warnings).toEqual([]);
  });

  it('reports every pair under one long section', () => {
    // [0, 500) contains both [10, 20) and [30, 40); the two small ones leave a gap [20, 30) but
    // the long one covers it, so there is no gap (derived by hand).
    const result = validateGeologySections([section(0, 500, 'a'), section(10, 20, 'b'), section(30, 40, 'c')]);
    expect(result.errors).toEqual([
      { kind: 'overlap', indexA: 0, indexB: 1, fromM: 10, toM: 20 },
      { kind: 'overlap', indexA: 0, indexB: 2, fromM: 30, toM: 40 },
    ]);
    expect(result.warnings).toEqual([]);
  });

  it('warns about gaps and rejects empty or reversed ranges', () => {
    // Gap between [0, 100) and [120, 200) is [100, 120); index 2 (50 → 50) is empty, index 3 reversed.
    const result = validateGeologySections([section(0, 100, 'a'), section(120, 200, 'b'), section(50, 50, 'c'), section(80, 60, 'd')]);
    expect(result.errors).toEqual([
      { kind: 'invalid_range', index: 2 },
      { kind: 'invalid_range', index: 3 },
    ]);
    expect(result.warnings).toEqual([{ kind: 'gap', beforeIndex: 0, afterIndex: 1, fromM: 100, toM: 120 }]);
  });
});

describe('findSectionAt', () => {
  it('finds the section, giving a shared boundary to the section that begins there', () => {
    expect(findSectionAt(longSection, 50)?.groundTypeId).toBe('marl');
    expect(findSectionAt(longSection, 100)?.groundTypeId).toBe('sandstone');
    expect(findSectionAt(longSection, 400)?.groundTypeId).toBe('granite'); // end of the last section
    expect(findSectionAt(longSection, 400.001)).toBeUndefined();
    expect(findSectionAt(longSection, -1)).toBeUndefined();
  });
});

describe('splitChainageBySection', () => {
  it('splits an increasing interval at section boundaries', () => {
    // 90 → 260: 10 m of marl, 150 m of sandstone, 10 m of granite.
    expect(splitChainageBySection(longSection, 90, 260)).toEqual([
      { fromM: 90, toM: 100, lengthM: 10, groundTypeId: 'marl', sectionIndex: 0 },
      { fromM: 100, toM: 250, lengthM: 150, groundTypeId: 'sandstone', sectionIndex: 1 },
      { fromM: 250, toM: 260, lengthM: 10, groundTypeId: 'granite', sectionIndex: 2 },
    ]);
  });

  it('splits a decreasing interval in the order travelled', () => {
    // 260 → 90 is the same ground, met in reverse.
    expect(splitChainageBySection(longSection, 260, 90)).toEqual([
      { fromM: 260, toM: 250, lengthM: 10, groundTypeId: 'granite', sectionIndex: 2 },
      { fromM: 250, toM: 100, lengthM: 150, groundTypeId: 'sandstone', sectionIndex: 1 },
      { fromM: 100, toM: 90, lengthM: 10, groundTypeId: 'marl', sectionIndex: 0 },
    ]);
  });

  it('marks ground outside every section as unknown', () => {
    // Sections [0, 100) and [120, 200); interval -5 → 210 leaves 5 + 20 + 10 m unknown.
    const gappy = [section(120, 200, 'b'), section(0, 100, 'a')];
    expect(splitChainageBySection(gappy, -5, 210).map((p) => [p.groundTypeId, p.lengthM, p.sectionIndex])).toEqual([
      [null, 5, null],
      ['a', 100, 1],
      [null, 20, null],
      ['b', 80, 0],
      [null, 10, null],
    ]);
    expect(splitChainageBySection([], 10, 12)).toEqual([{ fromM: 10, toM: 12, lengthM: 2, groundTypeId: null, sectionIndex: null }]);
  });

  it('counts overlapping chainage once, for the section that starts first', () => {
    // [0, 100) and [90, 200) overlap; 80 → 110 gives 20 m to the first and 10 m to the second.
    const overlapping = [section(0, 100, 'a'), section(90, 200, 'b')];
    expect(splitChainageBySection(overlapping, 80, 110).map((p) => [p.groundTypeId, p.lengthM])).toEqual([
      ['a', 20],
      ['b', 10],
    ]);
  });

  it('gives a zero-length interval the ground at its chainage', () => {
    expect(splitChainageBySection(longSection, 250, 250)).toEqual([
      { fromM: 250, toM: 250, lengthM: 0, groundTypeId: 'granite', sectionIndex: 2 },
    ]);
  });
});
