/** Stop reminders 24 h and 2 h ahead, by an injected clock; each once; opted-out users skipped. */
import { sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { stopRemindersJob } from '../../jobs/stop-reminders';
import { db } from '../../server/db/client';
import { caughtMail, crewMembers, crews, notificationOptOuts, outbox, stopPositions, stops } from '../../server/db/schema';
import { makeProject, makeUser, uniq, waitForMail } from '../support/fixtures';
import { makeCutterhead } from '../support/drive-fixtures';

describe('stop reminders', () => {
  it('reminds the crew 24 h and 2 h before a published stop, once each, with the work pack and cautions', async () => {
    const project = await makeProject();
    const drive = await makeCutterhead(project.id, 4);
    const quiet = await makeUser(); // a crew member who turned reminders off
    await db.insert(notificationOptOuts).values({ userId: quiet.id, kind: 'stop_reminder' });
    const [crew] = await db
      .insert(crews)
      .values({ projectId: project.id, name: uniq('Crew') })
      .returning();
    const a = `${uniq('lead')}@kerfwise.test`;
    const b = `${uniq('fitter')}@kerfwise.test`;
    await db.insert(crewMembers).values([
      { crewId: crew.id, name: 'Lead', email: a },
      { crewId: crew.id, name: 'Fitter', email: b },
      { crewId: crew.id, name: 'Quiet', email: quiet.email, userId: quiet.id },
    ]);
    const start = new Date(Date.now() + 90 * 86400_000); // far ahead: other tests' stops never collide
    const [stop] = await db
      .insert(stops)
      .values({
        projectId: project.id,
        source: 'planner',
        status: 'scheduled',
        chainageM: 4321.5,
        ringNumber: 2881,
        compressedAir: true,
        workingPressureBar: 3.1,
        plannedStart: start,
        expectedHours: 10,
        crewId: crew.id,
        publishedAt: new Date(),
      })
      .returning();
    await db.insert(stopPositions).values([
      { stopId: stop.id, positionId: drive.positions[1].id, expectedWearMm: 23.4 },
      { stopId: stop.id, positionId: drive.positions[3].id, expectedWearMm: 11.2 },
    ]);
    const hours = (h: number) => new Date(start.getTime() - h * 3600_000);
    const mailsTo = async (to: string) =>
      db
        .select()
        .from(outbox)
        .where(sql`${to} = any(${outbox.toAddresses}) and ${outbox.kind} = 'stop_reminder'`);

    await stopRemindersJob({ now: hours(25) });
    expect(await mailsTo(a)).toHaveLength(0);

    await stopRemindersJob({ now: hours(23) });
    const first = await waitForMail(a, 'Reminder (24 hours)');
    expect(first.toAddresses.sort()).toEqual([a, b].sort());
    // The work pack's own text, as when the stop was published.
    expect(first.textBody).toContain('cutter stop at chainage 4+321.5, ring 2881');
    expect(first.textBody).toMatch(/position 2 \(\w+\), \S+ off, expected wear 23\.4 of 25 mm/);
    expect(first.textBody).toContain('COMPRESSED AIR (indicative working pressure 3.10 bar)');
    expect(first.textBody).toMatch(/does not compute decompression schedules/);
    expect(first.textBody).toMatch(/Entering the cutterhead/);
    // Site time with the zone named; the reference is the platform's own time-zone data (Intl), not the code's date library.
    const siteClock = new Intl.DateTimeFormat('sv-SE', {
      timeZone: 'Europe/Zurich',
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
    }).format(start);
    expect(first.textBody).toContain(`Planned start: ${siteClock} Europe/Zurich, about 10 h.`);
    expect(first.subject).toBe(`Reminder (24 hours): cutter stop at 4+321.5, ${siteClock} Europe/Zurich`);

    await stopRemindersJob({ now: hours(22) });
    expect(await mailsTo(a)).toHaveLength(1);

    await stopRemindersJob({ now: hours(1.5) });
    await waitForMail(b, 'Reminder (2 hours)');
    expect(await mailsTo(a)).toHaveLength(2);
    const quietMail = await db
      .select()
      .from(caughtMail)
      .where(sql`${quiet.email} = any(${caughtMail.toAddresses})`);
    expect(quietMail).toHaveLength(0);
  });

  it('sends nothing for a stop that is not published, or is cancelled', async () => {
    const project = await makeProject();
    const [crew] = await db
      .insert(crews)
      .values({ projectId: project.id, name: uniq('Crew') })
      .returning();
    const to = `${uniq('nobody')}@kerfwise.test`;
    await db.insert(crewMembers).values({ crewId: crew.id, name: 'X', email: to });
    const start = new Date(Date.now() + 91 * 86400_000);
    await db.insert(stops).values([
      { projectId: project.id, source: 'planner', status: 'scheduled', chainageM: 1, plannedStart: start, crewId: crew.id },
      {
        projectId: project.id,
        source: 'planner',
        status: 'cancelled',
        chainageM: 2,
        plannedStart: start,
        crewId: crew.id,
        publishedAt: new Date(),
        cancelReason: 'x',
      },
    ]);
    await stopRemindersJob({ now: new Date(start.getTime() - 3600_000) });
    const queued = await db
      .select()
      .from(outbox)
      .where(sql`${to} = any(${outbox.toAddresses})`);
    expect(queued).toHaveLength(0);
  });
});
