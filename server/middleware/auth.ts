import { and, eq } from 'drizzle-orm';
import type { NextFunction, Request, Response } from 'express';
import { z } from 'zod';
import { roleCan, type Permission, type ProjectRole } from '../../shared/roles';
import { db } from '../db/client';
import { memberships, projects } from '../db/schema';
import { forbidden, HttpError, notFound } from '../lib/http-error';
import { resolveSession, SESSION_COOKIE, type AuthUser } from '../lib/session';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      user?: AuthUser;
      sessionId?: string;
      /** Set by requireProject: the caller's role on the project in the route. */
      projectRole?: ProjectRole;
    }
  }
}

/** Reads the session cookie, if any; never refuses (routes decide). */
export async function loadUser(req: Request, _res: Response, next: NextFunction) {
  const found = await resolveSession(req.cookies?.[SESSION_COOKIE]);
  if (found) {
    req.user = found.user;
    req.sessionId = found.sessionId;
  }
  next();
}

export function requireUser(req: Request): AuthUser {
  if (!req.user) throw new HttpError(401, 'Sign in to continue.');
  return req.user;
}

export function requireSignedIn(req: Request, _res: Response, next: NextFunction) {
  requireUser(req);
  next();
}

export function requireAdmin(req: Request, _res: Response, next: NextFunction) {
  const user = requireUser(req);
  if (!user.isAdmin) throw forbidden('Only an administrator can do that.');
  next();
}

const projectParamsSchema = z.object({ projectId: z.string() });
const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * Guards every `/api/projects/:projectId/…` route. A non-member gets 404 — the same answer as for a
 * project that does not exist — so that project ids reveal nothing (DEVELOPERS.md, decision 6).
 */
export function requireProject(permission: Permission) {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const user = requireUser(req);
    const { projectId } = projectParamsSchema.parse(req.params);
    if (!uuidPattern.test(projectId)) throw notFound('That project');
    const [row] = await db
      .select({ role: memberships.role })
      .from(memberships)
      .innerJoin(projects, eq(projects.id, memberships.projectId))
      .where(and(eq(memberships.projectId, projectId), eq(memberships.userId, user.id)))
      .limit(1);
    if (!row) throw notFound('That project');
    if (!roleCan(row.role, permission)) throw forbidden();
    req.projectRole = row.role;
    next();
  };
}
