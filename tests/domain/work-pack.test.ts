/**
 * The work pack of a stop as words (shared/domain/work-pack.ts): the parts kit and the crew's text.
 * Kit rule from DEVELOPERS.md decision 24 (common practice, no source); chainage written km+m
 * (common practice, no source); site times checked against the EU summer-time rule.
 */
import { describe, expect, it } from 'vitest';
import { partsKit, workPackText, type WorkPackForText } from '../../shared/domain/work-pack';

describe('parts kit', () => {
  it('packs one assembly per change and the spares per 10 and 20 changes, rounded up, per disc size', () => {
    // derived: 12 changes of 17″ → 12 assemblies, ⌈12/10⌉ = 2 rings and seal kits, ⌈12/20⌉ = 1 bearing kit;
    // 1 change of 19″ → 1 of each spare (rounded up from 0.1 and 0.05).
    const kit = partsKit(
      new Map([
        [19, 1],
        [17, 12],
      ]),
    );
    expect(kit.map((k) => [k.item, k.quantity])).toEqual([
      ['17″ disc cutter assembly', 12],
      ['17″ spare ring', 2],
      ['17″ spare seal kit', 2],
      ['17″ spare bearing kit', 1],
      ['19″ disc cutter assembly', 1],
      ['19″ spare ring', 1],
      ['19″ spare seal kit', 1],
      ['19″ spare bearing kit', 1],
    ]);
    expect(partsKit(new Map())).toEqual([]);
  });
});

describe('work pack text', () => {
  const pack = (over: Partial<WorkPackForText['stop']> = {}): WorkPackForText => ({
    stop: {
      chainageM: 5011.74,
      ringNumber: 3341,
      plannedStart: new Date('2026-03-29T01:30:00Z'),
      expectedHours: 12,
      compressedAir: true,
      workingPressureBar: 2.5,
      ...over,
    },
    crew: { name: 'Crew B', members: [{ name: 'Ana' }, { name: 'Ben' }] },
    positions: [{ number: 7, positionClass: 'face', twinDisc: false, fittedSerial: 'K-0107', expectedWearMm: 18.04, wearLimitMm: 20 }],
    storeSerials: [{ serial: 'K-0201' }],
    shortages: [{ discSizeIn: 17, needed: 2, inStore: 1 }],
    partsKit: partsKit(new Map([[17, 1]])),
    cautions: ['Caution one.', 'Caution two.'],
  });

  it('writes chainage as km+m and the start in site time with the zone named', () => {
    const text = workPackText(pack(), { name: 'Invented drive', siteTimeZone: 'Europe/Zurich' }, 'http://kerfwise.test/projects/p/stops/s');
    // The example: a stop mail wrote "5011.7 m" where screens write "5+011.7".
    expect(text).toContain('Invented drive: cutter stop at chainage 5+011.7, ring 3341');
    // EU rule (Directive 2000/84/EC): summer time starts 29 March 2026 at 01:00 UTC, so 01:30 UTC is 03:30 CEST.
    expect(text).toContain('Planned start: 2026-03-29 03:30 Europe/Zurich, about 12 h.');
    expect(text).toContain('Worked in COMPRESSED AIR (indicative working pressure 2.50 bar).');
    expect(text).toContain('  - position 7 (face), K-0107 off, expected wear 18.0 of 20 mm');
    expect(text).toContain('SHORT: 2 17″ cutters needed, 1 in store.');
    expect(text).toContain('Work pack: http://kerfwise.test/projects/p/stops/s');
    // Every caution is in the text, in order, at the end.
    expect(text.trimEnd().endsWith('Caution one.\n\nCaution two.')).toBe(true);
  });

  it('says where the work pack is when no address is configured, and when a stop has no date yet', () => {
    const text = workPackText(
      pack({ plannedStart: null, compressedAir: false, workingPressureBar: null }),
      { name: 'D', siteTimeZone: 'Europe/Zurich' },
      null,
    );
    expect(text).toContain('Not scheduled yet.');
    expect(text).toContain('Worked in free air.');
    expect(text).toContain('The work pack is on the stop’s page in Kerfwise.');
  });
});
