/**
 * Drive-data and forecast benchmark on the synthetic 10 km drive (issue 4 and 5 targets):
 * full rolled-distance recompute; the full forecast (fit + all positions) against the time to read
 * its rows from PostgreSQL.
 */
import { eq, sql } from 'drizzle-orm';
import { db } from '../../server/db/client';
import {
  cutters,
  entrySubmissions,
  fittings,
  geologySections,
  groundTypes,
  inspectionEntries,
  inspectionRounds,
  positions,
  projects,
  strokes,
} from '../../server/db/schema';
import { buildForecast, loadForecastData } from '../../server/services/forecast';
import { invalidateRolledDistance, refreshRolledDistance } from '../../server/services/rolled-distance';
import { BENCH_RINGS, benchGeology, benchGroundTypes, benchLayout, benchStrokes } from './generate-drive';

const START_M = 0;
const START_MS = Date.UTC(2026, 0, 5, 6);

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
async function timeIt<T>(runs: number, fn: () => Promise<T> | T): Promise<{ ms: number; last: T }> {
  const times: number[] = [];
  let last!: T;
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    last = await fn();
    times.push(performance.now() - t);
  }
  return { ms: median(times), last };
}

/** Loads the synthetic drive: layout, geology, strokes, a fitted cutter per position and rounds every ~250 m. */
export async function loadBenchDrive(): Promise<string> {
  const [project] = await db
    .insert(projects)
    .values({ name: `Bench drive ${Date.now()}`, excavatedDiameterM: 9.6, startChainageM: START_M, siteTimeZone: 'Europe/Zurich' })
    .returning();
  const projectId = project.id;
  const grounds = await db
    .insert(groundTypes)
    .values(benchGroundTypes.map((g) => ({ ...g, projectId })))
    .returning();
  await db.insert(geologySections).values(
    benchGeology(START_M).map((s) => ({
      projectId,
      chainageFromM: s.fromM,
      chainageToM: s.toM,
      groundTypeId: grounds[s.ground].id,
      stopAllowed: s.stopAllowed,
      stopReason: s.stopAllowed ? '' : 'bench no-stop',
    })),
  );
  const layout = await db
    .insert(positions)
    .values(benchLayout().map((p) => ({ ...p, projectId })))
    .returning();
  const rows = benchStrokes(1, BENCH_RINGS, START_M, START_MS);
  for (let i = 0; i < rows.length; i += 1000) await db.insert(strokes).values(rows.slice(i, i + 1000).map((r) => ({ ...r, projectId })));
  const serials = await db
    .insert(cutters)
    .values(layout.map((p) => ({ projectId, serial: `B-${p.number}`, discSizeIn: 19, status: 'fitted' as const })))
    .returning();
  const fitted = await db
    .insert(fittings)
    .values(
      layout.map((p, i) => ({
        projectId,
        positionId: p.id,
        cutterId: serials[i].id,
        fittedAt: new Date(START_MS - 3600_000),
        fittedChainageM: START_M,
      })),
    )
    .returning();
  // ~37 rounds × 80 positions ≈ 3,000 inspections; wear grows with chainage, just enough to fit.
  for (let r = 1; r <= 37; r++) {
    const stroke = rows[Math.min(rows.length - 1, r * 180)];
    const [round] = await db
      .insert(inspectionRounds)
      .values({
        projectId,
        startedAt: new Date(stroke.endTime.getTime() + 60_000),
        chainageM: stroke.chainageEndM,
        ringNumber: stroke.ringNumber,
      })
      .returning();
    const entries = layout.map((p, i) => ({
      projectId,
      roundId: round.id,
      positionId: p.id,
      clientKey: randomUUIDLike(r, i),
      fittingId: fitted[i].id,
      wearMm: Math.round(((p.trackRadiusMm / 4500) * r * 0.6 + 0.1) * 10) / 10,
      conditions: ['even_wear' as const],
    }));
    const saved = await db
      .insert(inspectionEntries)
      .values(entries)
      .returning({ id: inspectionEntries.id, clientKey: inspectionEntries.clientKey });
    await db.insert(entrySubmissions).values(saved.map((e) => ({ projectId, clientKey: e.clientKey, entryId: e.id })));
  }
  return projectId;
}

const randomUUIDLike = (r: number, i: number) => `00000000-0000-4000-8000-${String(r * 1000 + i).padStart(12, '0')}`;

export async function benchDrive(): Promise<string[]> {
  const out: string[] = [];
  const projectId = await loadBenchDrive();
  const [{ n: strokeCount }] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(strokes)
    .where(eq(strokes.projectId, projectId));
  const [{ n: entryCount }] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(inspectionEntries)
    .where(eq(inspectionEntries.projectId, projectId));
  out.push(`Synthetic drive: ${strokeCount} strokes, 80 positions, 40 geology sections, ${entryCount} inspections`);

  const recompute = await timeIt(3, () =>
    db.transaction(async (tx) => {
      await invalidateRolledDistance(tx, projectId);
      return refreshRolledDistance(tx, projectId);
    }),
  );
  out.push(`Rolled distance, full recompute of the drive: ${recompute.ms.toFixed(0)} ms (median of 3)`);

  const read = await timeIt(5, () => db.transaction((tx) => loadForecastData(tx, projectId)));
  const compute = await timeIt(5, () => buildForecast(read.last, new Date(START_MS + 400 * 86400_000)));
  out.push(`Forecast, read its rows from PostgreSQL: ${read.ms.toFixed(0)} ms (median of 5)`);
  out.push(
    `Forecast, compute (fit + ${compute.last.positions.length} positions): ${compute.ms.toFixed(0)} ms (median of 5) — target ≤ 150 ms`,
  );
  out.push(`Forecast, compute / read: ${(compute.ms / read.ms).toFixed(2)}× — target ≤ 2×`);
  return out;
}

/** Starts V8's CPU profiler in this process; `stop(file)` writes the profile there. */
async function startCpuProfile(): Promise<{ stop: (file: string) => Promise<void> }> {
  const { Session } = await import('node:inspector/promises');
  const { mkdir, writeFile } = await import('node:fs/promises');
  const { dirname } = await import('node:path');
  const session = new Session();
  session.connect();
  await session.post('Profiler.enable');
  await session.post('Profiler.setSamplingInterval', { interval: 100 });
  await session.post('Profiler.start');
  return {
    async stop(file) {
      const { profile } = await session.post('Profiler.stop');
      session.disconnect();
      await mkdir(dirname(file), { recursive: true });
      await writeFile(file, JSON.stringify(profile));
    },
  };
}

/**
 * Import of 10,000 advance-log rows end to end through the HTTP API (upload, parse, validate,
 * insert, rolled distance), against PostgreSQL's own COPY of the same rows into the same table.
 *
 * The limit is what the database itself costs to store those rows where Kerfwise stores them:
 * `COPY … FROM STDIN` into `strokes` (its keys, indexes, foreign key, triggers and WAL), one
 * transaction, for a second drive set up the same way. A scratch table with none of those is
 * printed beside it as well. The server runs as it does on a site, for days: a 500-row import into
 * a third drive goes first, so the figure is not the first request's code being compiled; that
 * first (cold) import is printed too.
 */
export async function benchImport(): Promise<string[]> {
  const { createApp } = await import('../../server/app');
  const { hashPassword } = await import('../../server/lib/password');
  const { memberships, users } = await import('../../server/db/schema');
  const { pool } = await import('../../server/db/client');
  const { from: copyFrom } = await import('pg-copy-streams');
  const { pipeline } = await import('node:stream/promises');
  const { Readable } = await import('node:stream');
  const { strokesCsv, strokeValues } = await import('./generate-drive');

  const out: string[] = [];
  const rows = benchStrokes(1, 10_000, START_M, START_MS);
  const csv = strokesCsv(rows);
  const email = `bench-${Date.now()}@kerfwise.test`;
  const [user] = await db
    .insert(users)
    .values({ email, name: 'Bench planner', passwordHash: await hashPassword('bench password 1') })
    .returning();

  /** A drive with the bench's geology and layout, the bench planner a member. */
  async function benchProject(name: string) {
    const [project] = await db
      .insert(projects)
      .values({ name: `${name} ${Date.now()}`, excavatedDiameterM: 9.6, startChainageM: START_M, siteTimeZone: 'Europe/Zurich' })
      .returning();
    const grounds = await db
      .insert(groundTypes)
      .values(benchGroundTypes.map((g) => ({ ...g, projectId: project.id })))
      .returning();
    await db.insert(geologySections).values(
      benchGeology(START_M).map((s) => ({
        projectId: project.id,
        chainageFromM: s.fromM,
        chainageToM: s.toM,
        groundTypeId: grounds[s.ground].id,
        stopAllowed: true,
      })),
    );
    await db.insert(positions).values(benchLayout().map((p) => ({ ...p, projectId: project.id })));
    await db.insert(memberships).values({ projectId: project.id, userId: user.id, role: 'planner' });
    return project;
  }
  const warmUp = await benchProject('Bench import warm-up');
  const project = await benchProject('Bench import');
  const copied = await benchProject('Bench import COPY');

  const server = createApp().listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  const base = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
  try {
    const signIn = await fetch(`${base}/api/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email, password: 'bench password 1' }),
    });
    const cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0];
    const importCsv = async (projectId: string, text: string) => {
      const t = performance.now();
      const res = await fetch(`${base}/api/projects/${projectId}/strokes/import`, {
        method: 'POST',
        headers: { 'content-type': 'text/csv', cookie },
        body: text,
      });
      const ms = performance.now() - t;
      const body = (await res.json()) as { inserted?: number; error?: { message: string } };
      if (res.status !== 201) throw new Error(`import failed: ${res.status} ${JSON.stringify(body).slice(0, 300)}`);
      return { ms, inserted: body.inserted };
    };
    const cold = await importCsv(warmUp.id, strokesCsv(rows.slice(0, 500)));
    // KERFWISE_BENCH_CPU_PROF=<dir>: a V8 CPU profile of this process over the import request alone
    // (the server runs in this process), written as import-<time>.cpuprofile.
    const profiler = process.env.KERFWISE_BENCH_CPU_PROF ? await startCpuProfile() : undefined;
    const api = await importCsv(project.id, csv);
    if (profiler) await profiler.stop(`${process.env.KERFWISE_BENCH_CPU_PROF}/import-${Date.now()}.cpuprofile`);

    const columns =
      '(project_id, ring_number, start_time, end_time, chainage_start_m, chainage_end_m, revolutions, penetration_mm_per_rev, rpm, thrust_kn, torque_knm, extra)';
    const copyText = (projectId: string) => rows.map((r) => [projectId, ...strokeValues(r), '{}'].join('\t')).join('\n') + '\n';
    const client = await pool.connect();
    let copyMs: number;
    let scratchMs: number;
    try {
      // The limit: the same rows into the same table, one transaction, committed.
      const text = copyText(copied.id);
      const c = performance.now();
      await client.query('begin');
      await pipeline(Readable.from([text]), client.query(copyFrom(`copy strokes ${columns} from stdin`)));
      await client.query('commit');
      copyMs = performance.now() - c;
      // Beside it: a scratch table of the same shape with no foreign key and no WAL (a temporary table).
      await client.query('create temp table strokes_copy (like strokes including all)');
      const scratch = copyText(project.id);
      const d = performance.now();
      await pipeline(Readable.from([scratch]), client.query(copyFrom(`copy strokes_copy ${columns} from stdin`)));
      scratchMs = performance.now() - d;
    } finally {
      client.release();
    }
    out.push(
      `Advance-log import of 10,000 rows through the API: ${api.ms.toFixed(0)} ms end to end (${api.inserted} inserted; the server's first import, 500 rows: ${cold.ms.toFixed(0)} ms) — target ≤ 3,000 ms`,
    );
    out.push(
      `PostgreSQL COPY of the same 10,000 rows into strokes: ${copyMs.toFixed(0)} ms; API / COPY = ${(api.ms / copyMs).toFixed(1)}× — target ≤ 5× (into a temporary table with no keys or WAL: ${scratchMs.toFixed(0)} ms, ${(api.ms / scratchMs).toFixed(1)}×)`,
    );
  } finally {
    server.close();
  }
  return out;
}
