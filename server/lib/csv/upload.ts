/**
 * The HTTP side of every CSV import: the request body as a stream the reader may stop early, the
 * column mapping (chosen now or remembered per project and kind), the refusal as a 4xx whose issues
 * point at row and column, and the warnings naming columns the import does not read.
 */
import { and, eq, sql } from 'drizzle-orm';
import type { Request } from 'express';
import { once } from 'node:events';
import { PassThrough } from 'node:stream';
import type { z } from 'zod';
import { db, type DbOrTx } from '../../db/client';
import { importMappings } from '../../db/schema';
import { badRequest, HttpError } from '../http-error';
import type { CsvIssue } from '../../../shared/schemas/advance-log';

/** The imports whose column mapping is remembered per project (`import_mappings.kind`). */
export type MappingKind = 'advance_log' | 'geology';

/**
 * The request body as a stream the CSV reader may stop early. When it stops (too large, binary),
 * the rest of the upload is read and dropped, so the client receives the answer instead of a reset
 * connection.
 */
export function uploadStream(req: Request): { body: PassThrough; drain: () => Promise<void> } {
  const body = new PassThrough();
  req.pipe(body);
  return {
    body,
    drain: async () => {
      if (req.readableEnded) return;
      req.unpipe(body);
      req.resume();
      await once(req, 'end');
    },
  };
}

/** Refuses a JSON or form upload with a message that says what to send instead. */
export function requireRawCsv(req: Request): void {
  if (req.is('application/json') || req.is('multipart/form-data')) {
    throw badRequest('Send the CSV file itself as the request body (Content-Type text/csv).');
  }
}

/** Turns the reader's refusal into a 4xx whose issues point at row and column. */
export function csvRefusal(errors: CsvIssue[], errorCount: number, detected: unknown): HttpError {
  const tooBig = errors.some((e) => e.row === 0 && /50 MB|too large|larger than/i.test(e.message));
  const issues = errors.map((e) => ({
    path: e.row === 0 ? 'file' : `row ${e.row}${e.column ? `, ${e.column}` : ''}`,
    row: e.row,
    column: e.column,
    message: e.message,
  }));
  const whole = errors.find((e) => e.row === 0);
  const message = whole ? `${whole.message} Nothing was imported.` : `${errorCount} problem(s) in the file; nothing was imported.`;
  return new HttpError(tooBig ? 413 : 400, message, issues, { errorCount, detected });
}

/** The mapping remembered for a project's imports of one kind, or null before the first. */
export async function storedMapping(projectId: string, kind: MappingKind): Promise<Record<string, string> | null> {
  const [stored] = await db
    .select()
    .from(importMappings)
    .where(and(eq(importMappings.projectId, projectId), eq(importMappings.kind, kind)));
  return (stored?.mapping as Record<string, string> | undefined) ?? null;
}

/**
 * The columns for this upload: `mapping` chosen with it (JSON in the query, checked by `schema`),
 * else `remembered` from the project's last import of this kind (used where the file has the column).
 */
export async function chosenMapping(
  projectId: string,
  kind: MappingKind,
  raw: string | undefined,
  schema: z.ZodType<Record<string, string>>,
): Promise<{ mapping?: Record<string, string>; remembered?: Record<string, string> }> {
  if (raw) {
    let parsed: unknown;
    try {
      parsed = JSON.parse(raw);
    } catch {
      throw badRequest('The column mapping is not valid JSON.');
    }
    return { mapping: schema.parse(parsed) };
  }
  return { remembered: (await storedMapping(projectId, kind)) ?? undefined };
}

/** Remembers the mapping an import used, for the next import of that kind (inside the import's transaction). */
export async function rememberMapping(tx: DbOrTx, projectId: string, kind: MappingKind, mapping: Record<string, string>): Promise<void> {
  await tx
    .insert(importMappings)
    .values({ projectId, kind, mapping })
    .onConflictDoUpdate({ target: [importMappings.projectId, importMappings.kind], set: { mapping, updatedAt: sql`now()` } });
}

/**
 * One warning per column that fills no field, so nothing in a file is dropped without a word.
 * `keptAs` says where such values go when they are kept (the advance log keeps them with each
 * ring); `canMap` whether the upload offers a column mapping to fix it.
 */
export function unusedColumnWarnings(unusedColumns: string[], options: { what: string; keptAs?: string; canMap: boolean }): CsvIssue[] {
  const fix = options.canMap ? 'choose it in the column mapping' : 'rename the column';
  return unusedColumns.map((column) => ({
    row: 1,
    column,
    message: options.keptAs
      ? `Kerfwise reads no field of ${options.what} from '${column}'; its values are kept ${options.keptAs}. If it holds one of the fields, ${fix}.`
      : `Kerfwise does not read '${column}' in ${options.what}; its values were not imported. If it holds one of the fields, ${fix}.`,
  }));
}
