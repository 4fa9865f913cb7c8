import { z } from 'zod';
import { freeText, singleLine } from './fields';
import { cutterStatuses, discConditionKeys } from '../cutters';
import type { CutterStatus } from '../cutters';

export const serialSchema = z
  .string({ message: 'Enter the serial number.' })
  .trim()
  .min(1, 'Enter the serial number.')
  .max(40, 'A serial number has at most 40 characters.')
  .regex(/^[A-Za-z0-9][A-Za-z0-9./_-]*$/, 'A serial number uses letters, digits and . / _ - only.');

export const receiveCutterInputSchema = z.object({
  serial: serialSchema,
  discSizeIn: z.coerce
    .number({ message: 'The disc size must be a number of inches.' })
    .min(10, 'Disc sizes run from 10″ to 24″.')
    .max(24, 'Disc sizes run from 10″ to 24″.'),
  notes: freeText('The notes', 500).default(''),
});
export type ReceiveCutterInput = z.infer<typeof receiveCutterInputSchema>;

export const cutterListQuerySchema = z.object({
  status: z.enum(cutterStatuses).optional(),
  q: singleLine('The search', 40).optional(),
});
export type CutterListQuery = z.infer<typeof cutterListQuerySchema>;

/** Workshop outcome for a removed cutter: rebuilt (what was renewed) and back in store, or scrapped. */
export const workshopInputSchema = z.discriminatedUnion('outcome', [
  z.object({
    outcome: z.literal('rebuilt'),
    newRing: z.boolean().default(true),
    newBearings: z.boolean().default(false),
    newSeals: z.boolean().default(false),
    note: freeText('The note', 500).default(''),
  }),
  z.object({
    outcome: z.literal('scrapped'),
    reason: freeText('The reason', 500, 'Say why the cutter is scrapped.').refine((s) => s.length > 0, 'Say why the cutter is scrapped.'),
  }),
]);
export type WorkshopInput = z.infer<typeof workshopInputSchema>;

export const conditionsSchema = z.array(z.enum(discConditionKeys, { message: 'Unknown condition.' })).max(discConditionKeys.length);

export interface Cutter {
  id: string;
  serial: string;
  discSizeIn: number;
  status: CutterStatus;
  rebuildCount: number;
  notes: string;
  createdAt: string;
  updatedAt: string;
}

/** A row of the store list: the serial, its state and, when fitted, where and since when. */
export interface CutterListItem extends Cutter {
  positionNumber: number | null;
  fittedAt: string | null;
}

export interface CutterLife {
  cutter: Cutter;
  periods: {
    id: string;
    positionId: string;
    positionNumber: number;
    fittedAt: string;
    fittedChainageM: number;
    fittedRing: number | null;
    removedAt: string | null;
    removedChainageM: number | null;
    removedRing: number | null;
    removalReason: string | null;
  }[];
  events: {
    id: number;
    at: string;
    kind: string;
    positionId: string | null;
    positionNumber: number | null;
    /** What the event recorded (its shape depends on `kind`). */
    details: unknown;
  }[];
}
