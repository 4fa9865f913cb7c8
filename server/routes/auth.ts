import { and, count, eq, gt, isNull, max, sql, type SQL } from 'drizzle-orm';
import { Router } from 'express';
import {
  passwordResetRequestSchema,
  signInInputSchema,
  type Me,
  type NotificationChoice,
  type NotificationChoiceChange,
  type ResetRequested,
  type SignedIn,
} from '../../shared/schemas/auth';
import { changePasswordInputSchema, setPasswordInputSchema } from '../../shared/schemas/password';
import { db, type DbOrTx } from '../db/client';
import { memberships, notificationOptOuts, passwordResetRequests, signInAttempts, users } from '../db/schema';
import { notificationKeys, notificationKinds } from '../../shared/notifications';
import { z } from 'zod';
import { requireSignedIn, requireUser } from '../middleware/auth';
import { appUrl } from '../lib/app-url';
import { audit } from '../lib/audit';
import { badRequest, HttpError } from '../lib/http-error';
import { enqueueMail, kickMailDelivery } from '../lib/mail';
import { consumeToken, issueToken, revokeTokens } from '../lib/one-time-token';
import { logger } from '../lib/logger';
import { jsonText, reply, replyText } from '../lib/reply';
import { dummyPasswordHash, hashPassword, verifyPassword } from '../lib/password';
import { knownDevice, rememberDevice } from '../lib/device-cookie';
import { signInThrottle, waitS } from '../lib/sign-in-throttle';
import { clearSessionCookie, revokeAllSessions, revokeSession, startSession } from '../lib/session';
import { authChangesDelivered } from '../lib/session-cache';

export const authRouter = Router();

const wrongCredentials = () => new HttpError(401, 'That e-mail and password do not match an active account.');

/** Recent failures of one count (within the window) and when the last one was. */
async function failures(tx: DbOrTx, where: SQL | undefined) {
  const [row] = await tx
    .select({ n: count(), last: max(signInAttempts.at) })
    .from(signInAttempts)
    .where(
      and(
        where,
        eq(signInAttempts.succeeded, false),
        gt(signInAttempts.at, sql`now() - make_interval(mins => ${signInThrottle.windowMinutes})`),
      ),
    );
  return { n: row?.n ?? 0, lastMs: row?.last ? new Date(row.last).getTime() : null };
}

/**
 * Sign-in, throttled per account and source with growing delays (decision 29). The checks, the
 * password verification and the recorded attempt run under a transaction-scoped advisory lock
 * per account and per client address, so parallel attempts are counted one after another and a
 * burst cannot get more tries than the limit — on every instance, as the lock is PostgreSQL's.
 */
authRouter.post('/sign-in', async (req, res) => {
  const input = signInInputSchema.parse(req.body);
  const ip = req.ip ?? 'unknown';
  const deviceId = await knownDevice(req, input.email);
  const outcome = await db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`kerfwise-sign-in:${input.email}`}))`);
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`kerfwise-sign-in-ip:${ip}`}))`);
    const now = Date.now();
    const source = deviceId
      ? await failures(tx, and(eq(signInAttempts.email, input.email), eq(signInAttempts.deviceId, deviceId)))
      : await failures(tx, and(eq(signInAttempts.email, input.email), eq(signInAttempts.ip, ip), isNull(signInAttempts.deviceId)));
    let wait = waitS(source.n, source.lastMs, now);
    if (!deviceId) {
      const unknownDevices = await failures(tx, and(eq(signInAttempts.email, input.email), isNull(signInAttempts.deviceId)));
      const address = await failures(tx, and(eq(signInAttempts.ip, ip), isNull(signInAttempts.deviceId)));
      wait = Math.max(
        wait,
        waitS(unknownDevices.n, unknownDevices.lastMs, now, signInThrottle.accountUnknownFailures),
        waitS(address.n, address.lastMs, now, signInThrottle.perAddressFailures),
      );
    }
    if (wait > 0) return { kind: 'wait', wait } as const;
    const [user] = await tx.select().from(users).where(eq(users.email, input.email)).limit(1);
    // Verify against a dummy hash when there is no usable account, so both answers take as long.
    const ok = await verifyPassword(user?.passwordHash ?? (await dummyPasswordHash()), input.password);
    const accepted = Boolean(user && user.active && user.passwordHash && ok);
    await tx.insert(signInAttempts).values({ email: input.email, ip, deviceId, succeeded: accepted });
    if (!accepted || !user) return { kind: 'refused' } as const;
    await startSession(tx, req, res, user.id);
    return { kind: 'accepted', user } as const;
  });
  if (outcome.kind === 'wait') {
    res.set('Retry-After', String(outcome.wait));
    const minutes = Math.ceil(outcome.wait / 60);
    throw new HttpError(
      429,
      `Too many failed sign-ins. Wait ${outcome.wait < 90 ? `${outcome.wait} seconds` : `${minutes} minutes`} and try again, or reset your password.`,
    );
  }
  if (outcome.kind === 'refused') throw wrongCredentials();
  const { user } = outcome;
  await rememberDevice(req, res, input.email, deviceId);
  reply<SignedIn>(res, 200, { user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin } });
});

authRouter.post('/sign-out', async (req, res) => {
  if (req.sessionId) {
    await revokeSession(db, req.sessionId);
    // Every instance has been told before the answer (decision 45).
    await authChangesDelivered();
  }
  clearSessionCookie(req, res);
  res.status(204).end();
});

authRouter.get('/me', requireSignedIn, (req, res) => {
  const session = req.authSession!;
  // Read with the session (one query, or none when cached); the JSON text is made once per cached session.
  session.meJson ??= jsonText<Me>({ user: session.user, memberships: session.memberships });
  replyText<Me>(res, 200, session.meJson);
});

/** Reset requests allowed per hour, per address asked for and per client address (decision 29). */
export const resetLimits = { perAccount: 3, perAddress: 10, windowMinutes: 60 };

/** Queues the reset mail for an active account; nothing for an unknown or inactive one. */
async function sendResetLink(email: string) {
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  if (!user?.active) return;
  await db.transaction(async (tx) => {
    const token = await issueToken(tx, user.id, 'password_reset');
    await enqueueMail(tx, {
      kind: 'password_reset',
      about: { userId: user.id },
      to: [user.email],
      subject: 'Kerfwise: set a new password',
      text: `Hello ${user.name},\n\nSomeone (we hope you) asked to reset your Kerfwise password. Open this link within an hour to choose a new one:\n\n${appUrl()}/set-password?token=${token}\n\nThe link works once, and only the newest link you asked for works. If you did not ask for this, ignore this message; your password stays as it is.\n`,
    });
  });
  kickMailDelivery();
}

/**
 * Asks for a password-reset link. The answer is the same, and comes as fast, whether or not the
 * address has an account: the request is counted and answered first, and the account is looked
 * up and mailed after the answer has gone. The limits count requests, not accounts, so they say
 * nothing about which addresses exist either.
 */
authRouter.post('/password-reset', async (req, res) => {
  const { email } = passwordResetRequestSchema.parse(req.body);
  const ip = req.ip ?? 'unknown';
  const limited = await db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`kerfwise-reset:${email}`}))`);
    const since = sql`now() - make_interval(mins => ${resetLimits.windowMinutes})`;
    const [perAccount] = await tx
      .select({ n: count() })
      .from(passwordResetRequests)
      .where(and(eq(passwordResetRequests.email, email), gt(passwordResetRequests.at, since)));
    const [perAddress] = await tx
      .select({ n: count() })
      .from(passwordResetRequests)
      .where(and(eq(passwordResetRequests.ip, ip), gt(passwordResetRequests.at, since)));
    if ((perAccount?.n ?? 0) >= resetLimits.perAccount || (perAddress?.n ?? 0) >= resetLimits.perAddress) return true;
    await tx.insert(passwordResetRequests).values({ email, ip });
    return false;
  });
  if (limited) {
    res.set('Retry-After', String(resetLimits.windowMinutes * 60));
    throw new HttpError(
      429,
      `Too many reset requests. The last link sent is still valid for an hour; check your mail, or try again in ${resetLimits.windowMinutes} minutes.`,
    );
  }
  reply<ResetRequested>(res, 202, { message: 'If that address has an account, a link to set a new password is on its way.' });
  // After the answer: the time the lookup and the mail take does not show in the response.
  sendResetLink(email).catch((err: unknown) => logger.error({ err }, 'password-reset mail could not be queued'));
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
    // Every other link of this account stops working with the new password.
    await revokeTokens(tx, updated.id);
    await revokeAllSessions(tx, updated.id);
    await audit(tx, {
      userId: updated.id,
      entity: 'user',
      entityId: updated.id,
      action: used.purpose === 'invitation' ? 'accept_invitation' : 'reset_password',
    });
    await startSession(tx, req, res, updated.id);
    return updated;
  });
  if (!user) throw badRequest('This link has expired or has already been used. Ask for a new one from the sign-in page.');
  await authChangesDelivered();
  reply<SignedIn>(res, 200, { user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin } });
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
    await tx
      .update(users)
      .set({ passwordHash, updatedAt: sql`now()` })
      .where(eq(users.id, me.id));
    // A reset link asked for before the change must not undo it.
    await revokeTokens(tx, me.id);
    // A password change ends every session, this one included; a fresh one keeps this device signed in.
    await revokeAllSessions(tx, me.id);
    await audit(tx, { userId: me.id, entity: 'user', entityId: me.id, action: 'change_password' });
    await startSession(tx, req, res, me.id);
  });
  await authChangesDelivered();
  res.status(204).end();
});

/** The notifications this user may get (by their roles) and whether each is on. */
authRouter.get('/notifications', requireSignedIn, async (req, res) => {
  const me = requireUser(req);
  const roles = new Set(
    (await db.select({ role: memberships.role }).from(memberships).where(eq(memberships.userId, me.id))).map((r) => r.role as string),
  );
  const off = new Set((await db.select().from(notificationOptOuts).where(eq(notificationOptOuts.userId, me.id))).map((r) => r.kind));
  reply<NotificationChoice[]>(
    res,
    200,
    notificationKinds
      .filter((k) => k.roles.some((r) => roles.has(r)))
      .map((k) => ({ kind: k.key, label: k.label, enabled: !off.has(k.key) })),
  );
});

authRouter.put('/notifications', requireSignedIn, async (req, res) => {
  const me = requireUser(req);
  const input = z.object({ kind: z.enum(notificationKeys, { message: 'Unknown notification.' }), enabled: z.boolean() }).parse(req.body);
  await db.transaction(async (tx) => {
    if (input.enabled)
      await tx.delete(notificationOptOuts).where(and(eq(notificationOptOuts.userId, me.id), eq(notificationOptOuts.kind, input.kind)));
    else await tx.insert(notificationOptOuts).values({ userId: me.id, kind: input.kind }).onConflictDoNothing();
    await audit(tx, {
      userId: me.id,
      entity: 'notification',
      entityId: me.id,
      action: input.enabled ? 'turn_on' : 'turn_off',
      after: input,
    });
  });
  reply<NotificationChoiceChange>(res, 200, input);
});
