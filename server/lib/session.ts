import { and, eq, gt, isNull, sql } from 'drizzle-orm';
import type { Request, Response } from 'express';
import { jwtVerify, SignJWT } from 'jose';
import { db, type DbOrTx } from '../db/client';
import { sessions, users } from '../db/schema';
import { env } from '../env';

export const SESSION_COOKIE = 'kerfwise_session';

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

/** The signed-in user and session for a cookie value, or null when it is missing, forged, expired or revoked. */
export async function resolveSession(token: string | undefined): Promise<{ user: AuthUser; sessionId: string } | null> {
  if (!token) return null;
  let sessionId: string;
  try {
    const { payload } = await jwtVerify(token, secretKey(), { algorithms: ['HS256'] });
    if (!payload.jti) return null;
    sessionId = payload.jti;
  } catch {
    return null;
  }
  const [row] = await db
    .select({ id: users.id, email: users.email, name: users.name, isAdmin: users.isAdmin })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .where(and(eq(sessions.id, sessionId), isNull(sessions.revokedAt), gt(sessions.expiresAt, sql`now()`), eq(users.active, true)))
    .limit(1);
  return row ? { user: row, sessionId } : null;
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
