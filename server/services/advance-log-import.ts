/**
 * Imports an advance-log CSV (already read and checked row by row by lib/csv/advance-log.ts) against
 * what is stored: rings already there with the same values are skipped, so importing a file again
 * adds nothing; a ring stored with other values is a conflict that needs an explicit "replace";
 * everything else goes in, all or nothing, in one transaction.
 */
import { and, eq, sql } from 'drizzle-orm';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { from as copyFrom } from 'pg-copy-streams';
import type { AdvanceLogRow } from '../../shared/schemas/advance-log';
import type pg from 'pg';
import type { DbOrTx } from '../db/client';
import { strokes } from '../db/schema';
import { audit } from '../lib/audit';
import { rememberMapping } from '../lib/csv/upload';
import { ConflictError, InvalidInputError, type Issue } from '../lib/errors';
import { driveDataChanged } from './drive-data';

type StoredStroke = typeof strokes.$inferSelect;

const close = (a: number | null, b: number | null, tol: number) => (a === null || b === null ? a === b : Math.abs(a - b) <= tol);

/** What differs between a stored ring and a row of the file (times to the second, chainage to the mm). */
export function strokeDifferences(stored: StoredStroke, row: AdvanceLogRow): string[] {
  const diffs: string[] = [];
  if (Math.abs(stored.startTime.getTime() - Date.parse(row.startTime)) >= 1000) diffs.push('start time');
  if (Math.abs(stored.endTime.getTime() - Date.parse(row.endTime)) >= 1000) diffs.push('end time');
  if (!close(stored.chainageStartM, row.chainageStartM, 0.001)) diffs.push('chainage start');
  if (!close(stored.chainageEndM, row.chainageEndM, 0.001)) diffs.push('chainage end');
  if (!close(stored.revolutions, row.revolutions, 0.05)) diffs.push('revolutions');
  if (!close(stored.penetrationMmPerRev, row.penetrationMmPerRev, 0.005)) diffs.push('penetration');
  return diffs;
}

/**
 * The connection of a Drizzle transaction (node-postgres), for COPY, which Drizzle does not speak.
 * Refuses the pool itself: COPY outside the import's transaction could not be rolled back.
 */
function transactionClient(tx: DbOrTx): pg.PoolClient {
  const client = (tx as unknown as { session?: { client?: unknown } }).session?.client;
  if (!client || typeof (client as pg.PoolClient).release !== 'function') {
    throw new Error('COPY of strokes needs a transaction (db.transaction), not the pool.');
  }
  return client as pg.PoolClient;
}

/** COPY text-format field: backslash is COPY's escape character (JSON.stringify already escapes tabs and line breaks). */
const copyText = (v: string) => (v.includes('\\') ? v.replaceAll('\\', '\\\\') : v);
const copyNumber = (v: number | null) => (v === null ? '\\N' : String(v));

/**
 * Writes new strokes with COPY … FROM STDIN on the transaction's own connection (decision 46), so a
 * refusal later in the transaction still rolls them back. Numbers go as JavaScript writes them
 * (the shortest text that reads back as the same double), times as the reader's ISO 8601 text.
 */
async function copyStrokes(tx: DbOrTx, projectId: string, rows: readonly AdvanceLogRow[]): Promise<void> {
  if (rows.length === 0) return;
  const client = transactionClient(tx);
  function* lines(): Generator<string> {
    let chunk = '';
    for (const r of rows) {
      chunk += `${projectId}\t${r.ringNumber}\t${r.startTime}\t${r.endTime}\t${r.chainageStartM}\t${r.chainageEndM}\t${copyNumber(r.revolutions)}\t${copyNumber(r.penetrationMmPerRev)}\t${copyNumber(r.rpm)}\t${copyNumber(r.thrustKn)}\t${copyNumber(r.torqueKnm)}\t${copyText(JSON.stringify(r.extra))}\n`;
      if (chunk.length >= 64 * 1024) {
        yield chunk;
        chunk = '';
      }
    }
    if (chunk) yield chunk;
  }
  await pipeline(
    Readable.from(lines()),
    client.query(
      copyFrom(
        'copy strokes (project_id, ring_number, start_time, end_time, chainage_start_m, chainage_end_m, revolutions, penetration_mm_per_rev, rpm, thrust_kn, torque_knm, extra) from stdin',
      ),
    ),
  );
}

export interface ImportOutcome {
  inserted: number;
  unchanged: number;
  replaced: number;
}

export async function importAdvanceLog(
  tx: DbOrTx,
  projectId: string,
  userId: string,
  rows: { line: number; data: AdvanceLogRow }[],
  options: { replace: boolean; mapping: Record<string, string> },
): Promise<ImportOutcome> {
  const rings = rows.map((r) => r.data.ringNumber);
  const stored = new Map<number, StoredStroke>();
  // One array parameter for all rings (not one parameter per ring): only the rings already stored come back.
  const found = await tx
    .select()
    .from(strokes)
    .where(and(eq(strokes.projectId, projectId), sql`${strokes.ringNumber} = any(${sql.param(rings)}::int[])`));
  for (const s of found) stored.set(s.ringNumber, s);
  const fresh: typeof rows = [];
  const conflicts: ((typeof rows)[number] & { diffs: string[]; stored: StoredStroke })[] = [];
  let unchanged = 0;
  for (const r of rows) {
    const s = stored.get(r.data.ringNumber);
    if (!s) fresh.push(r);
    else {
      const diffs = strokeDifferences(s, r.data);
      if (diffs.length === 0) unchanged++;
      else conflicts.push({ ...r, diffs, stored: s });
    }
  }
  if (conflicts.length > 0 && !options.replace) {
    const issues: Issue[] = conflicts.slice(0, 200).map((c) => ({
      path: `row ${c.line}`,
      row: c.line,
      column: 'ring',
      message: `Ring ${c.data.ringNumber} is already stored with a different ${c.diffs.join(', ')}. Import with "replace" to overwrite it.`,
    }));
    throw new ConflictError(
      `${conflicts.length} ring(s) of the file differ from the stored ones; nothing was imported. Check them, then import again with "replace" to overwrite.`,
      issues,
      { conflictCount: conflicts.length },
    );
  }

  // New rings may not overlap stored strokes in chainage (the engine checked the file itself).
  if (fresh.length > 0) {
    const lo = Math.min(...fresh.map((r) => Math.min(r.data.chainageStartM, r.data.chainageEndM)));
    const hi = Math.max(...fresh.map((r) => Math.max(r.data.chainageStartM, r.data.chainageEndM)));
    const near = await tx
      .select({ ringNumber: strokes.ringNumber, a: strokes.chainageStartM, b: strokes.chainageEndM })
      .from(strokes)
      .where(
        and(
          eq(strokes.projectId, projectId),
          sql`least(${strokes.chainageStartM}, ${strokes.chainageEndM}) < ${hi}`,
          sql`greatest(${strokes.chainageStartM}, ${strokes.chainageEndM}) > ${lo}`,
        ),
      );
    const issues: Issue[] = [];
    for (const r of fresh) {
      const a = Math.min(r.data.chainageStartM, r.data.chainageEndM);
      const b = Math.max(r.data.chainageStartM, r.data.chainageEndM);
      const hit = near.find((n) => n.ringNumber !== r.data.ringNumber && Math.min(n.a, n.b) < b - 0.001 && Math.max(n.a, n.b) > a + 0.001);
      if (hit)
        issues.push({
          path: `row ${r.line}`,
          row: r.line,
          column: 'chainage start',
          message: `Ring ${r.data.ringNumber} overlaps the stored ring ${hit.ringNumber} (${Math.min(hit.a, hit.b)}–${Math.max(hit.a, hit.b)} m).`,
        });
    }
    if (issues.length > 0)
      throw new InvalidInputError(`${issues.length} row(s) overlap strokes already stored; nothing was imported.`, issues.slice(0, 200));
  }

  const values = (r: AdvanceLogRow) => ({
    ringNumber: r.ringNumber,
    startTime: new Date(r.startTime),
    endTime: new Date(r.endTime),
    chainageStartM: r.chainageStartM,
    chainageEndM: r.chainageEndM,
    revolutions: r.revolutions,
    penetrationMmPerRev: r.penetrationMmPerRev,
    rpm: r.rpm,
    thrustKn: r.thrustKn,
    torqueKnm: r.torqueKnm,
    extra: r.extra,
  });
  await copyStrokes(
    tx,
    projectId,
    fresh.map((r) => r.data),
  );
  for (const c of conflicts) {
    await tx.update(strokes).set(values(c.data)).where(eq(strokes.id, c.stored.id));
  }
  await rememberMapping(tx, projectId, 'advance_log', options.mapping);
  await audit(tx, {
    userId,
    projectId,
    entity: 'advance_log',
    entityId: projectId,
    action: 'import',
    before: conflicts.length ? conflicts.map((c) => c.stored) : null,
    after: {
      inserted: fresh.length,
      unchanged,
      replaced: conflicts.length,
      rings: rings.length ? [Math.min(...rings), Math.max(...rings)] : [],
    },
  });
  // Replaced rings change the past; new rings after the last computed one only add.
  if (fresh.length + conflicts.length > 0) await driveDataChanged(tx, projectId, { rewritesPast: conflicts.length > 0, refreshNow: true });
  return { inserted: fresh.length, unchanged, replaced: conflicts.length };
}
