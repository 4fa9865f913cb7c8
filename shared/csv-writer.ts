/**
 * The one CSV writer of Kerfwise: every CSV that leaves it — server exports and the client's
 * Export CSV buttons — is written here (DEVELOPERS.md, decision on the CSV writer).
 *
 * - Text cells that a spreadsheet would read as a formula (starting with =, +, -, @, tab or
 *   carriage return) get a leading single quote, as the OWASP "CSV Injection" page advises; numbers
 *   are written as numbers and never touched (a negative chainage stays -12.5).
 * - Numbers are rounded to the decimals the screen shows for that column (`decimals`), or written
 *   in full when the column has none (the advance log, which must read back unchanged).
 * - Fields are quoted as RFC 4180 asks (comma, double quote, CR or LF inside), records end in CRLF.
 * - The text starts with a UTF-8 byte-order mark so spreadsheet programs read m³, µm or ° right.
 */

export type CsvCell = string | number | boolean | null | undefined;

export interface CsvColumn {
  header: string;
  /** Decimals of a number in this column, as the screen shows it; none: the number in full. */
  decimals?: number;
}

/** UTF-8 byte-order mark (U+FEFF), first character of every CSV Kerfwise writes. */
export const CSV_BOM = '\uFEFF';

/** Characters that make a spreadsheet treat a cell as a formula (OWASP CSV Injection). */
const FORMULA_START = new Set(['=', '+', '-', '@', '\t', '\r']);

/** A text cell made safe to open in a spreadsheet: a formula-leading cell gets a leading '. */
export function neutraliseCsvText(text: string): string {
  return text.length > 0 && FORMULA_START.has(text[0]) ? `'${text}` : text;
}

/** A number as the screen shows it: rounded to `decimals` when given; '' when not finite. */
export function formatCsvNumber(value: number, decimals?: number): string {
  if (!Number.isFinite(value)) return '';
  const text = decimals == null ? String(value) : value.toFixed(decimals);
  // -0.00 after rounding reads as a minus sign on a zero: write the zero.
  return /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
}

function field(cell: CsvCell, column: CsvColumn | undefined): string {
  let text: string;
  if (cell == null) text = '';
  else if (typeof cell === 'number') text = formatCsvNumber(cell, column?.decimals);
  else if (typeof cell === 'boolean') text = cell ? 'yes' : 'no';
  else text = neutraliseCsvText(cell);
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

const columnOf = (c: string | CsvColumn): CsvColumn => (typeof c === 'string' ? { header: c } : c);

/** One CSV record (with its CRLF) of cells laid out as `columns`. */
export function csvRecord(cells: readonly CsvCell[], columns: readonly (string | CsvColumn)[] = []): string {
  return `${cells.map((c, i) => field(c, columns[i] === undefined ? undefined : columnOf(columns[i]))).join(',')}\r\n`;
}

/** The start of a CSV file: the BOM and the header record (headers are neutralised too). */
export function csvHead(columns: readonly (string | CsvColumn)[]): string {
  return CSV_BOM + csvRecord(columns.map((c) => columnOf(c).header));
}

/** A whole CSV file: BOM, header, one record per row. */
export function writeCsv(columns: readonly (string | CsvColumn)[], rows: readonly (readonly CsvCell[])[]): string {
  return csvHead(columns) + rows.map((r) => csvRecord(r, columns)).join('');
}
