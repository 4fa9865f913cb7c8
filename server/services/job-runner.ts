/**
 * Runs scheduled jobs safely on any number of server instances: a PostgreSQL advisory lock lets
 * one instance at a time run a job (the others record a 'skipped' run), every run is recorded in
 * `job_runs` with its outcome and error, and a job whose last good run is older than its period is
 * run once at start-up ("catch-up"). Jobs get the time as an argument, so tests inject a clock.
 */
import { and, desc, eq, sql } from 'drizzle-orm';
import { db, pool } from '../db/client';
import { jobRuns } from '../db/schema';
import { logger } from '../lib/logger';

export interface JobContext {
  now: Date;
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
}

export type JobTrigger = 'schedule' | 'catch-up' | 'admin';
export type JobRun = typeof jobRuns.$inferSelect;

/** Runs a job under its advisory lock and records the run. */
export async function runJob(job: JobDefinition, trigger: JobTrigger, options: { now?: Date; userId?: string | null } = {}): Promise<JobRun> {
  const client = await pool.connect();
  try {
    const { rows } = await client.query<{ locked: boolean }>('select pg_try_advisory_lock(hashtext($1)) as locked', [`kerfwise-job:${job.name}`]);
    if (!rows[0].locked) {
      const [skipped] = await db
        .insert(jobRuns)
        .values({ job: job.name, trigger, outcome: 'skipped', finishedAt: sql`now()`, summary: 'Another server was running this job.', triggeredBy: options.userId ?? null })
        .returning();
      return skipped;
    }
    const [run] = await db.insert(jobRuns).values({ job: job.name, trigger, triggeredBy: options.userId ?? null }).returning();
    try {
      const summary = await job.run({ now: options.now ?? new Date() });
      const [done] = await db.update(jobRuns).set({ outcome: 'ok', summary, finishedAt: sql`now()` }).where(eq(jobRuns.id, run.id)).returning();
      return done;
    } catch (err) {
      logger.error({ err, job: job.name }, 'job failed');
      const [failed] = await db
        .update(jobRuns)
        .set({ outcome: 'failed', error: err instanceof Error ? err.message : String(err), finishedAt: sql`now()` })
        .where(eq(jobRuns.id, run.id))
        .returning();
      return failed;
    } finally {
      await client.query('select pg_advisory_unlock(hashtext($1))', [`kerfwise-job:${job.name}`]);
    }
  } finally {
    client.release();
  }
}

/** The last good run of a job, if any. */
export async function lastGoodRun(name: string): Promise<JobRun | undefined> {
  const [row] = await db.select().from(jobRuns).where(and(eq(jobRuns.job, name), eq(jobRuns.outcome, 'ok'))).orderBy(desc(jobRuns.startedAt)).limit(1);
  return row;
}

/** At start-up: runs once every job whose last good run is older than its period (or that never ran). */
export async function catchUpMissedRuns(jobs: JobDefinition[], now: Date = new Date()): Promise<JobRun[]> {
  const runs: JobRun[] = [];
  for (const job of jobs) {
    const last = await lastGoodRun(job.name);
    if (!last || now.getTime() - last.startedAt.getTime() > job.periodMs) runs.push(await runJob(job, 'catch-up', { now }));
  }
  return runs;
}
