/** The job runner: runs recorded, one instance at a time (advisory lock), failures kept, catch-up once. */
import { desc, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { db, pool } from '../../server/db/client';
import { jobRuns } from '../../server/db/schema';
import { catchUpMissedRuns, runJob, type JobDefinition } from '../../server/services/job-runner';
import { uniq } from '../support/fixtures';

const job = (name: string, run: JobDefinition['run'], periodMs = 3600_000): JobDefinition => ({
  name,
  label: name,
  cron: '* * * * *',
  periodMs,
  run,
});

describe('job runner', () => {
  it('records a run with its outcome and summary, and passes the injected clock', async () => {
    let seen: Date | undefined;
    const run = await runJob(
      job(uniq('test-job'), async ({ now }) => {
        seen = now;
        return 'did 3 things';
      }),
      'admin',
      { now: new Date('2026-12-24T02:30:00Z') },
    );
    expect(run.outcome).toBe('ok');
    expect(run.summary).toBe('did 3 things');
    expect(run.finishedAt).not.toBeNull();
    expect(seen?.toISOString()).toBe('2026-12-24T02:30:00.000Z');
  });

  it('records a failure with its error message', async () => {
    const run = await runJob(
      job(uniq('failing-job'), async () => {
        throw new Error('mail server said no');
      }),
      'schedule',
    );
    expect(run.outcome).toBe('failed');
    expect(run.error).toBe('mail server said no');
  });

  it('lets only one instance run a job at a time (PostgreSQL advisory lock)', async () => {
    const name = uniq('locked-job');
    // Another "instance" holds the job's lock on its own connection.
    const other = await pool.connect();
    await other.query('select pg_advisory_lock(hashtext($1))', [`kerfwise-job:${name}`]);
    let ran = false;
    const run = await runJob(
      job(name, async () => {
        ran = true;
        return '';
      }),
      'schedule',
    );
    await other.query('select pg_advisory_unlock(hashtext($1))', [`kerfwise-job:${name}`]);
    other.release();
    expect(run.outcome).toBe('skipped');
    expect(ran).toBe(false);
    // Two at once from here: exactly one runs.
    const slow = job(name, () => new Promise((r) => setTimeout(() => r('slow'), 300)));
    const outcomes = (await Promise.all([runJob(slow, 'schedule'), runJob(slow, 'schedule')])).map((r) => r.outcome).sort();
    expect(outcomes).toEqual(['ok', 'skipped']);
  });

  it('catches up a missed run once at start-up, and not when the last run is recent', async () => {
    let count = 0;
    const j = job(uniq('nightly-like'), async () => `run ${++count}`, 24 * 3600_000);
    await catchUpMissedRuns([j]); // never ran → runs
    await catchUpMissedRuns([j]); // ran just now → nothing
    expect(count).toBe(1);
    // Pretend the last good run was two days ago (in its slot of two days ago): the next start-up catches up once.
    const twoDaysAgo = new Date(Date.now() - 48 * 3600_000);
    await db.update(jobRuns).set({ startedAt: twoDaysAgo, slotAt: twoDaysAgo }).where(eq(jobRuns.job, j.name));
    const runs = await catchUpMissedRuns([j]);
    expect(runs.map((r) => r.trigger)).toEqual(['catch-up']);
    expect(count).toBe(2);
    const [last] = await db.select().from(jobRuns).where(eq(jobRuns.job, j.name)).orderBy(desc(jobRuns.startedAt)).limit(1);
    expect(last.summary).toBe('run 2');
  });
});
