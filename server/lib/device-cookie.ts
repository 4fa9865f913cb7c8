import type { Request, Response } from 'express';
import { jwtVerify, SignJWT } from 'jose';
import { randomUUID } from 'node:crypto';
import { env } from '../env';

/**
 * The device cookie of the OWASP Authentication Cheat Sheet's throttling scheme: after a good
 * sign-in, the browser gets a signed token naming the account and a random device id. Failures
 * from a device that carries one for the account are counted for that device alone, so an attack
 * from elsewhere cannot lock the owner out of their usual tablet (decision 29).
 */
export const DEVICE_COOKIE = 'kerfwise_device';
const DEVICE_DAYS = 365;

const key = () => new TextEncoder().encode(`device:${env().SESSION_SECRET}`);

/** The device id the request's cookie names for `email`, or null (none, forged, or another account's). */
export async function knownDevice(req: Request, email: string): Promise<string | null> {
  const token: string | undefined = req.cookies?.[DEVICE_COOKIE];
  if (!token) return null;
  try {
    const { payload } = await jwtVerify(token, key(), { algorithms: ['HS256'] });
    return payload.sub === email && typeof payload.jti === 'string' ? payload.jti : null;
  } catch {
    return null;
  }
}

/** Marks this browser as a known device of `email` (keeping its id when it already was one). */
export async function rememberDevice(req: Request, res: Response, email: string, deviceId: string | null): Promise<void> {
  const id = deviceId ?? randomUUID();
  const token = await new SignJWT({})
    .setProtectedHeader({ alg: 'HS256' })
    .setSubject(email)
    .setJti(id)
    .setIssuedAt()
    .setExpirationTime(`${DEVICE_DAYS}d`)
    .sign(key());
  res.cookie(DEVICE_COOKIE, token, {
    httpOnly: true,
    sameSite: 'lax',
    secure: req.secure,
    path: '/api/auth',
    maxAge: DEVICE_DAYS * 86_400_000,
  });
}
