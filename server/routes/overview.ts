import { Router } from 'express';
import { db } from '../db/client';
import { requireProject } from '../middleware/auth';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import type { OverviewWire } from '../../shared/schemas/overview';
import { buildOverview } from '../services/overview';

/** Each role's start of the day: only the sections of the caller's role on the drive. */
export const overviewRouter = Router({ mergeParams: true });

overviewRouter.get('/', requireProject('project.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const overview = await db.transaction((tx) => buildOverview(tx, projectId, req.projectRole!, new Date()));
  reply<OverviewWire>(res, 200, overview);
});
