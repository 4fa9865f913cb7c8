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

/** PostgreSQL's binary COPY header: signature, flags, header extension length (COPY documentation, "Binary Format"). */
const COPY_BINARY_HEADER = Buffer.from([0x50, 0x47, 0x43, 0x4f, 0x50, 0x59, 0x0a, 0xff, 0x0d, 0x0a, 0x00, 0, 0, 0, 0, 0, 0, 0, 0]);
/** Microseconds from the Unix epoch to PostgreSQL's (2000-01-01 UTC), as ms. */
const PG_EPOCH_MS = Date.UTC(2000, 0, 1);
const STROKE_FIELDS = 12;
const CHUNK_BYTES = 64 * 1024;

/** The extra columns as JSON text; most files have none, and `{}` needs no serialising. */
function extraJson(extra: Record<string, string>): string {
  for (const _ in extra) return JSON.stringify(extra);
  return '{}';
}

/**
 * The strokes in PostgreSQL's binary COPY format, in chunks of about 64 KB: no number or time is
 * written as text and read back (a double goes as its 8 bytes, a time as microseconds since
 * 2000-01-01, the extra columns as jsonb version 1 + JSON text). -0 goes as 0, as the text format
 * wrote it; times are the reader's ISO text read to the ms (they are kept to the second).
 */
export function* strokesCopyBinary(projectId: string, rows: readonly AdvanceLogRow[]): Generator<Buffer> {
  const uuid = Buffer.from(projectId.replaceAll('-', ''), 'hex');
  if (uuid.length !== 16) throw new Error(`Not a uuid: ${projectId}`);
  let buf = Buffer.allocUnsafe(CHUNK_BYTES);
  let at = COPY_BINARY_HEADER.copy(buf, 0);
  const float8 = (v: number | null) => {
    if (v === null) at = buf.writeInt32BE(-1, at);
    else at = buf.writeDoubleBE(v + 0, buf.writeInt32BE(8, at));
  };
  const timestamptz = (iso: string) => {
    const ms = Date.parse(iso);
    if (!Number.isFinite(ms)) throw new Error(`Not a time: ${iso}`);
    // Microseconds since 2000 stay well inside 2^53, so the double is exact; written as two 32-bit halves.
    const us = (ms - PG_EPOCH_MS) * 1000;
    if (!Number.isSafeInteger(us)) throw new Error(`Time out of range for COPY: ${iso}`);
    const high = Math.floor(us / 4294967296);
    at = buf.writeUInt32BE(us - high * 4294967296, buf.writeInt32BE(high, buf.writeInt32BE(8, at)));
  };
  for (const r of rows) {
    const json = extraJson(r.extra);
    // Fixed part: field count, 11 fields of at most 4 + 16 bytes, the jsonb length and version byte.
    const need = 2 + 11 * 20 + 5 + (json.length === 2 ? 2 : Buffer.byteLength(json)) + 2;
    if (at + need > buf.length) {
      yield buf.subarray(0, at);
      buf = Buffer.allocUnsafe(Math.max(CHUNK_BYTES, need));
      at = 0;
    }
    at = buf.writeInt16BE(STROKE_FIELDS, at);
    at = buf.writeInt32BE(16, at);
    at += uuid.copy(buf, at);
    at = buf.writeInt32BE(r.ringNumber, buf.writeInt32BE(4, at));
    timestamptz(r.startTime);
    timestamptz(r.endTime);
    float8(r.chainageStartM);
    float8(r.chainageEndM);
    float8(r.revolutions);
    float8(r.penetrationMmPerRev);
    float8(r.rpm);
    float8(r.thrustKn);
    float8(r.torqueKnm);
    const lengthAt = at;
    at = buf.writeUInt8(1, at + 4);
    const written = json.length === 2 ? buf.write('{}', at, 'latin1') : buf.write(json, at, 'utf8');
    buf.writeInt32BE(written + 1, lengthAt);
    at += written;
  }
  if (at + 2 > buf.length) {
    yield buf.subarray(0, at);
    buf = Buffer.allocUnsafe(2);
    at = 0;
  }
  at = buf.writeInt16BE(-1, at);
  yield buf.subarray(0, at);
}

/**
 * Writes new strokes with COPY … FROM STDIN (binary) on the transaction's own connection
 * (decision 46), so a refusal later in the transaction still rolls them back.
 */
async function copyStrokes(tx: DbOrTx, projectId: string, rows: readonly AdvanceLogRow[]): Promise<void> {
  if (rows.length === 0) return;
  const client = transactionClient(tx);
  await pipeline(
    Readable.from(strokesCopyBinary(projectId, rows)),
    client.query(
      copyFrom(
        'copy strokes (project_id, ring_number, start_time, end_time, chainage_start_m, chainage_end_m, revolutions, penetration_mm_per_rev, rpm, thrust_kn, torque_knm, extra) from stdin with (format binary)',
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

  // A new ring below a stored one fills a gap in what may already be counted: the incremental
  // refresh counts only rings after the last counted one, so such an import rewrites the past.
  let fillsGap = false;
  if (fresh.length > 0) {
    let lowestFresh = Infinity;
    for (const { data } of fresh) lowestFresh = Math.min(lowestFresh, data.ringNumber);
    const [above] = await tx
      .select({ ringNumber: strokes.ringNumber })
      .from(strokes)
      .where(and(eq(strokes.projectId, projectId), sql`${strokes.ringNumber} > ${lowestFresh}`))
      .limit(1);
    fillsGap = above !== undefined;
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
  // Replaced rings and rings filling a gap change the past; new rings after the last stored one only add.
  if (fresh.length + conflicts.length > 0)
    await driveDataChanged(tx, projectId, {
      rewritesPast: conflicts.length > 0 || fillsGap,
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
