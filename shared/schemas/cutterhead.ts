import { z } from 'zod';
import { positionClasses } from '../cutters';
import type { DiscCondition, PositionClass } from '../cutters';
import { wholeNumberText } from './fields';

const num = (label: string) =>
  z.coerce.number({ message: `${label} must be a number.` }).refine(Number.isFinite, `${label} must be a number.`);

/** One cutterhead position as the planner enters it. */
export const positionInputSchema = z
  .object({
    number: num('Position number').int('Position number must be a whole number.').min(1, 'Position numbers start at 1.').max(999),
    // More than 0: the rolled distance divides by it (shared/domain/forecast.ts, rolledKmPerMetre); at most the radius of a 20 m head.
    trackRadiusMm: num('Track radius')
      .gt(0, 'Track radius must be more than 0 mm.')
      .max(10_000, 'Track radius must be at most 10,000 mm (the radius of a 20 m head).'),
    positionClass: z.enum(positionClasses, { message: 'Class must be centre, face or gauge.' }),
    discSizeIn: num('Disc size')
      .min(10, 'Disc size looks wrong: give it in inches, like 17 or 19.')
      .max(24, 'Disc size looks wrong: give it in inches, like 17 or 19.'),
    tiltDeg: num('Tilt angle')
      .min(0, 'Tilt must be between 0° and 90°.')
      .max(90, 'Tilt must be between 0° and 90°.')
      .nullable()
      .default(null),
    wearLimitMm: num('Wear limit').gt(0, 'The wear limit must be more than 0 mm.').max(100, 'The wear limit must be at most 100 mm.'),
    twinDisc: z.coerce.boolean().default(false),
    angleDeg: num('Angle')
      .min(0, 'Angle must be between 0° and 360°.')
      .lt(360, 'Angle must be between 0° and 360°.')
      .nullable()
      .default(null),
  })
  .refine((p) => p.positionClass === 'centre' || !p.twinDisc, { path: ['twinDisc'], message: 'Only centre positions carry twin discs.' });
export type PositionInput = z.infer<typeof positionInputSchema>;

/** The whole layout saved at once from the table form. */
export const layoutInputSchema = z.object({
  positions: z.array(positionInputSchema).min(1, 'The layout needs at least one position.').max(400),
});
export type LayoutInput = z.infer<typeof layoutInputSchema>;

export const layoutCsvInputSchema = z.object({
  csv: z.string().min(1, 'The file is empty.').max(2_000_000, 'The file is too large for a cutterhead layout.'),
});

/** A position as GET /positions lists it: the layout, the serial on it now, and its last wear. */
export interface LayoutPosition {
  id: string;
  number: number;
  trackRadiusMm: number;
  positionClass: PositionClass;
  discSizeIn: number;
  tiltDeg: number | null;
  wearLimitMm: number;
  twinDisc: boolean;
  angleDeg: number | null;
  current: { fittingId: string; cutterId: string; serial: string; fittedAt: string; fittedChainageM: number } | null;
  lastWearMm: number | null;
  lastMeasuredAt: string | null;
  lastConditions: DiscCondition[];
}

export interface FittedPeriod {
  id: string;
  cutterId: string;
  serial: string;
  fittedAt: string;
  fittedChainageM: number;
  fittedRing: number | null;
  removedAt: string | null;
  removedChainageM: number | null;
  removedRing: number | null;
  removalReason: string | null;
  removalConditions: DiscCondition[] | null;
}

export interface Measurement {
  id: string;
  wearMm: number | null;
  conditions: DiscCondition[];
  action: 'none' | 'changed';
  note: string;
  remeasured: boolean;
  recordedAt: string;
  roundAt: string;
  chainageM: number;
  ringNumber: number | null;
  fittingId: string | null;
  serial: string | null;
  removedSerial: string | null;
  fittedSerial: string | null;
  changeReason: string | null;
}

export interface PositionDetail {
  position: Omit<LayoutPosition, 'current' | 'lastWearMm' | 'lastMeasuredAt' | 'lastConditions'>;
  periods: FittedPeriod[];
  measurements: Measurement[];
  photos: { id: string; entryId: string; createdAt: string; mimeType: string }[];
}

/** The most measurements per position GET …/positions/history answers. */
export const POSITION_HISTORY_MAX = 200;

/** GET …/positions/history?last=N: the newest N measurements of every position (named by the caller, 1–200). */
export const positionHistoryQuerySchema = z.object({
  last: wholeNumberText('The number of measurements per position (?last=)', POSITION_HISTORY_MAX).refine(
    (n) => n >= 1,
    'The number of measurements per position (?last=) must be at least 1.',
  ),
});

/** One position's recent history: as GET …/positions/:id answers, with only the newest measurements (and their photos). */
export interface PositionHistory extends PositionDetail {
  /** Older measurements left out of this answer (0: the whole history is here). */
  olderMeasurements: number;
}

/** Every position of a drive with its recent history, in one read (kept on the tablet for offline use, decision 42). */
export interface PositionHistories {
  /** When the server read it (ISO). */
  readAt: string;
  /** The newest measurements kept per position. */
  last: number;
  positions: PositionHistory[];
}

export interface LayoutSaved {
  created: number;
  updated: number;
  unchanged: number;
  /** From a CSV import: columns the import did not read, by row and column. */
  warnings?: { row: number; column: string; message: string }[];
}
