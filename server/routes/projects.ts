import { eq } from 'drizzle-orm';
import { Router } from 'express';
import type { Project } from '../../shared/schemas/project';
import { db } from '../db/client';
import { memberships, projects } from '../db/schema';
import { requireProject, requireSignedIn, requireUser } from '../middleware/auth';
import { notFound } from '../lib/http-error';
import { reply } from '../lib/reply';

export const projectsRouter = Router();

/** The drives the signed-in user belongs to, with their role on each. */
projectsRouter.get('/', requireSignedIn, async (req, res) => {
  const user = requireUser(req);
  const rows = await db
    .select({ project: projects, role: memberships.role })
    .from(memberships)
    .innerJoin(projects, eq(projects.id, memberships.projectId))
    .where(eq(memberships.userId, user.id))
    .orderBy(projects.name);
  reply<Project[]>(
    res,
    200,
    rows.map((r) => ({ ...r.project, role: r.role })),
  );
});

projectsRouter.get('/:projectId', requireProject('project.read'), async (req, res) => {
  const [project] = await db
    .select()
    .from(projects)
    .where(eq(projects.id, String(req.params.projectId)))
    .limit(1);
  // requireProject set the caller's role (it answers 404 to a non-member).
  if (!project || !req.projectRole) throw notFound('That project');
  reply<Project>(res, 200, { ...project, role: req.projectRole });
});
