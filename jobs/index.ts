/**
 * The scheduled work of Kerfwise (node-cron). Every job runs through the job runner
 * (server/services/job-runner.ts): one instance at a time across servers, every run recorded,
 * a missed run caught up once at start-up, and an administrator can run a job now.
 */
import cron, { type ScheduledTask } from 'node-cron';
import { deliverPendingMail } from '../server/lib/mail';
import { logger } from '../server/lib/logger';
import { catchUpMissedRuns, runJob, slotAtOrBefore, type JobDefinition } from '../server/services/job-runner';
import { BACKUP_JOB, BACKUP_WATCH_JOB, backupWatchJob, nightlyBackupJob } from './backup';
import { alreadySentText } from './digest-weeks';
import { downtimeDigestJob, downtimeDigestWeek } from './downtime-digest';
import { partsDigestJob, partsDigestWeek } from './parts-digest';
import { refreshForecastsJob } from './refresh-forecasts';
import { stopRemindersJob } from './stop-reminders';

const MINUTE = 60_000;

export const jobs: JobDefinition[] = [
  {
    name: 'deliver-mail',
    label: 'Send waiting e-mail (retries after a mail-server outage)',
    cron: '* * * * *',
    periodMs: 5 * MINUTE,
    run: async () => {
      const { sent, failed } = await deliverPendingMail();
      return `${sent} sent, ${failed} failed (will retry).`;
    },
  },
  {
    name: 'refresh-forecasts',
    label: 'Nightly forecast refresh; propose stops for positions due soon',
    cron: '30 2 * * *',
    periodMs: 24 * 60 * MINUTE,
    run: (ctx) => refreshForecastsJob(ctx),
  },
  {
    name: 'stop-reminders',
    label: 'Remind crews 24 h and 2 h before a published stop',
    cron: '*/5 * * * *',
    periodMs: 10 * MINUTE,
    run: stopRemindersJob,
  },
  {
    name: 'downtime-digest',
    label: 'Weekly downtime summary to the site managers (last week, by cause)',
    cron: '0 7 * * 1',
    periodMs: 7 * 24 * 60 * MINUTE,
    run: (ctx) => downtimeDigestJob(ctx),
    alreadyDone: ({ now }) => alreadySentText('downtime_digest', now, downtimeDigestWeek),
  },
  {
    name: 'parts-digest',
    label: 'Weekly parts order suggestions to the buyers',
    cron: '0 6 * * 1',
    periodMs: 7 * 24 * 60 * MINUTE,
    run: (ctx) => partsDigestJob(ctx),
    alreadyDone: ({ now }) => alreadySentText('parts_digest', now, partsDigestWeek),
  },
  {
    name: BACKUP_JOB,
    label: 'Nightly backup of the database and photos (BACKUP_DIR), with retention',
    cron: '15 2 * * *',
    periodMs: 24 * 60 * MINUTE,
    run: nightlyBackupJob,
  },
  {
    name: BACKUP_WATCH_JOB,
    label: 'Hourly check that a backup is at most 36 h old; mails the administrators once a day while none is',
    cron: '40 * * * *',
    periodMs: 60 * MINUTE,
    run: backupWatchJob,
  },
];

/** The job of that name in the registry (tests and the entries; the server is given the registry). */
export function findJob(name: string): JobDefinition | undefined {
  return jobs.find((j) => j.name === name);
}

/**
 * One cron tick: runs the job in the slot of the scheduled time `at` (the runner records the run
 * and never rejects; the catch is a last guard so a tick can never end the process).
 */
export function scheduledTick(job: JobDefinition, at: Date): Promise<void> {
  return runJob(job, 'schedule', { now: at, slot: slotAtOrBefore(job.cron, at) }).then(
    () => undefined,
    (err: unknown) => logger.error({ err, job: job.name }, 'scheduled run failed'),
  );
}

/** Schedules every job and catches up missed runs (in the background). Returns a stop function. */
export function startJobs(): () => void {
  const tasks: ScheduledTask[] = jobs.map((job) =>
    cron.schedule(job.cron, (ctx) => scheduledTick(job, ctx.date), { name: job.name, noOverlap: true }),
  );
  catchUpMissedRuns(jobs).catch((err: unknown) => logger.error({ err }, 'start-up catch-up failed'));
  return () => tasks.forEach((t) => t.stop());
}
