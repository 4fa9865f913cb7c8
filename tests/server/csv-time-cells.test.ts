/**
 * The quick reader of ISO time cells (decision 46, second pass) against the `ISO_TIME` regex it
 * stands in front of: wherever it takes a cell, the regex matches it with the same parts; cells it
 * leaves go to the regex unchanged. Check values: derived — the regex is the reference (it is what
 * every time cell went through before); the shapes below are ISO 8601's extended format.
 */
import { describe, expect, it } from 'vitest';
import { ISO_TIME, quickIsoParts } from '../../server/lib/csv/cells';
import { mulberry32 as random } from '../support/random';

function regexParts(raw: string) {
  const m = ISO_TIME.exec(raw);
  if (!m) return null;
  return { year: +m[1], month: +m[2], day: +m[3], hour: +m[4], minute: +m[5], second: +(m[6] ?? 0), offset: m[8] };
}

describe('quick ISO time cells', () => {
  it('takes the common shapes, with the parts the regex gives', () => {
    for (const cell of [
      '2026-03-14T06:30:00',
      '2026-03-14 06:30:59',
      '2026-03-14t06:30:00z',
      '2026-03-14T06:30:00Z',
      '2026-03-14T06:30:00.000Z',
      '2026-03-14T06:30:00,5+01:00',
      '2026-10-25T02:30:00-05:30',
      '0099-02-30T24:61:61',
    ]) {
      expect(quickIsoParts(cell), cell).not.toBeNull();
      expect(quickIsoParts(cell), cell).toEqual(regexParts(cell));
    }
  });

  it('leaves every other shape to the regex (no seconds, short offsets, a space before the offset)', () => {
    for (const cell of [
      '2026-03-14T06:30',
      '2026-03-14T06:30:00+01',
      '2026-03-14T06:30:00+0100',
      '2026-03-14T06:30:00 Z',
      '2026-03-14T06:30:00.',
    ]) {
      expect(quickIsoParts(cell), cell).toBeNull();
    }
  });

  it('never takes a cell the regex refuses or reads differently (random edits of ISO cells)', () => {
    const rand = random(46);
    const alphabet = '0123456789-:Tt zZ+.,x\u0661';
    const bases = ['2026-03-14T06:30:00', '2026-03-14T06:30:00.250Z', '2026-03-14 06:30:00+01:00', '2026-12-31t23:59:59-14:00'];
    let taken = 0;
    for (let n = 0; n < 30_000; n++) {
      let cell = bases[Math.floor(rand() * bases.length)];
      for (let edits = Math.floor(rand() * 3); edits > 0; edits--) {
        const at = Math.floor(rand() * (cell.length + 1));
        const ch = alphabet[Math.floor(rand() * alphabet.length)];
        const kind = rand();
        cell =
          kind < 0.4
            ? cell.slice(0, at) + ch + cell.slice(at + 1)
            : kind < 0.7
              ? cell.slice(0, at) + ch + cell.slice(at)
              : cell.slice(0, at) + cell.slice(at + 1);
      }
      const quick = quickIsoParts(cell);
      if (quick === null) continue;
      taken += 1;
      expect(quick, JSON.stringify(cell)).toEqual(regexParts(cell));
    }
    // derived: a third of the cells are unedited bases; the quick reader must have taken many.
    expect(taken).toBeGreaterThan(5_000);
  });
});
