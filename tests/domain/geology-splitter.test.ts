/**
 * chainageSplitter (decision 46): sorts the sections once and starts each walk at the first section
 * reaching the interval. Check values: derived — equal to the walk over every section in chainage
 * order (the first version of splitChainageBySection, written out below), on invented random long
 * sections including overlapping, touching, empty and reversed ranges, and intervals in both
 * directions.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { chainageSplitter, type ChainagePiece, type GeologySection } from '../../shared/domain/geology';

function walkEverySection(sections: readonly GeologySection[], fromM: number, toM: number): ChainagePiece[] {
  const order = sections
    .map((_, i) => i)
    .filter((i) => sections[i].chainageFromM < sections[i].chainageToM)
    .sort((a, b) => sections[a].chainageFromM - sections[b].chainageFromM || sections[a].chainageToM - sections[b].chainageToM);
  if (fromM === toM) {
    let index = sections.findIndex((s) => s.chainageFromM <= fromM && fromM < s.chainageToM);
    if (index < 0) index = sections.findIndex((s) => s.chainageFromM < s.chainageToM && s.chainageToM === fromM);
    const at = index < 0 ? null : index;
    return [{ fromM, toM, lengthM: 0, groundTypeId: at === null ? null : sections[at].groundTypeId, sectionIndex: at }];
  }
  const loM = Math.min(fromM, toM);
  const hiM = Math.max(fromM, toM);
  const pieces: ChainagePiece[] = [];
  const push = (a: number, b: number, i: number | null) =>
    pieces.push({ fromM: a, toM: b, lengthM: b - a, groundTypeId: i === null ? null : sections[i].groundTypeId, sectionIndex: i });
  let cursorM = loM;
  for (const i of order) {
    const s = sections[i];
    const startM = Math.max(cursorM, s.chainageFromM);
    const endM = Math.min(hiM, s.chainageToM);
    if (s.chainageFromM >= hiM) break;
    if (endM <= startM) continue;
    if (startM > cursorM) push(cursorM, startM, null);
    push(startM, endM, i);
    cursorM = endM;
  }
  if (cursorM < hiM) push(cursorM, hiM, null);
  if (fromM < toM) return pieces;
  return pieces.reverse().map((p) => ({ ...p, fromM: p.toM, toM: p.fromM }));
}

const section = fc
  .record({ from: fc.integer({ min: 0, max: 60 }), length: fc.integer({ min: -5, max: 30 }), ground: fc.constantFrom('a', 'b', 'c') })
  .map(({ from, length, ground }): GeologySection => ({
    chainageFromM: from * 10,
    chainageToM: (from + length) * 10,
    groundTypeId: ground,
    waterHeadM: null,
    stopAllowed: true,
    stopReason: null,
  }));

describe('chainageSplitter equals the walk over every section (derived)', () => {
  it('random long sections and intervals', () => {
    fc.assert(
      fc.property(
        fc.array(section, { maxLength: 25 }),
        fc.array(fc.tuple(fc.integer({ min: -50, max: 1000 }), fc.integer({ min: -50, max: 1000 })), { minLength: 1, maxLength: 20 }),
        (sections, intervals) => {
          const split = chainageSplitter(sections);
          for (const [a, b] of intervals) expect(split(a, b)).toEqual(walkEverySection(sections, a, b));
        },
      ),
      { seed: 46, numRuns: 500 },
    );
  });
});
