/**
 * The round entry form's schema (src/features/rounds/entry-draft.ts): the form's own checks, then the
 * server's rules on the same field names, so a broken rule names the field the fitter must fix.
 */
import { describe, expect, it } from 'vitest';
import { entryInputSchema } from '../../shared/schemas/inspection';
import { draftFrom, entryFormSchema, MAX_PHOTO_BYTES, type Draft } from '../../src/features/rounds/entry-draft';

const empty: Draft = {
  wearMm: '',
  notMeasured: false,
  conditions: [],
  action: 'none',
  removedSerial: 'F-1',
  fitted: null,
  changeReason: '',
  note: '',
  photos: [],
};

const issuesOf = (d: Partial<Draft>) => {
  const r = entryFormSchema.safeParse({ ...empty, ...d });
  return r.success ? [] : r.error.issues.map((i) => [i.path.join('.'), i.message]);
};

describe('entryFormSchema', () => {
  it('asks for the wear or "not measured" (a form-only rule: the server takes null as not measured)', () => {
    expect(issuesOf({})).toEqual([['wearMm', 'Enter the wear, or choose “Not measured”.']]);
    expect(issuesOf({ notMeasured: true })).toEqual([]);
  });

  it('reads the keyed text as millimetres; a dangling point is the whole number (derived: "12." is 12)', () => {
    const r = entryFormSchema.parse({ ...empty, wearMm: '12.' });
    expect(r.wearMm).toBe(12);
    expect(entryFormSchema.parse({ ...empty, wearMm: '9.5', notMeasured: true }).wearMm).toBeNull();
  });

  it('applies the server schema’s rules on the same field names', () => {
    // The bounds and the one-decimal rule are entryInputSchema's own messages (shared/schemas/inspection.ts).
    expect(issuesOf({ wearMm: '100.5' })).toEqual([['wearMm', 'Wear above 100 mm is not possible; check the value.']]);
    expect(issuesOf({ wearMm: '12.55' })).toEqual([['wearMm', 'Give wear to one decimal, like 12.5.']]);
    expect(issuesOf({ wearMm: '10', action: 'changed' })).toEqual([
      ['fitted', 'A change needs the serial of the cutter put on.'],
      ['changeReason', 'Give the reason for the change.'],
    ]);
    expect(issuesOf({ wearMm: '10', action: 'changed', fitted: { serial: 'bad serial!', isNew: true }, changeReason: 'x' })).toEqual([
      ['fitted.serial', 'A serial number uses letters, digits and . / _ - only.'],
    ]);
  });

  it('sends the change fields only with a change, the removed serial trimmed and left out when empty', () => {
    const none = entryFormSchema.parse({ ...empty, wearMm: '3', fitted: { serial: 'S-1', isNew: false }, changeReason: 'x' });
    expect(none).toMatchObject({ action: 'none', removedSerial: null, fitted: null, changeReason: null });
    const changed = entryFormSchema.parse({
      ...empty,
      wearMm: '3',
      action: 'changed',
      removedSerial: '  F-1 ',
      fitted: { serial: 'S-1', isNew: false },
      changeReason: 'Ring damaged',
    });
    expect(changed).toMatchObject({ removedSerial: 'F-1', fitted: { serial: 'S-1', isNew: false }, changeReason: 'Ring damaged' });
    expect(
      entryFormSchema.parse({ ...empty, wearMm: '3', action: 'changed', removedSerial: ' ', fitted: changed.fitted, changeReason: 'x' })
        .removedSerial,
    ).toBeNull();
    // What the form hands over becomes a request the server's schema takes as it is.
    const body = entryInputSchema.parse({ ...changed, clientKey: crypto.randomUUID(), positionId: crypto.randomUUID() });
    expect(body).toMatchObject({ wearMm: 3, action: 'changed', remeasured: false });
  });

  it('refuses a photo over the photo route’s 10 MB limit, beside the photos', () => {
    const big = new File([new Uint8Array(MAX_PHOTO_BYTES + 1)], 'big.jpg', { type: 'image/jpeg' });
    const ok = new File([new Uint8Array(10)], 'ok.jpg', { type: 'image/jpeg' });
    expect(issuesOf({ notMeasured: true, photos: [ok, big] })).toEqual([
      ['photos', 'A photo is larger than 10 MB. Take it at a lower resolution.'],
    ]);
    expect(issuesOf({ notMeasured: true, photos: [ok] })).toEqual([]);
  });
});

describe('draftFrom', () => {
  const position = { current: { serial: 'F-7' } } as Parameters<typeof draftFrom>[0];
  it('starts empty with the serial on the position as the one removed', () => {
    expect(draftFrom(position, undefined, undefined)).toEqual({ ...empty, removedSerial: 'F-7' });
  });
  it('shows a stored change with the serial now on the position as the one fitted', () => {
    const stored = { wearMm: 4, conditions: ['even_wear'], action: 'changed', changeReason: 'Planned change', note: 'n' };
    expect(draftFrom(position, stored as Parameters<typeof draftFrom>[1], undefined)).toMatchObject({
      wearMm: '4',
      notMeasured: false,
      removedSerial: '',
      fitted: { serial: 'F-7', isNew: false },
      changeReason: 'Planned change',
    });
  });
});
