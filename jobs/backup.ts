/**
 * Nightly backup (DEVELOPERS.md, decision 28): one consistent backup of the database and the stored
 * photos into BACKUP_DIR, then the retention (BACKUP_KEEP_DAILY / BACKUP_KEEP_WEEKLY) prunes the
 * older ones. The run's summary carries size and duration; a failure is recorded by the job runner
 * and mailed to every active administrator.
 */
import { and, desc, eq, like } from 'drizzle-orm';
import { db } from '../server/db/client';
import { jobRuns, users } from '../server/db/schema';
import { env } from '../server/env';
import { enqueueMail, kickMailDelivery } from '../server/lib/mail';
import { BACKUP_JOB_NAME, createBackup, formatBytes, pruneBackups } from '../server/services/backup';
import { backupStatus } from '../server/services/backup-status';
import type { JobContext } from '../server/services/job-runner';

export const BACKUP_JOB = BACKUP_JOB_NAME;

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

export async function nightlyBackupJob({ now }: JobContext): Promise<string> {
  const e = env();
  try {
    const backup = await createBackup({ databaseUrl: e.DATABASE_URL, storageDir: e.STORAGE_DIR, backupDir: e.BACKUP_DIR, now });
    const pruned = await pruneBackups(e.BACKUP_DIR, now, { daily: e.BACKUP_KEEP_DAILY, weekly: e.BACKUP_KEEP_WEEKLY });
    const photos = backup.manifest.files.length - 1;
    return (
      `${backup.name}: ${formatBytes(backup.sizeBytes)} (database and ${plural(photos, 'stored file')}) ` +
      `in ${(backup.durationMs / 1000).toFixed(1)} s; ${plural(pruned.kept.length, 'backup')} kept, ${pruned.removed.length} removed.`
    );
  } catch (err) {
    await mailAdministrators(
      'Kerfwise backup FAILED',
      `The nightly backup at ${now.toISOString()} failed:\n\n${err instanceof Error ? err.message : String(err)}\n\n` +
        `Backup folder: ${e.BACKUP_DIR}\n\nUntil a backup succeeds, the newest good one is older than a day. ` +
        'Fix the cause (disk full, folder not writable, database not reachable), then run the job again under ' +
        'Administration → Jobs, or run "npm run backup" on the server.\n',
    ).catch(() => {});
    throw err;
  }
}

/** Queues one message to every active administrator. */
export async function mailAdministrators(subject: string, text: string): Promise<number> {
  const admins = await db
    .select({ email: users.email })
    .from(users)
    .where(and(eq(users.isAdmin, true), eq(users.active, true)));
  if (admins.length === 0) return 0;
  await db.transaction(async (tx) => {
    await enqueueMail(tx, { kind: 'backup_alert', to: admins.map((a) => a.email), subject, text });
  });
  kickMailDelivery();
  return admins.length;
}

export const BACKUP_WATCH_JOB = 'backup-watch';
/** The watch mails at most once in this many hours while backups stay missing. */
const WATCH_REMIND_HOURS = 24;
const MAILED = 'Mailed the administrators';

/**
 * Hourly: when no good backup is newer than 36 h (the nightly job has not run, or keeps failing
 * without anyone noticing), mail the administrators — at most once a day while it lasts.
 */
export async function backupWatchJob({ now }: JobContext): Promise<string> {
  const status = await backupStatus(now);
  const [running] = await db
    .select({ id: jobRuns.id })
    .from(jobRuns)
    .where(and(eq(jobRuns.job, BACKUP_JOB_NAME), eq(jobRuns.outcome, 'running')))
    .limit(1);
  if (status.missing && running) return 'A backup is running now; checked again at the next hour.';
  if (!status.missing) return `A backup is at most ${status.missingAfterHours} h old; nothing to do.`;
  // The last time the watch mailed, as the run's own clock saw it (written into its summary).
  const [lastMailed] = await db
    .select({ summary: jobRuns.summary })
    .from(jobRuns)
    .where(and(eq(jobRuns.job, BACKUP_WATCH_JOB), like(jobRuns.summary, `${MAILED} at %`)))
    .orderBy(desc(jobRuns.id))
    .limit(1);
  const mailedAtMs = lastMailed?.summary ? Date.parse(lastMailed.summary.slice(`${MAILED} at `.length).split(' ')[0]) : NaN;
  const recent = Number.isFinite(mailedAtMs) && now.getTime() - mailedAtMs < WATCH_REMIND_HOURS * 3600_000 && mailedAtMs <= now.getTime();
  const newest = status.newestAt ? `The newest good backup is from ${status.newestAt.toISOString()}.` : 'There is no good backup at all.';
  if (recent) return `Backups are missing (${newest}); the administrators were mailed within the last ${WATCH_REMIND_HOURS} h.`;
  const n = await mailAdministrators(
    'Kerfwise backup MISSING',
    `No backup of Kerfwise is newer than ${status.missingAfterHours} hours. ${newest}\n\n` +
      `Backup folder: ${status.backupDir}\n${status.failedSince ? `Last failure: ${status.failedSince.error ?? 'no message'}\n` : ''}\n` +
      'Check Administration → Jobs: is the nightly backup running, and does it succeed? Run it there, or run "npm run backup" on the server.\n',
  );
  return `${MAILED} at ${now.toISOString()} (${n}): backups are missing. ${newest}`;
}
