/** The client's reading of the server's error body (server/middleware/error.ts writes it). */
import { describe, expect, it } from 'vitest';
import { apiErrorFrom } from '../../src/lib/api-client';

describe('ApiError from an error body', () => {
  it('keeps the row and column of import issues and the extra details', () => {
    // Shape as the CSV import answers a refused file (DEVELOPERS.md decision 17: errors by row and column).
    const err = apiErrorFrom(400, {
      error: {
        message: '2 problems in the file.',
        issues: [
          { path: 'rows.4.advanceMm', message: 'Not a number.', row: 4, column: 'Advance (mm)' },
          { path: 'header', message: 'No ring column.' },
        ],
        errorCount: 2,
      },
    });
    expect(err.status).toBe(400);
    expect(err.message).toBe('2 problems in the file.');
    expect(err.issues).toEqual([
      { path: 'rows.4.advanceMm', message: 'Not a number.', row: 4, column: 'Advance (mm)' },
      { path: 'header', message: 'No ring column.' },
    ]);
    expect(err.details).toEqual({ errorCount: 2 });
  });

  it('names the status when the body is not an error body', () => {
    const err = apiErrorFrom(502, null);
    expect(err.message).toBe('The server answered 502.');
    expect(err.issues).toEqual([]);
  });
});
