/** The administrator's view of backups: the last good one, a failure since, and whether one is missing. */
import { and, desc, eq, gt } from 'drizzle-orm';
import { Router } from 'express';
import { db } from '../db/client';
import { jobRuns } from '../db/schema';
import { env } from '../env';
import { requireAdmin } from '../middleware/auth';
import { BACKUP_JOB_NAME, BACKUP_MISSING_AFTER_HOURS, listBackups } from '../services/backup';
import { lastGoodRun } from '../services/job-runner';

export const backupsRouter = Router();
backupsRouter.use(requireAdmin);

backupsRouter.get('/status', async (_req, res) => {
  const now = new Date();
  const good = await lastGoodRun(BACKUP_JOB_NAME);
  const [failed] = await db
    .select()
    .from(jobRuns)
    .where(and(eq(jobRuns.job, BACKUP_JOB_NAME), eq(jobRuns.outcome, 'failed'), good ? gt(jobRuns.startedAt, good.startedAt) : undefined))
    .orderBy(desc(jobRuns.startedAt))
    .limit(1);
  const goodAt = good?.finishedAt ?? good?.startedAt ?? null;
  const onDisk = await listBackups(env().BACKUP_DIR).catch(() => []);
  // A backup made by hand (`npm run backup`) counts too: it is a complete folder, not a job run.
  const newestAt = Math.max(goodAt?.getTime() ?? 0, onDisk.at(-1)?.takenAt.getTime() ?? 0);
  res.json({
    missing: now.getTime() - newestAt > BACKUP_MISSING_AFTER_HOURS * 3600_000,
    missingAfterHours: BACKUP_MISSING_AFTER_HOURS,
    lastGood: good ? { at: goodAt, summary: good.summary } : null,
    failedSince: failed ? { at: failed.startedAt, error: failed.error } : null,
    backupDir: env().BACKUP_DIR,
    onDisk: onDisk.length,
    newestOnDisk: onDisk.at(-1)?.name ?? null,
  });
});
