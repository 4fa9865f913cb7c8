/** The administrator's view of backups: the last good one, a failure since, and whether one is missing. */
import { Router } from 'express';
import type { BackupStatus } from '../../shared/schemas/admin';
import { requireAdmin } from '../middleware/auth';
import { reply } from '../lib/reply';
import { backupStatus } from '../services/backup-status';

export const backupsRouter = Router();
backupsRouter.use(requireAdmin);

backupsRouter.get('/status', async (_req, res) => {
  const { newestAt: _newestAt, ...status } = await backupStatus(new Date());
  reply<BackupStatus>(res, 200, status);
});
