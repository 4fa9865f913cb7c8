import { and, asc, eq } from 'drizzle-orm';
import { beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { auditLog, positions } from '../../server/db/schema';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';

const app = createApp();

/** Face positions for a 6.2 m bore (makeProject), radius and limit per DOMAIN.md §4 (common practice). */
const face = (number: number, trackRadiusMm: number, wearLimitMm = 25) => ({
  number,
  trackRadiusMm,
  positionClass: 'face',
  discSizeIn: 17,
  tiltDeg: null,
  wearLimitMm,
  twinDisc: false,
  angleDeg: null,
});

const csvHeader = 'number,track_radius_mm,class,disc_size_in,tilt_deg,wear_limit_mm,twin_disc,angle_deg';

let projectId: string;
let planner: Awaited<ReturnType<typeof signedInAgent>>;

/** Everything a failed request must leave as it was: the positions and the audit trail. */
async function snapshot() {
  const rows = await db.select().from(positions).where(eq(positions.projectId, projectId)).orderBy(asc(positions.number));
  const audits = await db.select({ id: auditLog.id }).from(auditLog).where(eq(auditLog.projectId, projectId));
  return { rows, auditCount: audits.length };
}

beforeEach(async () => {
  const project = await makeProject();
  projectId = project.id;
  const user = await makeUser();
  await addMember(projectId, user.id, 'planner');
  planner = await signedInAgent(app, user.email);
  const res = await planner.put(`/api/projects/${projectId}/positions`).send({ positions: [face(1, 500), face(2, 1500), face(3, 2500)] });
  expect(res.status).toBe(200);
  expect(res.body).toEqual({ created: 3, updated: 0, unchanged: 0 });
});

describe('layout rules on PUT /positions', () => {
  it('refuses duplicate position numbers, names the row and field, and changes nothing', async () => {
    const before = await snapshot();
    const res = await planner.put(`/api/projects/${projectId}/positions`).send({ positions: [face(1, 600), face(4, 1000), face(4, 1100)] });
    expect(res.status).toBe(400);
    expect(res.body.error.issues).toEqual([{ path: 'positions.2.number', message: expect.stringMatching(/Position 4 appears twice/) }]);
    expect(await snapshot()).toEqual(before); // position 1 keeps 500 mm, no position 4
  });

  it('refuses a track radius beyond the excavated radius', async () => {
    // [geometry] a disc cuts inside the bore: track radius ≤ D/2. makeProject's D = 6.2 m → 3100 mm
    // (derived: 6.2 × 1000 / 2). 3100 itself is allowed, 3100.5 is not.
    const before = await snapshot();
    const res = await planner.put(`/api/projects/${projectId}/positions`).send({ positions: [face(1, 3100), face(5, 3100.5)] });
    expect(res.status).toBe(400);
    expect(res.body.error.issues).toEqual([
      { path: 'positions.1.trackRadiusMm', message: expect.stringMatching(/beyond the excavated radius \(3100 mm\)/) },
    ]);
    expect(await snapshot()).toEqual(before);
  });

  it('refuses a wear limit of 0 or below on every row that has one', async () => {
    const before = await snapshot();
    const res = await planner
      .put(`/api/projects/${projectId}/positions`)
      .send({ positions: [face(1, 500, 0), face(2, 1500, 20), face(3, 2500, -5)] });
    expect(res.status).toBe(400);
    expect(res.body.error.issues).toEqual([
      { path: 'positions.0.wearLimitMm', message: 'The wear limit must be more than 0 mm.' },
      { path: 'positions.2.wearLimitMm', message: 'The wear limit must be more than 0 mm.' },
    ]);
    expect(await snapshot()).toEqual(before); // position 2's valid 20 mm was not saved either
  });

  it('audits a wear-limit change with the limit before and after', async () => {
    const res = await planner
      .put(`/api/projects/${projectId}/positions`)
      .send({ positions: [face(1, 500), face(2, 1500, 22), face(3, 2500)] });
    expect(res.body).toEqual({ created: 0, updated: 1, unchanged: 2 });
    const [pos2] = await db
      .select()
      .from(positions)
      .where(and(eq(positions.projectId, projectId), eq(positions.number, 2)));
    const trail = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'position'), eq(auditLog.entityId, pos2.id), eq(auditLog.action, 'change_wear_limit')));
    expect(trail).toHaveLength(1);
    expect(trail[0].userId).not.toBeNull();
    expect(trail[0].before).toMatchObject({ number: 2, wearLimitMm: 25 });
    expect(trail[0].after).toMatchObject({ number: 2, wearLimitMm: 22 });
  });

  it('lets a fitter read the layout but not change it', async () => {
    const fitter = await makeUser();
    await addMember(projectId, fitter.id, 'fitter');
    const agent = await signedInAgent(app, fitter.email);
    expect((await agent.get(`/api/projects/${projectId}/positions`)).body).toHaveLength(3);
    const before = await snapshot();
    expect((await agent.put(`/api/projects/${projectId}/positions`).send({ positions: [face(1, 500, 10)] })).status).toBe(403);
    expect(await snapshot()).toEqual(before);
  });
});

describe('CSV import, all or nothing', () => {
  const post = (csv: string) => planner.post(`/api/projects/${projectId}/positions/import`).send({ csv });

  it('reports every row that breaks a field rule, by row and field, and imports none of the good ones', async () => {
    const before = await snapshot();
    // Row 1 is the header, so the data rows are 2…6.
    const res = await post(
      [
        csvHeader,
        '10,700,face,17,,25,no,',
        '11,3200,face,17,,25,no,', // beyond the 3100 mm bore radius
        '12,900,face,17,,0,no,', // limit 0
        '10,1000,face,17,,25,no,', // duplicate of row 2
        '13,1100,face,17,,25,yes,', // twin discs on a face position
      ].join('\n'),
    );
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/nothing was imported/);
    expect(res.body.error.issues.map((i: { path: string }) => i.path)).toEqual(['row 4.wearLimitMm', 'row 6.twinDisc']);
    expect(await snapshot()).toEqual(before);
  });

  it('checks the layout rules across the file before saving anything', async () => {
    const before = await snapshot();
    const res = await post([csvHeader, '10,700,face,17,,25,no,', '11,3200,face,17,,25,no,', '10,1000,face,17,,25,no,'].join('\n'));
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(['row 3.trackRadiusMm', 'row 4.number']);
    expect(await snapshot()).toEqual(before); // position 10 (row 2, valid) was not created
  });

  it('imports a good file in one go, updating by number and auditing the changed limit', async () => {
    const res = await post(
      [csvHeader, '1,500,face,17,,25,no,', '3,2500,face,17,,20,no,45', '4,3000,gauge,17,40,12,no,90', '5,60,centre,17,,25,yes,'].join(
        '\r\n',
      ),
    );
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ created: 2, updated: 1, unchanged: 1, warnings: [] });
    const { rows } = await snapshot();
    expect(rows.map((r) => [r.number, r.positionClass, r.wearLimitMm, r.twinDisc, r.tiltDeg, r.angleDeg])).toEqual([
      [1, 'face', 25, false, null, null],
      [2, 'face', 25, false, null, null],
      [3, 'face', 20, false, null, 45],
      [4, 'gauge', 12, false, 40, 90],
      [5, 'centre', 25, true, null, null],
    ]);
    const trail = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.projectId, projectId), eq(auditLog.action, 'change_wear_limit')));
    expect(trail.map((t) => [(t.before as { wearLimitMm: number }).wearLimitMm, (t.after as { wearLimitMm: number }).wearLimitMm])).toEqual(
      [[25, 20]],
    );
  });

  // Issue 10: every CSV import goes through the one reader, which names a column it does not read
  // in a warning instead of refusing the file (nothing is dropped without a word).
  it('names an unknown column in a warning and imports the positions', async () => {
    const res = await post('number,track_radius_mm,class,disc_size_in,wear_limit_mm,colour\n9,800,face,17,25,red');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({
      created: 1,
      warnings: [{ row: 1, column: 'colour', message: expect.stringMatching(/does not read 'colour' in a cutterhead layout/) }],
    });
  });

  it('refuses a bad layout file with errors by row and column, read by the CSV reader', async () => {
    const before = await snapshot();
    // derived: inline file; line 3 has a track radius that is not a number, line 4 a class Kerfwise does not know.
    const res = await post([csvHeader, '20,700,face,17,,25,no,', '21,abc,face,17,,25,no,', '22,900,middle,17,,25,no,'].join('\n'));
    expect(res.status).toBe(400);
    expect(res.body.error.issues).toEqual([
      {
        path: 'row 3.trackRadiusMm',
        row: 3,
        column: 'track_radius_mm',
        message: expect.stringMatching(/must be a number; 'abc' is not one/),
      },
      { path: 'row 4.positionClass', row: 4, column: 'class', message: expect.stringMatching(/centre, face or gauge/) },
    ]);
    expect(await snapshot()).toEqual(before);
  });
});
