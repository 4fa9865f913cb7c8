import { and, eq, isNull, sql } from 'drizzle-orm';
import type { Request, Response } from 'express';
import { jwtVerify, SignJWT } from 'jose';
import { db, type DbOrTx } from '../db/client';
import { sessions } from '../db/schema';
import { env } from '../env';
import type { ProjectRole } from '../../shared/roles';

export const SESSION_COOKIE = 'kerfwise_session';

export const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

const secretKey = () => new TextEncoder().encode(env().SESSION_SECRET);

export interface AuthUser {
  id: string;
  email: string;
  name: string;
  isAdmin: boolean;
}

/** Opens a server-side session row and sets the signed cookie that names it. */
export async function startSession(tx: DbOrTx, req: Request, res: Response, userId: string): Promise<void> {
  const hours = env().SESSION_HOURS;
  const expiresAt = new Date(Date.now() + hours * 3600_000);
  const [row] = await tx
    .insert(sessions)
    .values({ userId, expiresAt, userAgent: req.get('user-agent')?.slice(0, 300) ?? null, ip: req.ip ?? null })
    .returning({ id: sessions.id });
  const token = await new SignJWT({})
    .setProtectedHeader({ alg: 'HS256' })
    .setSubject(userId)
    .setJti(row.id)
    .setIssuedAt()
    .setExpirationTime(expiresAt)
    .sign(secretKey());
  res.cookie(SESSION_COOKIE, token, {
    httpOnly: true,
    sameSite: 'lax',
    secure: req.secure,
    path: '/',
    expires: expiresAt,
  });
}

export function clearSessionCookie(req: Request, res: Response): void {
  res.clearCookie(SESSION_COOKIE, { httpOnly: true, sameSite: 'lax', secure: req.secure, path: '/' });
}

/**
 * The signed-in user and session for a cookie value, or null when it is missing, forged, expired
 * or revoked. With `projectId`, the same single query also reads the caller's role on that project
 * (null when not a member), so a project route costs one query for session and membership.
 */
export async function resolveSession(
  token: string | undefined,
  projectId?: string,
): Promise<{ user: AuthUser; sessionId: string; projectRole?: { projectId: string; role: ProjectRole | null } } | null> {
  if (!token) return null;
  let sessionId: string;
  try {
    const { payload } = await jwtVerify(token, secretKey(), { algorithms: ['HS256'] });
    if (!payload.jti || !uuidPattern.test(payload.jti)) return null;
    sessionId = payload.jti;
  } catch {
    return null;
  }
  const { rows } = await db.execute<{ id: string; email: string; name: string; is_admin: boolean; role: ProjectRole | null }>(sql`
    select u.id, u.email, u.name, u.is_admin, ${projectId ? sql`(select m.role from memberships m where m.user_id = u.id and m.project_id = ${projectId})` : sql`null`} as role
    from sessions s join users u on u.id = s.user_id
    where s.id = ${sessionId} and s.revoked_at is null and s.expires_at > now() and u.active
    limit 1`);
  const row = rows[0];
  if (!row) return null;
  return {
    user: { id: row.id, email: row.email, name: row.name, isAdmin: row.is_admin },
    sessionId,
    ...(projectId ? { projectRole: { projectId, role: row.role } } : {}),
  };
}

export async function revokeSession(tx: DbOrTx, sessionId: string): Promise<void> {
  await tx
    .update(sessions)
    .set({ revokedAt: sql`now()` })
    .where(and(eq(sessions.id, sessionId), isNull(sessions.revokedAt)));
}

export async function revokeAllSessions(tx: DbOrTx, userId: string): Promise<void> {
  await tx
    .update(sessions)
    .set({ revokedAt: sql`now()` })
    .where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt)));
}
