/** The mail retry back-off counts from the time an attempt was due, not from the tick that got to it. */
import { eq } from 'drizzle-orm';
import nodemailer from 'nodemailer';
import { describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { outbox } from '../../server/db/schema';
import { deliverPendingMail, enqueueMail } from '../../server/lib/mail';
import { uniq } from '../support/fixtures';

const MIN = 60_000;

describe('mail retry back-off', () => {
  it('keeps the 1, 2, 4 … minute steps from the due time when each tick comes late', async () => {
    const kind = uniq('backoff-test');
    // Far in the future, so no other delivery pass of the suite picks it up; the test moves "now".
    const t0 = new Date(Math.floor((Date.now() + 40 * 86400_000) / MIN) * MIN);
    await db.transaction((tx) => enqueueMail(tx, { kind, to: [`${uniq('crew')}@kerfwise.test`], subject: 'back-off', text: 'hello' }));
    await db.update(outbox).set({ nextAttemptAt: t0 }).where(eq(outbox.kind, kind));
    const down = nodemailer.createTransport({ host: '127.0.0.1', port: 1, secure: false, ignoreTLS: true, connectionTimeout: 1000 });
    const nextDue = async () => (await db.select().from(outbox).where(eq(outbox.kind, kind)))[0].nextAttemptAt.getTime() - t0.getTime();

    // Decision 8's schedule (1, 2, 4 … minutes after each failure): due at t0, t0+1, t0+3, t0+7 min,
    // whatever the lateness of the minute tick that makes each attempt (here 30 s, 40 s, 10 s).
    await deliverPendingMail({ transport: down, asOf: new Date(t0.getTime() + 30_000), kind });
    expect(await nextDue()).toBe(1 * MIN);
    await deliverPendingMail({ transport: down, asOf: new Date(t0.getTime() + 1 * MIN + 40_000), kind });
    expect(await nextDue()).toBe(3 * MIN);
    await deliverPendingMail({ transport: down, asOf: new Date(t0.getTime() + 3 * MIN + 10_000), kind });
    expect(await nextDue()).toBe(7 * MIN);
    // After a long stop (the job did not run for an hour) the due time plus 8 min is long past:
    // then the step counts from now (70 + 8), and the message is tried once in that pass, not again at once.
    const late = new Date(t0.getTime() + 70 * MIN);
    expect(await deliverPendingMail({ transport: down, asOf: late, kind })).toEqual({ sent: 0, failed: 1 });
    expect(await nextDue()).toBe(78 * MIN);
    await db.delete(outbox).where(eq(outbox.kind, kind));
  });
});
