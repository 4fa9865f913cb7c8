/**
 * Two server processes against one PostgreSQL, as a company running several instances behind a
 * proxy would (issue 14): a session made on one works on the other, a forecast computed by one is
 * served by the other from the shared cache (304 for the ETag the first one gave), a scheduled job
 * fired on both at the same instant runs once, and a waiting mail is sent once. Each process is
 * tests/support/outage-server.ts (the app and the process guards, job ticks over IPC).
 */
import { fork, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { caughtMail, forecastCache, jobRuns } from '../../server/db/schema';
import { enqueueMail } from '../../server/lib/mail';
import { addMember, makeUser, PASSWORD, uniq } from '../support/fixtures';
import { makeStopsDrive } from '../support/stops-fixtures';

interface Instance {
  child: ChildProcess;
  url: string;
  tick: (job: string, at: Date) => Promise<void>;
}

function startInstance(): Promise<Instance> {
  const child = fork(path.resolve('tests/support/outage-server.ts'), [], {
    execArgv: ['--import', 'tsx'],
    env: { ...process.env, LOG_LEVEL: 'warn' },
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
