/**
 * Advance-log and geology imports through the API: every deliberately bad file in
 * tests/fixtures/bad-csv gets a 4xx whose issues point at a row and column, and leaves the
 * database exactly as it was; good files import once (a second import adds nothing).
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { eq, sql } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { fittingRolledKm, fittings, groundTypes, projects, strokes } from '../../server/db/schema';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';
import { csvLines } from '../support/csv';
import { makeCutterhead } from '../support/drive-fixtures';

const app = createApp();
const badDir = path.resolve('tests/fixtures/bad-csv');
const goodDir = path.resolve('tests/fixtures/good-csv');
const badFiles = readdirSync(badDir).filter((f) => f.endsWith('.csv'));

let projectId: string;
let planner: Awaited<ReturnType<typeof signedInAgent>>;

/** A fingerprint of everything an import may touch. */
async function snapshot() {
  const [s] = await db
    .execute<{ n: number; h: string | null }>(
      sql`select count(*)::int as n, md5(string_agg(ring_number::text || start_time::text || chainage_start_m::text, ',' order by ring_number)) as h from strokes where project_id = ${projectId}`,
    )
    .then((r) => r.rows);
  const [g] = await db
    .execute<{ n: number; h: string | null }>(
      sql`select count(*)::int as n, md5(string_agg(chainage_from_m::text || ground_type_id::text, ',' order by chainage_from_m)) as h from geology_sections where project_id = ${projectId}`,
    )
    .then((r) => r.rows);
  const grounds = (await db.select().from(groundTypes).where(eq(groundTypes.projectId, projectId))).length;
  const rolled = (await db.select().from(fittingRolledKm).where(eq(fittingRolledKm.projectId, projectId))).length;
  return { strokes: s, geology: g, grounds, rolled };
}

const post = (url: string, body: Buffer | string) =>
  planner
    .post(url)
    .set('Content-Type', 'text/csv')
    .send(Buffer.isBuffer(body) ? body : Buffer.from(body));

beforeAll(async () => {
  const p = await makeProject();
  projectId = p.id;
  // The fixtures' drive: chainage from about 2450 m, increasing, site time zone Europe/Zurich.
  await db.update(projects).set({ startChainageM: 2400 }).where(eq(projects.id, projectId));
  await makeCutterhead(projectId, 3);
  // The fixtures' strokes are from March 2026: the discs were fitted before that.
  await db
    .update(fittings)
    .set({ fittedAt: new Date('2026-01-05T06:00:00Z') })
    .where(eq(fittings.projectId, projectId));
  const u = await makeUser();
  await addMember(projectId, u.id, 'planner');
  planner = await signedInAgent(app, u.email);
  expect(
    (await post(`/api/projects/${projectId}/geology/import`, readFileSync(path.join(goodDir, 'geology-long-section.csv')))).status,
  ).toBe(201);
  expect(
    (await post(`/api/projects/${projectId}/strokes/import`, readFileSync(path.join(goodDir, 'advance-log-comma-iso.csv')))).status,
  ).toBe(201);
});

describe('bad files change nothing', () => {
  it('has at least 25 deliberately bad files', () => {
    expect(badFiles.length).toBeGreaterThanOrEqual(25);
  });

  it.each(badFiles)('%s is refused with row and column, and the database is as it was', async (file) => {
    const before = await snapshot();
    const url = file.startsWith('geology-') ? `/api/projects/${projectId}/geology/import` : `/api/projects/${projectId}/strokes/import`;
    const res = await post(url, readFileSync(path.join(badDir, file)));
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
    expect(res.body.error.message).toMatch(/nothing was imported/i);
    expect(res.body.error.issues.length).toBeGreaterThan(0);
    for (const issue of res.body.error.issues) {
      expect(typeof issue.row).toBe('number');
      expect(issue.message.length).toBeGreaterThan(10);
    }
    expect(await snapshot()).toEqual(before);
  });

  it('a binary file named .csv is refused', async () => {
    const before = await snapshot();
    const bytes = Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 7919) % 256));
    const res = await post(`/api/projects/${projectId}/strokes/import`, bytes);
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].row).toBe(0);
    expect(await snapshot()).toEqual(before);
  });

  it('a 60 MB file is refused as too large', async () => {
    const before = await snapshot();
    // Long remarks, so the 50 MB limit is reached before the 50,000-row limit.
    const line = `101,2026-03-14T06:00:00+01:00,2026-03-14T06:50:00+01:00,2450,2451.5,187.5,8,5.5,12000,2500,${'x'.repeat(1600)}\n`;
    const big = Buffer.from(
      'Ring,Start time,End time,Chainage start (m),Chainage end (m),Cutterhead revolutions,Penetration (mm/rev),RPM,Thrust (kN),Torque (kNm),Remarks\n' +
        line.repeat(Math.ceil((60 * 1024 * 1024) / line.length)),
    );
    const res = await post(`/api/projects/${projectId}/strokes/import`, big);
    expect(res.status, JSON.stringify(res.body).slice(0, 500)).toBe(413);
    expect(res.body.error.message).toMatch(/50 MB/);
    expect(await snapshot()).toEqual(before);
  });
});

describe('good files', () => {
  it('importing the same rows again adds nothing', async () => {
    const before = await snapshot();
    const again = await post(`/api/projects/${projectId}/strokes/import`, readFileSync(path.join(goodDir, 'advance-log-comma-iso.csv')));
    expect(again.status).toBe(200);
    expect(again.body.inserted).toBe(0);
    expect(again.body.unchanged).toBeGreaterThan(0);
    expect(await snapshot()).toEqual(before);
  });

  it('a ring stored with other values is listed and needs an explicit replace', async () => {
    const original = readFileSync(path.join(goodDir, 'advance-log-comma-iso.csv'), 'utf8').split('\n');
    // Change the penetration of the second data row only (column 7 of the fixture).
    const cells = original[2].split(',');
    const col = original[0].split(',').findIndex((h) => /penetration/i.test(h));
    cells[col] = String(Number(cells[col]) + 1);
    original[2] = cells.join(',');
    const changed = original.join('\n');
    const before = await snapshot();
    const refused = await post(`/api/projects/${projectId}/strokes/import`, changed);
    expect(refused.status).toBe(409);
    expect(refused.body.error.issues[0]).toMatchObject({ row: 3 });
    expect(refused.body.error.issues[0].message).toMatch(/replace/);
    expect(await snapshot()).toEqual(before);
    const replaced = await post(`/api/projects/${projectId}/strokes/import?replace=true`, changed);
    expect(replaced.status).toBe(201);
    expect(replaced.body.replaced).toBe(1);
  });

  it('a BOM, semicolons and decimal commas are read; the mapping is remembered', async () => {
    const other = await makeProject();
    await db.update(projects).set({ startChainageM: 2400 }).where(eq(projects.id, other.id));
    const u = await makeUser();
    await addMember(other.id, u.id, 'planner');
    const agent = await signedInAgent(app, u.email);
    const res = await agent
      .post(`/api/projects/${other.id}/strokes/import`)
      .set('Content-Type', 'text/csv')
      .send(readFileSync(path.join(goodDir, 'advance-log-bom-semicolon-decimal-comma.csv')));
    expect(res.status, JSON.stringify(res.body).slice(0, 400)).toBe(201);
    expect(res.body.detected).toMatchObject({ bom: true, delimiter: ';', decimalComma: true });
    const mapping = await agent.get(`/api/projects/${other.id}/strokes/mapping`);
    expect(mapping.body.mapping).toMatchObject({ ringNumber: expect.any(String) });
  });

  it('rolled distance is attributed per position after an import', async () => {
    const rows = await db.select().from(fittingRolledKm).where(eq(fittingRolledKm.projectId, projectId));
    expect(rows.length).toBeGreaterThan(0);
    expect(rows.every((r) => r.rolledKm > 0)).toBe(true);
  });

  it('the log pages, sorts and filters on the server', async () => {
    const page = await planner.get(`/api/projects/${projectId}/strokes?page=1&pageSize=10&sort=ringNumber&dir=asc`);
    expect(page.status).toBe(200);
    const all = await db.select().from(strokes).where(eq(strokes.projectId, projectId));
    expect(page.body.total).toBe(all.length);
    expect(page.body.rows[0].ringNumber).toBe(Math.min(...all.map((s) => s.ringNumber)));
    const bad = await planner.get(`/api/projects/${projectId}/strokes?sort=nonsense`);
    expect(bad.status).toBe(400);
    const csv = await planner.get(`/api/projects/${projectId}/strokes/export.csv`);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csvLines(csv.text)[0]).toMatch(/^ring,start_time/);
  });

  it('geology sections that overlap are refused from the table form too', async () => {
    const [g] = await db.select().from(groundTypes).where(eq(groundTypes.projectId, projectId)).limit(1);
    const before = await snapshot();
    const res = await planner.put(`/api/projects/${projectId}/geology`).send({
      sections: [
        { chainageFromM: 0, chainageToM: 100, groundTypeId: g.id },
        { chainageFromM: 90, chainageToM: 200, groundTypeId: g.id },
      ],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('sections.1.chainageFromM');
    expect(await snapshot()).toEqual(before);
  });
});
