/**
 * The header row → which column fills which field. The first non-blank line names the columns;
 * none of its cells may look like a value, and no name may appear twice. A mapping passed in
 * chosen on the mapping screen wins; then a column remembered for the project, when the file has
 * it; the other fields are found by the synonyms in shared/csv-headers.ts. Columns left over fill no field: the caller keeps
 * them (advance log `extra`) or names them in a warning.
 */
import { headerMatches, type ColumnMapping, type CsvFieldInfo } from '../../../shared/csv-headers';
import { looksLikeValue } from './cells';
import type { IssueLog } from './issues';

export interface ColumnPlan<F extends string> {
  headers: string[];
  columns: Map<F, number>;
  /** Columns that fill no field: their header (or "column N" when unnamed) and index. */
  unused: [string, number][];
}

export interface ColumnSpec<F extends string> {
  fields: readonly CsvFieldInfo<F>[];
  requiredColumns: readonly (readonly F[])[];
}

/** Reads the header row into a column plan; null (with errors logged) when it cannot be used. */
export function planColumns<F extends string>(
  cells: string[],
  table: ColumnSpec<F>,
  explicit: ColumnMapping<F>,
  log: IssueLog,
  remembered: ColumnMapping<F> = {},
): ColumnPlan<F> | null {
  const headers = cells.map((cell) => cell.trim());
  const errorsBefore = log.errorCount;
  const value = headers.find(looksLikeValue);
  if (value !== undefined) {
    const example = table.fields
      .slice(0, 4)
      .map((f) => f.label)
      .join(', ');
    log.error({
      row: 1,
      column: '',
      message: `The first line holds values such as '${value}', not column names. Add a header row naming each column (for example ${example}).`,
    });
    return null;
  }
  const firstIndex = new Map<string, number>();
  headers.forEach((header, i) => {
    if (header === '') return;
    const key = header.toLowerCase();
    const first = firstIndex.get(key);
    if (first === undefined) firstIndex.set(key, i);
    else
      log.error({
        row: 1,
        column: header,
        message: `Two columns are named '${header}' (columns ${first + 1} and ${i + 1}). Rename or remove one.`,
      });
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
    if (index < 0)
      log.error({
        row: 1,
        column: name,
        message: `The column mapping reads ${label} from '${name}', but the file has no column of that name.`,
      });
    else {
      columns.set(field, index);
      used.add(index);
    }
  }
  for (const [field, wanted] of Object.entries(remembered) as [F, string | undefined][]) {
    if (wanted === undefined || field in explicit) continue;
    const index = headers.findIndex((h, i) => !used.has(i) && h.toLowerCase() === wanted.trim().toLowerCase());
    if (index < 0) continue;
    columns.set(field, index);
    used.add(index);
  }
  for (const info of table.fields) {
    if (info.field in explicit || columns.has(info.field)) continue;
    const matches = headers.flatMap((header, i) => (!used.has(i) && headerMatches(info, header) ? [i] : []));
    if (matches.length === 0) continue;
    columns.set(info.field, matches[0]);
    used.add(matches[0]);
    if (matches.length > 1) {
      const names = matches.map((i) => `'${headers[i]}'`).join(' and ');
      log.warning({
        row: 1,
        column: headers[matches[0]],
        message: `Columns ${names} could each be ${info.label}; '${headers[matches[0]]}' was used. Choose another in the column mapping if that is wrong.`,
      });
    }
  }
  for (const group of table.requiredColumns) {
    if (group.some((field) => columns.has(field))) continue;
    const infos = group.map((field) => table.fields.find((f) => f.field === field)!);
    const labels = infos.map((f) => f.label).join(' or ');
    const names = infos.map((f) => `'${f.synonyms[0]}'`).join(' or ');
    log.error({
      row: 1,
      column: infos[0].label,
      message: `No column for ${labels} was found. Name a column ${names}, or choose one in the column mapping.`,
    });
  }
  if (log.errorCount > errorsBefore) return null;
  const unused = headers.flatMap((header, i): [string, number][] => (used.has(i) ? [] : [[header || `column ${i + 1}`, i]]));
  return { headers, columns, unused };
}
