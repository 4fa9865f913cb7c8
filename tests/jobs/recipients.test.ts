/**
 * recipientsFor (server/services/recipients.ts): the one place jobs and routes pick whom to mail.
 * Expected recipients follow the product rule in shared/notifications.ts (who each kind is for)
 * and each person's own choices; the people are made up here.
 */
import { describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { crewMembers, crews, notificationOptOuts } from '../../server/db/schema';
import { recipientsFor } from '../../server/services/recipients';
import { addMember, makeProject, makeUser, uniq } from '../support/fixtures';

describe('recipientsFor', () => {
  it('mails the roles a kind is for, skipping who turned that kind off, inactive users and other roles', async () => {
    const project = await makeProject();
    const other = await makeProject();
    const planner = await makeUser();
    const quietPlanner = await makeUser(); // turned stop proposals off
    const gonePlanner = await makeUser({ active: false });
    const buyer = await makeUser();
    const elsewhere = await makeUser(); // a planner of another drive
    await addMember(project.id, planner.id, 'planner');
    await addMember(project.id, quietPlanner.id, 'planner');
    await addMember(project.id, gonePlanner.id, 'planner');
    await addMember(project.id, buyer.id, 'buyer');
    await addMember(other.id, elsewhere.id, 'planner');
    await db.insert(notificationOptOuts).values({ userId: quietPlanner.id, kind: 'stop_proposed' });

    const proposed = await recipientsFor(db, project.id, 'stop_proposed');
    expect(proposed).toEqual([{ email: planner.email, userId: planner.id }]);
    // Another kind goes to its own role only (parts digests: buyers, not planners or site managers).
    await addMember(project.id, (await makeUser()).id, 'site_manager');
    expect((await recipientsFor(db, project.id, 'parts_digest')).map((r) => r.email)).toEqual([buyer.email]);
  });

  it('mails a stop’s crew, members without an account included, skipping a member who turned the kind off', async () => {
    const project = await makeProject();
    const quiet = await makeUser();
    const keen = await makeUser();
    await db.insert(notificationOptOuts).values({ userId: quiet.id, kind: 'stop_reminder' });
    const [crew] = await db
      .insert(crews)
      .values({ projectId: project.id, name: uniq('Crew') })
      .returning();
    const outsider = `${uniq('agency')}@kerfwise.test`;
    await db.insert(crewMembers).values([
      { crewId: crew.id, name: 'A Quiet', email: quiet.email, userId: quiet.id },
      { crewId: crew.id, name: 'B Keen', email: keen.email, userId: keen.id },
      { crewId: crew.id, name: 'C Agency fitter', email: outsider },
    ]);
    expect((await recipientsFor(db, project.id, 'stop_reminder', { crewId: crew.id })).map((r) => r.email)).toEqual([keen.email, outsider]);
    // The same person still gets the published work pack: only reminders were turned off.
    expect((await recipientsFor(db, project.id, 'stop_published', { crewId: crew.id })).map((r) => r.email)).toEqual([
      quiet.email,
      keen.email,
      outsider,
    ]);
    // No crew on the stop: nobody.
    expect(await recipientsFor(db, project.id, 'stop_reminder', { crewId: null })).toEqual([]);
  });
});
