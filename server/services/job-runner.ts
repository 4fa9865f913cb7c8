/**
 * Runs scheduled jobs safely on any number of server instances, through any database outage
 * (DEVELOPERS.md, decisions 19 and 25):
 * - a PostgreSQL advisory lock lets one instance at a time run a job (the others record 'skipped');
 * - a scheduled or catch-up run first claims its slot — job name + the scheduled time it stands
 *   for — in `job_runs` under a unique key, so a late instance finds the slot taken and does not
 *   do the work again;
 * - every run is recorded with its outcome and error; a run that cannot even be recorded because
 *   the database is down is kept in memory as failed and written when the database is back;
 * - `runJob` never rejects, so a timer or cron callback can never end the process;
 * - a job whose last good run is older than its period is run once at start-up ("catch-up").
 * Jobs get the time as an argument, so tests inject a clock.
 */
import { and, desc, eq, sql } from 'drizzle-orm';
import { drizzle } from 'drizzle-orm/node-postgres';
import { parse as parseCron } from 'node-cron';
import type pg from 'pg';
import { pool as appPool } from '../db/client';
import * as schema from '../db/schema';
import { jobRuns } from '../db/schema';
import { logger } from '../lib/logger';

export interface JobContext {
  now: Date;
  /** 'Run now' confirmed by an administrator: send a weekly digest again for a week already sent. */
  again?: boolean;
}

export interface JobDefinition {
  name: string;
  label: string;
  /** node-cron expression, in the server's time zone. */
  cron: string;
  /** A run older than this (ms) counts as missed at start-up. */
  periodMs: number;
  /** Does the work; returns a one-line summary for the run record. */
  run: (ctx: JobContext) => Promise<string>;
  /**
   * For 'run now': what a run at `now` would send again (e.g. "week 2026-W13 was sent on …"),
   * or null. The administrator is asked before such a run.
   */
  alreadyDone?: (ctx: JobContext) => Promise<string | null>;
}

export type JobTrigger = 'schedule' | 'catch-up' | 'admin';
export type JobRun = typeof jobRuns.$inferSelect;

export interface RunOptions {
  now?: Date;
  userId?: string | null;
  /** The scheduled time this run stands for; by default the job's last slot at or before `now`. Ignored for 'admin'. */
  slot?: Date;
  again?: boolean;
}

const MINUTE_MS = 60_000;

/**
 * The job's last scheduled time at or before `at` (server time zone, whole minutes), looking back
 * at most a year; `at` itself when the expression never matches.
 */
export function slotAtOrBefore(cron: string, at: Date): Date {
  const f = parseCron(cron);
  const nums = (xs: (number | string)[]) => new Set(xs.filter((x): x is number => typeof x === 'number'));
  const minutes = nums(f.minute),
    hours = nums(f.hour),
    doms = nums(f.dayOfMonth),
    months = nums(f.month);
  const dows = nums(f.dayOfWeek.map((d) => (d === 7 ? 0 : d)));
  const anyDom = doms.size >= 31,
    anyDow = dows.size >= 7;
  const t = new Date(Math.floor(at.getTime() / MINUTE_MS) * MINUTE_MS);
  for (let i = 0; i < 366 * 24 * 60; i++, t.setTime(t.getTime() - MINUTE_MS)) {
    if (!minutes.has(t.getMinutes()) || !hours.has(t.getHours()) || !months.has(t.getMonth() + 1)) continue;
    const dom = doms.has(t.getDate()),
      dow = dows.has(t.getDay());
    // Classic cron: with both day fields restricted, either one matching is enough.
    if (anyDom && anyDow ? true : anyDom ? dow : anyDow ? dom : dom || dow) return t;
  }
  return new Date(at.getTime());
}

const message = (err: unknown) => (err instanceof Error ? err.message : String(err));

/** A failed run that could not be written when it happened (the database was down). */
interface Unrecorded {
  runId?: number;
  job: string;
  trigger: JobTrigger;
  startedAt: Date;
  finishedAt: Date;
  error: string;
  slotAt: Date | null;
  userId: string | null;
}

const FLUSH_RETRY_MS = 5_000;

/** A job runner over its own pool (one per server instance; tests make two to act as two servers). */
export function createJobRunner(pool: pg.Pool) {
  const db = drizzle(pool, { schema, casing: 'snake_case' });
  const unrecorded: Unrecorded[] = [];
  let flushTimer: NodeJS.Timeout | undefined;

  /** Writes failed runs kept in memory; leaves them when the database is still away. */
  async function flushUnrecorded(): Promise<number> {
    let written = 0;
    while (unrecorded.length > 0) {
      const u = unrecorded[0];
      const values = { outcome: 'failed', error: u.error, finishedAt: u.finishedAt };
      const updated = u.runId
        ? await db
            .update(jobRuns)
            .set(values)
            .where(and(eq(jobRuns.id, u.runId), eq(jobRuns.outcome, 'running')))
            .returning({ id: jobRuns.id })
        : [];
      if (!u.runId) {
        await db
          .insert(jobRuns)
          .values({ ...values, job: u.job, trigger: u.trigger, startedAt: u.startedAt, slotAt: u.slotAt, triggeredBy: u.userId });
      }
      unrecorded.shift();
      if (!u.runId || updated.length > 0) written++;
    }
    return written;
  }

  function scheduleFlush() {
    if (flushTimer) return;
    flushTimer = setTimeout(() => {
      flushUnrecorded()
        .catch(() => {}) // still away; try again
        .finally(() => {
          flushTimer = undefined;
          if (unrecorded.length > 0) scheduleFlush();
        });
    }, FLUSH_RETRY_MS);
    flushTimer.unref();
  }

  function remember(u: Unrecorded): JobRun {
    unrecorded.push(u);
    scheduleFlush();
    return {
      id: u.runId ?? 0,
      job: u.job,
      trigger: u.trigger,
      startedAt: u.startedAt,
      finishedAt: u.finishedAt,
      outcome: 'failed',
      summary: null,
      error: u.error,
      triggeredBy: u.userId,
      slotAt: u.slotAt,
    };
  }

  async function recordSkipped(job: JobDefinition, trigger: JobTrigger, slotAt: Date | null, userId: string | null, summary: string) {
    const [skipped] = await db
      .insert(jobRuns)
      .values({ job: job.name, trigger, outcome: 'skipped', finishedAt: sql`now()`, summary, slotAt, triggeredBy: userId })
      .returning();
    return skipped;
  }

  /**
   * Runs a job under its advisory lock, in its slot, and records the run. Never rejects: a failure
   * of the job or of the database is a failed run.
   */
  async function runJob(job: JobDefinition, trigger: JobTrigger, options: RunOptions = {}): Promise<JobRun> {
    const now = options.now ?? new Date();
    const userId = options.userId ?? null;
    const slotAt = trigger === 'admin' ? null : (options.slot ?? slotAtOrBefore(job.cron, now));
    const startedAt = new Date();
    let runId: number | undefined;
    try {
      await flushUnrecorded().catch(() => {});
      const lockKey = `kerfwise-job:${job.name}`;
      const client = await pool.connect();
      let broken: Error | undefined;
      try {
        const { rows } = await client.query<{ locked: boolean }>('select pg_try_advisory_lock(hashtext($1)) as locked', [lockKey]);
        if (!rows[0].locked) return await recordSkipped(job, trigger, slotAt, userId, 'Another server was running this job.');
        try {
          // We hold the lock, so a run still marked 'running' belongs to a process that died mid-run.
          await db
            .update(jobRuns)
            .set({ outcome: 'failed', error: 'The server stopped during this run; it did not finish.', finishedAt: sql`now()` })
            .where(and(eq(jobRuns.job, job.name), eq(jobRuns.outcome, 'running')));
          const [run] = await db
            .insert(jobRuns)
            .values({ job: job.name, trigger, triggeredBy: userId, slotAt })
            .onConflictDoNothing()
            .returning();
          if (!run)
            return await recordSkipped(
              job,
              trigger,
              slotAt,
              userId,
              `The run for ${slotAt?.toISOString()} was already done by another server.`,
            );
          runId = run.id;
          let summary: string;
          try {
            summary = await job.run({ now, again: options.again });
          } catch (err) {
            logger.error({ err, job: job.name }, 'job failed');
            // Failing frees the slot (the unique key covers running and good runs only): a catch-up may redo it.
            const [failed] = await db
              .update(jobRuns)
              .set({ outcome: 'failed', error: message(err), finishedAt: sql`now()` })
              .where(eq(jobRuns.id, run.id))
              .returning();
            return failed;
          }
          const [done] = await db
            .update(jobRuns)
            .set({ outcome: 'ok', summary, finishedAt: sql`now()` })
            .where(eq(jobRuns.id, run.id))
            .returning();
          return done;
        } finally {
          await client.query('select pg_advisory_unlock(hashtext($1))', [lockKey]).catch((err: Error) => {
            broken = err; // the session (and with it the lock) is gone already
          });
        }
      } finally {
        client.release(broken);
      }
    } catch (err) {
      // The database went away before the run could be recorded, or while recording its end.
      logger.error(
        { err: message(err), job: job.name, trigger },
        'job run could not be recorded; kept as failed until the database is back',
      );
      return remember({
        runId,
        job: job.name,
        trigger,
        startedAt,
        finishedAt: new Date(),
        error: `The database could not be reached: ${message(err)}`,
        slotAt,
        userId,
      });
    }
  }

  /** The last good run of a job, if any. */
  async function lastGoodRun(name: string): Promise<JobRun | undefined> {
    const [row] = await db
      .select()
      .from(jobRuns)
      .where(and(eq(jobRuns.job, name), eq(jobRuns.outcome, 'ok')))
      .orderBy(desc(jobRuns.startedAt))
      .limit(1);
    return row;
  }

  /**
   * At start-up: runs once every job whose last good run is older than its period (or that never
   * ran), in the slot it missed. Never rejects: a job that cannot be checked is a failed run.
   */
  async function catchUpMissedRuns(jobs: JobDefinition[], now: Date = new Date()): Promise<JobRun[]> {
    const runs: JobRun[] = [];
    for (const job of jobs) {
      let due: boolean;
      try {
        const last = await lastGoodRun(job.name);
        due = !last || now.getTime() - last.startedAt.getTime() > job.periodMs;
      } catch (err) {
        logger.error({ err: message(err), job: job.name }, 'catch-up check failed');
        runs.push(
          remember({
            job: job.name,
            trigger: 'catch-up',
            startedAt: now,
            finishedAt: new Date(),
            error: `Catch-up check failed; the database could not be reached: ${message(err)}`,
            slotAt: null,
            userId: null,
          }),
        );
        continue;
      }
      if (due) runs.push(await runJob(job, 'catch-up', { now }));
    }
    return runs;
  }

  return { runJob, lastGoodRun, catchUpMissedRuns, flushUnrecorded, pendingRecords: () => unrecorded.length };
}

export type JobRunner = ReturnType<typeof createJobRunner>;

/** This server's runner, over the app's pool. */
export const jobRunner: JobRunner = createJobRunner(appPool);
export const { runJob, lastGoodRun, catchUpMissedRuns } = jobRunner;
