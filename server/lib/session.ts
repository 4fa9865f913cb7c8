import { and, eq, isNull, sql } from 'drizzle-orm';
import type { Request, Response } from 'express';
import { jwtVerify, SignJWT } from 'jose';
import { db, type DbOrTx } from '../db/client';
import { sessions } from '../db/schema';
import { env } from '../env';
import { cachedSession, sessionCacheTicket, storeSession, type ResolvedSession } from './session-cache';

export const SESSION_COOKIE = 'kerfwise_session';

export const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

let secretMemo: Uint8Array | undefined;
const secretKey = () => (secretMemo ??= new TextEncoder().encode(env().SESSION_SECRET));

export type { AuthUser, ResolvedSession } from './session-cache';

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
 * or revoked, with the caller's role on every project. Answered from this instance's session cache
 * when it holds the cookie (no query, no signature check: the cookie was checked when cached);
 * otherwise one query reads session, user and memberships, and the answer is cached (decision 45).
 */
export async function resolveSession(token: string | undefined): Promise<ResolvedSession | null> {
  if (!token) return null;
  const hit = cachedSession(token);
  if (hit) return hit;
  const ticket = sessionCacheTicket();
  let sessionId: string;
  try {
    const { payload } = await jwtVerify(token, secretKey(), { algorithms: ['HS256'] });
    if (!payload.jti || !uuidPattern.test(payload.jti)) return null;
    sessionId = payload.jti;
  } catch {
    return null;
  }
  const { rows } = await db.execute<{
    id: string;
    email: string;
    name: string;
    is_admin: boolean;
    expires_ms: number;
    memberships: ResolvedSession['memberships'];
  }>(sql`
    select u.id, u.email, u.name, u.is_admin, (extract(epoch from s.expires_at) * 1000)::float8 as expires_ms,
           coalesce((select json_agg(json_build_object('projectId', p.id, 'projectName', p.name, 'role', m.role) order by p.name, p.id)
                     from memberships m join projects p on p.id = m.project_id where m.user_id = u.id), '[]'::json) as memberships
    from sessions s join users u on u.id = s.user_id
    where s.id = ${sessionId} and s.revoked_at is null and s.expires_at > now() and u.active
    limit 1`);
  const row = rows[0];
  if (!row) return null;
  const found: ResolvedSession = {
    user: { id: row.id, email: row.email, name: row.name, isAdmin: row.is_admin },
    sessionId,
    expiresMs: row.expires_ms,
    memberships: row.memberships,
    roles: new Map(row.memberships.map((m) => [m.projectId, m.role])),
  };
  storeSession(token, found, ticket);
  return found;
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
