/**
 * A scheduled run happens once per slot (job + the scheduled time it stands for), even when a
 * second server fires the same slot late; a weekly digest goes out once per week and drive across
 * the schedule, the start-up catch-up and 'run now' (DEVELOPERS.md, decision 19).
 */
import { and, eq, sql } from 'drizzle-orm';
import { afterAll, describe, expect, inject, it } from 'vitest';
import { downtimeDigestJob } from '../../jobs/downtime-digest';
import { findJob, jobs } from '../../jobs/index';
import { createApp } from '../../server/app';
import { db, resilientPool } from '../../server/db/client';
import { digestWeeks, jobRuns, outbox } from '../../server/db/schema';
import { createJobRunner, runJob, slotAtOrBefore, type JobDefinition } from '../../server/services/job-runner';
import { makeSmallCatalogue } from '../support/parts-fixtures';
import { makeCutterhead } from '../support/drive-fixtures';
import { addMember, makeProject, makeUser, signedInAgent, uniq } from '../support/fixtures';

// The second "server": its own pool, its own runner (its own advisory-lock sessions).
const otherPool = resilientPool({ connectionString: inject('databaseUrl'), max: 3 }, 'second-server');
const otherServer = createJobRunner(otherPool);
afterAll(() => otherPool.end());

const job = (run: JobDefinition['run'], cron = '0 7 * * 1'): JobDefinition => ({
  name: uniq('slot-job'),
  label: 'slot test',
  cron,
  periodMs: 7 * 24 * 3600_000,
  run,
});

describe('slots', () => {
  it('finds the last scheduled time at or before an instant (server time zone)', () => {
    // Calendar: Wednesday 25 November 2026; the Monday before is 23 November (any 2026 calendar).
    expect(slotAtOrBefore('0 7 * * 1', new Date(2026, 10, 25, 10, 30, 12))).toEqual(new Date(2026, 10, 23, 7, 0));
    // On the minute itself, the slot is that minute; one minute before, the week before.
    expect(slotAtOrBefore('0 7 * * 1', new Date(2026, 10, 23, 7, 0, 59))).toEqual(new Date(2026, 10, 23, 7, 0));
    expect(slotAtOrBefore('0 7 * * 1', new Date(2026, 10, 23, 6, 59, 59))).toEqual(new Date(2026, 10, 16, 7, 0));
    expect(slotAtOrBefore('*/5 * * * *', new Date(2026, 10, 25, 10, 37, 30))).toEqual(new Date(2026, 10, 25, 10, 35));
    expect(slotAtOrBefore('30 2 * * *', new Date(2026, 10, 25, 2, 29))).toEqual(new Date(2026, 10, 24, 2, 30));
  });

  it('does the work once when a second server fires the same slot late', async () => {
    let done = 0;
    const j = job(async () => `did it (${++done})`);
    const slot = new Date('2027-06-07T05:00:00Z');
    const first = await runJob(j, 'schedule', { now: slot, slot });
    // The other server's tick comes 40 s late: the lock is free again, but the slot is taken.
    const late = await otherServer.runJob(j, 'schedule', { now: new Date(slot.getTime() + 40_000), slot });
    expect([first.outcome, late.outcome]).toEqual(['ok', 'skipped']);
    expect(late.summary).toMatch(/already done by another server/);
    expect(done).toBe(1);
    // The next slot is a new one.
    const next = new Date('2027-06-14T05:00:00Z');
    expect((await otherServer.runJob(j, 'schedule', { now: next, slot: next })).outcome).toBe('ok');
    expect(done).toBe(2);
  });

  it('does the work once when two servers fire the same slot at the same moment', async () => {
    let done = 0;
    const j = job(() => new Promise((resolve) => setTimeout(() => resolve(`slow (${++done})`), 200)));
    const slot = new Date('2027-06-07T05:00:00Z');
    const runs = await Promise.all([
      runJob(j, 'schedule', { slot }),
      otherServer.runJob(j, 'schedule', { slot }),
      otherServer.runJob(j, 'catch-up', { slot }),
    ]);
    expect(runs.map((r) => r.outcome).sort()).toEqual(['ok', 'skipped', 'skipped']);
    expect(done).toBe(1);
  });

  it('a failed run frees its slot, so a late server or the catch-up may do it', async () => {
    let attempts = 0;
    const j = job(async () => {
      if (++attempts === 1) throw new Error('first attempt failed');
      return 'second attempt worked';
    });
    const slot = new Date('2027-06-07T05:00:00Z');
    expect((await runJob(j, 'schedule', { slot })).outcome).toBe('failed');
    const retry = await otherServer.runJob(j, 'catch-up', { slot });
    expect(retry.outcome).toBe('ok');
    const rows = await db.select().from(jobRuns).where(eq(jobRuns.job, j.name));
    expect(rows.map((r) => r.outcome).sort()).toEqual(['failed', 'ok']);
    expect(rows.every((r) => r.slotAt?.getTime() === slot.getTime())).toBe(true);
  });
});

describe('weekly digests', () => {
  it('a week is sent once across schedule, catch-up and run now; run now sends it again only when asked', async () => {
    const project = await makeProject(); // site time zone Europe/Zurich
    const manager = await makeUser();
    await addMember(project.id, manager.id, 'site_manager');
    const registry = findJob('downtime-digest')!;
    // The registry's job, limited to this drive so other test files' drives are not mailed.
    const digest: JobDefinition = {
      ...registry,
      name: uniq('downtime-digest'),
      run: (ctx) => downtimeDigestJob(ctx, { projectId: project.id }),
    };
    const mails = async () =>
      (
        await db
          .select()
          .from(outbox)
          .where(and(eq(outbox.kind, 'downtime_digest'), sql`${manager.email} = any(${outbox.toAddresses})`))
      ).length;

    // Monday 7 June 2027, 07:00 in Zurich (05:00Z): last week is 2027-W22 (ISO 8601 calendar).
    const monday = new Date('2027-06-07T05:00:00Z');
    expect((await runJob(digest, 'schedule', { now: monday, slot: monday })).outcome).toBe('ok');
    expect(await mails()).toBe(1);
    // A second server's late tick for the same slot: taken.
    expect((await otherServer.runJob(digest, 'schedule', { now: new Date(monday.getTime() + 90_000), slot: monday })).outcome).toBe(
      'skipped',
    );
    // A server that starts on Tuesday catches up in another slot: runs, but the week is taken.
    const tuesday = new Date('2027-06-08T09:00:00Z');
    const catchUp = await otherServer.runJob(digest, 'catch-up', { now: tuesday, slot: tuesday });
    expect(catchUp.outcome).toBe('ok');
    expect(catchUp.summary).toBe('0 downtime digest(s) queued for 1 drive(s). 1 drive(s) left out: their week was already sent.');
    // Run now: the administrator is asked first (the registry's check names the drive and the week) …
    const question = await registry.alreadyDone!({ now: tuesday });
    expect(question).toContain(`${project.name} (week 2027-W22, sent `);
    expect(question).toMatch(/Send it again\?$/);
    const unasked = await runJob(digest, 'admin', { now: tuesday });
    expect(unasked.summary).toMatch(/left out: their week was already sent/);
    expect(await mails()).toBe(1);
    // … and with the confirmation it goes out again, counted as re-sent.
    await runJob(digest, 'admin', { now: tuesday, again: true });
    expect(await mails()).toBe(2);
    const [week] = await db
      .select()
      .from(digestWeeks)
      .where(and(eq(digestWeeks.projectId, project.id), eq(digestWeeks.digest, 'downtime_digest')));
    expect(week).toMatchObject({ isoWeek: '2027-W22', mails: 1, resent: 1 });
    // The next Monday covers the next week.
    const nextMonday = new Date('2027-06-14T05:00:00Z');
    await runJob(digest, 'schedule', { now: nextMonday, slot: nextMonday });
    expect(await mails()).toBe(3);
  });

  it('two servers sending the same week at the same moment queue it once', async () => {
    const project = await makeProject();
    await makeCutterhead(project.id, 2);
    await makeSmallCatalogue(project.id);
    const buyer = await makeUser();
    await addMember(project.id, buyer.id, 'buyer');
    const { partsDigestJob } = await import('../../jobs/parts-digest');
    const digest: JobDefinition = {
      ...findJob('parts-digest')!,
      name: uniq('parts-digest'),
      run: (ctx) => partsDigestJob(ctx, { projectId: project.id }),
    };
    const monday = new Date('2027-06-07T04:00:00Z');
    // Different slots (as two servers with different clocks might compute): only the week record stops the second.
    await Promise.all([
      runJob(digest, 'schedule', { now: monday, slot: monday }),
      otherServer.runJob(digest, 'catch-up', { now: monday, slot: new Date(monday.getTime() + 60_000) }),
    ]);
    const rows = await db
      .select()
      .from(outbox)
      .where(and(eq(outbox.kind, 'parts_digest'), sql`${buyer.email} = any(${outbox.toAddresses})`));
    expect(rows).toHaveLength(1);
  });

  it('run now through the API asks before sending a week again (409), and sends with again=true', async () => {
    // A drive with a buyer and a catalogue, so the weekly parts digest has someone to mail this week.
    const project = await makeProject();
    await makeCutterhead(project.id, 2);
    await makeSmallCatalogue(project.id);
    const buyer = await makeUser();
    await addMember(project.id, buyer.id, 'buyer');
    const admin = await makeUser({ isAdmin: true });
    const agent = await signedInAgent(createApp({ jobs }), admin.email);
    const first = await agent.post('/api/admin/jobs/parts-digest/run');
    expect(first.status).toBe(200);
    expect(first.body.outcome).toBe('ok');
    const again = await agent.post('/api/admin/jobs/parts-digest/run');
    expect(again.status).toBe(409);
    expect(again.body.error.confirmAgain).toBe(true);
    expect(again.body.error.message).toContain(project.name);
    const bad = await agent.post('/api/admin/jobs/parts-digest/run?again=yes');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toBe('again must be true or false');
    const confirmed = await agent.post('/api/admin/jobs/parts-digest/run?again=true');
    expect(confirmed.status).toBe(200);
    const rows = await db
      .select()
      .from(outbox)
      .where(and(eq(outbox.kind, 'parts_digest'), sql`${buyer.email} = any(${outbox.toAddresses})`));
    expect(rows).toHaveLength(2);
  });
});
