/**
 * Nightly backup (DEVELOPERS.md, decision 28): one consistent backup of the database and the stored
 * photos into BACKUP_DIR, then the retention (BACKUP_KEEP_DAILY / BACKUP_KEEP_WEEKLY) prunes the
 * older ones. The run's summary carries size and duration; a failure is recorded by the job runner
 * and mailed to every active administrator.
 */
import { and, eq } from 'drizzle-orm';
import { db } from '../server/db/client';
import { users } from '../server/db/schema';
import { env } from '../server/env';
import { enqueueMail, kickMailDelivery } from '../server/lib/mail';
import { BACKUP_JOB_NAME, createBackup, formatBytes, pruneBackups } from '../server/services/backup';
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
  const admins = await db.select({ email: users.email }).from(users).where(and(eq(users.isAdmin, true), eq(users.active, true)));
  if (admins.length === 0) return 0;
  await db.transaction(async (tx) => {
    await enqueueMail(tx, { kind: 'backup_alert', to: admins.map((a) => a.email), subject, text });
  });
  kickMailDelivery();
  return admins.length;
}
