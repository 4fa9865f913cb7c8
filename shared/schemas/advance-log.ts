import { z } from 'zod';
import { CHAINAGE_LIMIT_M, chainageM, CONTROL, freeText, INT32_MAX, instant, inWindow, requiredLine } from './fields';
import type { ColumnMapping, CsvFieldInfo } from '../csv-headers';

/**
 * Rows of the two CSV imports after their columns have been mapped: the advance log (one row per
 * ring or stroke) and the geology long section. Shared by the import engine (server) and the
 * column-mapping screen (client). Values not given are null; unmapped columns of the advance log
 * are kept as text in `extra`.
 */

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

/** For a cross-field refinement: run it only when none of `fields` already failed. */
const whenValid =
  (...fields: string[]) =>
  (payload: { issues: readonly { path?: readonly PropertyKey[] }[] }) =>
    !payload.issues.some((issue) => fields.includes(String(issue.path?.[0])));

/** The longest value of an extra column (characters). */
const EXTRA_MAX_CHARS = 10_000;

const isoWithOffset = (what: string) => instant(what, `${what} is missing or is not a date and time with its UTC offset.`);

const nullableAtLeastZero = (what: string) =>
  z.number().min(0, `${what} cannot be negative; leave the cell empty when it was not recorded.`).nullable();

export const advanceLogRowSchema = z
  .object({
    ringNumber: z
      .number({ error: 'The ring number is empty; every row needs one.' })
      .int('The ring number must be a whole number.')
      .min(0, 'The ring number cannot be negative.')
      .max(INT32_MAX, `The ring number must be at most ${INT32_MAX.toLocaleString('en')}.`),
    /** ISO 8601 with offset, in the project's time zone. */
    startTime: isoWithOffset('The start time'),
    endTime: isoWithOffset('The end time'),
    chainageStartM: chainageM(
      'The chainage at the start of the stroke',
      'The chainage at the start of the stroke is empty; every row needs one.',
    ),
    chainageEndM: chainageM(
      'The chainage at the end of the stroke',
      'The chainage at the end of the stroke is empty; every row needs one.',
    ),
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
    extra: z.record(z.string(), freeText('An extra column', EXTRA_MAX_CHARS)),
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

/** The ISO 8601 form `instant` (z.iso.datetime with an offset) accepts. */
const ISO_INSTANT = z.regexes.datetime({ offset: true });
const isInstant = (v: unknown): v is string => typeof v === 'string' && ISO_INSTANT.test(v) && inWindow(Date.parse(v));
const isChainage = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v) && Math.abs(v) <= CHAINAGE_LIMIT_M;
const isNullableAtLeastZero = (v: unknown) => v === null || (typeof v === 'number' && Number.isFinite(v) && v >= 0);

/**
 * A quick yes to `advanceLogRowSchema`, without building zod's result objects: true only for a
 * candidate the schema accepts unchanged (its extra values already trimmed), so an import of
 * 10,000 good rows allocates nothing per row for checking (decision 46). False does not mean
 * invalid: the caller then asks the schema, whose issues (and messages) stay the one source.
 * tests/server/advance-log-row-check.test.ts holds the two together.
 */
export function isAdvanceLogRow(c: Record<string, unknown>): c is AdvanceLogRow {
  const ring = c.ringNumber;
  if (typeof ring !== 'number' || !Number.isInteger(ring) || ring < 0 || ring > INT32_MAX) return false;
  if (!isInstant(c.startTime) || !isInstant(c.endTime) || !(Date.parse(c.endTime) > Date.parse(c.startTime))) return false;
  if (!isChainage(c.chainageStartM) || !isChainage(c.chainageEndM)) return false;
  const revolutions = c.revolutions;
  const penetration = c.penetrationMmPerRev;
  if (!isNullableAtLeastZero(revolutions) || !isNullableAtLeastZero(c.rpm) || !isNullableAtLeastZero(c.thrustKn)) return false;
  if (!isNullableAtLeastZero(c.torqueKnm)) return false;
  if (penetration !== null && !(typeof penetration === 'number' && Number.isFinite(penetration) && penetration > 0)) return false;
  if (revolutions === null && penetration === null) return false;
  const extra = c.extra;
  if (typeof extra !== 'object' || extra === null || Array.isArray(extra) || Object.getPrototypeOf(extra) !== Object.prototype)
    return false;
  for (const key in extra) {
    const v = (extra as Record<string, unknown>)[key];
    if (typeof v !== 'string' || v.length > EXTRA_MAX_CHARS || CONTROL.test(v) || (v.length > 0 && v.trim() !== v)) return false;
  }
  return true;
}

export const advanceLogColumnMappingSchema = z.partialRecord(
  z.enum(advanceLogFieldNames),
  requiredLine('A column name', 200, 'Choose a column of the file.'),
);
export type AdvanceLogColumnMapping = ColumnMapping<AdvanceLogField>;

// ----- geology long section -----

export const geologySectionFieldNames = [
  'chainageFromM',
  'chainageToM',
  'groundTypeName',
  'waterHeadM',
  'stopAllowed',
  'stopReason',
  'ucsMpa',
  'cai',
] as const;
export type GeologySectionField = (typeof geologySectionFieldNames)[number];

export const geologySectionRowSchema = z
  .object({
    chainageFromM: chainageM('Chainage from', 'Chainage from is empty; every section needs one.'),
    /** Greater than chainageFromM whatever the drive direction (see shared/domain/geology.ts). */
    chainageToM: chainageM('Chainage to', 'Chainage to is empty; every section needs one.'),
    // Limits as in shared/schemas/geology.ts, so rows that pass here also pass the section input.
    groundTypeName: requiredLine('The ground type name', 80, 'The ground type is empty; name the ground of this section.'),
    waterHeadM: z
      .number()
      .min(0, 'The water head above the tunnel axis cannot be negative; leave it empty when unknown.')
      .max(500, 'The water head above the tunnel axis must be at most 500 m.')
      .nullable(),
    stopAllowed: z.boolean({ error: 'Say whether a stop is allowed in this section: yes or no.' }),
    stopReason: freeText('The stop reason', 300).nullable(),
    /**
     * Properties of the section's ground type when the file gives them (limits as in
     * shared/schemas/geology.ts); undefined, not null, when it does not.
     */
    ucsMpa: z
      .number()
      .min(0, 'UCS cannot be negative.')
      .max(500, 'UCS must be at most 500 MPa.')
      .nullable()
      .transform((v) => v ?? undefined),
    cai: z
      .number()
      .min(0, 'CAI cannot be negative.')
      .max(7, 'CAI must be at most 7 (the Cerchar scale ends there).')
      .nullable()
      .transform((v) => v ?? undefined),
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

export const geologySectionColumnMappingSchema = z.partialRecord(
  z.enum(geologySectionFieldNames),
  requiredLine('A column name', 200, 'Choose a column of the file.'),
);
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

/** The column mapping of one import as GET …/mapping sends it, remembered per project. */
export interface ImportMapping<F extends string> {
  /** Field → header, remembered from the last import; null before the first. */
  mapping: ColumnMapping<F> | null;
  fields: CsvFieldInfo<F>[];
}
export type AdvanceLogMapping = ImportMapping<AdvanceLogField>;
export type GeologyMapping = ImportMapping<GeologySectionField>;

/**
 * A problem in, or a note about, an uploaded CSV file (server/lib/csv reads it; an import's answer
 * lists its notes as `warnings`, e.g. a column it did not read). `row` is the 1-based line of the
 * file (the header is line 1; a row that spans lines inside quotes has the line it starts on), 0
 * for the file as a whole. `column` is the header as written in the file, the field's label when
 * the file has no such column, '' for a whole row or file.
 */
export interface CsvIssue {
  row: number;
  column: string;
  message: string;
}

/** The delimiters a CSV file may use (server/lib/csv/detect.ts finds which). */
export type CsvDelimiter = ',' | ';' | '\t';

/** What an import found out about the file: its format, and the header each field was read from. */
export interface ImportDetected<F extends string> {
  bom: boolean;
  /** Null when the file was refused before its delimiter was known. */
  delimiter: CsvDelimiter | null;
  decimalComma: boolean;
  /** Field → header of the column it was read from. */
  mapping: ColumnMapping<F>;
}

/** POST /strokes/import: 201 when rings were stored or replaced, else 200. */
export interface AdvanceLogImported {
  inserted: number;
  unchanged: number;
  replaced: number;
  warnings: CsvIssue[];
  detected: ImportDetected<AdvanceLogField>;
}

/** POST /geology/import (201): the long section is replaced by the file's sections. */
export interface GeologyImported {
  saved: number;
  warnings: CsvIssue[];
  detected: ImportDetected<GeologySectionField>;
}
