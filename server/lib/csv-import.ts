/**
 * Reading advance-log and geology CSV uploads: streamed, size-limited, every row validated, every
 * problem reported by line and column so a planner can fix the file and upload it again. No
 * database here: the caller imports the rows (all or nothing) when the result is ok.
 *
 * Rules, in the order they apply:
 * - Size: more than `maxBytes` (default 50 MB) → refused, reading stops at once; more than
 *   `maxRows` (default 50,000) data rows → refused.
 * - Content: the first 64 KB decide. A UTF-8 byte-order mark is noted and dropped. NUL bytes or
 *   bytes that are not UTF-8 → not a text file (a spreadsheet workbook is named as such). Later
 *   bytes that are not UTF-8 also refuse the file.
 * - Delimiter (see detectCsvFormat): comma, semicolon or tab, whichever splits the header row
 *   into at least two columns and splits the most of the next 19 lines into the same number of
 *   columns; ties go to the one giving more columns, then comma before semicolon before tab.
 * - Decimal comma: only in semicolon or tab files, when a value in those first lines looks like
 *   12,5. The whole file is then read that way; a number written the other way is an error
 *   rather than a guess (1.250 could be 1250 or 1.25).
 * - Header: the first non-blank line names the columns; none of its cells may look like a value.
 *   Columns are matched to fields by the synonyms in shared/schemas/advance-log.ts, ignoring
 *   case, punctuation and a trailing unit ("Thrust [kN]" = "thrust"); a mapping passed in wins.
 * - Times: ISO 8601 date and time ("2026-03-14T06:30", "T" or a space, seconds and fraction
 *   optional, offset "Z"/"+01:00"/"+0100" optional) or day first "DD.MM.YYYY HH:mm[:ss]" (day,
 *   month and hour may have one digit). Without an offset the time is local to the project's time
 *   zone; a local time skipped by a clock change is an error; one repeated by a clock change
 *   takes the later (standard-time) reading. A file mixing the two formats is an
 *   error. Times come out in ISO 8601 with the project's offset, to the second.
 * - Blank lines and lines of separators only are skipped.
 * - Advance log, between rows: ring numbers are unique in the file; rows are in order (each ring
 *   number above the previous row's, its chainage start not behind the previous row's in the
 *   drive direction, its start time not earlier). Strokes are half-open intervals of chainage
 *   [lower, higher) and of time [start, end): two strokes overlapping by more than 1 mm of
 *   chainage, or by any time at all, are an error (touching is fine); a chainage gap of more
 *   than 1 mm is a warning.
 * - Geology: sections [from, to) must not overlap at all; a gap between them is a warning.
 * - Checks between rows use only the rows without errors of their own; after fixing those, an
 *   upload may show further errors.
 */
import { Readable, pipeline } from 'node:stream';
import { CsvError, parse, type Info } from 'csv-parse';
import { tzOffset } from '@date-fns/tz';
import type { z } from 'zod';
import {
  advanceLogFields,
  advanceLogRequiredColumns,
  advanceLogRowSchema,
  geologySectionFields,
  geologySectionRequiredColumns,
  geologySectionRowSchema,
  type AdvanceLogField,
  type AdvanceLogRow,
  type ColumnMapping,
  type CsvFieldInfo,
  type GeologySectionField,
  type GeologySectionRow,
} from '../../shared/schemas/advance-log';
import type { driveDirections } from '../../shared/schemas/project';

export type CsvDelimiter = ',' | ';' | '\t';
export type DriveDirection = (typeof driveDirections)[number];

/**
 * A problem in a file. `row` is the 1-based line of the file (the header is line 1; a row that
 * spans lines inside quotes has the line it starts on), 0 for the file as a whole. `column` is
 * the header as written in the file, the field's label when the file has no such column, '' for
 * a whole row or file.
 */
export interface CsvIssue {
  row: number;
  column: string;
  message: string;
}

export interface CsvFormat {
  bom: boolean;
  delimiter: CsvDelimiter;
  decimalComma: boolean;
}

export type CsvFormatDetection = ({ ok: true } & CsvFormat) | { ok: false; bom: boolean; error: CsvIssue };

export interface CsvDetected<F extends string> {
  bom: boolean;
  /** Null when the file was refused before its delimiter was known. */
  delimiter: CsvDelimiter | null;
  decimalComma: boolean;
  /** Field → header of the column it was read from. */
  mapping: ColumnMapping<F>;
}

export interface CsvProgress {
  bytesRead: number;
  /** Data rows parsed so far (header and blank lines not counted). */
  rowsParsed: number;
}

export interface CsvReadOptions<F extends string> {
  /** Columns chosen by the user; fields left out are matched by header name. */
  mapping?: ColumnMapping<F>;
  maxBytes?: number;
  maxRows?: number;
  /** Length of the error list returned (the count covers all); warnings are capped the same. */
  maxErrors?: number;
  /** Called after each chunk read and once at the end. */
  onProgress?: (progress: CsvProgress) => void;
}

export interface AdvanceLogReadOptions extends CsvReadOptions<AdvanceLogField> {
  /** IANA time zone of the site, for times written without an offset. */
  timeZone: string;
  direction: DriveDirection;
}

export interface CsvLineRow<Row> {
  /** Line of the file the row starts on. */
  line: number;
  data: Row;
}

export type CsvImportResult<Row, F extends string> =
  | { ok: true; rows: CsvLineRow<Row>[]; warnings: CsvIssue[]; detected: CsvDetected<F> }
  | { ok: false; errors: CsvIssue[]; errorCount: number; warnings: CsvIssue[]; detected: CsvDetected<F> };

const MB = 1024 * 1024;
export const DEFAULT_MAX_BYTES = 50 * MB;
export const DEFAULT_MAX_ROWS = 50_000;
const DEFAULT_MAX_ERRORS = 200;
const SAMPLE_BYTES = 64 * 1024;
const SAMPLE_LINES = 20;
const MAX_RECORD_CHARS = 64 * 1024;
/** Strokes may touch or overlap by up to 1 mm of chainage (rounding of logged chainage); more is an overlap or a gap. */
const STROKE_CHAINAGE_TOLERANCE_M = 0.001;

const DELIMITERS: readonly CsvDelimiter[] = [',', ';', '\t'];
const DELIMITER_NAMES: Record<CsvDelimiter, string> = { ',': 'comma', ';': 'semicolon', '\t': 'tab' };
const POINT_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;
const COMMA_NUMBER = /^[+-]?(\d+(,\d*)?|,\d+)$/;
const DECIMAL_COMMA_VALUE = /^[+-]?\d+,\d+$/;
const ISO_TIME = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d+))?)?\s*(Z|[+-]\d{2}(?::?\d{2})?)?$/i;
const DAY_FIRST_TIME = /^(\d{1,2})\.(\d{1,2})\.(\d{4}) +(\d{1,2}):(\d{2})(?::(\d{2}))?$/;
const TIME_EXAMPLES = '2026-03-14T06:30 (ISO 8601, optionally with an offset like +01:00) or 14.03.2026 06:30';

type TimeFormat = 'iso' | 'dayFirst';
const TIME_FORMAT_NAMES: Record<TimeFormat, string> = { iso: 'YYYY-MM-DD hh:mm (ISO 8601)', dayFirst: 'DD.MM.YYYY hh:mm' };

const fileIssue = (message: string): CsvIssue => ({ row: 0, column: '', message });

/** Raised inside the reading pipeline to refuse the whole file. */
class FileRefused extends Error {
  constructor(readonly issue: CsvIssue) {
    super(issue.message);
  }
}

// ----- format detection -----

/** Splits text into lines, keeping line breaks inside double quotes; drops a last line that may be cut unless the text is the whole file. */
function sampleLines(text: string, isWholeFile: boolean): string[] {
  const lines: string[] = [];
  let start = 0;
  let inQuotes = false;
  for (let i = 0; i < text.length && lines.length < SAMPLE_LINES; i += 1) {
    const ch = text[i];
    if (ch === '"') inQuotes = !inQuotes;
    else if (!inQuotes && (ch === '\n' || ch === '\r')) {
      lines.push(text.slice(start, i));
      if (ch === '\r' && text[i + 1] === '\n') i += 1;
      start = i + 1;
    }
  }
  if (lines.length < SAMPLE_LINES && start < text.length && (isWholeFile || lines.length === 0)) lines.push(text.slice(start));
  return lines.filter((line) => /[^,;\t"\s]/.test(line));
}

/** Fields of one line split at `delimiter` outside double quotes, quotes removed. */
function splitFields(line: string, delimiter: string): string[] {
  const fields: string[] = [];
  let field = '';
  let inQuotes = false;
  for (const ch of line) {
    if (ch === '"') inQuotes = !inQuotes;
    else if (ch === delimiter && !inQuotes) {
      fields.push(field);
      field = '';
    } else field += ch;
  }
  fields.push(field);
  return fields;
}

const startsWith = (bytes: Uint8Array, prefix: readonly number[]) => prefix.every((b, i) => bytes[i] === b);

/**
 * Reads the first chunk of a file (64 KB is plenty): BOM, delimiter and decimal comma, or why the
 * file cannot be a CSV text file. `isWholeFile` says the chunk is the entire file, so its last
 * line is complete. Rules: see the comment at the top of this file.
 */
export function detectCsvFormat(firstChunk: Uint8Array, isWholeFile = false): CsvFormatDetection {
  const bom = startsWith(firstChunk, [0xef, 0xbb, 0xbf]);
  const refuse = (error: CsvIssue): CsvFormatDetection => ({ ok: false, bom, error });
  // Zip (xlsx, ods) and OLE2 (xls) containers.
  if (startsWith(firstChunk, [0x50, 0x4b, 0x03, 0x04]) || startsWith(firstChunk, [0xd0, 0xcf, 0x11, 0xe0])) {
    return refuse(fileIssue('This is a spreadsheet workbook, not a CSV file. Open it in the spreadsheet program and save it as "CSV UTF-8", then upload that file.'));
  }
  if (firstChunk.includes(0)) {
    return refuse(fileIssue('This is not a text file (it contains NUL bytes). Upload the advance log or long section saved as CSV text.'));
  }
  let text: string;
  try {
    // Drops the BOM; { stream: true } tolerates a character cut at the end of the chunk.
    text = new TextDecoder('utf-8', { fatal: true }).decode(firstChunk, { stream: true });
  } catch {
    return refuse(fileIssue('The file is not UTF-8 text (it may be saved in an older encoding such as Windows-1252, or not be text at all). Save it as "CSV UTF-8" and upload it again.'));
  }
  const lines = sampleLines(text, isWholeFile);
  if (lines.length === 0) return refuse(fileIssue('The file is empty.'));
  const [header, ...data] = lines;
  let best: { delimiter: CsvDelimiter; columns: number; score: number } | null = null;
  for (const delimiter of DELIMITERS) {
    const columns = splitFields(header, delimiter).length;
    if (columns < 2) continue;
    const score = data.filter((line) => splitFields(line, delimiter).length === columns).length;
    if (!best || score > best.score || (score === best.score && columns > best.columns)) best = { delimiter, columns, score };
  }
  if (!best) {
    const hint = header.includes('|') ? " It seems to use '|'." : '';
    return refuse({
      row: 1,
      column: '',
      message: `The first line has no comma, semicolon or tab between column names, so its columns cannot be told apart.${hint} Save the file as CSV with commas, semicolons or tabs between values.`,
    });
  }
  const { delimiter } = best;
  const decimalComma = delimiter !== ',' && data.some((line) => splitFields(line, delimiter).some((field) => DECIMAL_COMMA_VALUE.test(field.trim())));
  return { ok: true, bom, delimiter, decimalComma };
}

// ----- cells -----

type Cell = { ok: true; value: unknown; timeFormat?: TimeFormat } | { ok: false; message: string };

function readNumber(raw: string, label: string, decimalComma: boolean): Cell {
  if (decimalComma ? COMMA_NUMBER.test(raw) : POINT_NUMBER.test(raw)) return { ok: true, value: Number(raw.replace(',', '.')) };
  if (decimalComma && POINT_NUMBER.test(raw)) {
    return { ok: false, message: `'${raw}' has a decimal point, but this file writes decimals with a comma (like 12,5): write ${raw.replace('.', ',')}.` };
  }
  if (!decimalComma && /^[+-]?[\d,]+(\.\d+)?$/.test(raw)) {
    return { ok: false, message: `'${raw}' has a comma, but this file writes numbers with a decimal point and no thousands separator (like 12.5 or 16000).` };
  }
  return { ok: false, message: `${label} must be a number; '${raw}' is not one.` };
}

const offsetMs = (timeZone: string, instantMs: number) => tzOffset(timeZone, new Date(instantMs)) * 60_000;

/**
 * The instant (ms) at which clocks in `timeZone` show `wallMs` (that wall time written as if UTC);
 * null when a clock change skips it. A wall time shown twice gives the later, standard-time instant.
 */
function localToInstantMs(wallMs: number, timeZone: string): number | null {
  const guessMs = wallMs - offsetMs(timeZone, wallMs);
  const instantMs = wallMs - offsetMs(timeZone, guessMs);
  return instantMs + offsetMs(timeZone, instantMs) === wallMs ? instantMs : null;
}

/** ISO 8601 to the second with the offset `timeZone` has at that instant, e.g. 2026-03-14T06:00:00+01:00. */
function isoInZone(instantMs: number, timeZone: string): string {
  const offsetMin = offsetMs(timeZone, instantMs) / 60_000;
  const wall = new Date(instantMs + offsetMin * 60_000).toISOString().slice(0, 19);
  const abs = Math.abs(offsetMin);
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${wall}${offsetMin < 0 ? '-' : '+'}${pad(Math.floor(abs / 60))}:${pad(abs % 60)}`;
}

function readTime(raw: string, label: string, timeZone: string): Cell {
  let parts: number[];
  let offset: string | undefined;
  let timeFormat: TimeFormat;
  const iso = ISO_TIME.exec(raw);
  const dayFirst = iso ? null : DAY_FIRST_TIME.exec(raw);
  if (iso) {
    const ms = Number((iso[7] ?? '0').slice(0, 3).padEnd(3, '0'));
    parts = [...iso.slice(1, 7).map((p) => Number(p ?? 0)), ms];
    offset = iso[8];
    timeFormat = 'iso';
  } else if (dayFirst) {
    const [, day, month, year, hour, minute, second] = dayFirst;
    parts = [year, month, day, hour, minute, second ?? '0', '0'].map(Number);
    timeFormat = 'dayFirst';
  } else {
    return { ok: false, message: `${label}: '${raw}' is not a date and time Kerfwise reads. Write ${TIME_EXAMPLES}.` };
  }
  const [year, month, day, hour, minute, second, ms] = parts;
  const calendar = new Date(Date.UTC(year, month - 1, day, hour, minute, second, ms));
  const real =
    calendar.getUTCFullYear() === year &&
    calendar.getUTCMonth() === month - 1 &&
    calendar.getUTCDate() === day &&
    calendar.getUTCHours() === hour &&
    calendar.getUTCMinutes() === minute &&
    calendar.getUTCSeconds() === second;
  if (!real) return { ok: false, message: `${label}: '${raw}' is not a real date and time.` };
  let instantMs: number;
  if (offset) {
    const sign = offset.startsWith('-') ? -1 : 1;
    const digits = offset.replace(/[^0-9]/g, '');
    const offsetMin = offset.toUpperCase() === 'Z' ? 0 : sign * (Number(digits.slice(0, 2)) * 60 + Number(digits.slice(2) || 0));
    if (Math.abs(offsetMin) > 14 * 60) return { ok: false, message: `${label}: '${raw}' has a UTC offset beyond ±14:00.` };
    instantMs = calendar.getTime() - offsetMin * 60_000;
  } else {
    const local = localToInstantMs(calendar.getTime(), timeZone);
    if (local === null) {
      return {
        ok: false,
        message: `${label}: '${raw}' does not exist in ${timeZone} (the clocks jump forward over it). Give the time with its UTC offset, like 2026-03-29T02:30+01:00.`,
      };
    }
    instantMs = local;
  }
  return { ok: true, value: isoInZone(instantMs, timeZone), timeFormat };
}

function readCell(info: CsvFieldInfo<string>, raw: string, decimalComma: boolean, timeZone: string | undefined): Cell {
  if (raw === '') return { ok: true, value: null };
  switch (info.type) {
    case 'number':
      return readNumber(raw, info.label, decimalComma);
    case 'time':
      if (timeZone === undefined) throw new Error(`No time zone given to read ${info.label}.`);
      return readTime(raw, info.label, timeZone);
    case 'yesNo':
      if (/^(yes|y|true|1)$/i.test(raw)) return { ok: true, value: true };
      if (/^(no|n|false|0)$/i.test(raw)) return { ok: true, value: false };
      return { ok: false, message: `${info.label}: write yes or no; '${raw}' is neither.` };
    case 'text':
      return { ok: true, value: raw };
  }
}

const looksLikeValue = (cell: string) => POINT_NUMBER.test(cell) || COMMA_NUMBER.test(cell) || ISO_TIME.test(cell) || DAY_FIRST_TIME.test(cell);

// ----- header → columns -----

/** Lower case, bracketed text and a trailing unit removed, then letters and digits only: "Thrust [kN]" → "thrust". */
function normalizeHeader(header: string): string {
  let name = header.toLowerCase().replace(/[([{][^)\]}]*[)\]}]/g, ' ').trim();
  const unit = /^(.*\S)\s+(mm\/rev|mm\/u|kn·m|kn\.m|kn-m|knm|kn|rpm|1\/min|mm|m)$/.exec(name);
  if (unit) name = unit[1];
  return name.replace(/[^a-z0-9]/g, '');
}

interface ColumnPlan<F extends string> {
  headers: string[];
  columns: Map<F, number>;
  /** Unmapped columns: key for `extra`, column index. */
  extra: [string, number][];
}

class IssueLog {
  readonly errors: CsvIssue[] = [];
  readonly warnings: CsvIssue[] = [];
  errorCount = 0;
  private readonly linesWithErrors = new Set<number>();

  constructor(private readonly maxErrors: number) {}

  error(issue: CsvIssue): void {
    this.errorCount += 1;
    this.linesWithErrors.add(issue.row);
    // A refusal of the whole file (row 0) is always kept, ahead of any row errors.
    if (issue.row === 0) this.errors.unshift(issue);
    else if (this.errors.length < this.maxErrors) this.errors.push(issue);
  }

  warning(issue: CsvIssue): void {
    if (this.warnings.length < this.maxErrors) this.warnings.push(issue);
  }

  hasError(line: number): boolean {
    return this.linesWithErrors.has(line);
  }
}

/** Reads the header row into a column plan; null (with errors logged) when it cannot be used. */
function planColumns<F extends string>(
  cells: string[],
  table: TableSpec<F, unknown>,
  explicit: ColumnMapping<F>,
  log: IssueLog,
): ColumnPlan<F> | null {
  const headers = cells.map((cell) => cell.trim());
  const errorsBefore = log.errorCount;
  const value = headers.find(looksLikeValue);
  if (value !== undefined) {
    const example = table.fields.slice(0, 4).map((f) => f.label).join(', ');
    log.error({ row: 1, column: '', message: `The first line holds values such as '${value}', not column names. Add a header row naming each column (for example ${example}).` });
    return null;
  }
  const firstIndex = new Map<string, number>();
  headers.forEach((header, i) => {
    if (header === '') return;
    const key = header.toLowerCase();
    const first = firstIndex.get(key);
    if (first === undefined) firstIndex.set(key, i);
    else log.error({ row: 1, column: header, message: `Two columns are named '${header}' (columns ${first + 1} and ${i + 1}). Rename or remove one.` });
  });
  if (log.errorCount > errorsBefore) return null;

  const columns = new Map<F, number>();
  const used = new Set<number>();
  for (const [field, wanted] of Object.entries(explicit) as [F, string | undefined][]) {
    if (wanted === undefined) continue;
    const name = wanted.trim();
    let index = headers.indexOf(name);
    if (index < 0) index = headers.findIndex((h) => h.toLowerCase() === name.toLowerCase());
    const label = table.fields.find((f) => f.field === field)?.label ?? field;
    if (index < 0) log.error({ row: 1, column: name, message: `The column mapping reads ${label} from '${name}', but the file has no column of that name.` });
    else {
      columns.set(field, index);
      used.add(index);
    }
  }
  const normalized = headers.map(normalizeHeader);
  for (const info of table.fields) {
    if (info.field in explicit) continue;
    const synonyms = new Set(info.synonyms.map(normalizeHeader));
    const matches = normalized.flatMap((name, i) => (!used.has(i) && synonyms.has(name) ? [i] : []));
    if (matches.length === 0) continue;
    columns.set(info.field, matches[0]);
    used.add(matches[0]);
    if (matches.length > 1) {
      const names = matches.map((i) => `'${headers[i]}'`).join(' and ');
      log.warning({ row: 1, column: headers[matches[0]], message: `Columns ${names} could each be ${info.label}; '${headers[matches[0]]}' was used. Choose another in the column mapping if that is wrong.` });
    }
  }
  for (const group of table.requiredColumns) {
    if (group.some((field) => columns.has(field))) continue;
    const infos = group.map((field) => table.fields.find((f) => f.field === field)!);
    const labels = infos.map((f) => f.label).join(' or ');
    const names = infos.map((f) => `'${f.synonyms[0]}'`).join(' or ');
    log.error({ row: 1, column: infos[0].label, message: `No column for ${labels} was found. Name a column ${names}, or choose one in the column mapping.` });
  }
  if (log.errorCount > errorsBefore) return null;
  const extra = headers.flatMap((header, i): [string, number][] => (used.has(i) ? [] : [[header || `column ${i + 1}`, i]]));
  return { headers, columns, extra };
}

// ----- tables -----

/** Reports a problem with a row's field by field name; the engine turns it into the column header. */
interface RowReport<F extends string> {
  error(line: number, field: F, message: string): void;
  warning(line: number, field: F, message: string): void;
}

interface TableSpec<F extends string, Row> {
  fields: readonly CsvFieldInfo<F>[];
  requiredColumns: readonly (readonly F[])[];
  schema: z.ZodType<Row>;
  /** Checks of one valid row that need the options or earlier rows, in file order. */
  checkRow(row: Row, line: number, report: RowReport<F>): void;
  /**
   * Checks between all rows without errors, once the file is read. `allRowsValid` is false when
   * some rows were left out for errors of their own: gaps are then not worth a warning.
   */
  finish(rows: readonly CsvLineRow<Row>[], report: RowReport<F>, allRowsValid: boolean): void;
}

interface Span<Row> {
  line: number;
  from: number;
  to: number;
  row: Row;
}

/**
 * Walks spans (half-open [from, to)) in order of `from`: a span starting more than `tolerance`
 * before the furthest end so far overlaps the span reaching that end; one starting more than
 * `tolerance` after it leaves a gap. Each span is reported at most once, so the cost is n log n.
 */
function sweepSpans<Row>(
  spans: Span<Row>[],
  tolerance: number,
  onOverlap: (later: Span<Row>, earlier: Span<Row>, from: number, to: number) => void,
  onGap: (before: Span<Row>, after: Span<Row>) => void,
): void {
  spans.sort((a, b) => a.from - b.from || a.to - b.to);
  let reach: Span<Row> | undefined;
  for (const span of spans) {
    if (reach && span.from < reach.to - tolerance) {
      const [later, earlier] = span.line > reach.line ? [span, reach] : [reach, span];
      onOverlap(later, earlier, span.from, Math.min(span.to, reach.to));
    } else if (reach && span.from > reach.to + tolerance) onGap(reach, span);
    if (!reach || span.to > reach.to) reach = span;
  }
}

/** Rounds chainage for messages (mm). */
const m = (chainageM: number) => String(Math.round(chainageM * 1000) / 1000);

function advanceLogTable(direction: DriveDirection): TableSpec<AdvanceLogField, AdvanceLogRow> {
  const sign = direction === 'increasing' ? 1 : -1;
  const ringLines = new Map<number, number>();
  let previous: CsvLineRow<AdvanceLogRow> | undefined;
  return {
    fields: advanceLogFields,
    requiredColumns: advanceLogRequiredColumns,
    schema: advanceLogRowSchema,
    checkRow(row, line, report) {
      const advanceM = sign * (row.chainageEndM - row.chainageStartM);
      if (advanceM <= 0) {
        const message =
          advanceM === 0
            ? `Chainage end equals chainage start (${m(row.chainageStartM)} m): a stroke must advance.`
            : `Chainage runs the wrong way: on this drive chainage ${direction === 'increasing' ? 'increases' : 'decreases'} as the machine advances, but this stroke goes from ${m(row.chainageStartM)} to ${m(row.chainageEndM)} m. Swap start and end, or check the drive direction of the project.`;
        report.error(line, 'chainageEndM', message);
        return;
      }
      const firstLine = ringLines.get(row.ringNumber);
      if (firstLine !== undefined) {
        report.error(line, 'ringNumber', `Ring ${row.ringNumber} is already on line ${firstLine}. Each ring may appear once; remove one of the two rows.`);
        return;
      }
      if (previous) {
        const { line: before, data: prev } = previous;
        if (row.ringNumber < prev.ringNumber) {
          report.error(line, 'ringNumber', `Rows out of order: ring ${row.ringNumber} comes after ring ${prev.ringNumber} (line ${before}). Sort the rows by ring number.`);
          return;
        }
        if (sign * (row.chainageStartM - prev.chainageStartM) < 0) {
          report.error(line, 'chainageStartM', `Rows out of order: this stroke starts at chainage ${m(row.chainageStartM)} m, behind ring ${prev.ringNumber} (line ${before}) which starts at ${m(prev.chainageStartM)} m.`);
          return;
        }
        if (Date.parse(row.startTime) < Date.parse(prev.startTime)) {
          report.error(line, 'startTime', `Rows out of order: this stroke starts at ${row.startTime}, before ring ${prev.ringNumber} (line ${before}) started at ${prev.startTime}.`);
          return;
        }
      }
      ringLines.set(row.ringNumber, line);
      previous = { line, data: row };
    },
    finish(rows, report, allRowsValid) {
      const byChainage = rows.map(({ line, data }) => ({ line, row: data, from: Math.min(data.chainageStartM, data.chainageEndM), to: Math.max(data.chainageStartM, data.chainageEndM) }));
      sweepSpans(
        byChainage,
        STROKE_CHAINAGE_TOLERANCE_M,
        (later, earlier, from, to) =>
          report.error(later.line, 'chainageStartM', `This stroke overlaps ring ${earlier.row.ringNumber} (line ${earlier.line}) over chainage ${m(from)}–${m(to)} m. Each stretch of tunnel belongs to one stroke.`),
        (before, after) => {
          if (!allRowsValid) return;
          const [first, second] = before.line < after.line ? [before, after] : [after, before];
          report.warning(second.line, 'chainageStartM', `No stroke covers chainage ${m(before.to)}–${m(after.from)} m (between lines ${first.line} and ${second.line}); the rolled distance over that stretch will be missing.`);
        },
      );
      const byTime = rows.map(({ line, data }) => ({ line, row: data, from: Date.parse(data.startTime), to: Date.parse(data.endTime) }));
      sweepSpans(
        byTime,
        0,
        (later, earlier) =>
          report.error(later.line, 'startTime', `This stroke starts at ${later.row.startTime}, before ring ${earlier.row.ringNumber} (line ${earlier.line}) ended at ${earlier.row.endTime}. Two strokes cannot run at the same time.`),
        () => undefined, // pauses between strokes are normal
      );
    },
  };
}

function geologyTable(): TableSpec<GeologySectionField, GeologySectionRow> {
  return {
    fields: geologySectionFields,
    requiredColumns: geologySectionRequiredColumns,
    schema: geologySectionRowSchema,
    checkRow: () => undefined,
    finish(rows, report, allRowsValid) {
      const spans = rows.map(({ line, data }) => ({ line, row: data, from: data.chainageFromM, to: data.chainageToM }));
      sweepSpans(
        spans,
        0,
        (later, earlier, from, to) =>
          report.error(later.line, 'chainageFromM', `This section overlaps the section on line ${earlier.line} (${earlier.row.groundTypeName}, ${m(earlier.from)}–${m(earlier.to)} m) over chainage ${m(from)}–${m(to)} m. Sections must not overlap.`),
        (before, after) => {
          if (!allRowsValid) return;
          report.warning(after.line, 'chainageFromM', `No section covers chainage ${m(before.to)}–${m(after.from)} m (between the sections on lines ${before.line} and ${after.line}); that stretch will count as unknown ground.`);
        },
      );
    },
  };
}

// ----- the reading pipeline -----

/** Bytes of `source`, refusing the file as soon as more than `maxBytes` have arrived. */
async function* limitedBytes(source: Readable, maxBytes: number, progress: CsvProgress, report: () => void): AsyncGenerator<Buffer> {
  for await (const chunk of source as AsyncIterable<Buffer | string | Uint8Array>) {
    const bytes = Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk);
    progress.bytesRead += bytes.length;
    if (progress.bytesRead > maxBytes) {
      const limit = maxBytes >= MB ? `${Math.round(maxBytes / MB)} MB` : `${maxBytes} bytes`;
      throw new FileRefused(fileIssue(`The file is larger than ${limit}. Split it into smaller files (for example one per month) and import them one after another.`));
    }
    report();
    yield bytes;
  }
}

/** UTF-8 text of the sample and the rest of the bytes; bytes that are not UTF-8 refuse the file. */
async function* utf8Text(sample: Buffer, rest: AsyncGenerator<Buffer>): AsyncGenerator<string> {
  const decoder = new TextDecoder('utf-8', { fatal: true });
  let offset = 0;
  const decode = (bytes?: Buffer) => {
    try {
      return decoder.decode(bytes, { stream: bytes !== undefined });
    } catch {
      throw new FileRefused(fileIssue(`The file is not all UTF-8 text: the bytes after byte ${offset} are not. Save it as "CSV UTF-8" and upload it again.`));
    }
  };
  try {
    yield decode(sample);
    offset += sample.length;
    for (let next = await rest.next(); !next.done; next = await rest.next()) {
      yield decode(next.value);
      offset += next.value.length;
    }
    yield decode();
  } finally {
    await rest.return(undefined);
  }
}

function syntaxIssue(err: CsvError, line: number, headers: string[] | undefined): CsvIssue {
  const column = typeof err.column === 'number' && headers ? (headers[err.column] ?? '') : '';
  switch (err.code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return { row: line, column, message: 'A double quote (") opens a value on this line and is never closed, so the rest of the file would read as one value. Close the quote or remove it.' };
    case 'CSV_MAX_RECORD_SIZE':
      return { row: line, column, message: `This row is longer than ${MAX_RECORD_CHARS / 1024} KB; check its separators and quotes.` };
    default:
      return { row: line, column, message: `The file cannot be read as CSV from this line on (${err.message}).` };
  }
}

/** Lines and count of the rows using one time format. */
interface TimeFormatUse {
  count: number;
  lines: number[];
  column: string;
}

const rowsCount = (count: number) => (count === 1 ? '1 row' : `${count} rows`);

function describeLines(lines: number[], count: number): string {
  const shown = `line${count === 1 ? '' : 's'} ${lines.join(', ')}`;
  return count > lines.length ? `${shown} and ${count - lines.length} more` : shown;
}

async function readCsv<F extends string, Row>(
  source: Readable,
  options: CsvReadOptions<F>,
  table: TableSpec<F, Row>,
  timeZone?: string,
): Promise<CsvImportResult<Row, F>> {
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  const maxRows = options.maxRows ?? DEFAULT_MAX_ROWS;
  const log = new IssueLog(options.maxErrors ?? DEFAULT_MAX_ERRORS);
  const detected: CsvDetected<F> = { bom: false, delimiter: null, decimalComma: false, mapping: {} };
  const progress: CsvProgress = { bytesRead: 0, rowsParsed: 0 };
  const reportProgress = () => options.onProgress?.({ ...progress });
  const rows: CsvLineRow<Row>[] = [];
  const timeFormats = new Map<TimeFormat, TimeFormatUse>();
  let plan: ColumnPlan<F> | null | undefined;
  let refused = false;
  // Line bookkeeping: csv-parse reports the line a record ends on and a running count of skipped
  // empty lines; a record starts after the previous one's end and the empty lines between.
  let previousEndLine = 0;
  let previousEmptyLines = 0;

  const columnName = (field: string) => {
    const index = plan?.columns.get(field as F);
    return index === undefined ? (table.fields.find((f) => f.field === field)?.label ?? field) : plan!.headers[index];
  };
  const report: RowReport<F> = {
    error: (line, field, message) => log.error({ row: line, column: columnName(field), message }),
    warning: (line, field, message) => log.warning({ row: line, column: columnName(field), message }),
  };

  const readRow = (record: string[], line: number, columns: ColumnPlan<F>) => {
    if (record.length !== columns.headers.length) {
      const delimiterName = DELIMITER_NAMES[detected.delimiter!];
      log.error({
        row: line,
        column: '',
        message: `Row has ${record.length} columns, header has ${columns.headers.length}. Look for a missing or extra ${delimiterName} on this line (a value containing one must be in double quotes).`,
      });
      return;
    }
    const candidate: Record<string, unknown> = { extra: Object.fromEntries(columns.extra.map(([key, i]) => [key, record[i].trim()])) };
    const failed = new Set<string>();
    for (const info of table.fields) {
      const index = columns.columns.get(info.field);
      const cell = readCell(info, index === undefined ? '' : record[index].trim(), detected.decimalComma, timeZone);
      if (!cell.ok) {
        failed.add(info.field);
        report.error(line, info.field, cell.message);
        continue;
      }
      candidate[info.field] = cell.value;
      if (cell.timeFormat) {
        const use = timeFormats.get(cell.timeFormat) ?? { count: 0, lines: [], column: columnName(info.field) };
        timeFormats.set(cell.timeFormat, use);
        if (use.lines.at(-1) !== line) {
          if (use.lines.length < 10) use.lines.push(line);
          use.count += 1;
        }
      }
    }
    const parsed = table.schema.safeParse(candidate);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const field = String(issue.path[0]);
        if (!failed.has(field)) report.error(line, field as F, issue.message);
      }
      return;
    }
    table.checkRow(parsed.data, line, report);
    if (!log.hasError(line)) rows.push({ line, data: parsed.data });
  };

  const bytes = limitedBytes(source, maxBytes, progress, reportProgress);
  try {
    const head: Buffer[] = [];
    let headBytes = 0;
    let ended = false;
    while (headBytes < SAMPLE_BYTES) {
      const next = await bytes.next();
      if (next.done) {
        ended = true;
        break;
      }
      head.push(next.value);
      headBytes += next.value.length;
    }
    const sample = Buffer.concat(head);
    const format = detectCsvFormat(sample, ended);
    detected.bom = format.bom;
    if (!format.ok) throw new FileRefused(format.error);
    detected.delimiter = format.delimiter;
    detected.decimalComma = format.decimalComma;

    // A CSV syntax error refuses the file at the line it starts on. Reported through on_skip, not
    // as a stream error, so the records before it still arrive and the line count stays right.
    let syntaxError: CsvError | undefined;
    const parser = parse({
      delimiter: format.delimiter,
      info: true,
      relax_column_count: true,
      relax_quotes: true,
      skip_empty_lines: true,
      max_record_size: MAX_RECORD_CHARS,
      skip_records_with_error: true,
      on_skip: (err) => {
        syntaxError ??= err;
      },
    });
    // A refusal while reading ends the iteration below with that error; nothing to do in the callback.
    pipeline(Readable.from(utf8Text(sample, bytes)), parser, () => undefined);
    for await (const { record, info } of parser as AsyncIterable<{ record: string[]; info: Info }>) {
      if (syntaxError && info.records > Number(syntaxError.records)) break;
      const line = previousEndLine + 1 + (info.empty_lines - previousEmptyLines);
      previousEndLine = info.lines;
      previousEmptyLines = info.empty_lines;
      if (record.every((cell) => cell.trim() === '')) continue;
      if (!plan) {
        plan = planColumns(record, table, options.mapping ?? {}, log);
        if (!plan) break;
        detected.mapping = Object.fromEntries([...plan.columns].map(([field, i]) => [field, plan!.headers[i]])) as ColumnMapping<F>;
        continue;
      }
      progress.rowsParsed += 1;
      if (progress.rowsParsed > maxRows) {
        throw new FileRefused(fileIssue(`The file has more than ${maxRows.toLocaleString('en')} data rows. Split it into smaller files and import them one after another.`));
      }
      readRow(record, line, plan);
    }
    if (syntaxError && plan !== null) {
      const emptyLines = Number(syntaxError.empty_lines ?? previousEmptyLines);
      throw new FileRefused(syntaxIssue(syntaxError, previousEndLine + 1 + (emptyLines - previousEmptyLines), plan?.headers));
    }
  } catch (err) {
    if (!(err instanceof FileRefused)) throw err;
    log.error(err.issue);
    refused = true;
  } finally {
    // Stops reading at once when the file was refused part way (harmless once it has ended).
    source.destroy();
    await bytes.return(undefined);
  }
  reportProgress();

  if (!refused && plan) {
    if (progress.rowsParsed === 0) log.error(fileIssue('The file has column names but no data rows.'));
    table.finish(rows, report, log.errorCount === 0);
    const [a, b] = [...timeFormats.entries()];
    if (a && b) {
      const [[majorFormat, major], [minorFormat, minor]] = a[1].count >= b[1].count ? [a, b] : [b, a];
      log.error({
        row: minor.lines[0],
        column: minor.column,
        message: `Dates in two formats: ${rowsCount(major.count)} use ${TIME_FORMAT_NAMES[majorFormat]}, ${rowsCount(minor.count)} ${TIME_FORMAT_NAMES[minorFormat]} (${describeLines(minor.lines, minor.count)}). Write every date the same way.`,
      });
    }
  } else if (!refused && plan === undefined) {
    log.error(fileIssue('The file holds no values, only separators.'));
  }

  if (log.errorCount === 0) return { ok: true, rows, warnings: log.warnings, detected };
  const errors = [...log.errors].sort((x, y) => x.row - y.row);
  return { ok: false, errors, errorCount: log.errorCount, warnings: log.warnings, detected };
}

/** Reads and checks an advance log (one row per ring or stroke) from a CSV byte stream; chainage in m, times in the project's time zone. */
export async function readAdvanceLogCsv(source: Readable, options: AdvanceLogReadOptions): Promise<CsvImportResult<AdvanceLogRow, AdvanceLogField>> {
  // Rejects with a RangeError for a time zone the runtime does not know: the caller's mistake, not the file's.
  new Intl.DateTimeFormat('en', { timeZone: options.timeZone });
  return readCsv(source, options, advanceLogTable(options.direction), options.timeZone);
}

/** Reads and checks a geology long section (sections of chainage in m) from a CSV byte stream. */
export function readGeologyCsv(source: Readable, options: CsvReadOptions<GeologySectionField> = {}): Promise<CsvImportResult<GeologySectionRow, GeologySectionField>> {
  return readCsv(source, options, geologyTable());
}
