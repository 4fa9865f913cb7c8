/** The administrator's view of backups: the last good one, a failure since, and whether one is missing. */
import { Router } from 'express';
import { requireAdmin } from '../middleware/auth';
import { backupStatus } from '../services/backup-status';

export const backupsRouter = Router();
backupsRouter.use(requireAdmin);

backupsRouter.get('/status', async (_req, res) => {
  const { newestAt: _newestAt, ...status } = await backupStatus(new Date());
  res.json(status);
});
