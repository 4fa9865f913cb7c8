/**
 * Keeps `fitting_rolled_km` — the distance each disc has rolled in each ground type during each
 * fitted period — and `entry_rolled_km` — the same from the fitting up to each inspection, the
 * exposure of that measurement — up to date. New strokes appended after the last computed ring are added to the
 * stored totals; anything that changes the past (a layout radius, the geology, a replaced stroke,
 * a change recorded back in time) drops the state, and the next refresh recomputes the drive.
 */
import { and, eq, sql } from 'drizzle-orm';
import type { GeologySection } from '../../shared/domain/geology';
import {
  revolutionsByGroundMs,
  sumRolledKmForPeriods,
  type PeriodRolledKm,
  type RadiusPeriod,
  type TimedStroke,
} from '../../shared/domain/rolled-distance';
import type { DbOrTx } from '../db/client';
import {
  entryRolledKm,
  fittingRolledKm,
  fittings,
  geologySections,
  inspectionEntries,
  inspectionRounds,
  positions,
  rolledDistanceState,
  strokes,
} from '../db/schema';

export const UNKNOWN_GROUND = 'unknown';

/** Forget the incremental state: the next refresh recomputes the whole drive. */
export async function invalidateRolledDistance(tx: DbOrTx, projectId: string): Promise<void> {
  await tx.delete(rolledDistanceState).where(eq(rolledDistanceState.projectId, projectId));
}

export interface RefreshResult {
  mode: 'full' | 'incremental' | 'none';
  strokes: number;
  errors: { ringNumber: number; reason: string }[];
}

/**
 * The columns of a stroke the computation reads (not the extra data, thrust, torque or speed);
 * times as ms since the epoch (to the ms, as a Date would hold them), cheaper to read than
 * timestamps for the 10,000 strokes of an import.
 */
type StrokeRow = {
  id: string;
  ring_number: number;
  chainage_start_m: number;
  chainage_end_m: number;
  revolutions: number | null;
  penetration_mm_per_rev: number | null;
  start_ms: number;
  end_ms: number;
};

/** A stroke as the refresh uses it: the stored values, times in ms since the epoch (floored to the ms). */
export type KnownStroke = Omit<TimedStroke, 'startMs' | 'endMs'> & { startMs: number; endMs: number };

/**
 * Strokes a write already holds in memory, so the refresh in its transaction need not read them
 * back: every stroke stored for the drive with a ring number from `fromRing` to `toRing` (both
 * included), with the values as stored once the write is done, in ring order. Ids only need to be
 * unique among them (they name no row; errors are reported by ring).
 */
export interface KnownStrokes {
  fromRing: number;
  toRing: number;
  strokes: readonly KnownStroke[];
}

const fromRow = (s: StrokeRow): KnownStroke => ({
  id: String(s.id),
  ringNumber: s.ring_number,
  chainageStartM: s.chainage_start_m,
  chainageEndM: s.chainage_end_m,
  revolutions: s.revolutions,
  penetrationMmPerRev: s.penetration_mm_per_rev,
  startMs: s.start_ms,
  endMs: s.end_ms,
});

/** The SQL of a stroke's times as the refresh reads them: ms since the epoch, floored (as a Date holds a timestamp). */
export const strokeStartMsSql = sql`floor(extract(epoch from start_time) * 1000)::float8`;
export const strokeEndMsSql = sql`floor(extract(epoch from end_time) * 1000)::float8`;

/**
 * The strokes the refresh counts, in ring order: all of the drive's (full) or those after
 * `afterRing` (incremental). With `known`, the rings it covers come from memory and only the
 * stored strokes before and after that range are read.
 */
async function strokesToCount(tx: DbOrTx, projectId: string, afterRing: number | null, known?: KnownStrokes): Promise<KnownStroke[]> {
  const outside = known ? sql`and (ring_number < ${known.fromRing} or ring_number > ${known.toRing})` : sql``;
  const after = afterRing === null ? sql`` : sql`and ring_number > ${afterRing}`;
  const rows = (
    await tx.execute<StrokeRow>(sql`
      select id, ring_number, chainage_start_m, chainage_end_m, revolutions, penetration_mm_per_rev,
             ${strokeStartMsSql} as start_ms, ${strokeEndMsSql} as end_ms
      from strokes
      where project_id = ${projectId} ${after} ${outside}
      order by ring_number`)
  ).rows.map(fromRow);
  if (!known) return rows;
  const inRange = afterRing === null ? known.strokes : known.strokes.filter((s) => s.ringNumber > afterRing);
  if (inRange.length === 0) return rows;
  // Stored strokes below the range, the range, then those above it: ring order throughout.
  let below = 0;
  while (below < rows.length && rows[below].ringNumber < known.fromRing) below++;
  if (below === rows.length) return rows.length === 0 ? [...inRange] : rows.concat(inRange);
  return rows.slice(0, below).concat(inRange, rows.slice(below));
}

/**
 * Brings the rolled distances of a project up to date, incrementally when only new strokes came
 * in. `known`: strokes the caller's write holds in memory (see KnownStrokes); the result is the
 * same as without them.
 */
export async function refreshRolledDistance(tx: DbOrTx, projectId: string, known?: KnownStrokes): Promise<RefreshResult> {
  const [state] = await tx.select().from(rolledDistanceState).where(eq(rolledDistanceState.projectId, projectId)).for('update');
  const full = !state;
  const strokeRows = await strokesToCount(tx, projectId, full ? null : state.throughRing, known);
  if (!full && strokeRows.length === 0) return { mode: 'none', strokes: 0, errors: [] };

  const positionRows = await tx.select().from(positions).where(eq(positions.projectId, projectId));
  const sectionRows = await tx.select().from(geologySections).where(eq(geologySections.projectId, projectId));
  const fittingRows = await tx.select().from(fittings).where(eq(fittings.projectId, projectId));

  const sections: GeologySection[] = sectionRows.map((s) => ({
    chainageFromM: s.chainageFromM,
    chainageToM: s.chainageToM,
    groundTypeId: s.groundTypeId,
    waterHeadM: s.waterHeadM,
    stopAllowed: s.stopAllowed,
    stopReason: s.stopReason,
  }));
  const { pieces, errors } = revolutionsByGroundMs(strokeRows, sections);
  // A stored radius the computation cannot use (0, negative) rolls nothing: its fittings are left out here, and the
  // forecast and parts demand name the position (usableTrackRadius).
  const radius = new Map(positionRows.filter((p) => usableTrackRadius(p.trackRadiusMm)).map((p) => [p.id, p.trackRadiusMm]));
  const periods: RadiusPeriod[] = fittingRows
    .filter((f) => radius.has(f.positionId))
    .map((f) => ({
      id: f.id,
      positionId: f.positionId,
      trackRadiusMm: radius.get(f.positionId)!,
      fromTime: f.fittedAt.toISOString(),
      toTime: f.removedAt?.toISOString() ?? null,
    }));
  // An inspection's exposure is a window too: from its disc's fitting to the round.
  const fittingById = new Map(fittingRows.map((f) => [f.id, f]));
  // Without a fitted period there is no exposure window either (a drive before its first fitting).
  const entryRows =
    periods.length === 0
      ? []
      : await tx
          .select({ id: inspectionEntries.id, fittingId: inspectionEntries.fittingId, at: inspectionRounds.startedAt })
          .from(inspectionEntries)
          .innerJoin(inspectionRounds, eq(inspectionRounds.id, inspectionEntries.roundId))
          .where(and(eq(inspectionEntries.projectId, projectId), sql`${inspectionEntries.fittingId} is not null`));
  const entryWindows: RadiusPeriod[] = entryRows.flatMap((e) => {
    const f = fittingById.get(e.fittingId!);
    return f && radius.has(f.positionId)
      ? [
          {
            id: e.id,
            positionId: f.positionId,
            trackRadiusMm: radius.get(f.positionId)!,
            fromTime: f.fittedAt.toISOString(),
            toTime: e.at.toISOString(),
          },
        ]
      : [];
  });
  const totals = sumRolledKmForPeriods(periods, pieces);
  const entryTotals = sumRolledKmForPeriods(entryWindows, pieces);

  if (full) {
    await tx.delete(fittingRolledKm).where(eq(fittingRolledKm.projectId, projectId));
    await tx.delete(entryRolledKm).where(eq(entryRolledKm.projectId, projectId));
  }
  await writeTotals(tx, projectId, totals, full ? 'replace' : 'add');
  await writeEntryTotals(
    tx,
    projectId,
    entryTotals.filter((t) => t.rolledKm > 0),
  );

  // Rings come in ascending order: the last is the highest.
  const throughRing = Math.max(state?.throughRing ?? -1, strokeRows.at(-1)?.ringNumber ?? -1);
  await tx
    .insert(rolledDistanceState)
    .values({ projectId, throughRing })
    .onConflictDoUpdate({ target: rolledDistanceState.projectId, set: { throughRing, computedAt: sql`now()` } });
  const ringOf = new Map(errors.length ? strokeRows.map((s) => [s.id, s.ringNumber]) : []);
  return {
    mode: full ? 'full' : 'incremental',
    strokes: strokeRows.length,
    errors: errors.map((e) => ({ ringNumber: ringOf.get(e.strokeId) ?? e.ringNumber, reason: e.reason })),
  };
}

async function writeTotals(tx: DbOrTx, projectId: string, totals: PeriodRolledKm[], how: 'replace' | 'add') {
  const values = totals.map((t) => ({
    fittingId: t.periodId,
    projectId,
    groundKey: t.groundTypeId ?? UNKNOWN_GROUND,
    rolledKm: t.rolledKm,
  }));
  for (let i = 0; i < values.length; i += 2000) {
    const chunk = values.slice(i, i + 2000);
    await tx
      .insert(fittingRolledKm)
      .values(chunk)
      .onConflictDoUpdate({
        target: [fittingRolledKm.fittingId, fittingRolledKm.groundKey],
        set: { rolledKm: how === 'add' ? sql`${fittingRolledKm.rolledKm} + excluded.rolled_km` : sql`excluded.rolled_km` },
      });
  }
}

async function writeEntryTotals(tx: DbOrTx, projectId: string, totals: PeriodRolledKm[]) {
  const values = totals.map((t) => ({ entryId: t.periodId, projectId, groundKey: t.groundTypeId ?? UNKNOWN_GROUND, rolledKm: t.rolledKm }));
  for (let i = 0; i < values.length; i += 2000) {
    await tx
      .insert(entryRolledKm)
      .values(values.slice(i, i + 2000))
      .onConflictDoUpdate({
        target: [entryRolledKm.entryId, entryRolledKm.groundKey],
        set: { rolledKm: sql`${entryRolledKm.rolledKm} + excluded.rolled_km` },
      });
  }
}

/**
 * A new measurement's exposure: the fitted period's totals so far, when they are current and no
 * stroke lies after the round; otherwise the drive is recomputed at the next refresh.
 */
export async function recordEntryExposure(tx: DbOrTx, projectId: string, entryId: string, fittingId: string, at: Date): Promise<void> {
  const [state] = await tx.select().from(rolledDistanceState).where(eq(rolledDistanceState.projectId, projectId));
  if (!state) return;
  const [later] = await tx
    .select({ id: strokes.id })
    .from(strokes)
    .where(and(eq(strokes.projectId, projectId), sql`${strokes.startTime} > ${at}`))
    .limit(1);
  if (later) {
    await invalidateRolledDistance(tx, projectId);
    return;
  }
  await tx.delete(entryRolledKm).where(eq(entryRolledKm.entryId, entryId));
  await tx.execute(sql`
    insert into entry_rolled_km (entry_id, project_id, ground_key, rolled_km)
    select ${entryId}, project_id, ground_key, rolled_km from fitting_rolled_km where fitting_id = ${fittingId} and rolled_km > 0`);
}

/** How far the disc now on a position has rolled in each ground type since it was fitted (km). */
export async function rolledSinceFitted(tx: DbOrTx, projectId: string, positionId: string): Promise<Record<string, number>> {
  const rows = await tx
    .select({ groundKey: fittingRolledKm.groundKey, rolledKm: fittingRolledKm.rolledKm })
    .from(fittingRolledKm)
    .innerJoin(fittings, eq(fittings.id, fittingRolledKm.fittingId))
    .where(and(eq(fittings.projectId, projectId), eq(fittings.positionId, positionId), sql`${fittings.removedAt} is null`));
  return Object.fromEntries(rows.map((r) => [r.groundKey, r.rolledKm]));
}

/** Whether a stored track radius can enter the rolled-distance computation (finite, > 0 mm). */
export function usableTrackRadius(trackRadiusMm: number): boolean {
  return Number.isFinite(trackRadiusMm) && trackRadiusMm > 0;
}
