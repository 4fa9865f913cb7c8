import { and, eq } from 'drizzle-orm';
import type { NextFunction, Request, Response } from 'express';
import { z } from 'zod';
import { roleCan, type Permission, type ProjectRole } from '../../shared/roles';
import { db } from '../db/client';
import { memberships } from '../db/schema';
import { forbidden, HttpError, notFound } from '../lib/http-error';
import { resolveSession, SESSION_COOKIE, uuidPattern, type AuthUser } from '../lib/session';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      user?: AuthUser;
      sessionId?: string;
      /** Set by requireProject: the caller's role on the project in the route. */
      projectRole?: ProjectRole;
      /** Set by loadUser on /projects/:projectId/… paths: the role read with the session (null: not a member). */
      sessionProjectRole?: { projectId: string; role: ProjectRole | null };
    }
  }
}

/** Reads the session cookie, if any; never refuses (routes decide). */
export async function loadUser(req: Request, _res: Response, next: NextFunction) {
  // On a project's path, the session query reads the caller's role on it too (one query).
  const projectId = /^\/projects\/([^/]+)/.exec(req.path)?.[1];
  const found = await resolveSession(req.cookies?.[SESSION_COOKIE], projectId && uuidPattern.test(projectId) ? projectId : undefined);
  if (found) {
    req.user = found.user;
    req.sessionId = found.sessionId;
    req.sessionProjectRole = found.projectRole;
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

/**
 * Guards every `/api/projects/:projectId/…` route. A non-member gets 404 — the same answer as for a
 * project that does not exist — so that project ids reveal nothing (DEVELOPERS.md, decision 6).
 */
export function requireProject(permission: Permission) {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const user = requireUser(req);
    const { projectId } = projectParamsSchema.parse(req.params);
    if (!uuidPattern.test(projectId)) throw notFound('That project');
    const row =
      req.sessionProjectRole?.projectId === projectId
        ? req.sessionProjectRole.role && { role: req.sessionProjectRole.role }
        : (
            await db
              .select({ role: memberships.role })
              .from(memberships)
              .where(and(eq(memberships.projectId, projectId), eq(memberships.userId, user.id)))
              .limit(1)
          )[0];
    if (!row) throw notFound('That project');
    if (!roleCan(row.role, permission)) throw forbidden();
    req.projectRole = row.role;
    next();
  };
}
