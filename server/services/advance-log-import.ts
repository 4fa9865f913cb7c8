/**
 * Imports an advance-log CSV (already read and checked row by row by lib/csv/advance-log.ts) against
 * what is stored: rings already there with the same values are skipped, so importing a file again
 * adds nothing; a ring stored with other values is a conflict that needs an explicit "replace";
 * everything else goes in, all or nothing, in one transaction.
 */
import { and, between, eq, getTableColumns, sql } from 'drizzle-orm';
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
import { strokeEndMsSql, strokeStartMsSql, type KnownStroke, type KnownStrokes } from './rolled-distance';

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
/** The extra columns as COPY text of JSON; most files have none, and `{}` needs no serialising. */
function copyExtra(extra: Record<string, string>): string {
  for (const _ in extra) return copyText(JSON.stringify(extra));
  return '{}';
}

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
      chunk += `${projectId}\t${r.ringNumber}\t${r.startTime}\t${r.endTime}\t${r.chainageStartM}\t${r.chainageEndM}\t${copyNumber(r.revolutions)}\t${copyNumber(r.penetrationMmPerRev)}\t${copyNumber(r.rpm)}\t${copyNumber(r.thrustKn)}\t${copyNumber(r.torqueKnm)}\t${copyExtra(r.extra)}\n`;
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

/** A stored stroke as the import reads it: the row, and its times as the rolled-distance refresh reads them. */
type StoredWithMs = StoredStroke & { startMs: number; endMs: number };

/** -0 as 0: what a number reads back as from PostgreSQL (COPY and parameters write -0 as "0"). */
const stored0 = (v: number) => v + 0;
const stored0OrNull = (v: number | null) => (v === null ? null : v + 0);

/** A stroke of the file as the refresh will find it stored: the file's values, times to the ms. */
function knownFromRow(r: AdvanceLogRow): KnownStroke {
  return {
    id: `file:${r.ringNumber}`,
    ringNumber: r.ringNumber,
    chainageStartM: stored0(r.chainageStartM),
    chainageEndM: stored0(r.chainageEndM),
    revolutions: stored0OrNull(r.revolutions),
    penetrationMmPerRev: stored0OrNull(r.penetrationMmPerRev),
    startMs: Date.parse(r.startTime),
    endMs: Date.parse(r.endTime),
  };
}

function knownFromStored(s: StoredWithMs): KnownStroke {
  return {
    id: String(s.id),
    ringNumber: s.ringNumber,
    chainageStartM: s.chainageStartM,
    chainageEndM: s.chainageEndM,
    revolutions: s.revolutions,
    penetrationMmPerRev: s.penetrationMmPerRev,
    startMs: s.startMs,
    endMs: s.endMs,
  };
}

export async function importAdvanceLog(
  tx: DbOrTx,
  projectId: string,
  userId: string,
  rows: { line: number; data: AdvanceLogRow }[],
  options: { replace: boolean; mapping: Record<string, string> },
): Promise<ImportOutcome> {
  let minRing = Infinity;
  let maxRing = -Infinity;
  for (const r of rows) {
    if (r.data.ringNumber < minRing) minRing = r.data.ringNumber;
    if (r.data.ringNumber > maxRing) maxRing = r.data.ringNumber;
  }
  // Every stored stroke from the file's first ring to its last, in one range read of the ring
  // index: the file's rings among them are compared with it, and all of them are what the
  // rolled-distance refresh needs over that range (so it does not read them back).
  const inRange: StoredWithMs[] =
    rows.length === 0
      ? []
      : await tx
          .select({ ...getTableColumns(strokes), startMs: sql<number>`${strokeStartMsSql}`, endMs: sql<number>`${strokeEndMsSql}` })
          .from(strokes)
          .where(and(eq(strokes.projectId, projectId), between(strokes.ringNumber, minRing, maxRing)))
          .orderBy(strokes.ringNumber);
  const stored = new Map<number, StoredWithMs>();
  for (const s of inRange) stored.set(s.ringNumber, s);
  const fresh: typeof rows = [];
  const conflicts: ((typeof rows)[number] & { diffs: string[]; stored: StoredWithMs })[] = [];
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
    let lo = Infinity;
    let hi = -Infinity;
    for (const { data } of fresh) {
      lo = Math.min(lo, data.chainageStartM, data.chainageEndM);
      hi = Math.max(hi, data.chainageStartM, data.chainageEndM);
    }
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
    if (near.length > 0)
      for (const r of fresh) {
        const a = Math.min(r.data.chainageStartM, r.data.chainageEndM);
        const b = Math.max(r.data.chainageStartM, r.data.chainageEndM);
        const hit = near.find(
          (n) => n.ringNumber !== r.data.ringNumber && Math.min(n.a, n.b) < b - 0.001 && Math.max(n.a, n.b) > a + 0.001,
        );
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
    before: conflicts.length ? conflicts.map((c) => storedRow(c.stored)) : null,
    after: {
      inserted: fresh.length,
      unchanged,
      replaced: conflicts.length,
      rings: rows.length ? [minRing, maxRing] : [],
    },
  });
  // Replaced rings change the past; new rings after the last computed one only add.
  if (fresh.length + conflicts.length > 0)
    await driveDataChanged(tx, projectId, {
      rewritesPast: conflicts.length > 0,
      refreshNow: true,
      known: knownAfterImport(minRing, maxRing, rows, inRange, stored),
    });
  return { inserted: fresh.length, unchanged, replaced: conflicts.length };
}

/** The stored row without the times the import read beside it (as the audit log has always kept it). */
function storedRow(s: StoredWithMs): StoredStroke {
  const { startMs: _startMs, endMs: _endMs, ...row } = s;
  return row;
}

/**
 * Every stroke stored from `minRing` to `maxRing` once the import is written, from memory: the
 * file's values for its new and replaced rings, the stored values for its unchanged rings (equal
 * within the tolerances, not to the bit) and for the stored rings it does not name.
 */
function knownAfterImport(
  minRing: number,
  maxRing: number,
  rows: readonly { data: AdvanceLogRow }[],
  inRange: readonly StoredWithMs[],
  stored: ReadonlyMap<number, StoredWithMs>,
): KnownStrokes {
  const inFile = new Set<number>();
  const known: KnownStroke[] = [];
  for (const { data } of rows) {
    inFile.add(data.ringNumber);
    const s = stored.get(data.ringNumber);
    // Unchanged: the stored stroke stays; otherwise (new or replaced) the file's values are stored now.
    known.push(s && strokeDifferences(s, data).length === 0 ? knownFromStored(s) : knownFromRow(data));
  }
  let ordered = true;
  for (const s of inRange) {
    if (inFile.has(s.ringNumber)) continue;
    known.push(knownFromStored(s));
    ordered = false;
  }
  for (let i = 1; ordered && i < known.length; i++) ordered = known[i - 1].ringNumber < known[i].ringNumber;
  if (!ordered) known.sort((x, y) => x.ringNumber - y.ringNumber);
  return { fromRing: minRing, toRing: maxRing, strokes: known };
}
