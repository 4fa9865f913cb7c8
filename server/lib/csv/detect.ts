/**
 * What kind of file an upload is, from its first 64 KB: a UTF-8 byte-order mark, the delimiter
 * (comma, semicolon or tab) and whether decimals are written with a comma — or why it cannot be
 * a CSV text file (a spreadsheet workbook, NUL bytes, another encoding).
 *
 * - Delimiter: comma, semicolon or tab, whichever splits the header row into at least two
 *   columns and splits the most of the next 19 lines into the same number of columns; ties go to
 *   the one giving more columns, then comma before semicolon before tab.
 * - Decimal comma: only in semicolon or tab files, when a value in those first lines looks like
 *   12,5. The whole file is then read that way (see cells.ts).
 */
import type { CsvDelimiter, CsvIssue } from '../../../shared/schemas/advance-log';
import { fileIssue } from './issues';

export interface CsvFormat {
  bom: boolean;
  delimiter: CsvDelimiter;
  decimalComma: boolean;
}

export type CsvFormatDetection = ({ ok: true } & CsvFormat) | { ok: false; bom: boolean; error: CsvIssue };

/** How many bytes of the file the detection reads. */
export const SAMPLE_BYTES = 64 * 1024;
const SAMPLE_LINES = 20;

const DELIMITERS: readonly CsvDelimiter[] = [',', ';', '\t'];
export const DELIMITER_NAMES: Record<CsvDelimiter, string> = { ',': 'comma', ';': 'semicolon', '\t': 'tab' };
const DECIMAL_COMMA_VALUE = /^[+-]?\d+,\d+$/;

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
    return refuse(
      fileIssue(
        'This is a spreadsheet workbook, not a CSV file. Open it in the spreadsheet program and save it as "CSV UTF-8", then upload that file.',
      ),
    );
  }
  if (firstChunk.includes(0)) {
    return refuse(fileIssue('This is not a text file (it contains NUL bytes). Save the table as CSV text and upload that file.'));
  }
  let text: string;
  try {
    // Drops the BOM; { stream: true } tolerates a character cut at the end of the chunk.
    text = new TextDecoder('utf-8', { fatal: true }).decode(firstChunk, { stream: true });
  } catch {
    return refuse(
      fileIssue(
        'The file is not UTF-8 text (it may be saved in an older encoding such as Windows-1252, or not be text at all). Save it as "CSV UTF-8" and upload it again.',
      ),
    );
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
  const decimalComma =
    delimiter !== ',' && data.some((line) => splitFields(line, delimiter).some((field) => DECIMAL_COMMA_VALUE.test(field.trim())));
  return { ok: true, bom, delimiter, decimalComma };
}
