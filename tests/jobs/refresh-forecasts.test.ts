/** The nightly job proposes a stop for positions due soon, tells the planner, and does not repeat itself. */
import { eq, sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { refreshForecastsJob } from '../../jobs/refresh-forecasts';
import { db } from '../../server/db/client';
import { geologySections, groundTypes, outbox, stopPositions, stops, strokes } from '../../server/db/schema';
import { addMember, makeProject, makeUser } from '../support/fixtures';
import { makeCutterhead } from '../support/drive-fixtures';

describe('nightly forecast refresh', () => {
  it('proposes one stop at an allowed place, lists the positions due, and mails the planner', async () => {
    const project = await makeProject(); // chainage from 0, increasing
    const planner = await makeUser();
    await addMember(project.id, planner.id, 'planner');
    const drive = await makeCutterhead(project.id, 4); // fitted 30 days ago
    // Invented ground: CAI 5 gives a Gehring prior of about 0.08 mm/km, enough to wear discs out over 300 m.
    const [rock] = await db.insert(groundTypes).values({ projectId: project.id, name: 'Test quartzite', cai: 5 }).returning();
    await db.insert(geologySections).values([
      { projectId: project.id, chainageFromM: 0, chainageToM: 400, groundTypeId: rock.id, waterHeadM: 10 },
      {
        projectId: project.id,
        chainageFromM: 400,
        chainageToM: 450,
        groundTypeId: rock.id,
        stopAllowed: false,
        stopReason: 'Fault zone: no stop',
        waterHeadM: 10,
      },
      { projectId: project.id, chainageFromM: 450, chainageToM: 2000, groundTypeId: rock.id, waterHeadM: 45 },
    ]);
    const t0 = Date.now() - 20 * 86400_000;
    await db.insert(strokes).values(
      Array.from({ length: 200 }, (_, i) => ({
        projectId: project.id,
        ringNumber: i + 1,
        startTime: new Date(t0 + i * 3600_000),
        endTime: new Date(t0 + i * 3600_000 + 40 * 60_000),
        chainageStartM: i * 1.5,
        chainageEndM: (i + 1) * 1.5,
        revolutions: 187.5,
        penetrationMmPerRev: 8,
      })),
    );

    const summary = await refreshForecastsJob({ now: new Date() }, { projectId: project.id });
    expect(summary).toMatch(/stop\(s\) proposed/);
    const proposed = await db.select().from(stops).where(eq(stops.projectId, project.id));
    expect(proposed).toHaveLength(1);
    expect(proposed[0]).toMatchObject({ status: 'proposed', source: 'job', compressedAir: false });
    // Never inside the no-stop fault zone, never behind the machine (at 300 m).
    expect(proposed[0].chainageM).toBeGreaterThanOrEqual(300);
    expect(proposed[0].chainageM < 400 || proposed[0].chainageM >= 450).toBe(true);
    const listed = await db.select().from(stopPositions).where(eq(stopPositions.stopId, proposed[0].id));
    expect(listed.length).toBeGreaterThan(0);
    expect(listed.every((l) => drive.positions.some((p) => p.id === l.positionId))).toBe(true);
    const mail = await db
      .select()
      .from(outbox)
      .where(sql`${planner.email} = any(${outbox.toAddresses}) and ${outbox.kind} = 'stop_proposed'`);
    expect(mail).toHaveLength(1);

    // The next night the same positions are covered by the open stop: nothing new.
    await refreshForecastsJob({ now: new Date() }, { projectId: project.id });
    expect(await db.select().from(stops).where(eq(stops.projectId, project.id))).toHaveLength(1);
  });
});
