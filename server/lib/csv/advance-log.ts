/**
 * The advance log: one row per ring or stroke. Between rows: ring numbers are unique in the file;
 * rows are in order (each ring number above the previous row's, its chainage start not behind the
 * previous row's in the drive direction, its start time not earlier). Strokes are half-open
 * intervals of chainage [lower, higher) and of time [start, end): two strokes overlapping by more
 * than 1 mm of chainage, or by any time at all, are an error (touching is fine); a chainage gap of
 * more than 1 mm is a warning. Columns that fill no field are kept with each ring in `extra`.
 */
import type { Readable } from 'node:stream';
import { advanceLogFields, advanceLogRequiredColumns } from '../../../shared/csv-headers';
import { aheadM } from '../../../shared/domain/chainage';
import { advanceLogRowSchema, isAdvanceLogRow, type AdvanceLogField, type AdvanceLogRow } from '../../../shared/schemas/advance-log';
import type { driveDirections } from '../../../shared/schemas/project';
import { readCsv, type CsvImportResult, type CsvReadOptions } from './read';
import { m, type CsvLineRow, type TableSpec } from './table';

export type DriveDirection = (typeof driveDirections)[number];

export interface AdvanceLogReadOptions extends CsvReadOptions<AdvanceLogField> {
  /** IANA time zone of the site, for times written without an offset. */
  timeZone: string;
  direction: DriveDirection;
}

/** Strokes may touch or overlap by up to 1 mm of chainage (rounding of logged chainage); more is an overlap or a gap. */
const STROKE_CHAINAGE_TOLERANCE_M = 0.001;

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

export function advanceLogTable(direction: DriveDirection): TableSpec<AdvanceLogField, AdvanceLogRow> {
  const ringLines = new Map<number, number>();
  let previous: CsvLineRow<AdvanceLogRow> | undefined;
  let previousStartMs = NaN;
  return {
    fields: advanceLogFields,
    requiredColumns: advanceLogRequiredColumns,
    schema: advanceLogRowSchema,
    isRow: isAdvanceLogRow,
    checkRow(row, line, report) {
      const advanceM = aheadM(row.chainageStartM, row.chainageEndM, direction);
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
        report.error(
          line,
          'ringNumber',
          `Ring ${row.ringNumber} is already on line ${firstLine}. Each ring may appear once; remove one of the two rows.`,
        );
        return;
      }
      if (previous) {
        const { line: before, data: prev } = previous;
        if (row.ringNumber < prev.ringNumber) {
          report.error(
            line,
            'ringNumber',
            `Rows out of order: ring ${row.ringNumber} comes after ring ${prev.ringNumber} (line ${before}). Sort the rows by ring number.`,
          );
          return;
        }
        if (aheadM(prev.chainageStartM, row.chainageStartM, direction) < 0) {
          report.error(
            line,
            'chainageStartM',
            `Rows out of order: this stroke starts at chainage ${m(row.chainageStartM)} m, behind ring ${prev.ringNumber} (line ${before}) which starts at ${m(prev.chainageStartM)} m.`,
          );
          return;
        }
        if (Date.parse(row.startTime) < previousStartMs) {
          report.error(
            line,
            'startTime',
            `Rows out of order: this stroke starts at ${row.startTime}, before ring ${prev.ringNumber} (line ${before}) started at ${prev.startTime}.`,
          );
          return;
        }
      }
      ringLines.set(row.ringNumber, line);
      previous = { line, data: row };
      previousStartMs = Date.parse(row.startTime);
    },
    finish(rows, report, allRowsValid) {
      const byChainage = rows.map(({ line, data }) => ({
        line,
        row: data,
        from: Math.min(data.chainageStartM, data.chainageEndM),
        to: Math.max(data.chainageStartM, data.chainageEndM),
      }));
      sweepSpans(
        byChainage,
        STROKE_CHAINAGE_TOLERANCE_M,
        (later, earlier, from, to) =>
          report.error(
            later.line,
            'chainageStartM',
            `This stroke overlaps ring ${earlier.row.ringNumber} (line ${earlier.line}) over chainage ${m(from)}–${m(to)} m. Each stretch of tunnel belongs to one stroke.`,
          ),
        (before, after) => {
          if (!allRowsValid) return;
          const [first, second] = before.line < after.line ? [before, after] : [after, before];
          report.warning(
            second.line,
            'chainageStartM',
            `No stroke covers chainage ${m(before.to)}–${m(after.from)} m (between lines ${first.line} and ${second.line}); the rolled distance over that stretch will be missing.`,
          );
        },
      );
      const byTime = rows.map(({ line, data }) => ({ line, row: data, from: Date.parse(data.startTime), to: Date.parse(data.endTime) }));
      sweepSpans(
        byTime,
        0,
        (later, earlier) =>
          report.error(
            later.line,
            'startTime',
            `This stroke starts at ${later.row.startTime}, before ring ${earlier.row.ringNumber} (line ${earlier.line}) ended at ${earlier.row.endTime}. Two strokes cannot run at the same time.`,
          ),
        () => undefined, // pauses between strokes are normal
      );
    },
  };
}

/** Reads and checks an advance log (one row per ring or stroke) from a CSV byte stream; chainage in m, times in the project's time zone. */
export async function readAdvanceLogCsv(
  source: Readable,
  options: AdvanceLogReadOptions,
): Promise<CsvImportResult<AdvanceLogRow, AdvanceLogField>> {
  // Rejects with a RangeError for a time zone the runtime does not know: the caller's mistake, not the file's.
  new Intl.DateTimeFormat('en', { timeZone: options.timeZone });
  return readCsv(source, options, advanceLogTable(options.direction), options.timeZone);
}
