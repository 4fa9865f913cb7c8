/**
 * A missing backup is mailed to the administrators (issue: "a failed or missing backup … is e-mailed
 * to the administrators"), at most once a day while it lasts. A test clock in 2099 puts every
 * backup of this test database far more than 36 h in the past.
 */
import { and, eq, gt, sql } from 'drizzle-orm';
import { expect, it } from 'vitest';
import { findJob } from '../../jobs/index';
import { db } from '../../server/db/client';
import { outbox } from '../../server/db/schema';
import { runJob } from '../../server/services/job-runner';
import { makeUser } from '../support/fixtures';

it('mails the administrators when no backup is newer than 36 h, then not again for a day', async () => {
  const admin = await makeUser({ isAdmin: true });
  const job = findJob('backup-watch')!;
  expect(job).toBeDefined();
  const start = new Date('2099-03-01T10:40:00Z');
  const at = (hours: number) => new Date(start.getTime() + hours * 3600_000);
  const mailsToAdmin = async () =>
    (
      await db
        .select()
        .from(outbox)
        .where(
          and(
            eq(outbox.kind, 'backup_alert'),
            sql`${admin.email} = any(${outbox.toAddresses})`,
            gt(outbox.createdAt, sql`now() - interval '1 hour'`),
          ),
        )
    ).filter((m) => m.subject.includes('MISSING'));

  const first = await runJob(job, 'admin', { now: start });
  expect(first.outcome).toBe('ok');
  expect(first.summary).toMatch(/^Mailed the administrators/);
  expect(await mailsToAdmin()).toHaveLength(1);

  const hourLater = await runJob(job, 'admin', { now: at(1) });
  expect(hourLater.summary).toMatch(/were mailed within the last 24 h/);
  expect(await mailsToAdmin()).toHaveLength(1);

  const nextDay = await runJob(job, 'admin', { now: at(25) });
  expect(nextDay.summary).toMatch(/^Mailed the administrators/);
  expect(await mailsToAdmin()).toHaveLength(2);
});
