/**
 * The round entry form's values (the "draft" the fitter has on the screen for one position) and
 * the form's schema: the form's own two checks (wear entered or "not measured", photo size), then
 * the values turned into the request's shape and checked with the server's own rules
 * (`entryValuesSchema`, the fields of `entryInputSchema`). Field names are the request's, so a
 * refusal's issue path (`wearMm`, `removedSerial`, `fitted.serial`, …) lands on its field.
 */
import { z } from 'zod';
import type { DiscCondition } from '../../../shared/cutters';
import { entryValuesSchema, type EntryValues } from '../../../shared/schemas/inspection';
import type { QueuedEntry } from '../../lib/outbox';
import type { RoundEntry, RoundPosition } from './api';

/** What the fitter has on the screen for one position, before it is saved. */
export interface Draft {
  /** The wear as keyed or typed ('12.' while the decimal is still to come); read only when `notMeasured` is off. */
  wearMm: string;
  notMeasured: boolean;
  conditions: DiscCondition[];
  action: 'none' | 'changed';
  removedSerial: string;
  fitted: { serial: string; isNew: boolean } | null;
  changeReason: string;
  note: string;
  /** Picked on this screen, not sent yet (they go to the outbox with the entry). */
  photos: File[];
}

/** The screen's starting point for a position: the newest queued entry, else what the server stored, else empty. */
export function draftFrom(position: RoundPosition, stored: RoundEntry | undefined, queued: QueuedEntry | undefined): Draft {
  const source = queued?.body ?? stored;
  if (!source) {
    return {
      wearMm: '',
      notMeasured: false,
      conditions: [],
      action: 'none',
      removedSerial: position.current?.serial ?? '',
      fitted: null,
      changeReason: '',
      note: '',
      photos: [],
    };
  }
  const changedOnServer = !queued && stored?.action === 'changed';
  return {
    wearMm: source.wearMm == null ? '' : String(source.wearMm),
    notMeasured: source.wearMm == null,
    conditions: [...source.conditions],
    action: source.action,
    removedSerial: queued?.body.removedSerial ?? (changedOnServer ? '' : (position.current?.serial ?? '')),
    // A change the server holds: the serial on the position now is the one that was fitted.
    fitted: queued?.body.fitted ?? (changedOnServer && position.current ? { serial: position.current.serial, isNew: false } : null),
    changeReason: source.changeReason ?? '',
    note: source.note,
    photos: [],
  };
}

/** The photo route's upload limit (server/routes/photos.ts), checked before anything is queued. */
export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;

/** The form's schema: its input is a Draft, its output the entry's values as the server parses them. */
export const entryFormSchema = z
  .custom<Draft>()
  .superRefine((d, ctx) => {
    if (!d.notMeasured && d.wearMm === '')
      ctx.addIssue({ code: 'custom', path: ['wearMm'], message: 'Enter the wear, or choose “Not measured”.' });
    if (d.photos.some((f) => f.size > MAX_PHOTO_BYTES))
      ctx.addIssue({ code: 'custom', path: ['photos'], message: 'A photo is larger than 10 MB. Take it at a lower resolution.' });
  })
  .transform((d): z.input<typeof entryValuesSchema> => {
    const changed = d.action === 'changed';
    return {
      wearMm: d.notMeasured ? null : Number(d.wearMm),
      conditions: d.conditions,
      action: d.action,
      removedSerial: changed && d.removedSerial.trim() ? d.removedSerial.trim() : null,
      fitted: changed ? d.fitted : null,
      changeReason: changed ? d.changeReason : null,
      note: d.note,
    };
  })
  .pipe(entryValuesSchema);

export type { EntryValues };

/** The form fields a refusal's issue can name; any other path is shown at the top of the form. */
export const draftFields = ['wearMm', 'conditions', 'removedSerial', 'fitted', 'changeReason', 'note', 'photos'] as const;
export const isDraftField = (path: string) => draftFields.some((p) => path === p || path.startsWith(`${p}.`));
