import { expect } from 'vitest';

/** The records of a CSV written by shared/csv-writer.ts: checks the UTF-8 BOM, drops it, splits on CRLF. */
export function csvLines(text: string): string[] {
  expect(text.startsWith('\uFEFF'), 'a Kerfwise CSV starts with the UTF-8 byte-order mark').toBe(true);
  return text.slice(1).replace(/\r\n$/, '').split('\r\n');
}
