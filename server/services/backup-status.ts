/**
 * Whether the drive's data has a recent backup: the last good backup run, a failure since, and
 * the newest complete backup folder on disk (a backup made by hand counts too). Shared by the
 * administrator's Jobs screen and the hourly watch that mails the administrators when backups stop.
 */
import { and, desc, eq, gt } from 'drizzle-orm';
import { db } from '../db/client';
import { jobRuns } from '../db/schema';
import { env } from '../env';
import { BACKUP_JOB_NAME, BACKUP_MISSING_AFTER_HOURS, listBackups } from './backup';
import { lastGoodRun } from './job-runner';

export interface BackupStatus {
  missing: boolean;
  missingAfterHours: number;
  /** The newest good backup, by job run or on disk; null when there is none. */
  newestAt: Date | null;
  lastGood: { at: Date; summary: string | null } | null;
  failedSince: { at: Date; error: string | null } | null;
  backupDir: string;
  onDisk: number;
  newestOnDisk: string | null;
}

export async function backupStatus(now: Date): Promise<BackupStatus> {
  const good = await lastGoodRun(BACKUP_JOB_NAME);
  const [failed] = await db
    .select()
    .from(jobRuns)
    .where(and(eq(jobRuns.job, BACKUP_JOB_NAME), eq(jobRuns.outcome, 'failed'), good ? gt(jobRuns.startedAt, good.startedAt) : undefined))
    .orderBy(desc(jobRuns.startedAt))
    .limit(1);
  const goodAt = good?.finishedAt ?? good?.startedAt ?? null;
  const onDisk = await listBackups(env().BACKUP_DIR).catch(() => []);
  const newestMs = Math.max(goodAt?.getTime() ?? 0, onDisk.at(-1)?.takenAt.getTime() ?? 0);
  return {
    missing: now.getTime() - newestMs > BACKUP_MISSING_AFTER_HOURS * 3600_000,
    missingAfterHours: BACKUP_MISSING_AFTER_HOURS,
    newestAt: newestMs > 0 ? new Date(newestMs) : null,
    lastGood: good ? { at: good.finishedAt ?? good.startedAt, summary: good.summary } : null,
    failedSince: failed ? { at: failed.startedAt, error: failed.error } : null,
    backupDir: env().BACKUP_DIR,
    onDisk: onDisk.length,
    newestOnDisk: onDisk.at(-1)?.name ?? null,
  };
}
