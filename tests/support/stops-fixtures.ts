/** A small drive for the stop tests, and stops in any state, made through the real database. Invented data. */
import { eq } from 'drizzle-orm';
import { db } from '../../server/db/client';
import {
  crewMembers,
  crews,
  cutters,
  geologySections,
  groundTypes,
  inspectionRounds,
  notificationOptOuts,
  stopPositions,
  stops,
  strokes,
} from '../../server/db/schema';
import { makeCutterhead } from './drive-fixtures';
import { makeProject, makeUser, uniq } from './fixtures';

/**
 * The long section of the test drive (chainage increasing; the project's compressed-air rule is
 * its default, above 30 m of head): free air up to 230 m, a fault zone without stops to 260 m,
 * then 40 m of head (compressed air) to 2500 m.
 */
export const testSections = [
  { chainageFromM: 0, chainageToM: 230, waterHeadM: 10, stopAllowed: true, stopReason: '' },
  { chainageFromM: 230, chainageToM: 260, waterHeadM: 12, stopAllowed: false, stopReason: 'Fault zone: no stop' },
  { chainageFromM: 260, chainageToM: 2500, waterHeadM: 40, stopAllowed: true, stopReason: '' },
];

/**
 * A drive with three positions (centre, face, gauge; makeCutterhead) fitted 30 days ago, one
 * ground type with a CAI (so the wear prior gives rates without inspections), the long section
 * above, 13 strokes of 1.5 m from 180.5 m to 200 m (the machine stands at 200 m after ring 133),
 * a store of 17″ cutters rebuilt 0, 0, 1, 2 and 3 times plus a 19″ one and one in the workshop, a
 * crew of three (one a user who turned stop mail off) and an inspection round.
 */
export async function makeStopsDrive() {
  const project = await makeProject();
  const [ground] = await db
    .insert(groundTypes)
    .values({ projectId: project.id, name: uniq('Gneiss'), cai: 4 })
    .returning();
  await db.insert(geologySections).values(testSections.map((s) => ({ ...s, projectId: project.id, groundTypeId: ground.id })));
  const drive = await makeCutterhead(project.id, 3);
  await db.update(cutters).set({ rebuildCount: 3 }).where(eq(cutters.id, drive.store[2].id));
  const startMs = Date.now() - 2 * 86400_000;
  await db.insert(strokes).values(
    Array.from({ length: 13 }, (_, i) => ({
      projectId: project.id,
      ringNumber: 121 + i,
      startTime: new Date(startMs + i * 3600_000),
      endTime: new Date(startMs + i * 3600_000 + 2400_000),
      chainageStartM: 180.5 + i * 1.5,
      chainageEndM: 182 + i * 1.5,
      revolutions: 187.5,
      penetrationMmPerRev: 8,
    })),
  );
  const extra = await db
    .insert(cutters)
    .values([
      { projectId: project.id, serial: uniq('R2'), discSizeIn: 17, status: 'in_store' as const, rebuildCount: 2 },
      { projectId: project.id, serial: uniq('R1'), discSizeIn: 17, status: 'in_store' as const, rebuildCount: 1 },
      { projectId: project.id, serial: uniq('B19'), discSizeIn: 19, status: 'in_store' as const, rebuildCount: 0 },
      { projectId: project.id, serial: uniq('W'), discSizeIn: 17, status: 'workshop' as const, rebuildCount: 0 },
    ])
    .returning();
  const quiet = await makeUser();
  await db.insert(notificationOptOuts).values({ userId: quiet.id, kind: 'stop_published' });
  const [crew] = await db
    .insert(crews)
    .values({ projectId: project.id, name: uniq('Crew') })
    .returning();
  const memberEmails = [`${uniq('lead')}@kerfwise.test`, `${uniq('fitter')}@kerfwise.test`];
  await db.insert(crewMembers).values([
    { crewId: crew.id, name: 'Ona Lead', email: memberEmails[0] },
    { crewId: crew.id, name: 'Pim Fitter', email: memberEmails[1] },
    { crewId: crew.id, name: 'Quinn Quiet', email: quiet.email, userId: quiet.id },
  ]);
  const [round] = await db
    .insert(inspectionRounds)
    .values({ projectId: project.id, startedAt: new Date(startMs), chainageM: 190 })
    .returning();
  return {
    project,
    ground,
    drive,
    extra,
    crew,
    memberEmails,
    quietEmail: quiet.email,
    roundId: round.id,
    currentChainageM: 200,
    currentRingNumber: 133,
  };
}

/** A stop of `projectId` in any state, changing `positionIds` (expected wear 20 mm). */
export async function insertStop(projectId: string, values: Partial<typeof stops.$inferInsert> = {}, positionIds: string[] = []) {
  const [stop] = await db
    .insert(stops)
    .values({ projectId, source: 'planner', chainageM: 500, ...values })
    .returning();
  if (positionIds.length > 0)
    await db.insert(stopPositions).values(positionIds.map((positionId) => ({ stopId: stop.id, positionId, expectedWearMm: 20 })));
  return stop;
}

/** For the route matrix: a crew with a member and a proposed stop. */
export async function stopContext(projectId: string): Promise<{ stopId: string; crewId: string }> {
  const [crew] = await db
    .insert(crews)
    .values({ projectId, name: uniq('Crew') })
    .returning();
  await db.insert(crewMembers).values({ crewId: crew.id, name: 'Matrix Member', email: `${uniq('m')}@kerfwise.test` });
  const stop = await insertStop(projectId);
  return { stopId: stop.id, crewId: crew.id };
}

/** A stop for one matrix call, in the state the action needs. */
export async function stopIn(projectId: string, crewId: string, status: 'proposed' | 'scheduled' | 'in_progress') {
  const planned = status === 'proposed' ? {} : { plannedStart: new Date(Date.now() + 30 * 86400_000), expectedHours: 10, crewId };
  const stop = await insertStop(projectId, { status, ...planned, ...(status === 'in_progress' ? { actualStart: new Date() } : {}) });
  return stop.id;
}

/** For the route matrix: a long section where every chainage allows a stop, unless the project has one (other rows replace it). */
export async function ensureStopSection(projectId: string): Promise<void> {
  const [any] = await db.select({ id: geologySections.id }).from(geologySections).where(eq(geologySections.projectId, projectId)).limit(1);
  if (any) return;
  const [ground] = await db
    .insert(groundTypes)
    .values({ projectId, name: uniq('Ground'), cai: 2 })
    .returning();
  await db.insert(geologySections).values({ projectId, chainageFromM: 0, chainageToM: 100_000, groundTypeId: ground.id, waterHeadM: 5 });
}
