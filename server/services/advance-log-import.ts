/**
 * Imports an advance-log CSV (already read and checked row by row by lib/csv/advance-log.ts) against
 * what is stored: rings already there with the same values are skipped, so importing a file again
 * adds nothing; a ring stored with other values is a conflict that needs an explicit "replace";
 * everything else goes in, all or nothing, in one transaction.
 */
import { and, eq, inArray, sql } from 'drizzle-orm';
import type { AdvanceLogRow } from '../../shared/schemas/advance-log';
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
 * Inserts many strokes in one statement: one array per column, unnested by PostgreSQL. Much
 * cheaper than building a row-by-row INSERT for tens of thousands of rows.
 */
async function insertStrokes(tx: DbOrTx, projectId: string, rows: AdvanceLogRow[]): Promise<void> {
  for (let i = 0; i < rows.length; i += 20_000) {
    const chunk = rows.slice(i, i + 20_000);
    // sql.param keeps each array one parameter (node-postgres sends it as an array literal).
    const col = <T>(f: (r: AdvanceLogRow) => T) => sql.param(chunk.map(f));
    await tx.execute(sql`
      insert into strokes (project_id, ring_number, start_time, end_time, chainage_start_m, chainage_end_m, revolutions, penetration_mm_per_rev, rpm, thrust_kn, torque_knm, extra)
      select ${projectId}::uuid, * from unnest(
        ${col((r) => r.ringNumber)}::int[], ${col((r) => r.startTime)}::timestamptz[], ${col((r) => r.endTime)}::timestamptz[],
        ${col((r) => r.chainageStartM)}::float8[], ${col((r) => r.chainageEndM)}::float8[], ${col((r) => r.revolutions)}::float8[],
        ${col((r) => r.penetrationMmPerRev)}::float8[], ${col((r) => r.rpm)}::float8[], ${col((r) => r.thrustKn)}::float8[],
        ${col((r) => r.torqueKnm)}::float8[], ${col((r) => JSON.stringify(r.extra))}::jsonb[])`);
  }
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
  for (let i = 0; i < rings.length; i += 5000) {
    const found = await tx
      .select()
      .from(strokes)
      .where(and(eq(strokes.projectId, projectId), inArray(strokes.ringNumber, rings.slice(i, i + 5000))));
    for (const s of found) stored.set(s.ringNumber, s);
  }
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
  await insertStrokes(
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
