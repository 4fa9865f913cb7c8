/** The outbox: with the mail server down, mail waits (with back-off); when it is back, it arrives once. */
import { eq, sql } from 'drizzle-orm';
import nodemailer from 'nodemailer';
import { afterAll, describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { caughtMail, outbox } from '../../server/db/schema';
import { startFakeSmtp, type FakeSmtp } from '../../server/devenv/fake-smtp';
import { deliverPendingMail, enqueueMail, retryDelayMinutes } from '../../server/lib/mail';
import { uniq } from '../support/fixtures';

let second: FakeSmtp | undefined;
afterAll(async () => second?.stop());

describe('mail outbox during an SMTP outage', () => {
  it('keeps the message, retries with back-off, and delivers it once the server is back', async () => {
    const kind = uniq('outage-test');
    const to = `${uniq('crew')}@kerfwise.test`;
    // Far in the future, so no other delivery pass of the suite picks it up; the test moves "now".
    const t0 = new Date(Date.now() + 30 * 86400_000);
    await db.transaction((tx) => enqueueMail(tx, { kind, to: [to], subject: 'Stop reminder during outage', text: 'hello' }));
    await db.update(outbox).set({ nextAttemptAt: t0 }).where(eq(outbox.kind, kind));

    // The mail server is down: nothing listens on this port.
    const down = nodemailer.createTransport({ host: '127.0.0.1', port: 1, secure: false, ignoreTLS: true, connectionTimeout: 1000 });
    expect(await deliverPendingMail({ transport: down, asOf: t0, kind })).toEqual({ sent: 0, failed: 1 });
    const [waiting] = await db.select().from(outbox).where(eq(outbox.kind, kind));
    expect(waiting.sentAt).toBeNull();
    expect(waiting.attempts).toBe(1);
    expect(waiting.lastError).toMatch(/ECONNREFUSED|connect/i);
    expect(waiting.nextAttemptAt.getTime() - t0.getTime()).toBe(retryDelayMinutes(1) * 60_000);
    // Not due again before its back-off.
    expect(await deliverPendingMail({ transport: down, asOf: t0, kind })).toEqual({ sent: 0, failed: 0 });

    // The server comes back.
    second = await startFakeSmtp({ databaseUrl: process.env.DATABASE_URL! });
    const up = nodemailer.createTransport(second.url);
    const later = new Date(t0.getTime() + 5 * 60_000);
    expect(await deliverPendingMail({ transport: up, asOf: later, kind })).toEqual({ sent: 1, failed: 0 });
    expect(await deliverPendingMail({ transport: up, asOf: later, kind })).toEqual({ sent: 0, failed: 0 });
    const caught = await db
      .select()
      .from(caughtMail)
      .where(sql`${to} = any(${caughtMail.toAddresses})`);
    expect(caught).toHaveLength(1);
    expect(caught[0].subject).toBe('Stop reminder during outage');
  });

  it('never resends a message whose sending was cut by a crash; the administrator decides', async () => {
    const kind = uniq('crash-test');
    const to = `${uniq('crew')}@kerfwise.test`;
    await db.transaction((tx) => enqueueMail(tx, { kind, to: [to], subject: 'Sent when the server died?', text: 'hello' }));
    // A crash after the hand-over to SMTP and before the mark: the claim stays, 20 minutes ago.
    await db
      .update(outbox)
      .set({ claimedAt: new Date(Date.now() - 20 * 60_000), attempts: 1 })
      .where(eq(outbox.kind, kind));
    second ??= await startFakeSmtp({ databaseUrl: process.env.DATABASE_URL! });
    const up = nodemailer.createTransport(second.url);
    expect(await deliverPendingMail({ transport: up, kind })).toEqual({ sent: 0, failed: 0 });

    // The administrator sees it as uncertain and sends it again.
    const { createApp } = await import('../../server/app');
    const { makeUser, signedInAgent } = await import('../support/fixtures');
    const admin = await signedInAgent(createApp(), (await makeUser({ isAdmin: true })).email);
    const [row] = await db.select().from(outbox).where(eq(outbox.kind, kind));
    const mail = await admin.get('/api/admin/mail');
    expect(mail.body.uncertain.map((m: { id: number }) => m.id)).toContain(row.id);
    expect((await admin.post(`/api/admin/outbox/${row.id}/release`)).status).toBe(202);
    expect((await admin.post(`/api/admin/outbox/${row.id}/release`)).status).toBe(404);
    // Released, it goes out once (the release starts a delivery pass; this one may find nothing left).
    await deliverPendingMail({ transport: up, kind });
    await expect
      .poll(async () => (await db.select().from(outbox).where(eq(outbox.kind, kind)))[0].sentAt, { timeout: 10_000 })
      .not.toBeNull();
    const [after] = await db.select().from(outbox).where(eq(outbox.kind, kind));
    expect(after.claimedAt).toBeNull();
    expect(after.attempts).toBe(2);
  });

  it('backs off 1, 2, 4 … minutes, at most an hour', () => {
    expect([1, 2, 3, 4, 7, 20].map(retryDelayMinutes)).toEqual([1, 2, 4, 8, 60, 60]);
  });
});
