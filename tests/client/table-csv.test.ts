/**
 * The client's Export CSV (DataTable → src/lib/csv.ts → shared/csv-writer.ts): numbers as the
 * screen shows them, and a refusal naming the column when a numeric column does not say how.
 */
import { createColumnHelper, createTable, getCoreRowModel } from '@tanstack/react-table';
import { describe, expect, it } from 'vitest';
import { columnsCsv } from '../../src/components/ui/data-table';
import { tableCsv } from '../../src/lib/csv';

const BOM = '\uFEFF'; // UTF-8 byte-order mark U+FEFF (Unicode Standard, ch. 23.8 "Specials")

describe('tableCsv', () => {
  it('writes each numeric column with its declared decimals', () => {
    const result = tableCsv(
      ['Part', { header: 'Wear (mm)', decimals: 1 }, { header: 'Count', decimals: 0 }],
      [
        ['Disc 17"', 12.34, 3],
        ['Hub', 7.06, 12.6],
      ],
    );
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    // derived: 12.34 → 12.3 and 7.06 → 7.1 at one decimal, 12.6 → 13 at none (round half away
    // from zero for these non-tie values); the inch mark forces RFC 4180 quoting (RFC 4180 §2.6-2.7).
    expect(result.text).toBe(`${BOM}Part,Wear (mm),Count\r\n"Disc 17""",12.3,3\r\nHub,7.1,13\r\n`);
  });

  it('refuses a numeric column without decimals and names it', () => {
    const result = tableCsv(['Part', 'Limit (mm)'], [['Hub', 25]]);
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.column).toBe('Limit (mm)');
    expect(result.message).toContain('“Limit (mm)”');
  });

  it('accepts a text column without decimals, and an empty numeric column', () => {
    const result = tableCsv(['Part', 'Limit (mm)'], [['=1+1', null]]);
    expect(result.ok).toBe(true);
    // OWASP "CSV Injection": a cell starting with = gets a leading single quote.
    if (result.ok) expect(result.text).toBe(`${BOM}Part,Limit (mm)\r\n'=1+1,\r\n`);
  });

  it('refuses decimals that are not a whole number from 0 to 12', () => {
    expect(tableCsv([{ header: 'Rate', decimals: 1.5 }], [[1]]).ok).toBe(false);
    expect(tableCsv([{ header: 'Rate', decimals: -1 }], [[1]]).ok).toBe(false);
  });
});

interface Row {
  serial: string;
  wearMm: number;
  ring: number;
}
const col = createColumnHelper<Row>();

function rowsOf(columns: Parameters<typeof createTable<Row>>[0]['columns'], data: Row[]) {
  const table = createTable<Row>({
    data,
    columns,
    getCoreRowModel: getCoreRowModel(),
    state: {},
    onStateChange: () => {},
    renderFallbackValue: null,
  });
  table.setOptions((prev) => ({ ...prev, state: table.initialState }));
  return columnsCsv(table.getAllLeafColumns(), table.getRowModel().rows);
}

describe("DataTable's default export", () => {
  const data = [{ serial: 'S-1', wearMm: 4.449, ring: 120 }];

  it('takes decimals from meta.csvDecimals and leaves display-only columns out', () => {
    const [header, rows] = rowsOf(
      [
        col.accessor('serial', { header: 'Serial' }),
        col.accessor('wearMm', { header: 'Wear (mm)', meta: { csvDecimals: 2 } }),
        col.accessor('ring', { header: () => 'Ring', meta: { csvDecimals: 0, csvHeader: 'Ring' } }),
        col.display({ id: 'open', header: 'Open', cell: () => null }),
      ],
      data,
    );
    const result = tableCsv(header, rows);
    expect(result.ok).toBe(true);
    // derived: 4.449 at two decimals is 4.45; "Open" holds a button, not a value.
    if (result.ok) expect(result.text).toBe(`${BOM}Serial,Wear (mm),Ring\r\nS-1,4.45,120\r\n`);
  });

  it('refuses when a numeric column has no meta.csvDecimals', () => {
    const [header, rows] = rowsOf([col.accessor('serial', { header: 'Serial' }), col.accessor('ring', { header: 'Ring' })], data);
    const result = tableCsv(header, rows);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.column).toBe('Ring');
  });
});
