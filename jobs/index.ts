/**
 * The scheduled work of Kerfwise (node-cron). Each job is safe to run on several server instances
 * at once; later jobs (forecast refresh, reminders, digests) add themselves to `schedule`.
 */
import cron, { type ScheduledTask } from 'node-cron';
import { deliverPendingMail } from '../server/lib/mail';
import { logger } from '../server/lib/logger';

interface ScheduledJob {
  name: string;
  /** A cron expression, evaluated in the server's time zone. */
  cron: string;
  run: () => Promise<unknown>;
}

export const schedule: ScheduledJob[] = [
  // The outbox is also kicked right after every commit that queues mail; this pass retries failures.
  { name: 'deliver-mail', cron: '* * * * *', run: () => deliverPendingMail() },
];

export function startJobs(): () => void {
  const tasks: ScheduledTask[] = schedule.map((job) =>
    cron.schedule(job.cron, async () => {
      try {
        await job.run();
      } catch (err) {
        logger.error({ err, job: job.name }, 'scheduled job failed');
      }
    }, { name: job.name, noOverlap: true }),
  );
  return () => tasks.forEach((t) => t.stop());
}
