/**
 * The server survives a database restart and an outage (DEVELOPERS.md, decision 33). The server
 * runs as a child process (tests/support/outage-server.ts) so "still alive" means a real process
 * that an unhandled error would have ended.
 *
 * It gets its own PostgreSQL cluster (the suite's port + 10, e.g. 54356 next to 54346), because
 * restarting and stopping the suite's shared cluster would fail other test files running beside
 * this one; a separate cluster costs about a second to start (initdb once, ~1.3 s).
 */
import { fork, spawnSync, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runMigrations } from '../../server/db/migrate';
import { findPgBin, startLocalPostgres, type LocalPostgres } from '../../server/devenv/postgres';

const port = Number(process.env.KERFWISE_TEST_PG_PORT ?? 54330) + 10;
const dataDir = path.resolve(`.data/pg-outage-${port}`);
const logFile = `${dataDir}-run/server.log`;

/** pg_ctl on this cluster, as the postgres user when we are root (as server/devenv/postgres.ts does). */
function pgCtl(...args: string[]) {
  const bin = path.join(findPgBin(), 'pg_ctl');
  const asRoot = process.getuid?.() === 0;
  const r = spawnSync(asRoot ? 'runuser' : bin, [...(asRoot ? ['-u', 'postgres', '--', bin] : []), '-D', dataDir, ...args], {
    cwd: '/',
    encoding: 'utf8',
  });
  if (r.status !== 0) throw new Error(`pg_ctl ${args.join(' ')} failed: ${r.stdout}${r.stderr}`);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

let cluster: LocalPostgres;
let child: ChildProcess;
let childOutput = '';
let base: string;
let fixtures: typeof import('../support/fixtures');
let db: typeof import('../../server/db/client').db;
let schema: typeof import('../../server/db/schema');
let drizzleOrm: typeof import('drizzle-orm');

const alive = () => child.exitCode === null && child.signalCode === null;

async function waitForHealth(timeoutMs: number): Promise<number> {
  const start = Date.now();
  while (Date.now() - start < timeoutMs) {
    const res = await fetch(`${base}/api/health`).catch(() => null);
    if (res?.status === 200) return Date.now() - start;
    await sleep(100);
  }
  throw new Error(`health did not return to 200 within ${timeoutMs} ms`);
}

beforeAll(async () => {
  cluster = await startLocalPostgres({ dataDir, port, database: 'kerfwise_outage', fast: true, freshDatabase: true });
  await runMigrations(cluster.url);
  // Server modules read DATABASE_URL once, on first import: import them only now, at this cluster.
  process.env.DATABASE_URL = cluster.url;
  fixtures = await import('../support/fixtures');
  ({ db } = await import('../../server/db/client'));
  schema = await import('../../server/db/schema');
  drizzleOrm = await import('drizzle-orm');

  child = fork(path.resolve('tests/support/outage-server.ts'), [], {
    execArgv: ['--import', 'tsx'],
    env: { ...process.env, DATABASE_URL: cluster.url, LOG_LEVEL: 'warn' },
    stdio: ['ignore', 'pipe', 'pipe', 'ipc'],
  });
  child.stdout?.on('data', (d) => (childOutput += d));
  child.stderr?.on('data', (d) => (childOutput += d));
  const childPort = await new Promise<number>((resolve, reject) => {
    child.on('message', (m: { port?: number }) => m.port && resolve(m.port));
    child.once('exit', (code) => reject(new Error(`server exited (${code}) before listening:\n${childOutput}`)));
  });
  base = `http://127.0.0.1:${childPort}`;
});

afterAll(async () => {
  if (child && alive()) {
    child.kill('SIGTERM');
    await new Promise((r) => child.once('exit', r));
  }
  await (await import('../../server/db/client')).pool.end().catch(() => {});
  cluster?.stop();
});

describe('database restart and outage', () => {
  it('keeps serving through pg_ctl restart -m fast: 10 clients, acknowledged = stored, no doubles', async () => {
    const { makeProject, makeUser, addMember, PASSWORD } = fixtures;
    const { makeCutterhead } = await import('../support/drive-fixtures');
    const project = await makeProject();
    const perClient = 8;
    const drive = await makeCutterhead(project.id, perClient);
    const clients: { agent: ReturnType<typeof request.agent>; roundId: string }[] = [];
    for (let i = 0; i < 10; i++) {
      const u = await makeUser();
      await addMember(project.id, u.id, 'fitter');
      const agent = request.agent(base);
      const signIn = await agent.post('/api/auth/sign-in').send({ email: u.email, password: PASSWORD });
      expect(signIn.status, JSON.stringify(signIn.body) + childOutput).toBe(200);
      const round = await agent
        .post(`/api/projects/${project.id}/rounds`)
        .send({ startedAt: '2026-11-02T08:00:00Z', chainageM: 400 + i, ringNumber: 267 + i, crew: `crew ${i}` });
      expect(round.status).toBe(201);
      clients.push({ agent, roundId: round.body.id as string });
    }

    const statuses = new Map<number, number>();
    const acknowledged: string[] = [];
    // Each client sends its positions one after another and, like the tablet's queue, resends the
    // same clientKey after no answer or a 5xx until it is acknowledged.
    const send = async ({ agent, roundId }: (typeof clients)[number]) => {
      for (const position of drive.positions) {
        const body = { clientKey: randomUUID(), positionId: position.id, wearMm: 5, conditions: ['even_wear'], action: 'none' };
        for (let attempt = 0; ; attempt++) {
          if (attempt > 300) throw new Error('an entry was never acknowledged');
          const res = await agent
            .post(`/api/projects/${project.id}/rounds/${roundId}/entries`)
            .send(body)
            .timeout(10_000)
            .catch(() => null);
          const status = res?.status ?? 0;
          statuses.set(status, (statuses.get(status) ?? 0) + 1);
          if (status === 200 || status === 201) {
            acknowledged.push(body.clientKey);
            break;
          }
          if (status === 503) expect(res?.headers['retry-after']).toBe('5');
          await sleep(100);
        }
        await sleep(40);
      }
    };
    const sending = Promise.all(clients.map(send));
    await sleep(400);
    const restartAt = Date.now();
    pgCtl('-l', logFile, '-m', 'fast', '-w', 'restart');
    const restartMs = Date.now() - restartAt;
    expect(alive()).toBe(true);
    const backWithinMs = await waitForHealth(10_000);
    await sending;

    expect(alive()).toBe(true);
    // Back within a few seconds of the database (common practice, no source: the pool reconnects on the next query).
    expect(backWithinMs).toBeLessThan(5_000);
    // Every answer was stored, refused for the outage (503), or none (cut mid-request): never a 500.
    expect([...statuses.keys()].filter((s) => ![0, 200, 201, 503].includes(s))).toEqual([]);
    expect(acknowledged).toHaveLength(10 * perClient);
    const { inArray, eq } = drizzleOrm;
    const submissions = await db.select().from(schema.entrySubmissions).where(inArray(schema.entrySubmissions.clientKey, acknowledged));
    expect(submissions).toHaveLength(acknowledged.length);
    const entries = await db.select().from(schema.inspectionEntries).where(eq(schema.inspectionEntries.projectId, project.id));
    expect(entries).toHaveLength(10 * perClient);
    expect(new Set(entries.map((e) => `${e.roundId}:${e.positionId}`)).size).toBe(entries.length);
    expect(new Set(entries.map((e) => e.clientKey))).toEqual(new Set(acknowledged));
    console.info(
      `restart took ${restartMs} ms; health back ${backWithinMs} ms later; answers: ${JSON.stringify(Object.fromEntries(statuses))}`,
    );
  }, 120_000);

  it('survives a job tick while PostgreSQL is stopped, answers 503 meanwhile, and records the run as failed', async () => {
    const { makeUser, PASSWORD } = fixtures;
    const u = await makeUser();
    const agent = request.agent(base);
    expect((await agent.post('/api/auth/sign-in').send({ email: u.email, password: PASSWORD })).status).toBe(200);

    pgCtl('-m', 'fast', '-w', 'stop');
    try {
      const down = await agent.get('/api/auth/me');
      expect(down.status).toBe(503);
      expect(down.headers['retry-after']).toBe('5');
      expect(down.body.error.message).toMatch(/cannot reach its database/);
      expect((await fetch(`${base}/api/health`)).status).toBe(503);
      // The test clock's tick: a Monday 07:00 slot of every-minute mail delivery.
      const at = '2027-06-07T05:00:00.000Z';
      const ticked = new Promise((resolve) => child.on('message', (m: { ticked?: string }) => m.ticked && resolve(m.ticked)));
      child.send({ tick: 'deliver-mail', at });
      expect(await ticked).toBe('deliver-mail');
      await sleep(500);
      expect(alive()).toBe(true);
    } finally {
      pgCtl('-l', logFile, '-w', 'start');
    }
    await waitForHealth(10_000);
    expect((await agent.get('/api/auth/me')).status).toBe(200);
    // The failed run is written once the database is back (the runner retries every 5 s).
    const { and, eq } = drizzleOrm;
    let runs: (typeof schema.jobRuns.$inferSelect)[] = [];
    for (let i = 0; i < 150 && runs.length === 0; i++) {
      runs = await db
        .select()
        .from(schema.jobRuns)
        .where(and(eq(schema.jobRuns.job, 'deliver-mail'), eq(schema.jobRuns.slotAt, new Date('2027-06-07T05:00:00Z'))));
      if (runs.length === 0) await sleep(100);
    }
    expect(runs).toHaveLength(1);
    expect(runs[0]).toMatchObject({ trigger: 'schedule', outcome: 'failed' });
    expect(runs[0].error).toMatch(/database could not be reached/);
    expect(alive()).toBe(true);
  }, 90_000);
});
