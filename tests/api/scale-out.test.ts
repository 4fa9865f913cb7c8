/**
 * Two server processes against one PostgreSQL, as a company running several instances behind a
 * proxy would (issue 14): a session made on one works on the other, a forecast computed by one is
 * served by the other from the shared cache (304 for the ETag the first one gave), a scheduled job
 * fired on both at the same instant runs once, and a waiting mail is sent once. Each process is
 * tests/support/outage-server.ts (the app and the process guards, job ticks over IPC).
 *
 * Each instance keeps resolved sessions in memory (decision 45): a sign-out, a role change or a
 * removed membership made through one is seen by the other in the very next request, and when an
 * instance's listener connection drops it reads sessions from the database until it is back.
 */
import { fork, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { caughtMail, forecastCache, jobRuns, sessions, users } from '../../server/db/schema';
import { AUTH_LISTENER_NAME } from '../../server/lib/session-cache';
import { enqueueMail } from '../../server/lib/mail';
import { addMember, makeUser, PASSWORD, uniq } from '../support/fixtures';
import { makeStopsDrive } from '../support/stops-fixtures';

interface Instance {
  child: ChildProcess;
  url: string;
  tick: (job: string, at: Date) => Promise<void>;
}

async function signIn(url: string, email: string): Promise<string> {
  const res = await request(url).post('/api/auth/sign-in').set('Origin', 'http://kerfwise.test').send({ email, password: PASSWORD });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return String(res.headers['set-cookie']).split(';')[0];
}

/**
 * Writes without telling any instance: the trigger that notifies is disabled inside this one
 * transaction (ALTER TABLE is transactional and locks the table, so no other write misses it).
 */
async function unnoticed(
  table: 'users' | 'sessions',
  write: (tx: Parameters<Parameters<typeof db.transaction>[0]>[0]) => Promise<unknown>,
) {
  await db.transaction(async (tx) => {
    await tx.execute(sql.raw(`alter table ${table} disable trigger ${table}_auth_notify`));
    await write(tx);
    await tx.execute(sql.raw(`alter table ${table} enable trigger ${table}_auth_notify`));
  });
}

/** Renames a user unnoticed: an instance that still answers with the old name answered from its cache. */
const renameUnnoticed = (userId: string, name: string) =>
  unnoticed('users', (tx) => tx.update(users).set({ name }).where(eq(users.id, userId)));

async function listenerCount(): Promise<number> {
  const { rows } = await db.execute<{ n: number }>(
    sql`select count(*)::int as n from pg_stat_activity where application_name = ${AUTH_LISTENER_NAME}`,
  );
  return rows[0].n;
}

async function until(what: string, check: () => Promise<boolean>, timeoutMs = 10_000) {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting until ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

function startInstance(): Promise<Instance> {
  const child = fork(path.resolve('tests/support/outage-server.ts'), [], {
    execArgv: ['--import', 'tsx'],
    // The session cache on, as in production (in-process tests run without it: tests/support/setup-env.ts).
    env: { ...process.env, LOG_LEVEL: 'warn', SESSION_CACHE: 'on' },
    stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
  });
  return new Promise((resolve, reject) => {
    child.once('exit', (code) => reject(new Error(`server process exited with ${code}`)));
    child.on('message', (m: { port?: number }) => {
      if (!m.port) return;
      resolve({
        child,
        url: `http://127.0.0.1:${m.port}`,
        tick: (job, at) =>
          new Promise((done) => {
            const onMessage = (r: { ticked?: string }) => {
              if (r.ticked !== job) return;
              child.off('message', onMessage);
              done();
            };
            child.on('message', onMessage);
            child.send({ tick: job, at: at.toISOString() });
          }),
      });
    });
  });
}

describe('two server processes, one database', () => {
  let a: Instance;
  let b: Instance;
  let cookie: string;
  let drive: Awaited<ReturnType<typeof makeStopsDrive>>;

  beforeAll(async () => {
    [a, b] = await Promise.all([startInstance(), startInstance()]);
    drive = await makeStopsDrive();
    const planner = await makeUser();
    await addMember(drive.project.id, planner.id, 'planner');
    const signIn = await request(a.url)
      .post('/api/auth/sign-in')
      .set('Origin', 'http://kerfwise.test')
      .send({ email: planner.email, password: PASSWORD });
    expect(signIn.status, JSON.stringify(signIn.body)).toBe(200);
    cookie = String(signIn.headers['set-cookie']).split(';')[0];
  });

  afterAll(() => {
    a?.child.kill('SIGTERM');
    b?.child.kill('SIGTERM');
  });

  it('a session made on one works on the other', async () => {
    const me = await request(b.url).get('/api/auth/me').set('Cookie', cookie);
    expect(me.status).toBe(200);
    expect(me.body.memberships.map((m: { projectId: string }) => m.projectId)).toContain(drive.project.id);
  });

  it('a forecast computed by one is served by the other from the shared cache', async () => {
    const path_ = `/api/projects/${drive.project.id}/forecast`;
    const first = await request(a.url).get(path_).set('Cookie', cookie);
    expect(first.status).toBe(200);
    const [computed] = await db.select().from(forecastCache).where(eq(forecastCache.projectId, drive.project.id));
    const fromB = await request(b.url).get(path_).set('Cookie', cookie).set('If-None-Match', first.headers.etag);
    expect(fromB.status).toBe(304);
    const full = await request(b.url).get(path_).set('Cookie', cookie);
    expect(full.body).toEqual(first.body);
    const [after] = await db.select().from(forecastCache).where(eq(forecastCache.projectId, drive.project.id));
    // Not computed again: the row the first instance wrote is the one the second served.
    expect(after.computedAt.getTime()).toBe(computed.computedAt.getTime());
  });

  it('sessions are cached: a change no instance was told of is not seen', async () => {
    // Proves the next tests test the cache: B answers /me from memory once it has read the session.
    const user = await makeUser();
    await addMember(drive.project.id, user.id, 'fitter');
    await until('both listeners are connected', async () => (await listenerCount()) >= 2);
    const c = await signIn(a.url, user.email);
    const before = await request(b.url).get('/api/auth/me').set('Cookie', c);
    expect(before.status).toBe(200);
    await renameUnnoticed(user.id, 'Renamed Quietly');
    const cached = await request(b.url).get('/api/auth/me').set('Cookie', c);
    expect(cached.body.user.name).toBe(before.body.user.name);
  });

  it('a sign-out on one is refused by the other in the next request', async () => {
    const user = await makeUser();
    await addMember(drive.project.id, user.id, 'planner');
    const c = await signIn(a.url, user.email);
    // B has the session cached (read twice), for /me and for a project route.
    for (let i = 0; i < 2; i++) {
      expect((await request(b.url).get('/api/auth/me').set('Cookie', c)).status).toBe(200);
      expect((await request(b.url).get(`/api/projects/${drive.project.id}/positions`).set('Cookie', c)).status).toBe(200);
    }
    const out = await request(a.url).post('/api/auth/sign-out').set('Origin', 'http://kerfwise.test').set('Cookie', c);
    expect(out.status).toBe(204);
    expect((await request(b.url).get('/api/auth/me').set('Cookie', c)).status).toBe(401);
    expect((await request(b.url).get(`/api/projects/${drive.project.id}/positions`).set('Cookie', c)).status).toBe(401);
  });

  it('a role change or a removed membership on one is seen by the other in the next request', async () => {
    const admin = await makeUser({ isAdmin: true });
    const adminCookie = await signIn(a.url, admin.email);
    const user = await makeUser();
    await addMember(drive.project.id, user.id, 'planner');
    const c = await signIn(a.url, user.email);
    const roleOnB = async () =>
      ((await request(b.url).get('/api/auth/me').set('Cookie', c)).body.memberships as { projectId: string; role: string }[]).find(
        (m) => m.projectId === drive.project.id,
      )?.role;
    expect(await roleOnB()).toBe('planner');
    expect(await roleOnB()).toBe('planner');
    const members = `/api/admin/projects/${drive.project.id}/members/${user.id}`;
    const changed = await request(a.url)
      .put(members)
      .set('Origin', 'http://kerfwise.test')
      .set('Cookie', adminCookie)
      .send({ role: 'fitter' });
    expect(changed.status, JSON.stringify(changed.body)).toBe(200);
    expect(await roleOnB()).toBe('fitter');
    const forecastOnB = () => request(b.url).get(`/api/projects/${drive.project.id}/positions`).set('Cookie', c);
    expect((await forecastOnB()).status).toBe(200);
    const removed = await request(a.url).delete(members).set('Origin', 'http://kerfwise.test').set('Cookie', adminCookie);
    expect(removed.status).toBe(204);
    // Not a member any more: the same 404 as for a project that does not exist (decision 6).
    expect((await forecastOnB()).status).toBe(404);
    expect(await roleOnB()).toBeUndefined();
  });

  it('while its listener connection is down an instance reads sessions from the database (fail safe)', async () => {
    const user = await makeUser();
    const c = await signIn(a.url, user.email);
    await until('both listeners are connected', async () => (await listenerCount()) >= 2);
    expect((await request(b.url).get('/api/auth/me').set('Cookie', c)).status).toBe(200);
    expect((await request(b.url).get('/api/auth/me').set('Cookie', c)).status).toBe(200);
    // Cut both listeners (waiting until their backends are gone), then revoke the session without
    // any notification: nothing tells B, so only a cache that is bypassed while cut refuses it.
    await db.execute(sql`select pg_terminate_backend(pid, 5000) from pg_stat_activity where application_name = ${AUTH_LISTENER_NAME}`);
    await new Promise((r) => setTimeout(r, 100));
    const [session] = await db.select({ id: sessions.id }).from(sessions).where(eq(sessions.userId, user.id));
    await unnoticed('sessions', (tx) => tx.update(sessions).set({ revokedAt: new Date() }).where(eq(sessions.id, session.id)));
    expect((await request(b.url).get('/api/auth/me').set('Cookie', c)).status).toBe(401);
    // The listeners come back by themselves, and B caches again.
    await until('both listeners are back', async () => (await listenerCount()) >= 2);
    await new Promise((r) => setTimeout(r, 200));
    const other = await makeUser();
    const c2 = await signIn(a.url, other.email);
    const before = await request(b.url).get('/api/auth/me').set('Cookie', c2);
    await renameUnnoticed(other.id, 'Renamed While Cached');
    expect((await request(b.url).get('/api/auth/me').set('Cookie', c2)).body.user.name).toBe(before.body.user.name);
  });

  it('a job fired on both at the same instant runs once, and a waiting mail is sent once', async () => {
    const to = `${uniq('scale')}@kerfwise.test`;
    await enqueueMail(db, { kind: 'password_reset', to: [to], subject: 'Scale-out check', text: 'One copy only.' });
    // An instant of its own (a minute boundary far from any other test's ticks), the same on both.
    const at = new Date(Date.UTC(2031, 4, 6, 3, 17, 0));
    await Promise.all([a.tick('deliver-mail', at), b.tick('deliver-mail', at)]);
    const runs = await db
      .select({ outcome: jobRuns.outcome })
      .from(jobRuns)
      .where(sql`${jobRuns.job} = 'deliver-mail' and ${jobRuns.slotAt} = ${at.toISOString()}`);
    expect(runs.filter((r) => r.outcome === 'ok')).toHaveLength(1);
    const copies = await db
      .select()
      .from(caughtMail)
      .where(sql`${to} = any(${caughtMail.toAddresses})`);
    expect(copies).toHaveLength(1);
  });
});
