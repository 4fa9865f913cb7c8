import { eq } from 'drizzle-orm';
import { Router } from 'express';
import { db } from '../db/client';
import { memberships, projects } from '../db/schema';
import { requireProject, requireSignedIn, requireUser } from '../middleware/auth';
import { notFound } from '../lib/http-error';

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
  res.json(rows.map((r) => ({ ...r.project, role: r.role })));
});

projectsRouter.get('/:projectId', requireProject('project.read'), async (req, res) => {
  const [project] = await db
    .select()
    .from(projects)
    .where(eq(projects.id, String(req.params.projectId)))
    .limit(1);
  if (!project) throw notFound('That project');
  res.json({ ...project, role: req.projectRole });
});
