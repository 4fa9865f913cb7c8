import { z } from 'zod';
import { chainageM, freeText, instant, ringNumber, singleLine } from './fields';
import { conditionsSchema, serialSchema } from './cutter';
import type { DiscCondition } from '../cutters';
import type { LayoutPosition } from './cutterhead';

export const startRoundInputSchema = z.object({
  /** Made by the tablet when the round is started offline: sent again, the same round answers 200 (decision 42). */
  id: z.uuid({ message: 'The round id must be a UUID made by the device.' }).optional(),
  startedAt: instant('The start of the round', 'Give the date and time of the round.'),
  chainageM: z.coerce
    .number({ message: 'Give the chainage where the machine stands, in metres.' })
    .pipe(chainageM('The chainage', 'Give the chainage where the machine stands, in metres.')),
  ringNumber: z.coerce.number({ message: 'The ring number must be a whole number.' }).pipe(ringNumber()).nullable().default(null),
  crew: singleLine('The crew', 300).default(''),
  notes: freeText('The notes', 2000).default(''),
});
export type StartRoundInput = z.infer<typeof startRoundInputSchema>;

/** The cutter put on the position: one from the store, or a new serial entered on the spot. */
const fittedSchema = z.object({ serial: serialSchema, isNew: z.boolean().default(false) });

/** What the fitter records for one position: the fields of an entry, without its keys and times. */
const entryFields = z.object({
  wearMm: z
    .number({ message: 'Wear must be a number of millimetres.' })
    .min(0, 'Wear cannot be negative.')
    .max(100, 'Wear above 100 mm is not possible; check the value.')
    .refine((v) => Math.abs(v * 10 - Math.round(v * 10)) < 1e-6, 'Give wear to one decimal, like 12.5.')
    .nullable(),
  conditions: conditionsSchema.default([]),
  action: z.enum(['none', 'changed']).default('none'),
  /** The serial taken off; defaults to the one Kerfwise has on the position. */
  removedSerial: serialSchema.nullable().default(null),
  fitted: fittedSchema.nullable().default(null),
  changeReason: freeText('The reason for the change', 300).nullable().default(null),
  note: freeText('The note', 2000).default(''),
});

/** The rules across fields of a change, applied to both schemas below (zod cannot pick or omit from a refined object). */
type ChangeFields = { action: 'none' | 'changed'; fitted: unknown; changeReason: string | null };
type Rule = [(e: ChangeFields) => boolean, { path: string[]; message: string }];
const changeNeedsFitted: Rule = [
  (e: ChangeFields) => e.action !== 'changed' || e.fitted !== null,
  { path: ['fitted'], message: 'A change needs the serial of the cutter put on.' },
];
const changeNeedsReason: Rule = [
  (e: ChangeFields) => e.action !== 'changed' || (e.changeReason ?? '') !== '',
  { path: ['changeReason'], message: 'Give the reason for the change.' },
];

/** The values of an entry as the round screen's form hands them over (its keys and times are added when it is saved). */
export const entryValuesSchema = entryFields.refine(...changeNeedsFitted).refine(...changeNeedsReason);
export type EntryValues = z.infer<typeof entryValuesSchema>;

/** One position in a round. Sent again with the same clientKey it is stored once. */
export const entryInputSchema = entryFields
  .extend({
    clientKey: z.uuid({ message: 'clientKey must be a UUID.' }),
    positionId: z.uuid({ message: 'Choose a position.' }),
    /** Confirms a wear lower than the last measurement of the same disc as a correction. */
    remeasured: z.boolean().default(false),
    /** When the fitter entered it (offline entries arrive later). */
    recordedAt: instant('The time recorded').optional(),
  })
  .refine(...changeNeedsFitted)
  .refine(...changeNeedsReason);
export type EntryInput = z.infer<typeof entryInputSchema>;

export interface Round {
  id: string;
  projectId: string;
  startedAt: string;
  chainageM: number;
  ringNumber: number | null;
  crew: string;
  notes: string;
  closedAt: string | null;
}

export interface RoundListItem extends Round {
  entryCount: number;
  changeCount: number;
}

/** A cutterhead position as the round screen gets it (GET /positions' rows): the serial on it now and its last wear. */
export type RoundPosition = LayoutPosition;

/** What the server stored for one position in this round, with the flags the fitter sees. */
export interface RoundEntry {
  id: string;
  positionId: string;
  clientKey: string;
  wearMm: number | null;
  conditions: DiscCondition[];
  action: 'none' | 'changed';
  removedCutterId: string | null;
  fittedCutterId: string | null;
  changeReason: string | null;
  note: string;
  remeasured: boolean;
  recordedAt: string;
  overLimit: boolean;
  needsChange: boolean;
  photoIds: string[];
}

export interface RoundDetail {
  round: Round;
  positions: RoundPosition[];
  entries: RoundEntry[];
  /** Position ids in the order they were recorded in the previous round. */
  lastRoundOrder: string[];
}

export interface StoreCutter {
  id: string;
  serial: string;
  discSizeIn: number;
  rebuildCount: number;
}

/** The flags the fitter sees beside an entry. */
export interface EntryFlags {
  overLimit: boolean;
  needsChange: boolean;
}

/** POST /rounds/:roundId/entries: the entry as stored (201), or as stored before when the same clientKey came again (200, `replayed`). */
export interface EntryRecorded extends EntryFlags {
  entry: Omit<RoundEntry, keyof EntryFlags | 'photoIds'>;
  replayed: boolean;
}

/** GET /rounds/:roundId/history: one change to an entry of the round, oldest first. */
/** One of the caller's entries that another fitter's later-recorded entry overtook (decision 42). */
export interface OvertakenEntry {
  /** The audit event's id; the client keeps dismissed ones on the device. */
  id: number;
  roundId: string;
  positionId: string;
  /** Who recorded the entry that stands. */
  byName: string | null;
  at: Date;
}

export interface RoundHistoryRow {
  at: string;
  action: string;
  before: unknown;
  after: unknown;
  userName: string | null;
  positionNumber: number;
}

/** POST /photos: the photo as stored (201), or as stored before when the same clientKey came again (200). */
export interface PhotoStored {
  id: string;
  entryId: string;
  clientKey: string;
  mimeType: string;
  sizeBytes: number;
  originalName: string;
  createdAt: string;
}
