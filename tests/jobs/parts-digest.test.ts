/** The weekly parts digest: the buyer gets the order suggestions by e-mail, by an injected clock; opted-out buyers and other roles do not. */
import { and, eq, sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { partsDigestJob } from '../../jobs/parts-digest';
import { db } from '../../server/db/client';
import { caughtMail, notificationOptOuts, outbox } from '../../server/db/schema';
import { addMember, makeProject, makeUser, waitForMail } from '../support/fixtures';
import { makeCutterhead } from '../support/drive-fixtures';
import { makeSmallCatalogue } from '../support/parts-fixtures';
import { insertStop } from '../support/stops-fixtures';

describe('weekly parts digest', () => {
  it('mails each buyer the order suggestions with the stop they come from', async () => {
    const project = await makeProject(); // no advance log: only the dated stop makes demand
    const drive = await makeCutterhead(project.id, 4);
    const buyer = await makeUser();
    const quietBuyer = await makeUser();
    const planner = await makeUser();
    await addMember(project.id, buyer.id, 'buyer');
    await addMember(project.id, quietBuyer.id, 'buyer');
    await addMember(project.id, planner.id, 'planner');
    await db.insert(notificationOptOuts).values({ userId: quietBuyer.id, kind: 'parts_digest' });
    await makeSmallCatalogue(project.id); // 3 rings on hand, lead time 14 ± 7 days, minimum order 10
    // Injected clock: Monday 4 January 2027, 06:00 in Zurich. The stop three days later changes two positions.
    const now = new Date('2027-01-04T05:00:00Z');
    await insertStop(
      project.id,
      { status: 'scheduled', chainageM: 812.4, ringNumber: 541, plannedStart: new Date('2027-01-07T06:00:00Z') },
      [drive.positions[1].id, drive.positions[2].id],
    );

    const summary = await partsDigestJob({ now }, { projectId: project.id });
    expect(summary).toBe('1 drive(s) with a catalogue; 1 digest(s) queued.');

    const mail = await waitForMail(buyer.email, 'to order now');
    expect(mail.toAddresses).toEqual([buyer.email]);
    expect(mail.subject).toMatch(/: 1 part\(s\) to order now$/);
    expect(mail.textBody).toContain('order suggestions for the 12 weeks from 2027-01-04 (service level 95.0 %)');
    // derived: the stop draws 2 rings in week 0; weekly demand 2, 0, … over 12 weeks → d̄ = 1/6, σ_d = 0.553;
    // SS = 1.6449·√(2·0.3056 + (1/6)²·1) = 1.315 (DOMAIN.md §6); 3 on hand < 2 + 1.315 → 1 ring, raised to the
    // minimum order of 10 (3,800.00 EUR at 380).
    expect(mail.textBody).toContain(
      '• RING17 17″ ring, constant section: order 10 (minimum order) from Invented Forge, about 3,800.00 EUR.',
    );
    expect(mail.textBody).toContain('Demand from: Stop at 0+812.4 (ring 541), scheduled on 2027-01-07: 2.');
    // Assemblies: the 2 removed come back rebuilt in week 2, inside the 6-week lead time: 3 + 2 ≥ 2 + 2.23. Bolts: 20 ≥ 8 + 3.64.
    expect(mail.textBody).not.toContain('ASM17 17″ disc cutter, complete: order');
    expect(mail.textBody).not.toContain('BOLT Hub bolt M20: order');
    expect(mail.textBody).toMatch(/http:\/\/kerfwise\.test\/projects\/[0-9a-f-]+\/parts/);

    // Opted out, or not a buyer: nothing.
    for (const email of [quietBuyer.email, planner.email]) {
      expect(
        await db
          .select()
          .from(outbox)
          .where(and(sql`${email} = any(${outbox.toAddresses})`, eq(outbox.kind, 'parts_digest'))),
      ).toHaveLength(0);
      expect(
        await db
          .select()
          .from(caughtMail)
          .where(sql`${email} = any(${caughtMail.toAddresses})`),
      ).toHaveLength(0);
    }
  });

  it('says so when nothing needs ordering, and skips drives without a catalogue', async () => {
    const empty = await makeProject();
    const buyer = await makeUser();
    await addMember(empty.id, buyer.id, 'buyer');
    expect(await partsDigestJob({ now: new Date('2027-01-04T05:00:00Z') }, { projectId: empty.id })).toBe(
      '0 drive(s) with a catalogue; 0 digest(s) queued.',
    );

    await makeCutterhead(empty.id, 2);
    await makeSmallCatalogue(empty.id); // no stop: no demand
    await partsDigestJob({ now: new Date('2027-01-04T05:00:00Z') }, { projectId: empty.id });
    const mail = await waitForMail(buyer.email, 'no parts to order this week');
    expect(mail.textBody).toContain('Nothing needs ordering now');
  });
});
