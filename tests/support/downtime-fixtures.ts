/** A drive with two weeks of downtime around the spring daylight-saving change, made through the real database. Invented data. */
import { eq } from 'drizzle-orm';
import { db } from '../../server/db/client';
import { downtimeCauses, downtimeEvents, siteSettings, strokes } from '../../server/db/schema';
import { ensureDefaultCauses } from '../../server/services/downtime';
import { makeProject } from './fixtures';

/**
 * The hand-worked events (Europe/Zurich; clocks go from 02:00 CET to 03:00 CEST on 2026-03-29):
 * - cutter change, Sun 2026-03-22 16:00 CET → Mon 2026-03-23 04:00 CET: 12 h across the Monday
 *   (8 h in 2026-W12, 4 h in 2026-W13) and the 18:00 shift change (2 h Day, 10 h Night);
 * - machine breakdown, Sat 2026-03-28 18:00 CET → Sun 2026-03-29 06:00 CEST: one night shift of
 *   11 real hours, in 2026-W13.
 */
export const springEvents = [
  { cause: 'Cutter change', startAt: '2026-03-22T16:00:00+01:00', endAt: '2026-03-23T04:00:00+01:00' },
  { cause: 'Machine breakdown', startAt: '2026-03-28T18:00:00+01:00', endAt: '2026-03-29T06:00:00+02:00' },
] as const;

/** Two strokes of 1.5 m, 2 h of boring each, in 2026-W13. */
export const springStrokes = [
  {
    ringNumber: 1,
    startTime: new Date('2026-03-24T08:00:00Z'),
    endTime: new Date('2026-03-24T10:00:00Z'),
    chainageStartM: 100,
    chainageEndM: 101.5,
  },
  {
    ringNumber: 2,
    startTime: new Date('2026-03-25T08:00:00Z'),
    endTime: new Date('2026-03-25T10:00:00Z'),
    chainageStartM: 101.5,
    chainageEndM: 103,
  },
];

/** A new drive (Europe/Zurich) with the default causes, Day 06:00 / Night 18:00 shifts, and the spring events and strokes above. */
export async function makeSpringDowntimeDrive() {
  const project = await makeProject();
  await ensureDefaultCauses(db, project.id, null);
  await db.insert(siteSettings).values({
    projectId: project.id,
    shifts: [
      { name: 'Day', start: '06:00' },
      { name: 'Night', start: '18:00' },
    ],
    labourRatePerHour: '80.00',
    gapMinutes: 90,
  });
  const causes = new Map(
    (await db.select().from(downtimeCauses).where(eq(downtimeCauses.projectId, project.id))).map((c) => [c.name, c.id]),
  );
  await db.insert(downtimeEvents).values(
    springEvents.map((e) => ({
      projectId: project.id,
      startAt: new Date(e.startAt),
      endAt: new Date(e.endAt),
      causeId: causes.get(e.cause)!,
    })),
  );
  await db.insert(strokes).values(springStrokes.map((s) => ({ ...s, projectId: project.id })));
  return project;
}
