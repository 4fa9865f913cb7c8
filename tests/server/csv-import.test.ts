import { createReadStream, readdirSync, readFileSync, statSync } from 'node:fs';
import { mkdtemp, open, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readAdvanceLogCsv, type AdvanceLogReadOptions } from '../../server/lib/csv/advance-log';
import { detectCsvFormat } from '../../server/lib/csv/detect';
import { readGeologyCsv } from '../../server/lib/csv/geology';
import { readLayoutCsv } from '../../server/lib/csv/layout';
import type { CsvImportResult, CsvProgress } from '../../server/lib/csv/read';
import { normalizeHeader } from '../../shared/csv-headers';

// All data invented (no real project): a drive of 1.5 m strokes from chainage 2450.0 m,
// penetration 4.6–11.3 mm/rev, 4.6–6.8 rpm, thrust 8,700–15,400 kN, torque 1,760–3,600 kN·m.
// Expected rows, columns and values are read off the fixture files by hand ("derived: fixture").

const FIXTURES = join(__dirname, '../fixtures');
const ZURICH: AdvanceLogReadOptions = { timeZone: 'Europe/Zurich', direction: 'increasing' };

const fixture = (folder: 'bad-csv' | 'good-csv', name: string) => createReadStream(join(FIXTURES, folder, name));
const textStream = (text: string) => Readable.from([Buffer.from(text, 'utf8')]);

function failureOf<R, F extends string>(result: CsvImportResult<R, F>) {
  if (result.ok) throw new Error(`expected errors, the file was accepted with ${result.rows.length} rows`);
  return result;
}
const errorsOf = <R, F extends string>(result: CsvImportResult<R, F>) => failureOf(result).errors;

function rowsOf<R, F extends string>(result: CsvImportResult<R, F>) {
  if (!result.ok) throw new Error(`expected rows, got errors: ${JSON.stringify(result.errors)}`);
  return result.rows;
}

const issue = (row: number, column: string, message: RegExp) => ({ row, column, message: expect.stringMatching(message) });

const HEADER = 'Ring,Start time,End time,Chainage start (m),Chainage end (m),Cutterhead revolutions,Penetration (mm/rev)';
/** One inline stroke row; revolutions 190 = 1500 mm / 7.9 mm/rev, rounded (derived). */
const strokeRow = (ring: number, start: string, end: string, fromM: number, toM: number, thrust = '') =>
  [ring, start, end, fromM.toFixed(3), toM.toFixed(3), 190, 7.9].join(',') + (thrust ? `,${thrust}` : '');

describe('detectCsvFormat', () => {
  const bytes = (text: string) => Buffer.from(text, 'utf8');

  it('picks the delimiter that splits the header and the following lines alike', () => {
    // derived: the header has 3 commas and no semicolon; every row has 3 commas.
    expect(detectCsvFormat(bytes('Ring,Start,End,Pen\n1,a,b,7.9\n2,c,d,8.4\n'), true)).toEqual({
      ok: true,
      bom: false,
      delimiter: ',',
      decimalComma: false,
    });
    expect(detectCsvFormat(bytes('Ring\tStart\tPen\n1\ta\t7.9\n'), true)).toEqual({
      ok: true,
      bom: false,
      delimiter: '\t',
      decimalComma: false,
    });
  });

  it('prefers the semicolon when decimal commas add commas to the rows only', () => {
    // derived: the header has 2 semicolons and no comma, so a comma cannot be the delimiter.
    expect(detectCsvFormat(bytes('Ring;From;Pen\n101;2450,0;7,9\n102;2451,5;8,4\n'), true)).toEqual({
      ok: true,
      bom: false,
      delimiter: ';',
      decimalComma: true,
    });
  });

  it('does not count a comma inside a quoted header name', () => {
    // derived: outside quotes the header has 2 semicolons and 0 commas.
    expect(detectCsvFormat(bytes('Ring;"Thrust, total (kN)";Pen\n101;11800;7.9\n'), true)).toEqual({
      ok: true,
      bom: false,
      delimiter: ';',
      decimalComma: false,
    });
  });

  it('finds no decimal comma in a comma-separated file, even in quoted values', () => {
    expect(detectCsvFormat(bytes('Ring,Pen\n101,"7,9"\n'), true)).toMatchObject({ ok: true, delimiter: ',', decimalComma: false });
  });

  it('notes and drops a UTF-8 byte-order mark', () => {
    expect(detectCsvFormat(bytes('\ufeffRing;Pen\n101;7,9\n'), true)).toEqual({ ok: true, bom: true, delimiter: ';', decimalComma: true });
  });

  it('accepts a first chunk that ends inside a line and inside a character', () => {
    // derived: dropping the last byte cuts "Ü" (C3 9C) in half; the decoder waits for the rest.
    const chunk = bytes('Ring;Start;End;Remarks\n101;a;b;ok\n102;c;d;Ü').subarray(0, -1);
    expect(detectCsvFormat(chunk)).toEqual({ ok: true, bom: false, delimiter: ';', decimalComma: false });
  });

  it('refuses NUL bytes, bytes that are not UTF-8 and a header without delimiter', () => {
    expect(detectCsvFormat(Uint8Array.from([0x52, 0x69, 0x00, 0x6e, 0x67]))).toMatchObject({
      ok: false,
      error: { row: 0, message: expect.stringMatching(/not a text file/) },
    });
    expect(detectCsvFormat(Uint8Array.from([0x52, 0x69, 0x6e, 0x67, 0x3b, 0xdc, 0x0a]))).toMatchObject({
      ok: false,
      error: { row: 0, message: expect.stringMatching(/not UTF-8/) },
    });
    expect(detectCsvFormat(bytes('Ring Start End\n1 a b\n'), true)).toMatchObject({ ok: false, error: { row: 1, column: '' } });
  });
});

describe('good files', () => {
  it('reads a comma file with ISO times, every column and quoted remarks', async () => {
    const result = await readAdvanceLogCsv(fixture('good-csv', 'advance-log-comma-iso.csv'), ZURICH);
    const rows = rowsOf(result);
    expect(rows).toHaveLength(12);
    expect(result.warnings).toEqual([]);
    expect(result.detected).toMatchObject({ bom: false, delimiter: ',', decimalComma: false });
    // derived: fixture line 2.
    expect(rows[0]).toEqual({
      line: 2,
      data: {
        ringNumber: 101,
        startTime: '2026-03-14T06:00:00+01:00',
        endTime: '2026-03-14T06:37:00+01:00',
        chainageStartM: 2450,
        chainageEndM: 2451.5,
        revolutions: 190,
        penetrationMmPerRev: 7.9,
        rpm: 5.2,
        thrustKn: 11800,
        torqueKnm: 2450,
        extra: { Remarks: '' },
      },
    });
    expect(rows[5].data.extra).toEqual({ Remarks: 'cutter 23, 41 checked' }); // derived: fixture line 7
    // derived: the remark of ring 109 spans lines 10–11, so ring 110 starts on line 12.
    expect(rows[8]).toMatchObject({ line: 10, data: { ringNumber: 109, extra: { Remarks: 'ring built in 28 min\nsegment 4 re-seated' } } });
    expect(rows[9]).toMatchObject({ line: 12, data: { ringNumber: 110 } });
  });

  it('reads a BOM + semicolon + decimal comma file with day-first local times and unusual header names', async () => {
    const result = await readAdvanceLogCsv(fixture('good-csv', 'advance-log-bom-semicolon-decimal-comma.csv'), ZURICH);
    const rows = rowsOf(result);
    expect(rows).toHaveLength(12);
    expect(result.detected).toEqual({
      bom: true,
      delimiter: ';',
      decimalComma: true,
      mapping: {
        ringNumber: 'Ring Nr',
        startTime: 'Begin',
        endTime: 'Finish',
        chainageStartM: 'Chainage from [m]',
        chainageEndM: 'Chainage to [m]',
        revolutions: 'Revs',
        penetrationMmPerRev: 'Pen [mm/rev]',
        rpm: 'Cutterhead speed',
        thrustKn: 'Total thrust kN',
        torqueKnm: 'Torque [kN·m]',
      },
    });
    // derived: fixture line 2, "14.03.2026 06:00" local; Zurich keeps UTC+1 until 29 March 2026
    // (EU summer time starts on the last Sunday of March, Directive 2000/84/EC).
    expect(rows[0].data).toMatchObject({
      ringNumber: 101,
      startTime: '2026-03-14T06:00:00+01:00',
      chainageStartM: 2450,
      chainageEndM: 2451.5,
      penetrationMmPerRev: 7.9,
      rpm: 5.2,
    });
    expect(rows[11].data).toMatchObject({ ringNumber: 112, chainageStartM: 2466.5, penetrationMmPerRev: 5.3, rpm: 6.5 }); // derived: fixture line 13
  });

  it('reads a tab file of a drive whose chainage decreases, penetration only', async () => {
    const result = await readAdvanceLogCsv(fixture('good-csv', 'advance-log-tab-decreasing.csv'), {
      timeZone: 'Asia/Kolkata',
      direction: 'decreasing',
    });
    const rows = rowsOf(result);
    expect(rows).toHaveLength(8);
    // derived: fixture line 2; Asia/Kolkata is UTC+05:30 all year (IANA tz database).
    expect(rows[0].data).toMatchObject({
      ringNumber: 1,
      startTime: '2026-03-14T06:00:00+05:30',
      chainageStartM: 5210,
      chainageEndM: 5208.5,
      revolutions: null,
      penetrationMmPerRev: 7.9,
      thrustKn: null,
    });
  });

  it('reads a geology long section', async () => {
    const result = await readGeologyCsv(fixture('good-csv', 'geology-long-section.csv'));
    const rows = rowsOf(result);
    expect(result.warnings).toEqual([]);
    expect(rows.map((r) => r.data)).toEqual([
      { chainageFromM: 2400, chainageToM: 2520, groundTypeName: 'Marl', waterHeadM: 18.5, stopAllowed: true, stopReason: null },
      { chainageFromM: 2520, chainageToM: 2610, groundTypeName: 'Sandstone', waterHeadM: 21, stopAllowed: true, stopReason: null },
      {
        chainageFromM: 2610,
        chainageToM: 2655,
        groundTypeName: 'Fault zone',
        waterHeadM: 24.5,
        stopAllowed: false,
        stopReason: 'fractured ground, no face support',
      },
      { chainageFromM: 2655, chainageToM: 2900, groundTypeName: 'Granite', waterHeadM: 16, stopAllowed: true, stopReason: null },
    ]); // derived: fixture lines 2–5
  });

  it('accepts a long section with a gap but warns about it', async () => {
    const result = await readGeologyCsv(fixture('good-csv', 'geology-with-gap.csv'));
    // derived: fixture lines 2–4, decimal comma in 18,5; "Y" reads as yes.
    expect(rowsOf(result).map((r) => [r.data.waterHeadM, r.data.stopAllowed, r.data.stopReason])).toEqual([
      [18.5, true, null],
      [21, true, null],
      [null, false, 'below the river'],
    ]);
    // derived: line 2 ends at 2520, line 3 starts at 2540.
    expect(result.warnings).toEqual([
      issue(3, 'from', /No section covers chainage 2520–2540 m \(between the sections on lines 2 and 3\).*unknown ground/),
    ]);
    expect(result.detected).toMatchObject({ delimiter: ';', decimalComma: true });
  });
});

describe('bad files: each error on the right line and column', () => {
  // derived: lines and columns counted by hand in each file; see tests/fixtures/bad-csv/README.md.
  const cases: [file: string, expected: ReturnType<typeof issue>[]][] = [
    ['pipe-delimited.csv', [issue(1, '', /no comma, semicolon or tab.*It seems to use '\|'/)]],
    ['no-header.csv', [issue(1, '', /first line holds values such as '101', not column names/)]],
    ['duplicate-ring.csv', [issue(5, 'Ring', /Ring 103 is already on line 4/)]],
    [
      'text-in-number.csv',
      [
        issue(4, 'Thrust (kN)', /Thrust \(kN\) must be a number; 'n\/a' is not one/),
        issue(7, 'Penetration (mm/rev)', /'10,1' has a comma.*decimal point/),
      ],
    ],
    ['empty.csv', [issue(0, '', /The file is empty/)]],
    ['row-with-three-columns.csv', [issue(6, '', /^Row has 3 columns, header has 9\./)]],
    ['chainage-reversed.csv', [issue(6, 'Chainage end (m)', /wrong way: .*increases.*from 2457\.5 to 2456 m/)]],
    [
      'dates-in-two-formats.csv',
      [issue(7, 'Start time', /^Dates in two formats: 5 rows use YYYY-MM-DD.*, 3 rows DD\.MM\.YYYY hh:mm \(lines 7, 8, 9\)/)],
    ],
    ['stroke-overlaps-previous.csv', [issue(7, 'Chainage start (m)', /overlaps ring 105 \(line 6\) over chainage 2457–2457\.5 m/)]],
    [
      'stroke-starts-before-previous-ends.csv',
      [issue(5, 'Start time', /starts at 2026-03-14T08:32:00\+01:00, before ring 103 \(line 4\) ended at 2026-03-14T08:42:00\+01:00/)],
    ],
    ['header-only.csv', [issue(0, '', /column names but no data rows/)]],
    ['negative-revolutions.csv', [issue(4, 'Cutterhead revolutions', /cannot be negative/)]],
    ['end-before-start.csv', [issue(8, 'End time', /end time is not after the start time/)]],
    ['penetration-zero-no-revolutions.csv', [issue(3, 'Penetration (mm/rev)', /greater than 0 mm\/rev/)]],
    ['missing-required-column.csv', [issue(1, 'End time', /No column for End time was found/)]],
    [
      'unreadable-dates.csv',
      [
        issue(3, 'Start time', /'03\/14\/2026 6:50 AM' is not a date and time Kerfwise reads\. Write 2026-03-14T06:30/),
        issue(5, 'End time', /'2026-03-14 09:45 CET' is not a date and time/),
        issue(7, 'Start time', /'yesterday' is not a date and time/),
      ],
    ],
    ['duplicated-header.csv', [issue(1, 'Thrust (kN)', /Two columns are named 'Thrust \(kN\)' \(columns 8 and 9\)/)]],
    ['unterminated-quote.csv', [issue(6, 'Remarks', /double quote .* never closed/)]],
    [
      'decimal-point-in-decimal-comma-file.csv',
      [
        issue(8, 'Chainage start (m)', /'2459\.0' has a decimal point.*write 2459,0/),
        issue(8, 'Chainage end (m)', /'2460\.5' has a decimal point/),
        issue(8, 'Penetration (mm/rev)', /'11\.3' has a decimal point/),
      ],
    ],
    ['ring-not-whole-number.csv', [issue(4, 'Ring', /whole number/)]],
    ['rows-out-of-order.csv', [issue(5, 'Ring', /out of order: ring 103 comes after ring 104 \(line 4\)/)]],
    ['missing-required-value.csv', [issue(6, 'Chainage start (m)', /chainage at the start of the stroke is empty/)]],
    ['no-revolutions-no-penetration.csv', [issue(5, 'Cutterhead revolutions', /Neither revolutions nor penetration/)]],
    [
      'local-time-skipped-by-clock-change.csv',
      [
        issue(3, 'End time', /'29\.03\.2026 02:04' does not exist in Europe\/Zurich/),
        issue(4, 'Start time', /'29\.03\.2026 02:30' does not exist/),
      ],
    ],
    ['impossible-date.csv', [issue(4, 'Start time', /'2026-02-30T08:00:00\+01:00' is not a real date/)]],
    ['zero-length-stroke.csv', [issue(3, 'Chainage end (m)', /equals chainage start \(2451\.5 m\)/)]],
    ['windows-1252-encoded.csv', [issue(0, '', /not UTF-8 text.*CSV UTF-8/)]],
    ['spreadsheet-workbook-renamed.csv', [issue(0, '', /spreadsheet workbook, not a CSV file/)]],
    ['error-after-multiline-remark.csv', [issue(8, 'Thrust (kN)', /'12 500' is not one/)]],
    [
      'geology-overlapping-sections.csv',
      [
        issue(3, 'Chainage from (m)', /overlaps the section on line 2 \(Marl, 2400–2520 m\) over chainage 2500–2520 m/),
        issue(5, 'Chainage from (m)', /overlaps the section on line 4 \(Fault zone, 2610–2655 m\) over chainage 2650–2655 m/),
      ],
    ],
    ['geology-from-to-reversed.csv', [issue(3, 'Chainage to (m)', /Chainage to must be greater than chainage from/)]],
    [
      'geology-bad-values.csv',
      [
        issue(2, 'Water head above axis (m)', /cannot be negative/),
        issue(3, 'Stop allowed', /write yes or no; 'maybe'/),
        issue(3, 'Ground type', /ground type is empty/),
        issue(4, 'Stop reason', /Say why no stop is allowed/),
      ],
    ],
    ['geology-missing-stop-allowed-column.csv', [issue(1, 'Stop allowed (yes/no)', /No column for Stop allowed/)]],
    [
      'geology-unreadable-water-head.csv',
      [issue(3, 'water_head_m', /Water head above axis \(m\) must be a number; 'about 20' is not one/)],
    ],
  ];

  it.each(cases)('%s', async (file, expected) => {
    const source = fixture('bad-csv', file);
    const result: CsvImportResult<unknown, string> = file.startsWith('geology-')
      ? await readGeologyCsv(source)
      : await readAdvanceLogCsv(source, ZURICH);
    expect(errorsOf(result)).toEqual(expected);
    expect(failureOf(result).errorCount).toBe(expected.length);
  });

  it('covers every file in the folder, and the README lists each one', () => {
    const files = readdirSync(join(FIXTURES, 'bad-csv')).filter((f) => f !== 'README.md');
    expect(files.sort()).toEqual(cases.map(([f]) => f).sort());
    const readme = readFileSync(join(FIXTURES, 'bad-csv', 'README.md'), 'utf8');
    for (const f of files) expect(readme).toContain(`\`${f}\``);
  });

  it('reads the tab file of a decreasing drive as wrong-way strokes when the drive is set to increase', async () => {
    const result = await readAdvanceLogCsv(fixture('good-csv', 'advance-log-tab-decreasing.csv'), { ...ZURICH, direction: 'increasing' });
    const errors = errorsOf(result);
    expect(errors).toHaveLength(8); // derived: 8 strokes, each from a higher to a lower chainage
    expect(errors[0]).toEqual(issue(2, 'ch_end', /from 5210 to 5208\.5 m/));
  });
});

describe('generated bad files', () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'kerfwise-csv-'));
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  /** A valid stroke of an invented drive, one per hour from 1 Jan 2026 00:00 UTC, 1.5 m each. */
  const generatedStroke = (i: number) => {
    const startMs = Date.UTC(2026, 0, 1) + i * 3_600_000;
    const iso = (ms: number) => new Date(ms).toISOString().replace('.000Z', 'Z');
    return strokeRow(i + 1, iso(startMs), iso(startMs + 35 * 60_000), 1000 + 1.5 * i, 1001.5 + 1.5 * i);
  };

  it('refuses random bytes with NULs named .csv', async () => {
    // A fixed linear congruential generator (Numerical Recipes constants) so the bytes repeat.
    let seed = 20260314;
    const bytes = Buffer.alloc(4096, 0).map((_, i) => {
      seed = (seed * 1664525 + 1013904223) >>> 0;
      return i % 97 === 0 ? 0 : seed >>> 24;
    });
    const path = join(dir, 'advance-log.csv');
    await writeFile(path, bytes);
    const result = await readAdvanceLogCsv(createReadStream(path), ZURICH);
    expect(errorsOf(result)).toEqual([issue(0, '', /not a text file \(it contains NUL bytes\)/)]);
    expect(result.detected.delimiter).toBeNull();
  });

  it('stops reading a 60 MB file as soon as it passes 50 MB', async () => {
    const path = join(dir, 'advance-log-60mb.csv');
    const remark = 'segment joint checked '.repeat(60); // 1,320 characters per row
    const file = await open(path, 'w');
    await file.write(`${HEADER},Thrust (kN),Remarks\n`);
    for (let block = 0; block < 45; block += 1) {
      const lines = Array.from({ length: 1000 }, (_, k) => `${generatedStroke(block * 1000 + k)},12000,${remark}\n`);
      await file.write(lines.join(''));
    }
    await file.close();
    const size = statSync(path).size;
    expect(size).toBeGreaterThan(60 * 1024 * 1024);

    const source = createReadStream(path); // 64 KB chunks
    const seen: CsvProgress[] = [];
    const result = await readAdvanceLogCsv(source, { ...ZURICH, onProgress: (p) => seen.push(p) });
    expect(errorsOf(result)).toEqual([issue(0, '', /larger than 50 MB/)]);
    const last = seen.at(-1)!;
    // derived: refused on the first chunk past 50 MB, so at most one 64 KB chunk more was read.
    expect(last.bytesRead).toBeGreaterThan(50 * 1024 * 1024);
    expect(last.bytesRead).toBeLessThanOrEqual(50 * 1024 * 1024 + 64 * 1024);
    expect(source.destroyed).toBe(true);
    expect(last.rowsParsed).toBeLessThan(45_000);
  }, 60_000);

  it('refuses more than 50,000 data rows and stops reading', async () => {
    let blocksRead = 0;
    function* chunks() {
      yield `${HEADER}\n`;
      for (let block = 0; block < 100; block += 1) {
        blocksRead += 1;
        yield Array.from({ length: 1000 }, (_, k) => `${generatedStroke(block * 1000 + k)}\n`).join('');
      }
    }
    const source = Readable.from(chunks());
    const result = await readAdvanceLogCsv(source, ZURICH);
    expect(errorsOf(result)).toEqual([issue(0, '', /more than 50,000 data rows/)]);
    expect(source.destroyed).toBe(true);
    // derived: row 50,001 is in block 51; the streams may have read a few blocks ahead, not all 100.
    expect(blocksRead).toBeGreaterThanOrEqual(51);
    expect(blocksRead).toBeLessThan(60);
  }, 60_000);

  it('accepts exactly 50,000 rows', async () => {
    function* chunks() {
      yield `${HEADER}\n`;
      for (let block = 0; block < 50; block += 1) {
        yield Array.from({ length: 1000 }, (_, k) => `${generatedStroke(block * 1000 + k)}\n`).join('');
      }
    }
    const result = await readAdvanceLogCsv(Readable.from(chunks()), ZURICH);
    expect(rowsOf(result)).toHaveLength(50_000);
    expect(rowsOf(result)[49_999]).toMatchObject({ line: 50_001, data: { ringNumber: 50_000 } });
  }, 60_000);
});

describe('mapping, times and checks between rows (inline files)', () => {
  const rows = [
    strokeRow(101, '2026-03-14T06:00', '2026-03-14T06:37', 2450, 2451.5),
    strokeRow(102, '2026-03-14T07:00', '2026-03-14T07:34', 2451.5, 2453),
  ];

  it('lets an explicit mapping win over the header names, and warns when two headers fit one field', async () => {
    const text = `Ring,Stroke,${HEADER.slice('Ring,'.length)}\n${rows.map((r, i) => r.replace(/^(\d+),/, `$1,${7 + i},`)).join('\n')}\n`;
    const guessed = await readAdvanceLogCsv(textStream(text), ZURICH);
    expect(rowsOf(guessed).map((r) => r.data.ringNumber)).toEqual([101, 102]);
    expect(guessed.warnings).toEqual([
      issue(1, 'Ring', /Columns 'Ring' and 'Stroke' could each be Ring \/ stroke number; 'Ring' was used/),
    ]);

    const chosen = await readAdvanceLogCsv(textStream(text), { ...ZURICH, mapping: { ringNumber: 'Stroke' } });
    expect(rowsOf(chosen).map((r) => [r.data.ringNumber, r.data.extra])).toEqual([
      [7, { Ring: '101' }],
      [8, { Ring: '102' }],
    ]);
    expect(chosen.warnings).toEqual([]);
    expect(chosen.detected.mapping.ringNumber).toBe('Stroke');
  });

  it('reports a mapping to a column the file does not have', async () => {
    const result = await readAdvanceLogCsv(textStream(`${HEADER}\n${rows.join('\n')}\n`), {
      ...ZURICH,
      mapping: { thrustKn: 'Jack force' },
    });
    expect(errorsOf(result)).toEqual([
      issue(1, 'Jack force', /reads Thrust \(kN\) from 'Jack force', but the file has no column of that name/),
    ]);
  });

  it('converts times with an offset into the project time zone, seconds and fractions optional', async () => {
    const text = `${HEADER}\n${strokeRow(101, '2026-03-14T05:00Z', '2026-03-14 05:37:30.250+00:00', 2450, 2451.5)}\n`;
    const [row] = rowsOf(await readAdvanceLogCsv(textStream(text), ZURICH));
    // derived: 05:00 UTC is 06:00 in Zurich on 14 March 2026 (UTC+1, see above); the fraction is dropped.
    expect(row.data).toMatchObject({ startTime: '2026-03-14T06:00:00+01:00', endTime: '2026-03-14T06:37:30+01:00' });
  });

  it('reads a local time repeated by the autumn clock change as standard time, and writes UTC as +00:00', async () => {
    // derived: EU summer time ends at 01:00 UTC on 25 October 2026 (Directive 2000/84/EC), so
    // 02:30 in Zurich happens at 00:30 UTC (+02:00) and again at 01:30 UTC (+01:00): the second counts.
    const text = `${HEADER}\n${strokeRow(101, '2026-10-25T02:30', '2026-10-25T03:05', 2450, 2451.5)}\n`;
    expect(rowsOf(await readAdvanceLogCsv(textStream(text), ZURICH))[0].data.startTime).toBe('2026-10-25T02:30:00+01:00');
    expect(rowsOf(await readAdvanceLogCsv(textStream(text), { ...ZURICH, timeZone: 'UTC' }))[0].data.startTime).toBe(
      '2026-10-25T02:30:00+00:00',
    );
  });

  it('rejects a time zone the runtime does not know (a caller mistake, not a file error)', async () => {
    await expect(readAdvanceLogCsv(textStream(`${HEADER}\n`), { ...ZURICH, timeZone: 'Mars/Olympus_Mons' })).rejects.toThrow(RangeError);
  });

  it('keeps unmapped columns in extra, naming an unnamed one by its position', async () => {
    const text = `${HEADER},Shift,\n${rows[0]},B,seal kit\n`;
    expect(rowsOf(await readAdvanceLogCsv(textStream(text), ZURICH))[0].data.extra).toEqual({ Shift: 'B', 'column 9': 'seal kit' });
  });

  it('keeps a column headed __proto__ in extra as data (the extra object is built in place, decision 46)', async () => {
    const text = `${HEADER},__proto__\n${rows[0]},  x  \n`;
    const extra = rowsOf(await readAdvanceLogCsv(textStream(text), ZURICH))[0].data.extra;
    // derived: Object.fromEntries([['__proto__', 'x']]) makes an own property; it must not become the prototype.
    expect(Object.getPrototypeOf(extra)).toBe(Object.prototype);
    expect(Object.entries(extra)).toEqual([['__proto__', 'x']]);
  });

  it('treats a stroke overlapping by 1 mm as touching, by 2 mm as overlapping', async () => {
    const touching = `${HEADER}\n${strokeRow(101, '2026-03-14T06:00', '2026-03-14T06:37', 2450, 2451.5)}\n${strokeRow(102, '2026-03-14T07:00', '2026-03-14T07:34', 2451.499, 2453)}\n`;
    expect(rowsOf(await readAdvanceLogCsv(textStream(touching), ZURICH))).toHaveLength(2);
    const overlapping = touching.replace('2451.499', '2451.498');
    expect(errorsOf(await readAdvanceLogCsv(textStream(overlapping), ZURICH))).toEqual([
      issue(3, 'Chainage start (m)', /overlaps ring 101 \(line 2\) over chainage 2451\.498–2451\.5 m/),
    ]);
  });

  it('reports rows out of order by chainage and by start time', async () => {
    const behind = `${HEADER}\n${rows[0]}\n${strokeRow(102, '2026-03-14T07:00', '2026-03-14T07:34', 2440, 2441.5)}\n`;
    expect(errorsOf(await readAdvanceLogCsv(textStream(behind), ZURICH))).toEqual([
      issue(3, 'Chainage start (m)', /out of order: this stroke starts at chainage 2440 m, behind ring 101 \(line 2\)/),
    ]);
    const earlier = `${HEADER}\n${rows[0]}\n${strokeRow(102, '2026-03-14T05:00', '2026-03-14T05:34', 2451.5, 2453)}\n`;
    expect(errorsOf(await readAdvanceLogCsv(textStream(earlier), ZURICH))).toEqual([
      issue(3, 'Start time', /out of order: this stroke starts at 2026-03-14T05:00:00\+01:00, before ring 101/),
    ]);
  });

  it('collects every error but returns at most maxErrors of them', async () => {
    const lines = Array.from({ length: 300 }, (_, i) =>
      strokeRow(
        i + 1,
        `2026-03-${String(1 + Math.floor(i / 24)).padStart(2, '0')}T${String(i % 24).padStart(2, '0')}:00`,
        `2026-03-${String(1 + Math.floor(i / 24)).padStart(2, '0')}T${String(i % 24).padStart(2, '0')}:40`,
        1000 + 1.5 * i,
        1001.5 + 1.5 * i,
        'high',
      ),
    );
    const result = await readAdvanceLogCsv(textStream(`${HEADER},Thrust (kN)\n${lines.join('\n')}\n`), { ...ZURICH, maxErrors: 25 });
    expect(errorsOf(result)).toHaveLength(25);
    expect(failureOf(result).errorCount).toBe(300); // derived: one bad thrust on each of 300 rows
    expect(errorsOf(result)[24]).toEqual(issue(26, 'Thrust (kN)', /'high' is not one/));
  });

  it('reports progress as bytes and rows grow, ending at the whole file', async () => {
    const seen: CsvProgress[] = [];
    const path = join(FIXTURES, 'good-csv', 'advance-log-comma-iso.csv');
    await readAdvanceLogCsv(createReadStream(path, { highWaterMark: 256 }), { ...ZURICH, onProgress: (p) => seen.push(p) });
    expect(seen.length).toBeGreaterThan(5);
    for (let i = 1; i < seen.length; i += 1) {
      expect(seen[i].bytesRead).toBeGreaterThanOrEqual(seen[i - 1].bytesRead);
      expect(seen[i].rowsParsed).toBeGreaterThanOrEqual(seen[i - 1].rowsParsed);
    }
    expect(seen.at(-1)).toEqual({ bytesRead: statSync(path).size, rowsParsed: 12 });
  });

  it('stops at a file larger than a smaller maxBytes', async () => {
    const result = await readAdvanceLogCsv(textStream(`${HEADER}\n${rows.join('\n')}\n`), { ...ZURICH, maxBytes: 100 });
    expect(errorsOf(result)).toEqual([issue(0, '', /larger than 100 bytes/)]);
  });
});

describe('header names with units joined by "_", unused columns, ground properties, the layout', () => {
  it('compares header names with the unit joined by a space, an underscore or in brackets alike', () => {
    // common practice, no source: "name_unit" is how machine data systems and Kerfwise's own export write units.
    for (const header of ['water_head_m', 'Water head (m)', 'WATER HEAD m', 'water head'])
      expect(normalizeHeader(header)).toBe('waterhead');
    expect(['penetration_mm_per_rev', 'penetration_mm_rev', 'Penetration [mm/rev]'].map(normalizeHeader)).toEqual([
      'penetration',
      'penetration',
      'penetration',
    ]);
    expect(['thrust_kn', 'torque_knm', 'ucs_mpa', 'chainage_start_m', 'disc_size_in', 'tilt_deg'].map(normalizeHeader)).toEqual([
      'thrust',
      'torque',
      'ucs',
      'chainagestart',
      'discsize',
      'tilt',
    ]);
  });

  it("reads the advance log under the headers of Kerfwise's own export", async () => {
    // derived: the column list of GET /strokes/export.csv (server/routes/strokes.ts); times as the export writes them (UTC).
    const header = 'ring,start_time,end_time,chainage_start_m,chainage_end_m,revolutions,penetration_mm_per_rev,rpm,thrust_kn,torque_knm';
    const text = `${header}\n101,2026-03-14T05:00:00.000Z,2026-03-14T05:37:00.000Z,2450,2451.5,190,7.9,5.2,11800,2450\n`;
    const result = await readAdvanceLogCsv(textStream(text), ZURICH);
    expect(rowsOf(result)[0].data).toEqual({
      ringNumber: 101,
      startTime: '2026-03-14T06:00:00+01:00',
      endTime: '2026-03-14T06:37:00+01:00',
      chainageStartM: 2450,
      chainageEndM: 2451.5,
      revolutions: 190,
      penetrationMmPerRev: 7.9,
      rpm: 5.2,
      thrustKn: 11800,
      torqueKnm: 2450,
      extra: {},
    });
    expect(result.unusedColumns).toEqual([]);
  });

  it('reads water head, UCS and CAI of a long section written with "_" units, and lists a column it does not read', async () => {
    const text =
      'chainage_from_m,chainage_to_m,ground_type,water_head_m,stop_allowed,stop_reason,ucs_mpa,cai,logged_by\n2400,2520,Marl,18.5,yes,,45,1.2,AB\n2520,2610,Sandstone,21,yes,,80,2.4,AB\n';
    const result = await readGeologyCsv(textStream(text));
    // derived: the inline file above, line by line.
    expect(rowsOf(result).map((r) => [r.data.waterHeadM, r.data.ucsMpa, r.data.cai])).toEqual([
      [18.5, 45, 1.2],
      [21, 80, 2.4],
    ]);
    expect(result.unusedColumns).toEqual(['logged_by']);
  });

  it('refuses two rows of one ground type with different CAI', async () => {
    const text = 'from,to,ground,stop allowed,cai\n2400,2520,Marl,yes,1.2\n2520,2610,marl,yes,1.5\n';
    expect(errorsOf(await readGeologyCsv(textStream(text)))).toEqual([
      issue(3, 'cai', /CAI 1\.5 here, but line 2 gives 1\.2 for the same ground type/),
    ]);
  });

  it('reads a cutterhead layout through the same reader, with errors by row and column', async () => {
    // derived: inline file; line 3 has a wear limit of 0 (must be > 0), line 4 a class Kerfwise does not know.
    const text =
      'number;track_radius_mm;class;disc_size_in;wear_limit_mm;twin_disc\n1;60;Centre;17;25;yes\n2;900;face;17;0;no\n3;1800,5;middle;17;25;no\n';
    const result = await readLayoutCsv(textStream(text));
    expect(errorsOf(result)).toEqual([
      issue(3, 'wear_limit_mm', /wear limit must be more than 0 mm/),
      issue(4, 'class', /Class must be centre, face or gauge/),
    ]);
    expect(result.detected).toMatchObject({ delimiter: ';', decimalComma: true });
    const good = await readLayoutCsv(textStream('position,radius (mm),class,disc size,limit\n1,60,centre,17,25\n'));
    expect(rowsOf(good)[0].data).toEqual({
      number: 1,
      trackRadiusMm: 60,
      positionClass: 'centre',
      discSizeIn: 17,
      tiltDeg: null,
      wearLimitMm: 25,
      twinDisc: false,
      angleDeg: null,
    });
  });
});
