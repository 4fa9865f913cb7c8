import { and, eq } from 'drizzle-orm';
import type { NextFunction, Request, Response } from 'express';
import { roleCan, type Permission, type ProjectRole } from '../../shared/roles';
import { db } from '../db/client';
import { memberships } from '../db/schema';
import { forbidden, HttpError, notFound } from '../lib/http-error';
import { resolveSession, SESSION_COOKIE, uuidPattern, type AuthUser, type ResolvedSession } from '../lib/session';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      user?: AuthUser;
      sessionId?: string;
      /** Set by loadUser: the resolved session (user, expiry, roles per project). */
      authSession?: ResolvedSession;
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
    req.authSession = found;
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

/**
 * Guards every `/api/projects/:projectId/…` route. A non-member gets 404 — the same answer as for a
 * project that does not exist — so that project ids reveal nothing (DEVELOPERS.md, decision 6).
 * The caller's role comes with the resolved session (decision 45): no query of its own.
 */
export function requireProject(permission: Permission) {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const user = requireUser(req);
    const projectId = (req.params as Record<string, unknown>).projectId;
    if (typeof projectId !== 'string' || !uuidPattern.test(projectId)) throw notFound('That project');
    const role = req.authSession
      ? req.authSession.roles.get(projectId.toLowerCase())
      : (
          await db
            .select({ role: memberships.role })
            .from(memberships)
            .where(and(eq(memberships.projectId, projectId), eq(memberships.userId, user.id)))
            .limit(1)
        )[0]?.role;
    if (!role) throw notFound('That project');
    if (!roleCan(role, permission)) throw forbidden();
    req.projectRole = role;
    next();
  };
}
