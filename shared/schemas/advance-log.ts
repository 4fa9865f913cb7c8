import { z } from 'zod';

/**
 * Rows of the two CSV imports after their columns have been mapped: the advance log (one row per
 * ring or stroke) and the geology long section. Shared by the import engine (server) and the
 * column-mapping screen (client). Values not given are null; unmapped columns of the advance log
 * are kept as text in `extra`.
 */

/** How a cell is read: a number (decimal point or, for a whole file, decimal comma), a date and time, text, or yes/no. */
export type CsvValueType = 'number' | 'time' | 'text' | 'yesNo';

/** One target field of an import: its label (with unit) and the header names it is recognised by. */
export interface CsvFieldInfo<F extends string> {
  field: F;
  label: string;
  type: CsvValueType;
  /** Header names that map to this field, compared ignoring case, punctuation and a trailing unit. */
  synonyms: readonly string[];
}

/** Target field → header of the source column, as chosen on the mapping screen. */
export type ColumnMapping<F extends string> = Partial<Record<F, string>>;

// ----- advance log -----

export const advanceLogFieldNames = [
  'ringNumber',
  'startTime',
  'endTime',
  'chainageStartM',
  'chainageEndM',
  'revolutions',
  'penetrationMmPerRev',
  'rpm',
  'thrustKn',
  'torqueKnm',
] as const;
export type AdvanceLogField = (typeof advanceLogFieldNames)[number];

export const advanceLogFields: readonly CsvFieldInfo<AdvanceLogField>[] = [
  { field: 'ringNumber', label: 'Ring / stroke number', type: 'number', synonyms: ['ring', 'ring no', 'ring nr', 'ring number', 'ring id', 'stroke', 'stroke no', 'stroke number'] },
  { field: 'startTime', label: 'Start time', type: 'time', synonyms: ['start time', 'start', 'begin', 'begin time', 'started', 'start date time', 'start datetime', 'time start'] },
  { field: 'endTime', label: 'End time', type: 'time', synonyms: ['end time', 'end', 'finish', 'finish time', 'finished', 'end date time', 'end datetime', 'time end'] },
  { field: 'chainageStartM', label: 'Chainage start (m)', type: 'number', synonyms: ['chainage start', 'chainage from', 'start chainage', 'from chainage', 'ch start', 'ch from', 'from'] },
  { field: 'chainageEndM', label: 'Chainage end (m)', type: 'number', synonyms: ['chainage end', 'chainage to', 'end chainage', 'to chainage', 'ch end', 'ch to', 'to'] },
  { field: 'revolutions', label: 'Cutterhead revolutions', type: 'number', synonyms: ['revolutions', 'cutterhead revolutions', 'revs', 'cutterhead revs', 'rev count'] },
  { field: 'penetrationMmPerRev', label: 'Penetration (mm/rev)', type: 'number', synonyms: ['penetration', 'pen', 'penetration per rev', 'penetration per revolution'] },
  { field: 'rpm', label: 'Cutterhead speed (rpm)', type: 'number', synonyms: ['rpm', 'cutterhead speed', 'cutterhead rpm', 'rotation speed'] },
  { field: 'thrustKn', label: 'Thrust (kN)', type: 'number', synonyms: ['thrust', 'total thrust', 'thrust force'] },
  { field: 'torqueKnm', label: 'Torque (kN·m)', type: 'number', synonyms: ['torque', 'cutterhead torque'] },
];

/** Each inner list needs at least one mapped column: revolutions may come from penetration instead. */
export const advanceLogRequiredColumns: readonly (readonly AdvanceLogField[])[] = [
  ['ringNumber'],
  ['startTime'],
  ['endTime'],
  ['chainageStartM'],
  ['chainageEndM'],
  ['revolutions', 'penetrationMmPerRev'],
];

/** For a cross-field refinement: run it only when none of `fields` already failed. */
const whenValid =
  (...fields: string[]) =>
  (payload: { issues: readonly { path?: readonly PropertyKey[] }[] }) =>
    !payload.issues.some((issue) => fields.includes(String(issue.path?.[0])));

const isoWithOffset = (what: string) =>
  z.iso.datetime({ offset: true, error: `${what} is missing or is not a date and time with its UTC offset.` });

const nullableAtLeastZero = (what: string) =>
  z.number().min(0, `${what} cannot be negative; leave the cell empty when it was not recorded.`).nullable();

export const advanceLogRowSchema = z
  .object({
    ringNumber: z
      .number({ error: 'The ring number is empty; every row needs one.' })
      .int('The ring number must be a whole number.')
      .min(0, 'The ring number cannot be negative.'),
    /** ISO 8601 with offset, in the project's time zone. */
    startTime: isoWithOffset('The start time'),
    endTime: isoWithOffset('The end time'),
    chainageStartM: z.number({ error: 'The chainage at the start of the stroke is empty; every row needs one.' }),
    chainageEndM: z.number({ error: 'The chainage at the end of the stroke is empty; every row needs one.' }),
    /** Measured cutterhead revolutions over the stroke; null when only penetration is logged. */
    revolutions: nullableAtLeastZero('Cutterhead revolutions'),
    penetrationMmPerRev: z
      .number()
      .positive('Penetration must be greater than 0 mm/rev; leave the cell empty when it was not recorded.')
      .nullable(),
    rpm: nullableAtLeastZero('Cutterhead speed'),
    thrustKn: nullableAtLeastZero('Thrust'),
    torqueKnm: nullableAtLeastZero('Torque'),
    /** Columns of the file that map to no field, by header, as text. */
    extra: z.record(z.string(), z.string()),
  })
  .refine((row) => Date.parse(row.endTime) > Date.parse(row.startTime), {
    path: ['endTime'],
    message: 'The end time is not after the start time; check both times of this stroke.',
    when: whenValid('startTime', 'endTime'),
  })
  .refine((row) => row.revolutions !== null || row.penetrationMmPerRev !== null, {
    path: ['revolutions'],
    message: 'Neither revolutions nor penetration is given; the rolled distance needs one of them.',
    when: whenValid('revolutions', 'penetrationMmPerRev'),
  });
export type AdvanceLogRow = z.infer<typeof advanceLogRowSchema>;

export const advanceLogColumnMappingSchema = z.partialRecord(z.enum(advanceLogFieldNames), z.string().trim().min(1));
export type AdvanceLogColumnMapping = ColumnMapping<AdvanceLogField>;

// ----- geology long section -----

export const geologySectionFieldNames = [
  'chainageFromM',
  'chainageToM',
  'groundTypeName',
  'waterHeadM',
  'stopAllowed',
  'stopReason',
] as const;
export type GeologySectionField = (typeof geologySectionFieldNames)[number];

export const geologySectionFields: readonly CsvFieldInfo<GeologySectionField>[] = [
  { field: 'chainageFromM', label: 'Chainage from (m)', type: 'number', synonyms: ['chainage from', 'from chainage', 'from', 'ch from', 'chainage start', 'start chainage', 'start'] },
  { field: 'chainageToM', label: 'Chainage to (m)', type: 'number', synonyms: ['chainage to', 'to chainage', 'to', 'ch to', 'chainage end', 'end chainage', 'end'] },
  { field: 'groundTypeName', label: 'Ground type', type: 'text', synonyms: ['ground type', 'ground', 'geology', 'rock type', 'lithology', 'ground class'] },
  { field: 'waterHeadM', label: 'Water head above axis (m)', type: 'number', synonyms: ['water head above axis', 'water head', 'groundwater head', 'head above axis', 'water level above axis'] },
  { field: 'stopAllowed', label: 'Stop allowed (yes/no)', type: 'yesNo', synonyms: ['stop allowed', 'stops allowed', 'stopping allowed', 'can stop', 'intervention allowed'] },
  { field: 'stopReason', label: 'Stop reason', type: 'text', synonyms: ['stop reason', 'reason', 'stop note', 'stop remark'] },
];

export const geologySectionRequiredColumns: readonly (readonly GeologySectionField[])[] = [
  ['chainageFromM'],
  ['chainageToM'],
  ['groundTypeName'],
  ['stopAllowed'],
];

export const geologySectionRowSchema = z
  .object({
    chainageFromM: z.number({ error: 'Chainage from is empty; every section needs one.' }),
    /** Greater than chainageFromM whatever the drive direction (see shared/domain/geology.ts). */
    chainageToM: z.number({ error: 'Chainage to is empty; every section needs one.' }),
    // Limits as in shared/schemas/geology.ts, so rows that pass here also pass the section input.
    groundTypeName: z.string({ error: 'The ground type is empty; name the ground of this section.' }).min(1).max(80, 'Keep the ground type name to 80 characters.'),
    waterHeadM: z
      .number()
      .min(0, 'The water head above the tunnel axis cannot be negative; leave it empty when unknown.')
      .max(500, 'The water head above the tunnel axis must be at most 500 m.')
      .nullable(),
    stopAllowed: z.boolean({ error: 'Say whether a stop is allowed in this section: yes or no.' }),
    stopReason: z.string().max(300, 'Keep the stop reason to 300 characters.').nullable(),
  })
  .refine((row) => row.chainageToM > row.chainageFromM, {
    path: ['chainageToM'],
    message: 'Chainage to must be greater than chainage from: give the lower chainage as "from", whatever the drive direction.',
    when: whenValid('chainageFromM', 'chainageToM'),
  })
  .refine((row) => row.stopAllowed || row.stopReason !== null, {
    path: ['stopReason'],
    message: 'Say why no stop is allowed in this section (for example: fault zone).',
    when: whenValid('stopAllowed', 'stopReason'),
  });
export type GeologySectionRow = z.infer<typeof geologySectionRowSchema>;

export const geologySectionColumnMappingSchema = z.partialRecord(z.enum(geologySectionFieldNames), z.string().trim().min(1));
export type GeologySectionColumnMapping = ColumnMapping<GeologySectionField>;

/** One ring or stroke of the advance log as GET /strokes sends it. */
export interface Stroke {
  id: number;
  ringNumber: number;
  startTime: string;
  endTime: string;
  chainageStartM: number;
  chainageEndM: number;
  revolutions: number | null;
  penetrationMmPerRev: number | null;
  rpm: number | null;
  thrustKn: number | null;
  torqueKnm: number | null;
}

export interface StrokePage {
  rows: Stroke[];
  total: number;
  page: number;
  pageSize: number;
}

/** Metres advanced on one calendar day of the site. */
export interface DailyAdvance {
  day: string;
  advanceM: number;
  strokes: number;
}

export interface AdvanceLogMapping {
  /** Field → header, remembered from the last import; null before the first. */
  mapping: Partial<Record<AdvanceLogField, string>> | null;
  fields: CsvFieldInfo<AdvanceLogField>[];
}
