/**
 * Issues 11 and 12 through the real routes: a long section re-imported with "_" unit headers keeps
 * its water heads, UCS and CAI; a column the import does not read is named in a warning; an
 * unreadable water head is an error at its row and column, never 0; what the advance-log export
 * writes imports again as "nothing changed". All data invented (no real project).
 */
import { eq, sql } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { geologySections, groundTypes, projects } from '../../server/db/schema';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';

const app = createApp();
let projectId: string;
let planner: Awaited<ReturnType<typeof signedInAgent>>;

const post = (url: string, body: string) => planner.post(url).set('Content-Type', 'text/csv').send(Buffer.from(body));

beforeAll(async () => {
  const p = await makeProject();
  projectId = p.id;
  await db.update(projects).set({ startChainageM: 2400 }).where(eq(projects.id, projectId));
  const u = await makeUser();
  await addMember(projectId, u.id, 'planner');
  planner = await signedInAgent(app, u.email);
});

const waterHeads = async () =>
  (
    await db
      .select({ from: geologySections.chainageFromM, head: geologySections.waterHeadM })
      .from(geologySections)
      .where(eq(geologySections.projectId, projectId))
      .orderBy(geologySections.chainageFromM)
  ).map((s) => [s.from, s.head]);

describe('geology long section', () => {
  const longSection = [
    'chainage_from_m,chainage_to_m,ground_type,water_head_m,stop_allowed,stop_reason,ucs_mpa,cai',
    '2400,2520,Marl,18.5,yes,,45,1.2',
    '2520,2610,Sandstone,21,yes,,80,2.4',
    '2610,2655,Fault zone,24.5,no,fractured ground,,',
  ].join('\n');

  it('re-imported with water_head_m, ucs_mpa and cai keeps the water heads and fills the ground types', async () => {
    // derived: the inline file above (heads 18.5 / 21 / 24.5 m; Marl UCS 45 MPa CAI 1.2; Sandstone 80 MPa CAI 2.4).
    for (let i = 0; i < 2; i += 1) {
      const res = await post(`/api/projects/${projectId}/geology/import`, longSection);
      expect(res.status, JSON.stringify(res.body).slice(0, 400)).toBe(201);
      expect(res.body.saved).toBe(3);
      expect(await waterHeads()).toEqual([
        [2400, 18.5],
        [2520, 21],
        [2610, 24.5],
      ]);
    }
    const grounds = await db.select().from(groundTypes).where(eq(groundTypes.projectId, projectId)).orderBy(groundTypes.name);
    expect(grounds.map((g) => [g.name, g.ucsMpa, g.cai])).toEqual([
      ['Fault zone', null, null],
      ['Marl', 45, 1.2],
      ['Sandstone', 80, 2.4],
    ]);
  });

  it('names a column it does not read, and changes a ground type only with a warning', async () => {
    const withLogger = longSection
      .replace('45,1.2', '45,1.4')
      .split('\n')
      .map((line, i) => `${line},${i === 0 ? 'logged_by' : 'AB'}`)
      .join('\n');
    const res = await post(`/api/projects/${projectId}/geology/import`, withLogger);
    expect(res.status, JSON.stringify(res.body).slice(0, 400)).toBe(201);
    expect(res.body.warnings).toEqual(
      expect.arrayContaining([
        {
          row: 1,
          column: 'logged_by',
          message: expect.stringMatching(/does not read 'logged_by' in the long section; its values were not imported/),
        },
        { row: 2, column: 'Ground type', message: expect.stringMatching(/Ground type "Marl" changed from the file: CAI 1\.2 → 1\.4/) },
      ]),
    );
    expect(await waterHeads()).toEqual([
      [2400, 18.5],
      [2520, 21],
      [2610, 24.5],
    ]);
  });

  it('refuses an unreadable water head at its row and column and keeps what was stored', async () => {
    const before = await waterHeads();
    const res = await post(
      `/api/projects/${projectId}/geology/import`,
      longSection.replace('2520,2610,Sandstone,21,', '2520,2610,Sandstone,about 20,'),
    );
    expect(res.status).toBe(400);
    expect(res.body.error.issues).toEqual([
      { path: 'row 3, water_head_m', row: 3, column: 'water_head_m', message: expect.stringMatching(/'about 20' is not one/) },
    ]);
    expect(await waterHeads()).toEqual(before);
  });

  it('follows an explicit mapping, remembers it, and says where a water head was empty', async () => {
    const file = ['von,bis,Gebirge,Wasser,Halt,Grund', '2400,2520,Marl,,yes,', '2520,2655,Granite,30,yes,'].join('\n');
    const mapping = {
      chainageFromM: 'von',
      chainageToM: 'bis',
      groundTypeName: 'Gebirge',
      waterHeadM: 'Wasser',
      stopAllowed: 'Halt',
      stopReason: 'Grund',
    };
    const res = await post(`/api/projects/${projectId}/geology/import?mapping=${encodeURIComponent(JSON.stringify(mapping))}`, file);
    expect(res.status, JSON.stringify(res.body).slice(0, 400)).toBe(201);
    expect(res.body.warnings).toEqual(
      expect.arrayContaining([
        { row: 2, column: 'Wasser', message: expect.stringMatching(/water head is empty on line 2; those sections are stored with 0 m/) },
      ]),
    );
    const remembered = await planner.get(`/api/projects/${projectId}/geology/mapping`);
    expect(remembered.body.mapping).toEqual(mapping);
    // Without a mapping in the query, the remembered one reads the same file.
    expect((await post(`/api/projects/${projectId}/geology/import`, file)).status).toBe(201);
    expect(await waterHeads()).toEqual([
      [2400, 0],
      [2520, 30],
    ]);
  });
});

describe('advance log', () => {
  it('what the export writes imports again as "nothing changed"', async () => {
    // Invented strokes: 1.5 m each from 2450 m, one an hour, Zurich time (UTC+1 in March 2026).
    const header =
      'Ring,Start time,End time,Chainage start (m),Chainage end (m),Cutterhead revolutions,Penetration (mm/rev),RPM,Thrust (kN),Torque (kNm),Remarks';
    const rows = [0, 1, 2].map(
      (i) =>
        `${101 + i},2026-03-14T0${6 + i}:00,2026-03-14T0${6 + i}:37,${2450 + 1.5 * i},${2451.5 + 1.5 * i},${190 + i},${i === 1 ? '' : '7.9'},5.2,${i === 2 ? '' : '11800'},2450,ok`,
    );
    const first = await post(`/api/projects/${projectId}/strokes/import`, [header, ...rows].join('\n'));
    expect(first.status, JSON.stringify(first.body).slice(0, 400)).toBe(201);
    expect(first.body.inserted).toBe(3);
    // The Remarks column fills no field: kept with each ring, and said so.
    expect(first.body.warnings).toEqual([
      { row: 1, column: 'Remarks', message: expect.stringMatching(/kept with each ring as extra data/) },
    ]);

    const exported = await planner.get(`/api/projects/${projectId}/strokes/export.csv`);
    expect(exported.status).toBe(200);
    const again = await post(`/api/projects/${projectId}/strokes/import`, exported.text);
    expect(again.status, JSON.stringify(again.body).slice(0, 400)).toBe(200);
    // derived: three rings exported, all three stored with the same values.
    expect(again.body).toMatchObject({ inserted: 0, unchanged: 3, replaced: 0, warnings: [] });
    expect(again.body.detected.mapping).toMatchObject({
      ringNumber: 'ring',
      penetrationMmPerRev: 'penetration_mm_per_rev',
      thrustKn: 'thrust_kn',
      torqueKnm: 'torque_knm',
    });
    const [{ n }] = (await db.execute<{ n: number }>(sql`select count(*)::int as n from strokes where project_id = ${projectId}`)).rows;
    expect(n).toBe(3);
  });
});
