import { and, count, eq, gt, sql } from 'drizzle-orm';
import { Router } from 'express';
import {
  changePasswordInputSchema, passwordResetRequestSchema, setPasswordInputSchema, signInInputSchema,
} from '../../shared/schemas/auth';
import { db } from '../db/client';
import { memberships, notificationOptOuts, projects, signInAttempts, users } from '../db/schema';
import { notificationKeys, notificationKinds } from '../../shared/notifications';
import { z } from 'zod';
import { requireSignedIn, requireUser } from '../middleware/auth';
import { appUrl } from '../lib/app-url';
import { audit } from '../lib/audit';
import { badRequest, HttpError } from '../lib/http-error';
import { enqueueMail, kickMailDelivery } from '../lib/mail';
import { consumeToken, issueToken } from '../lib/one-time-token';
import { dummyPasswordHash, hashPassword, verifyPassword } from '../lib/password';
import { clearSessionCookie, revokeAllSessions, revokeSession, startSession } from '../lib/session';

/** Failed attempts allowed in the window, per account and per client address (DEVELOPERS.md, decision 7). */
export const signInLimits = { perAccount: 5, perAddress: 30, windowMinutes: 15 };

const wrongCredentials = () => new HttpError(401, 'That e-mail and password do not match an active account.');

async function recentFailures(column: typeof signInAttempts.email | typeof signInAttempts.ip, value: string) {
  const [row] = await db
    .select({ n: count() })
    .from(signInAttempts)
    .where(and(eq(column, value), eq(signInAttempts.succeeded, false), gt(signInAttempts.at, sql`now() - make_interval(mins => ${signInLimits.windowMinutes})`)));
  return row?.n ?? 0;
}

export const authRouter = Router();

authRouter.post('/sign-in', async (req, res) => {
  const input = signInInputSchema.parse(req.body);
  const ip = req.ip ?? 'unknown';
  if ((await recentFailures(signInAttempts.email, input.email)) >= signInLimits.perAccount
    || (await recentFailures(signInAttempts.ip, ip)) >= signInLimits.perAddress) {
    res.set('Retry-After', String(signInLimits.windowMinutes * 60));
    throw new HttpError(429, `Too many failed sign-ins. Wait ${signInLimits.windowMinutes} minutes and try again, or reset your password.`);
  }
  const [user] = await db.select().from(users).where(eq(users.email, input.email)).limit(1);
  // Verify against a dummy hash when there is no usable account, so both answers take as long.
  const ok = await verifyPassword(user?.passwordHash ?? (await dummyPasswordHash()), input.password);
  const accepted = Boolean(user && user.active && user.passwordHash && ok);
  await db.insert(signInAttempts).values({ email: input.email, ip, succeeded: accepted });
  if (!accepted || !user) throw wrongCredentials();
  await startSession(db, req, res, user.id);
  res.json({ user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin } });
});

authRouter.post('/sign-out', async (req, res) => {
  if (req.sessionId) await revokeSession(db, req.sessionId);
  clearSessionCookie(req, res);
  res.status(204).end();
});

authRouter.get('/me', requireSignedIn, async (req, res) => {
  const user = requireUser(req);
  const rows = await db
    .select({ projectId: projects.id, projectName: projects.name, role: memberships.role })
    .from(memberships)
    .innerJoin(projects, eq(projects.id, memberships.projectId))
    .where(eq(memberships.userId, user.id))
    .orderBy(projects.name);
  res.json({ user, memberships: rows });
});

authRouter.post('/password-reset', async (req, res) => {
  const { email } = passwordResetRequestSchema.parse(req.body);
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  if (user?.active) {
    await db.transaction(async (tx) => {
      const token = await issueToken(tx, user.id, 'password_reset');
      const link = `${appUrl(req)}/set-password?token=${token}`;
      await enqueueMail(tx, {
        kind: 'password_reset',
        to: [user.email],
        subject: 'Kerfwise: set a new password',
        text: `Hello ${user.name},\n\nSomeone (we hope you) asked to reset your Kerfwise password. Open this link within an hour to choose a new one:\n\n${link}\n\nThe link works once. If you did not ask for this, ignore this message; your password stays as it is.\n`,
      });
    });
    kickMailDelivery();
  }
  // The same answer whether or not the address has an account.
  res.status(202).json({ message: 'If that address has an account, a link to set a new password is on its way.' });
});

/** Completes a password reset or an invitation: the token from the e-mailed link plus the new password. */
authRouter.post('/set-password', async (req, res) => {
  const input = setPasswordInputSchema.parse(req.body);
  const passwordHash = await hashPassword(input.password);
  const user = await db.transaction(async (tx) => {
    const used = await consumeToken(tx, input.token);
    if (!used) return null;
    const [updated] = await tx
      .update(users)
      .set({ passwordHash, updatedAt: sql`now()` })
      .where(and(eq(users.id, used.userId), eq(users.active, true)))
      .returning();
    if (!updated) return null;
    await revokeAllSessions(tx, updated.id);
    await audit(tx, { userId: updated.id, entity: 'user', entityId: updated.id, action: used.purpose === 'invitation' ? 'accept_invitation' : 'reset_password' });
    await startSession(tx, req, res, updated.id);
    return updated;
  });
  if (!user) throw badRequest('This link has expired or has already been used. Ask for a new one from the sign-in page.');
  res.json({ user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin } });
});

authRouter.post('/change-password', requireSignedIn, async (req, res) => {
  const me = requireUser(req);
  const input = changePasswordInputSchema.parse(req.body);
  const [user] = await db.select().from(users).where(eq(users.id, me.id)).limit(1);
  if (!user?.passwordHash || !(await verifyPassword(user.passwordHash, input.currentPassword))) {
    throw badRequest('The current password is not right.', [{ path: 'currentPassword', message: 'The current password is not right.' }]);
  }
  const passwordHash = await hashPassword(input.newPassword);
  await db.transaction(async (tx) => {
    await tx.update(users).set({ passwordHash, updatedAt: sql`now()` }).where(eq(users.id, me.id));
    // A password change ends every session, this one included; a fresh one keeps this device signed in.
    await revokeAllSessions(tx, me.id);
    await audit(tx, { userId: me.id, entity: 'user', entityId: me.id, action: 'change_password' });
    await startSession(tx, req, res, me.id);
  });
  res.status(204).end();
});

/** The notifications this user may get (by their roles) and whether each is on. */
authRouter.get('/notifications', requireSignedIn, async (req, res) => {
  const me = requireUser(req);
  const roles = new Set((await db.select({ role: memberships.role }).from(memberships).where(eq(memberships.userId, me.id))).map((r) => r.role as string));
  const off = new Set((await db.select().from(notificationOptOuts).where(eq(notificationOptOuts.userId, me.id))).map((r) => r.kind));
  res.json(notificationKinds.filter((k) => k.roles.some((r) => roles.has(r))).map((k) => ({ kind: k.key, label: k.label, enabled: !off.has(k.key) })));
});

authRouter.put('/notifications', requireSignedIn, async (req, res) => {
  const me = requireUser(req);
  const input = z.object({ kind: z.enum(notificationKeys, { message: 'Unknown notification.' }), enabled: z.boolean() }).parse(req.body);
  await db.transaction(async (tx) => {
    if (input.enabled) await tx.delete(notificationOptOuts).where(and(eq(notificationOptOuts.userId, me.id), eq(notificationOptOuts.kind, input.kind)));
    else await tx.insert(notificationOptOuts).values({ userId: me.id, kind: input.kind }).onConflictDoNothing();
    await audit(tx, { userId: me.id, entity: 'notification', entityId: me.id, action: input.enabled ? 'turn_on' : 'turn_off', after: input });
  });
  res.json(input);
});
