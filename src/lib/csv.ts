import Papa from 'papaparse';

/** CSV text of a header and rows (RFC 4180 quoting by papaparse). */
export function toCsv(header: string[], rows: (string | number | null | undefined)[][]): string {
  return Papa.unparse({ fields: header, data: rows.map((r) => r.map((v) => v ?? '')) }, { newline: '\r\n' });
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
