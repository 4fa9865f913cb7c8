import { writeCsv, type CsvCell, type CsvColumn } from '../../shared/csv-writer';

/**
 * CSV text of a header and rows through Kerfwise's one CSV writer (shared/csv-writer.ts): formula
 * cells neutralised, numbers rounded to a column's `decimals`, UTF-8 BOM, RFC 4180 quoting.
 */
export function toCsv(header: (string | CsvColumn)[], rows: CsvCell[][]): string {
  return writeCsv(header, rows);
}

/** A table's CSV, or why Kerfwise will not write it. */
export type TableCsv = { ok: true; text: string } | { ok: false; column: string; message: string };

/**
 * The CSV of a table as the screen shows it (the client's Export CSV, DEVELOPERS.md decision 39):
 * every column that holds a number must say how many decimals the screen shows
 * (`decimals`, from a column's `meta.csvDecimals`). A numeric column without them is refused with
 * its name, never written in full by default: a file that disagrees with the screen misleads.
 */
export function tableCsv(header: readonly (string | CsvColumn)[], rows: readonly (readonly CsvCell[])[]): TableCsv {
  const columns = header.map((c) => (typeof c === 'string' ? { header: c } : c));
  for (const [i, column] of columns.entries()) {
    if (column.decimals != null) {
      if (!Number.isInteger(column.decimals) || column.decimals < 0 || column.decimals > 12) {
        return {
          ok: false,
          column: column.header,
          message: refusal(column.header, `its decimals (${column.decimals}) are not a whole number from 0 to 12`),
        };
      }
      continue;
    }
    if (rows.some((r) => typeof r[i] === 'number')) {
      return {
        ok: false,
        column: column.header,
        message: refusal(column.header, 'it holds numbers but does not say how many decimals the screen shows'),
      };
    }
  }
  return { ok: true, text: writeCsv(columns, rows) };
}

const refusal = (header: string, why: string) =>
  `CSV not exported: the column “${header}” cannot be written as the screen shows it (${why}). Please tell the people who look after Kerfwise.`;

/** Starts a browser download of CSV text. */
export function downloadCsv(filename: string, csv: string): void {
  const url = URL.createObjectURL(new Blob([csv], { type: 'text/csv;charset=utf-8' }));
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  a.click();
  URL.revokeObjectURL(url);
}
