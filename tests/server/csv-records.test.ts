/**
 * server/lib/csv/records.ts splits plain lines itself and hands the rest of a file to csv-parse
 * (decision 46). Check values: derived — for any file and any chunking, the records, their line
 * counts and the refused records equal what csv-parse alone (the same options) gives.
 */
import type { CsvError } from 'csv-parse';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { csvParser, csvRecords, MAX_RECORD_CHARS } from '../../server/lib/csv/records';

interface Seen {
  records: [string[], number, number, number][];
  skipped: [string, number | undefined, number | undefined, number | undefined][];
}

const skippedOf = (err: CsvError) => {
  const e = err as unknown as { lines?: number; records?: number; empty_lines?: number };
  return [err.code, e.lines, e.records, e.empty_lines] as Seen['skipped'][number];
};

async function* chunked(chunks: string[]): AsyncGenerator<string> {
  for (const chunk of chunks) yield chunk;
}

async function csvParseAlone(chunks: string[], delimiter: string): Promise<Seen> {
  const seen: Seen = { records: [], skipped: [] };
  const parser = csvParser(delimiter, (err) => seen.skipped.push(skippedOf(err)));
  const done = (async () => {
    for await (const { record, info } of parser as AsyncIterable<{
      record: string[];
      info: { lines: number; empty_lines: number; records: number };
    }>)
      seen.records.push([record, info.lines, info.empty_lines, info.records]);
  })();
  for (const chunk of chunks) parser.write(chunk);
  parser.end();
  await done;
  return seen;
}

async function ours(chunks: string[], delimiter: string): Promise<Seen> {
  const seen: Seen = { records: [], skipped: [] };
  for await (const batch of csvRecords(chunked(chunks)[Symbol.asyncIterator](), delimiter, (err) => seen.skipped.push(skippedOf(err))))
    for (const { record, info } of batch) seen.records.push([record, info.lines, info.empty_lines, info.records]);
  return seen;
}

/** Cuts `text` at the given fractions (the chunks a stream may deliver). */
function cut(text: string, cuts: number[]): string[] {
  const at = [...new Set(cuts.map((c) => Math.floor(c * text.length)))].sort((a, b) => a - b);
  const chunks: string[] = [];
  let from = 0;
  for (const i of at) {
    if (i > from) chunks.push(text.slice(from, i));
    from = Math.max(from, i);
  }
  chunks.push(text.slice(from));
  return chunks.filter((c) => c.length > 0);
}

const piece = fc.constantFrom('ring', '12.5', 'x', ' ', ',', ';', '\t', '\n', '\n', '\n', '\r\n', '\r\n', '\r', '"', '""', '"a,b"', '');
const lineEnding = fc.constantFrom('\n', '\r\n');

describe('csvRecords reads a file exactly as csv-parse alone', () => {
  it('plain files, LF and CR LF, with empty and blank lines, in any chunking', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.array(fc.constantFrom('ring', '12.5', '', ' ', 'x y'), { minLength: 1, maxLength: 5 }), { maxLength: 30 }),
        lineEnding,
        fc.boolean(),
        fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { maxLength: 6 }),
        async (rows, ending, finalEnding, cuts) => {
          const text = rows.map((r) => r.join(',')).join(ending) + (finalEnding ? ending : '');
          expect(await ours(cut(text, cuts), ',')).toEqual(await csvParseAlone(cut(text, cuts), ','));
        },
      ),
      { seed: 46, numRuns: 300 },
    );
  });

  it('files with quotes, stray carriage returns and mixed line endings, in any chunking', async () => {
    for (const delimiter of [',', ';', '\t']) {
      await fc.assert(
        fc.asyncProperty(
          fc.array(piece, { maxLength: 60 }),
          fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { maxLength: 6 }),
          async (pieces, cuts) => {
            const text = pieces.join('');
            expect(await ours(cut(text, cuts), delimiter)).toEqual(await csvParseAlone(cut(text, cuts), delimiter));
          },
        ),
        { seed: 4646, numRuns: 400 },
      );
    }
  });

  it('a record longer than csv-parse takes, before and after plain lines', async () => {
    const long = 'y'.repeat(MAX_RECORD_CHARS + 10);
    for (const text of [`a,b\n1,2\n${long}\n3,4\n`, `a,b\r\n1,2\r\n1,${long}\r\n3,4`, `${long}\n1,2\n`, `a,b\n"1,${long}"\n3,4\n`]) {
      const chunks = cut(text, [0.1, 0.5, 0.51, 0.9]);
      const alone = await csvParseAlone(chunks, ',');
      expect(alone.skipped.map((s) => s[0])).toContain('CSV_MAX_RECORD_SIZE');
      const mine = await ours(chunks, ',');
      expect(mine.records).toEqual(alone.records);
      // csv-parse may report one long record once per chunk it spans; the reader keeps the first.
      expect(mine.skipped[0]).toEqual(alone.skipped[0]);
    }
  });

  it('an unclosed quote is refused at the record csv-parse names, counted from the start of the file', async () => {
    const text = 'ring,start\n1,a\n\n2,b\n3,"c\n4,d\n';
    const alone = await csvParseAlone([text], ',');
    // derived: the quote opens on line 5 and is still open at the end of the text (line 6 when
    // csv-parse gives up), after three records (header, rings 1 and 2) and one empty line.
    expect(alone.skipped).toEqual([['CSV_QUOTE_NOT_CLOSED', 6, 3, 1]]);
    expect(await ours([text.slice(0, 7), text.slice(7)], ',')).toEqual(alone);
  });
});
