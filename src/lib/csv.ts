import { writeCsv, type CsvCell, type CsvColumn } from '../../shared/csv-writer';

/**
 * CSV text of a header and rows through Kerfwise's one CSV writer (shared/csv-writer.ts): formula
 * cells neutralised, numbers rounded to a column's `decimals`, UTF-8 BOM, RFC 4180 quoting.
 */
export function toCsv(header: (string | CsvColumn)[], rows: CsvCell[][]): string {
  return writeCsv(header, rows);
}

/** Starts a browser download of CSV text. */
export function downloadCsv(filename: string, csv: string): void {
  const url = URL.createObjectURL(new Blob([csv], { type: 'text/csv;charset=utf-8' }));
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  a.click();
  URL.revokeObjectURL(url);
}
