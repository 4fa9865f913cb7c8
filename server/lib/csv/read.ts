/**
 * The one CSV reader of Kerfwise: every import (advance log, geology long section, cutterhead
 * layout) streams its file through readCsv with a TableSpec. Streamed, size-limited, every row
 * validated, every problem reported by line and column so a person can fix the file and upload
 * it again. No database here: the caller imports the rows (all or nothing) when the result is ok.
 *
 * Rules, in the order they apply:
 * - Size: more than `maxBytes` (default 50 MB) → refused, reading stops at once; more than
 *   `maxRows` (default 50,000) data rows → refused.
 * - Content and format: the first 64 KB decide (detect.ts). Later bytes that are not UTF-8 also
 *   refuse the file.
 * - Header and mapping: columns.ts. Cells: cells.ts. A file mixing two time formats is an error.
 * - Blank lines and lines of separators only are skipped.
 * - Checks between rows (table specs) use only the rows without errors of their own; after fixing
 *   those, an upload may show further errors.
 */
import type { Readable } from 'node:stream';
import type { CsvError } from 'csv-parse';
import type { ColumnMapping } from '../../../shared/csv-headers';
import type { CsvIssue, ImportDetected } from '../../../shared/schemas/advance-log';
import { siteTimes } from '../../../shared/site-time';
import { cellSlot, readCellInto, TIME_FORMAT_NAMES, type TimeFormat } from './cells';
import { planColumns, type ColumnPlan } from './columns';
import { DELIMITER_NAMES, detectCsvFormat, SAMPLE_BYTES } from './detect';
import { FileRefused, fileIssue, IssueLog } from './issues';
import { csvRecords, MAX_RECORD_CHARS } from './records';
import type { CsvLineRow, RowReport, TableSpec } from './table';

export interface CsvProgress {
  bytesRead: number;
  /** Data rows parsed so far (header and blank lines not counted). */
  rowsParsed: number;
}

export interface CsvReadOptions<F extends string> {
  /** Columns chosen by the user for this file; fields left out are matched by header name. */
  mapping?: ColumnMapping<F>;
  /**
   * Columns remembered from the project's last import: used for fields the file has that column
   * for, ignored for the others (a file with other headers, e.g. Kerfwise's own export, is then
   * read by its header names).
   */
  remembered?: ColumnMapping<F>;
  maxBytes?: number;
  maxRows?: number;
  /** Length of the error list returned (the count covers all); warnings are capped the same. */
  maxErrors?: number;
  /** Called after each chunk read and once at the end. */
  onProgress?: (progress: CsvProgress) => void;
}

interface CsvResultCommon<F extends string> {
  warnings: CsvIssue[];
  detected: ImportDetected<F>;
  /** Headers of the columns that fill no field ("column N" when unnamed), for the caller to keep or name. */
  unusedColumns: string[];
}

export type CsvImportResult<Row, F extends string> =
  | ({ ok: true; rows: CsvLineRow<Row>[] } & CsvResultCommon<F>)
  | ({ ok: false; errors: CsvIssue[]; errorCount: number } & CsvResultCommon<F>);

const MB = 1024 * 1024;
export const DEFAULT_MAX_BYTES = 50 * MB;
export const DEFAULT_MAX_ROWS = 50_000;
const DEFAULT_MAX_ERRORS = 200;

/** Bytes of `source`, refusing the file as soon as more than `maxBytes` have arrived. */
async function* limitedBytes(source: Readable, maxBytes: number, progress: CsvProgress, report: () => void): AsyncGenerator<Buffer> {
  for await (const chunk of source as AsyncIterable<Buffer | string | Uint8Array>) {
    const bytes = Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk);
    progress.bytesRead += bytes.length;
    if (progress.bytesRead > maxBytes) {
      const limit = maxBytes >= MB ? `${Math.round(maxBytes / MB)} MB` : `${maxBytes} bytes`;
      throw new FileRefused(
        fileIssue(
          `The file is larger than ${limit}. Split it into smaller files (for example one per month) and import them one after another.`,
        ),
      );
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
      throw new FileRefused(
        fileIssue(`The file is not all UTF-8 text: the bytes after byte ${offset} are not. Save it as "CSV UTF-8" and upload it again.`),
      );
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
      return {
        row: line,
        column,
        message:
          'A double quote (") opens a value on this line and is never closed, so the rest of the file would read as one value. Close the quote or remove it.',
      };
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

/**
 * Reads a CSV byte stream as the rows of `table`: detects the format, maps the header, reads and
 * checks every row, then runs the checks between rows. Never throws for a problem of the file.
 */
export async function readCsv<F extends string, Row>(
  source: Readable,
  options: CsvReadOptions<F>,
  table: TableSpec<F, Row>,
  timeZone?: string,
): Promise<CsvImportResult<Row, F>> {
  const times = timeZone === undefined ? undefined : siteTimes(timeZone);
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  const maxRows = options.maxRows ?? DEFAULT_MAX_ROWS;
  const log = new IssueLog(options.maxErrors ?? DEFAULT_MAX_ERRORS);
  const detected: ImportDetected<F> = { bom: false, delimiter: null, decimalComma: false, mapping: {} };
  const progress: CsvProgress = { bytesRead: 0, rowsParsed: 0 };
  const reportProgress = () => options.onProgress?.({ ...progress });
  const rows: CsvLineRow<Row>[] = [];
  const unusedWithValues = new Set<number>();
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

  // One slot for every cell of the file, and the time format last seen with its count.
  const cell = cellSlot();
  let lastFormat: TimeFormat | undefined;
  let lastUse: TimeFormatUse | undefined;
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
    const extra: Record<string, string> = {};
    for (const [key, i] of columns.unused) {
      const v = record[i].trim();
      // A column headed "__proto__" is kept as data, as Object.fromEntries keeps it.
      if (key === '__proto__') Object.defineProperty(extra, key, { value: v, enumerable: true, writable: true, configurable: true });
      else extra[key] = v;
      if (v !== '') unusedWithValues.add(i);
    }
    const candidate: Record<string, unknown> = { extra };
    // Made only for a row with a cell that cannot be read (most rows have none).
    let failed: Set<string> | undefined;
    for (const info of table.fields) {
      const index = columns.columns.get(info.field);
      if (!readCellInto(cell, info, index === undefined ? '' : record[index].trim(), detected.decimalComma, times)) {
        (failed ??= new Set()).add(info.field);
        report.error(line, info.field, cell.message);
        continue;
      }
      candidate[info.field] = cell.value;
      if (cell.timeFormat) {
        let use = cell.timeFormat === lastFormat ? lastUse : timeFormats.get(cell.timeFormat);
        if (!use) timeFormats.set(cell.timeFormat, (use = { count: 0, lines: [], column: columnName(info.field) }));
        lastFormat = cell.timeFormat;
        lastUse = use;
        if (use.lines.at(-1) !== line) {
          if (use.lines.length < 10) use.lines.push(line);
          use.count += 1;
        }
      }
    }
    let data: Row;
    if (failed === undefined && table.isRow?.(candidate)) data = candidate;
    else {
      const parsed = table.schema.safeParse(candidate);
      if (!parsed.success) {
        for (const issue of parsed.error.issues) {
          const field = String(issue.path[0]);
          if (!failed?.has(field)) report.error(line, field as F, issue.message);
        }
        return;
      }
      data = parsed.data;
    }
    table.checkRow(data, line, report);
    if (!log.hasError(line)) rows.push({ line, data });
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
    const records = csvRecords(utf8Text(sample, bytes), format.delimiter, (err) => {
      syntaxError ??= err;
    });
    read: for await (const batch of records)
      for (const { record, info } of batch) {
        if (syntaxError && info.records > Number(syntaxError.records)) break read;
        const line = previousEndLine + 1 + (info.empty_lines - previousEmptyLines);
        previousEndLine = info.lines;
        previousEmptyLines = info.empty_lines;
        if (record.every((cell) => cell.trim() === '')) continue;
        if (!plan) {
          plan = planColumns(record, table, options.mapping ?? {}, log, options.remembered ?? {});
          if (!plan) break read;
          detected.mapping = Object.fromEntries([...plan.columns].map(([field, i]) => [field, plan!.headers[i]])) as ColumnMapping<F>;
          continue;
        }
        progress.rowsParsed += 1;
        if (progress.rowsParsed > maxRows) {
          throw new FileRefused(
            fileIssue(
              `The file has more than ${maxRows.toLocaleString('en')} data rows. Split it into smaller files and import them one after another.`,
            ),
          );
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

  // Unnamed columns that never hold a value (a trailing delimiter) are no loss worth naming.
  const unusedColumns = (plan?.unused ?? []).filter(([, i]) => plan!.headers[i] !== '' || unusedWithValues.has(i)).map(([name]) => name);
  if (log.errorCount === 0) return { ok: true, rows, warnings: log.warnings, detected, unusedColumns };
  const errors = [...log.errors].sort((x, y) => x.row - y.row);
  return { ok: false, errors, errorCount: log.errorCount, warnings: log.warnings, detected, unusedColumns };
}
