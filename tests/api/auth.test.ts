import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db, pool } from '../../server/db/client';
import { oneTimeTokens, signInAttempts, users } from '../../server/db/schema';
import { signInThrottle } from '../../server/lib/sign-in-throttle';
import { resetLimits } from '../../server/routes/auth';
import { makeUser, PASSWORD, signedInAgent, tokenFromLink, uniq, waitForMail } from '../support/fixtures';

const app = createApp();

describe('sign-in', () => {
  let user: Awaited<ReturnType<typeof makeUser>>;
  beforeAll(async () => {
    user = await makeUser();
  });

  it('accepts the right password and sets an HttpOnly, SameSite=Lax session cookie', async () => {
    const res = await request(app).post('/api/auth/sign-in').send({ email: user.email.toUpperCase(), password: PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe(user.email);
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toMatch(/kerfwise_session=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i); // plain http here; Secure is set when served over HTTPS
  });

  it('marks the cookie Secure when served over HTTPS (behind a trusted proxy)', async () => {
    const res = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-Proto', 'https')
      .send({ email: user.email, password: PASSWORD });
    expect(String(res.headers['set-cookie'])).toMatch(/Secure/);
  });

  it('gives the same answer for a wrong password and for an unknown user', async () => {
    const wrong = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-For', '198.51.100.7')
      .send({ email: user.email, password: 'not the password' });
    const unknown = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-For', '198.51.100.7')
      .send({ email: `${uniq('nobody')}@kerfwise.test`, password: 'whatever-it-is' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(unknown.body).toEqual(wrong.body);
    expect(wrong.headers['set-cookie']).toBeUndefined();
  });

  it('refuses a deactivated account with the same answer', async () => {
    const off = await makeUser({ active: false });
    const res = await request(app).post('/api/auth/sign-in').send({ email: off.email, password: PASSWORD });
    expect(res.status).toBe(401);
    expect(res.body.error.message).toMatch(/do not match/);
  });

  it('answers bad input with 400 and a message per field', async () => {
    const res = await request(app).post('/api/auth/sign-in').send({ email: 'not-an-address' });
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(['email', 'password']);
    const broken = await request(app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"email":');
    expect(broken.status).toBe(400);
    expect(broken.body.error.message).toMatch(/not valid JSON/);
    expect(JSON.stringify(broken.body)).not.toMatch(/at .*\.ts/); // no stack trace
  });

  it('slows one address after five failures on an account, even with the right password; other addresses still get in', async () => {
    const victim = await makeUser();
    const ip = '203.0.113.7';
    for (let i = 0; i < signInThrottle.freeFailures; i++) {
      const r = await request(app)
        .post('/api/auth/sign-in')
        .set('X-Forwarded-For', ip)
        .send({ email: victim.email, password: 'guess-guess-guess' });
      expect(r.status).toBe(401);
    }
    const blocked = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-For', ip)
      .send({ email: victim.email, password: PASSWORD });
    expect(blocked.status).toBe(429);
    expect(Number(blocked.headers['retry-after'])).toBeGreaterThan(0);
    expect(Number(blocked.headers['retry-after'])).toBeLessThanOrEqual(signInThrottle.firstDelayS);
    const elsewhere = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-For', '203.0.113.8')
      .send({ email: victim.email, password: PASSWORD });
    expect(elsewhere.status).toBe(200);
  });

  it('a burst of 40 parallel attempts gets no more tries than the limit: the right password as guess 25 is refused', async () => {
    const victim = await makeUser();
    const ip = '203.0.113.40';
    const burst = await Promise.all(
      Array.from({ length: 40 }, (_, i) =>
        request(app)
          .post('/api/auth/sign-in')
          .set('X-Forwarded-For', ip)
          .send({ email: victim.email, password: i === 24 ? PASSWORD : `wrong guess number ${i}` }),
      ),
    );
    const processed = burst.filter((r) => r.status === 401 || r.status === 200);
    expect(processed.length).toBeLessThanOrEqual(signInThrottle.freeFailures + 1);
    expect(burst.filter((r) => r.status === 429).length).toBeGreaterThanOrEqual(40 - signInThrottle.freeFailures - 1);
    const [{ n }] = await db
      .select({ n: sql<number>`count(*)::int` })
      .from(signInAttempts)
      .where(eq(signInAttempts.email, victim.email));
    expect(n).toBe(processed.length); // every verified attempt is recorded, and only those
  });

  it('an attack from elsewhere does not lock the owner out of their usual device (device cookie, OWASP)', async () => {
    const owner = await makeUser();
    // The owner signed in on their tablet before: it carries a device cookie for the account.
    const first = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-For', '198.51.100.5')
      .send({ email: owner.email, password: PASSWORD });
    expect(first.status).toBe(200);
    const device = (first.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('kerfwise_device='))!.split(';')[0];
    // Someone else tries from many addresses until unknown devices are slowed for the account.
    for (let i = 0; i < signInThrottle.accountUnknownFailures; i++) {
      await request(app)
        .post('/api/auth/sign-in')
        .set('X-Forwarded-For', `192.0.2.${i + 1}`)
        .send({ email: owner.email, password: `attacker guess ${i}` });
    }
    const stranger = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-For', '192.0.2.200')
      .send({ email: owner.email, password: PASSWORD });
    expect(stranger.status).toBe(429);
    const tablet = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-For', '198.51.100.5')
      .set('Cookie', device)
      .send({ email: owner.email, password: PASSWORD });
    expect(tablet.status).toBe(200);
  });

  it('trips the per-address limit across many accounts', async () => {
    const ip = '203.0.113.200';
    for (let i = 0; i < signInThrottle.perAddressFailures; i++) {
      await request(app)
        .post('/api/auth/sign-in')
        .set('X-Forwarded-For', ip)
        .send({ email: `${uniq('spray')}@kerfwise.test`, password: 'guess-guess-guess' });
    }
    const blocked = await request(app).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email: user.email, password: PASSWORD });
    expect(blocked.status).toBe(429);
    const elsewhere = await request(app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-For', '203.0.113.201')
      .send({ email: user.email, password: PASSWORD });
    expect(elsewhere.status).toBe(200);
  });
});

describe('sessions', () => {
  it('sign-out revokes the session: the old cookie no longer works', async () => {
    const u = await makeUser();
    const res = await request(app).post('/api/auth/sign-in').send({ email: u.email, password: PASSWORD });
    const cookie = (res.headers['set-cookie'] as unknown as string[])[0].split(';')[0];
    expect((await request(app).get('/api/auth/me').set('Cookie', cookie)).status).toBe(200);
    expect((await request(app).post('/api/auth/sign-out').set('Cookie', cookie)).status).toBe(204);
    const after = await request(app).get('/api/auth/me').set('Cookie', cookie);
    expect(after.status).toBe(401);
  });

  it('a forged token is refused', async () => {
    const res = await request(app).get('/api/auth/me').set('Cookie', 'kerfwise_session=eyJhbGciOiJIUzI1NiJ9.eyJqdGkiOiJ4In0.bad');
    expect(res.status).toBe(401);
  });

  it('a password change revokes the other sessions and keeps this one', async () => {
    const u = await makeUser();
    const phone = await signedInAgent(app, u.email);
    const tablet = await signedInAgent(app, u.email);
    const newPassword = 'a brand new long password';
    expect((await tablet.post('/api/auth/change-password').send({ currentPassword: PASSWORD, newPassword })).status).toBe(204);
    expect((await phone.get('/api/auth/me')).status).toBe(401);
    expect((await tablet.get('/api/auth/me')).status).toBe(200);
    const wrongCurrent = await tablet
      .post('/api/auth/change-password')
      .send({ currentPassword: 'nope', newPassword: 'another long password' });
    expect(wrongCurrent.status).toBe(400);
  });

  it('deactivating a user ends their sessions at once', async () => {
    const admin = await makeUser({ isAdmin: true });
    const u = await makeUser();
    const agent = await signedInAgent(app, u.email);
    const adminAgent = await signedInAgent(app, admin.email);
    expect((await adminAgent.patch(`/api/admin/users/${u.id}`).send({ active: false })).status).toBe(200);
    expect((await agent.get('/api/auth/me')).status).toBe(401);
  });
});

describe('password reset by e-mail', () => {
  it('sends a one-time link through the mail catcher; it works once', async () => {
    const u = await makeUser();
    const ask = await request(app).post('/api/auth/password-reset').send({ email: u.email });
    expect(ask.status).toBe(202);
    const mail = await waitForMail(u.email, 'new password');
    expect(mail.textBody).toContain('http://kerfwise.test/set-password?token=');
    const token = tokenFromLink(mail.textBody);
    const first = await request(app).post('/api/auth/set-password').send({ token, password: 'my fresh password 1' });
    expect(first.status).toBe(200);
    expect(String(first.headers['set-cookie'])).toMatch(/kerfwise_session=/);
    const again = await request(app).post('/api/auth/set-password').send({ token, password: 'my fresh password 2' });
    expect(again.status).toBe(400);
    expect(again.body.error.message).toMatch(/expired or has already been used/);
    await signedInAgent(app, u.email, 'my fresh password 1');
  });

  it('a link past its expiry is refused and the password stays', async () => {
    const u = await makeUser();
    await request(app).post('/api/auth/password-reset').send({ email: u.email });
    const token = tokenFromLink((await waitForMail(u.email, 'new password')).textBody);
    await db
      .update(oneTimeTokens)
      .set({ expiresAt: sql`now() - interval '1 second'` })
      .where(eq(oneTimeTokens.userId, u.id));
    const res = await request(app).post('/api/auth/set-password').send({ token, password: 'too late password' });
    expect(res.status).toBe(400);
    await signedInAgent(app, u.email, PASSWORD);
  });

  it('links are built from APP_URL, never from the Host or X-Forwarded-Host the caller sent', async () => {
    const u = await makeUser();
    const ask = await request(app)
      .post('/api/auth/password-reset')
      .set('Host', 'attacker.example')
      .set('X-Forwarded-Host', 'attacker.example')
      .send({ email: u.email });
    expect(ask.status).toBe(202);
    const mail = await waitForMail(u.email, 'new password');
    expect(mail.textBody).toContain('http://kerfwise.test/set-password?token=');
    expect(mail.textBody).not.toContain('attacker.example');
  });

  it('answers before it looks the account up: the answer comes while the users table is locked', async () => {
    const u = await makeUser();
    const client = await pool.connect();
    try {
      await client.query('BEGIN');
      await client.query('LOCK TABLE users IN ACCESS EXCLUSIVE MODE');
      // Were the lookup or the mail done before answering, this request would wait for the lock.
      const ask = await Promise.race([
        request(app)
          .post('/api/auth/password-reset')
          .send({ email: u.email })
          .then((r) => r.status),
        new Promise((resolve) => setTimeout(() => resolve('still waiting'), 5_000)),
      ]);
      expect(ask).toBe(202);
    } finally {
      await client.query('ROLLBACK');
      client.release();
    }
    await waitForMail(u.email, 'new password'); // and the mail still goes once the lock is gone
  });

  it('limits requests per address asked for, the same for known and unknown addresses', async () => {
    const known = await makeUser();
    const unknown = `${uniq('ghost')}@kerfwise.test`;
    for (const email of [known.email, unknown]) {
      const answers: number[] = [];
      for (let i = 0; i <= resetLimits.perAccount; i++) {
        answers.push(
          (
            await request(app)
              .post('/api/auth/password-reset')
              .set('X-Forwarded-For', `198.51.100.${60 + i}`)
              .send({ email })
          ).status,
        );
      }
      expect(answers).toEqual([...Array(resetLimits.perAccount).fill(202), 429]);
    }
  });

  it('a newer link or a password change makes every older link useless', async () => {
    const u = await makeUser();
    await request(app).post('/api/auth/password-reset').set('X-Forwarded-For', '198.51.100.90').send({ email: u.email });
    const older = tokenFromLink((await waitForMail(u.email, 'new password')).textBody);
    const agent = await signedInAgent(app, u.email);
    const change = await agent.post('/api/auth/change-password').send({ currentPassword: PASSWORD, newPassword: 'a brand new passphrase' });
    expect(change.status).toBe(204);
    const replay = await request(app).post('/api/auth/set-password').send({ token: older, password: 'attacker chosen password' });
    expect(replay.status).toBe(400);
    await signedInAgent(app, u.email, 'a brand new passphrase');
  });

  it('answers the same for an unknown address and sends nothing', async () => {
    const email = `${uniq('ghost')}@kerfwise.test`;
    const res = await request(app).post('/api/auth/password-reset').send({ email });
    expect(res.status).toBe(202);
    await expect(waitForMail(email, '', 1500)).rejects.toThrow(/no mail/);
  });
});

describe('invitations', () => {
  it('an invited person sets a password from the e-mailed link and is signed in', async () => {
    const admin = await makeUser({ isAdmin: true });
    const agent = await signedInAgent(app, admin.email);
    const email = `${uniq('invitee')}@kerfwise.test`;
    const res = await agent.post('/api/admin/users').send({ email, name: 'New Fitter' });
    expect(res.status).toBe(201);
    expect(res.body.invited).toBe(true);
    const dup = await agent.post('/api/admin/users').send({ email, name: 'Again' });
    expect(dup.status).toBe(409);
    const mail = await waitForMail(email, 'invited');
    const token = tokenFromLink(mail.textBody);
    const accept = await request(app).post('/api/auth/set-password').send({ token, password: 'invited and happy' });
    expect(accept.status).toBe(200);
    const [row] = await db.select().from(users).where(eq(users.email, email));
    expect(row.passwordHash).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/); // OWASP minimum parameters
  });
});

describe('health', () => {
  it('answers 200 when the database is reachable', async () => {
    const res = await request(app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body.database).toBe('reachable');
  });
});
