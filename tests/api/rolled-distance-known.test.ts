/**
 * The rolled-distance refresh with strokes the write holds in memory (decision 46, second pass):
 * on random invented drives it must give exactly what the refresh gives when it reads every stroke
 * back from PostgreSQL. Check values: derived — the refresh without `known` (the database's own
 * rows) is the reference; the in-memory path adds the same pieces in the same order, so the totals
 * are compared to the bit, not within a tolerance.
 */
import { and, eq, gte, lte, sql } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { db, type DbOrTx } from '../../server/db/client';
import {
  entryRolledKm,
  fittingRolledKm,
  fittings,
  geologySections,
  groundTypes,
  inspectionEntries,
  inspectionRounds,
  rolledDistanceState,
  strokes,
} from '../../server/db/schema';
import { importAdvanceLog } from '../../server/services/advance-log-import';
import {
  invalidateRolledDistance,
  refreshRolledDistance,
  type KnownStroke,
  type KnownStrokes,
  type RefreshResult,
} from '../../server/services/rolled-distance';
import type { AdvanceLogRow } from '../../shared/schemas/advance-log';
import { makeProject, makeUser } from '../support/fixtures';
import { makeCutterhead } from '../support/drive-fixtures';
import { mulberry32 as random } from '../support/random';

const iso = (ms: number) => new Date(ms).toISOString().replace('Z', '+00:00');

/** A whole invented drive of `count` rings: random lengths, times, revolutions (some only by penetration). */
function randomDrive(rand: () => number, count: number, startMs: number): AdvanceLogRow[] {
  const rows: AdvanceLogRow[] = [];
  let chainage = 100;
  let t = startMs;
  for (let ring = 1; ring <= count; ring++) {
    const length = Math.round((1.2 + rand() * 0.6) * 1000) / 1000;
    const duration = Math.round(900 + rand() * 1800) * 1000;
    const measured = rand() < 0.8;
    rows.push({
      ringNumber: ring,
      startTime: iso(t),
      endTime: iso(t + duration),
      chainageStartM: chainage,
      chainageEndM: Math.round((chainage + length) * 1000) / 1000,
      revolutions: measured ? Math.round((100 + rand() * 150) * 10) / 10 : null,
      penetrationMmPerRev: Math.round((5 + rand() * 6) * 100) / 100,
      rpm: null,
      thrustKn: null,
      torqueKnm: null,
      extra: {},
    });
    chainage = rows[rows.length - 1].chainageEndM;
    t += duration + Math.round(rand() * 3600) * 1000;
  }
  return rows;
}

/** Every rolled-distance total of the drive, in a fixed order. */
async function totals(tx: DbOrTx, projectId: string) {
  const fitted = await tx
    .select({ id: fittingRolledKm.fittingId, ground: fittingRolledKm.groundKey, km: fittingRolledKm.rolledKm })
    .from(fittingRolledKm)
    .where(eq(fittingRolledKm.projectId, projectId))
    .orderBy(fittingRolledKm.fittingId, fittingRolledKm.groundKey);
  const entries = await tx
    .select({ id: entryRolledKm.entryId, ground: entryRolledKm.groundKey, km: entryRolledKm.rolledKm })
    .from(entryRolledKm)
    .where(eq(entryRolledKm.projectId, projectId))
    .orderBy(entryRolledKm.entryId, entryRolledKm.groundKey);
  const [state] = await tx
    .select({ through: rolledDistanceState.throughRing })
    .from(rolledDistanceState)
    .where(eq(rolledDistanceState.projectId, projectId));
  return { fitted, entries, through: state?.through ?? null };
}

/** Runs `fn` in a transaction that is rolled back, returning what it returned. */
async function rolledBack<T>(fn: (tx: DbOrTx) => Promise<T>): Promise<T> {
  const undo = new Error('roll back');
  let out: T | undefined;
  await db
    .transaction(async (tx) => {
      out = await fn(tx);
      throw undo;
    })
    .catch((err) => {
      if (err !== undo) throw err;
    });
  return out as T;
}

/** The stored strokes from `fromRing` to `toRing` read with the test's own query, as KnownStrokes. */
async function knownFromDatabase(tx: DbOrTx, projectId: string, fromRing: number, toRing: number): Promise<KnownStrokes> {
  const rows = await tx
    .select({
      ringNumber: strokes.ringNumber,
      chainageStartM: strokes.chainageStartM,
      chainageEndM: strokes.chainageEndM,
      revolutions: strokes.revolutions,
      penetrationMmPerRev: strokes.penetrationMmPerRev,
      startTime: strokes.startTime,
      endTime: strokes.endTime,
    })
    .from(strokes)
    .where(and(eq(strokes.projectId, projectId), gte(strokes.ringNumber, fromRing), lte(strokes.ringNumber, toRing)))
    .orderBy(strokes.ringNumber);
  const known: KnownStroke[] = rows.map((r) => ({
    id: `test:${r.ringNumber}`,
    ringNumber: r.ringNumber,
    chainageStartM: r.chainageStartM,
    chainageEndM: r.chainageEndM,
    revolutions: r.revolutions,
    penetrationMmPerRev: r.penetrationMmPerRev,
    startMs: r.startTime.getTime(),
    endMs: r.endTime.getTime(),
  }));
  return { fromRing, toRing, strokes: known };
}

const withoutMode = (r: RefreshResult) => ({ strokes: r.strokes, errors: r.errors });

async function randomProject(seed: number) {
  const rand = random(seed);
  const project = await makeProject();
  const { positions } = await makeCutterhead(project.id, 5);
  const startMs = Math.floor((Date.now() - 20 * 86_400_000) / 1000) * 1000;
  const drive = randomDrive(rand, 520, startMs);
  // Geology with gaps (unknown ground) and sections shorter than some strokes.
  const grounds = await db
    .insert(groundTypes)
    .values(['A', 'B', 'C'].map((name) => ({ projectId: project.id, name: `${name}-${seed}` })))
    .returning();
  const sections: (typeof geologySections.$inferInsert)[] = [];
  for (let from = 100; from < 900;) {
    const to = from + 0.5 + rand() * 40;
    if (rand() < 0.85)
      sections.push({ projectId: project.id, chainageFromM: from, chainageToM: to, groundTypeId: grounds[Math.floor(rand() * 3)].id });
    from = to + (rand() < 0.2 ? rand() * 3 : 0);
  }
  await db.insert(geologySections).values(sections);
  // A second fitted period on one position, and measurements whose exposure windows end among the strokes.
  const [first] = await db.select().from(fittings).where(eq(fittings.positionId, positions[1].id));
  const changeAt = new Date(Date.parse(drive[260].endTime));
  await db.update(fittings).set({ removedAt: changeAt }).where(eq(fittings.id, first.id));
  await db
    .insert(fittings)
    .values({ projectId: project.id, cutterId: first.cutterId, positionId: positions[1].id, fittedAt: changeAt, fittedChainageM: 400 });
  const user = await makeUser();
  for (const ring of [120, 300]) {
    const [round] = await db
      .insert(inspectionRounds)
      .values({ projectId: project.id, startedAt: new Date(Date.parse(drive[ring].startTime)), chainageM: drive[ring].chainageStartM })
      .returning();
    const fitted = await db
      .select()
      .from(fittings)
      .where(and(eq(fittings.projectId, project.id), sql`${fittings.removedAt} is null`));
    await db.insert(inspectionEntries).values(
      fitted.map((f) => ({
        projectId: project.id,
        roundId: round.id,
        positionId: f.positionId,
        clientKey: crypto.randomUUID(),
        fittingId: f.id,
      })),
    );
  }
  return { projectId: project.id, userId: user.id, drive, rand };
}

const lines = (rows: AdvanceLogRow[]) => rows.map((data, i) => ({ line: i + 2, data }));
const options = { replace: true, mapping: {} };

describe('rolled-distance refresh with the strokes a write holds', () => {
  let setups: Awaited<ReturnType<typeof randomProject>>[];
  beforeAll(async () => {
    setups = [await randomProject(14), await randomProject(46)];
  }, 60_000);

  it('an import that replaces, keeps, fills a gap and appends gives the totals of a full recompute, to the bit', async () => {
    for (const { projectId, userId, drive, rand } of setups) {
      // Stored first: rings 1–400 without 200–219 (a gap to fill later).
      const first = drive.slice(0, 400).filter((r) => r.ringNumber < 200 || r.ringNumber > 219);
      await db.transaction((tx) => importAdvanceLog(tx, projectId, userId, lines(first), options));
      // The second file: 180–199 (some changed beyond the tolerances, some within them: kept as
      // stored), the gap 200–219, every other ring of 220–400 (the others stay stored, unnamed),
      // and 401–450 new.
      const second: AdvanceLogRow[] = [];
      for (const r of drive.slice(179, 450)) {
        if (r.ringNumber > 219 && r.ringNumber <= 400 && r.ringNumber % 2 === 1) continue;
        if (r.ringNumber >= 180 && r.ringNumber < 200) {
          const change = rand();
          if (change < 0.3) second.push({ ...r, revolutions: r.revolutions === null ? 150 : r.revolutions + 7 });
          else if (change < 0.6)
            second.push({
              ...r,
              // Within the tolerances (0.05 revolutions, 1 mm, under 1 s): unchanged, the stored values stay.
              revolutions: r.revolutions === null ? null : r.revolutions + 0.04,
              chainageEndM: r.chainageEndM + 0.0004,
              endTime: iso(Date.parse(r.endTime) + 600),
            });
          else second.push(r);
        } else second.push(r);
      }
      const { imported, reference } = await rolledBack(async (tx) => {
        const outcome = await importAdvanceLog(tx, projectId, userId, lines(second), options);
        expect(outcome.replaced).toBeGreaterThan(0);
        expect(outcome.unchanged).toBeGreaterThan(0);
        const imported = await totals(tx, projectId);
        await invalidateRolledDistance(tx, projectId);
        await refreshRolledDistance(tx, projectId);
        return { imported, reference: await totals(tx, projectId) };
      });
      expect(imported.fitted.length).toBeGreaterThan(5);
      expect(imported.entries.length).toBeGreaterThan(0);
      expect(imported).toEqual(reference);
    }
  }, 60_000);

  it('an import that only fills a gap below the last counted ring counts the gap (no replaced ring)', async () => {
    const { projectId, userId, drive } = await randomProject(7);
    // Stored and counted: rings 1–400 without 200–219; then a file with only the gap.
    const first = drive.slice(0, 400).filter((r) => r.ringNumber < 200 || r.ringNumber > 219);
    await db.transaction((tx) => importAdvanceLog(tx, projectId, userId, lines(first), options));
    const { imported, reference } = await rolledBack(async (tx) => {
      const outcome = await importAdvanceLog(tx, projectId, userId, lines(drive.slice(199, 219)), options);
      expect(outcome).toEqual({ inserted: 20, unchanged: 0, replaced: 0 });
      const imported = await totals(tx, projectId);
      await invalidateRolledDistance(tx, projectId);
      await refreshRolledDistance(tx, projectId);
      return { imported, reference: await totals(tx, projectId) };
    });
    expect(imported.fitted.length).toBeGreaterThan(5);
    expect(imported).toEqual(reference);
  }, 60_000);

  it('full and incremental refreshes with any known range equal the refresh that reads every stroke', async () => {
    for (const { projectId, userId, drive, rand } of setups) {
      // Stored and counted: rings 1–450; then rings 451–520 written without a refresh.
      await db.transaction((tx) => importAdvanceLog(tx, projectId, userId, lines(drive.slice(0, 450)), options));
      await db
        .insert(strokes)
        .values(drive.slice(450).map((r) => ({ ...r, projectId, startTime: new Date(r.startTime), endTime: new Date(r.endTime) })));
      for (let trial = 0; trial < 12; trial++) {
        const full = trial % 2 === 0;
        // Any range, also one that starts before the last counted ring, ends past the last ring or holds none.
        const a = Math.floor(rand() * 540) - 10;
        const b = a + Math.floor(rand() * 200);
        const run = (withKnown: boolean) =>
          rolledBack(async (tx) => {
            if (full) await invalidateRolledDistance(tx, projectId);
            const known = withKnown ? await knownFromDatabase(tx, projectId, a, b) : undefined;
            const result = await refreshRolledDistance(tx, projectId, known);
            return { result, totals: await totals(tx, projectId) };
          });
        const withKnown = await run(true);
        const reference = await run(false);
        expect(withKnown.result.mode, `trial ${trial}`).toBe(full ? 'full' : 'incremental');
        expect(withoutMode(withKnown.result), `trial ${trial}: rings ${a}–${b}`).toEqual(withoutMode(reference.result));
        expect(withKnown.totals, `trial ${trial}: rings ${a}–${b}`).toEqual(reference.totals);
      }
    }
  }, 120_000);
});
