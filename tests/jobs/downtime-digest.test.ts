/** The Monday downtime digest, by an injected clock: last week's table by cause, to the drive's site managers only. */
import { sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { downtimeDigestJob } from '../../jobs/downtime-digest';
import { db } from '../../server/db/client';
import { caughtMail, notificationOptOuts, outbox } from '../../server/db/schema';
import { makeSpringDowntimeDrive } from '../support/downtime-fixtures';
import { addMember, makeUser, waitForMail } from '../support/fixtures';

describe('weekly downtime digest', () => {
  it('mails last week’s downtime by cause in site time to each site manager who wants it', async () => {
    const project = await makeSpringDowntimeDrive();
    const manager = await makeUser();
    const quiet = await makeUser(); // a site manager who turned the digest off
    const planner = await makeUser();
    await addMember(project.id, manager.id, 'site_manager');
    await addMember(project.id, quiet.id, 'site_manager');
    await addMember(project.id, planner.id, 'planner');
    await db.insert(notificationOptOuts).values({ userId: quiet.id, kind: 'downtime_digest' });

    // Monday 2026-03-30 07:00 CEST: last week is 2026-W13, Mon 23 March 00:00 CET to Mon 30 March 00:00 CEST.
    const summary = await downtimeDigestJob({ now: new Date('2026-03-30T07:00:00+02:00') }, { projectId: project.id });
    expect(summary).toBe('1 downtime digest(s) queued for 1 drive(s).');
    const mail = await waitForMail(manager.email, '2026-W13');
    expect(mail.toAddresses).toEqual([manager.email]);
    const lines = mail.textBody.split('\n');
    expect(lines[0]).toBe(`${project.name}: downtime in week 2026-W13 (2026-03-23 to 2026-03-29, Europe/Zurich)`);
    // derived (tests/support/downtime-fixtures.ts): the breakdown's 11 h and the 4 h of the cutter change after
    // Monday 00:00 CET fall in W13; 15 h in all → 73.3 % and 26.7 %, largest first with the running share.
    const row = (cause: string) => lines.find((l) => l.startsWith(cause))?.split(/\s{2,}/);
    expect(row('Machine breakdown')).toEqual(['Machine breakdown', '11.0', '73.3 %', '73.3 %']);
    expect(row('Cutter change *')).toEqual(['Cutter change *', '4.0', '26.7 %', '100.0 %']);
    expect(row('Total')).toEqual(['Total', '15.0', '100.0 %']);
    // derived: the week of the spring change has 7 × 24 − 1 = 167 h; 4 h of boring → 2.4 %; 3 m over 167/24 days = 0.43 m a day.
    expect(mail.textBody).toContain('Downtime 15.0 h of 167 h; cutter work 26.7 % of the downtime.');
    expect(mail.textBody).toContain('Utilisation 2.4 % (boring 4.0 h); 3.0 m advanced, 0.4 m a day.');
    expect(mail.subject).toBe(`${project.name}: downtime in week 2026-W13 — 15.0 h, cutter work 26.7 %`);

    const others = await db
      .select()
      .from(caughtMail)
      .where(sql`(${quiet.email} = any(${caughtMail.toAddresses}) or ${planner.email} = any(${caughtMail.toAddresses}))`);
    expect(others).toHaveLength(0);
    const queued = await db
      .select()
      .from(outbox)
      .where(sql`${outbox.projectId} = ${project.id} and ${outbox.kind} = 'downtime_digest'`);
    expect(queued).toHaveLength(1);
  });
});
