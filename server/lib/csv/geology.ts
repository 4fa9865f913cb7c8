/**
 * The geology long section: sections [from, to) of chainage (m). Overlaps and gaps are judged by
 * the domain's own check (shared/domain/geology.ts): an overlap is an error, a gap a warning.
 * A file may also give the UCS and CAI of each section's ground type; rows of one ground type must
 * then agree.
 */
import type { Readable } from 'node:stream';
import { geologySectionFields, geologySectionRequiredColumns } from '../../../shared/csv-headers';
import { validateGeologySections } from '../../../shared/domain/geology';
import { geologySectionRowSchema, type GeologySectionField, type GeologySectionRow } from '../../../shared/schemas/advance-log';
import { readCsv, type CsvImportResult, type CsvReadOptions } from './read';
import { m, type TableSpec } from './table';

const groundProperties = [
  ['ucsMpa', 'UCS', ' MPa'],
  ['cai', 'CAI', ''],
] as const;

export function geologyTable(): TableSpec<GeologySectionField, GeologySectionRow> {
  /** Ground type (lower case) → property → the first line giving it and its value. */
  const firstGiven = new Map<string, Map<string, { line: number; value: number }>>();
  return {
    fields: geologySectionFields,
    requiredColumns: geologySectionRequiredColumns,
    schema: geologySectionRowSchema,
    checkRow(row, line, report) {
      const key = row.groundTypeName.trim().toLowerCase();
      const given = firstGiven.get(key) ?? new Map<string, { line: number; value: number }>();
      firstGiven.set(key, given);
      for (const [field, name, unit] of groundProperties) {
        const value = row[field];
        if (value === undefined) continue;
        const first = given.get(field);
        if (!first) given.set(field, { line, value });
        else if (first.value !== value) {
          report.error(
            line,
            field,
            `${name} ${value}${unit} here, but line ${first.line} gives ${first.value}${unit} for the same ground type (${row.groundTypeName}). A ground type has one ${name}; make the rows agree or name the grounds apart.`,
          );
        }
      }
    },
    finish(rows, report, allRowsValid) {
      const sections = rows.map(({ data }) => ({ ...data, groundTypeId: data.groundTypeName }));
      const { errors, warnings } = validateGeologySections(sections);
      for (const e of errors) {
        if (e.kind !== 'overlap') continue; // a reversed range was already refused by the row schema
        const [later, earlier] =
          rows[e.indexA].line > rows[e.indexB].line ? [rows[e.indexA], rows[e.indexB]] : [rows[e.indexB], rows[e.indexA]];
        report.error(
          later.line,
          'chainageFromM',
          `This section overlaps the section on line ${earlier.line} (${earlier.data.groundTypeName}, ${m(earlier.data.chainageFromM)}–${m(earlier.data.chainageToM)} m) over chainage ${m(e.fromM)}–${m(e.toM)} m. Sections must not overlap.`,
        );
      }
      if (!allRowsValid) return;
      for (const w of warnings) {
        const [before, after] = [rows[w.beforeIndex], rows[w.afterIndex]];
        report.warning(
          after.line,
          'chainageFromM',
          `No section covers chainage ${m(w.fromM)}–${m(w.toM)} m (between the sections on lines ${before.line} and ${after.line}); that stretch will count as unknown ground.`,
        );
      }
    },
  };
}

/** Reads and checks a geology long section (sections of chainage in m) from a CSV byte stream. */
export function readGeologyCsv(
  source: Readable,
  options: CsvReadOptions<GeologySectionField> = {},
): Promise<CsvImportResult<GeologySectionRow, GeologySectionField>> {
  return readCsv(source, options, geologyTable());
}
