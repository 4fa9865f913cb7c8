/**
 * Every CSV export of the server goes through shared/csv-writer.ts (issue 11): a text value
 * starting with = + - or @ that a person stored (cause name, event note, shift name, ground type
 * name, part name) comes out with a leading single quote (OWASP "CSV Injection"); every file starts
 * with the UTF-8 BOM; numbers are rounded as the screens show them. Invented drive.
 */
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { geologySections, groundTypes, parts, strokes } from '../../server/db/schema';
import { ensureDefaultCauses } from '../../server/services/downtime';
import { csvLines } from '../support/csv';
import { addMember, makeProject, makeUser, signedInAgent, uniq } from '../support/fixtures';

const app: Express = createApp();
const CAUSE = '=HYPERLINK("http://attacker.example","open")';
const NOTE = "+cmd|' /C calc'!A0";
const SHIFT = '-Night';
const PART = '@SUM(A1)';
let agent: Awaited<ReturnType<typeof signedInAgent>>;
let base: string;
let groundName: string;

beforeAll(async () => {
  const project = await makeProject(); // 6.2 m bore, Europe/Zurich
  await ensureDefaultCauses(db, project.id, null);
  const manager = await makeUser();
  await addMember(project.id, manager.id, 'site_manager');
  agent = await signedInAgent(app, manager.email);
  base = `/api/projects/${project.id}`;
  expect(
    (
      await agent.put(`${base}/downtime/settings`).send({
        shifts: [
          { name: 'Day', start: '06:00' },
          { name: SHIFT, start: '18:00' },
        ],
        labourRatePerHour: 80,
        gapMinutes: 90,
      })
    ).status,
  ).toBe(200);
  const cause = await agent.post(`${base}/downtime/causes`).send({ name: CAUSE, cutterWork: false });
  expect(cause.status, JSON.stringify(cause.body)).toBe(201);
  // 3 h in the day shift of Tue 2026-03-24 (CET, UTC+1).
  const event = await agent
    .post(`${base}/downtime/events`)
    .send({ startAt: '2026-03-24T08:00:00+01:00', endAt: '2026-03-24T11:00:00+01:00', causeId: cause.body.id, note: NOTE });
  expect(event.status, JSON.stringify(event.body)).toBe(201);
  groundName = `-${uniq('Granite')}`;
  const [ground] = await db.insert(groundTypes).values({ projectId: project.id, name: groundName }).returning();
  await db.insert(geologySections).values({ projectId: project.id, chainageFromM: 0, chainageToM: 1000, groundTypeId: ground.id });
  // 4 strokes of 2.5 m on 2026-03-24, chainage 100 → 110 m.
  await db.insert(strokes).values(
    [0, 1, 2, 3].map((i) => ({
      projectId: project.id,
      ringNumber: i + 1,
      startTime: new Date(`2026-03-24T0${i * 2}:00:00Z`),
      endTime: new Date(`2026-03-24T0${i * 2 + 1}:00:00Z`),
      chainageStartM: 100 + i * 2.5,
      chainageEndM: 102.5 + i * 2.5,
    })),
  );
  await db
    .insert(parts)
    .values({ projectId: project.id, code: 'SK-X', name: PART, kind: 'seal-kit', unitCost: '150.00', leadTimeMeanDays: 30 });
});

const period = 'from=2026-03-23&to=2026-03-29';
const get = async (path: string) => {
  const res = await agent.get(`${base}${path}`);
  expect(res.status, res.text.slice(0, 300)).toBe(200);
  expect(res.headers['content-type']).toMatch(/text\/csv/);
  return csvLines(res.text);
};

describe('formula cells are neutralised in every CSV export', () => {
  it('downtime events: cause and note', async () => {
    const lines = await get(`/downtime/events?format=csv&${period}`);
    // derived: 08:00–11:00 is 3 h, shown with 2 decimals on the events screen.
    expect(lines).toContain(
      `2026-03-24T08:00:00+01:00,2026-03-24T11:00:00+01:00,3.00,"'=HYPERLINK(""http://attacker.example"",""open"")",no,manual,,'${NOTE}`,
    );
  });

  it('downtime report by week, by shift (shift name in the header) and Pareto', async () => {
    const week = await get(`/downtime/report?format=csv&table=week&${period}`);
    expect(week[0]).toBe('cause,cutter_work,2026-W13,total');
    expect(week[1]).toBe(`"'=HYPERLINK(""http://attacker.example"",""open"")",no,3.00,3.00`);
    const shift = await get(`/downtime/report?format=csv&table=shift&${period}`);
    expect(shift[0]).toBe(`cause,cutter_work,Day,'${SHIFT},total`);
    expect(shift[1]).toBe(`"'=HYPERLINK(""http://attacker.example"",""open"")",no,3.00,0.00,3.00`);
    const pareto = await get(`/downtime/report?format=csv&table=pareto&${period}`);
    // derived: the only cause holds 100 % of the hours.
    expect(pareto[1]).toBe(`"'=HYPERLINK(""http://attacker.example"",""open"")",no,3.00,100.0,100.0`);
  });

  it('cutter cost by ground type (and by week, which has no text column)', async () => {
    const ground = await get(`/downtime/cost?format=csv&table=ground&${period}`);
    // derived by hand: face area π·6.2²/4 = 30.19 m²; 10 m of advance → 301.9 m³ (1 decimal, as on screen).
    expect(ground[1]).toMatch(new RegExp(`^'${groundName.replace(/[-+]/g, '\\$&')},10\\.0,301\\.9,`));
    const week = await get(`/downtime/cost?format=csv&table=week&${period}`);
    expect(week[1]).toMatch(/^2026-W13,10\.0,301\.9,/);
  });

  it('parts order suggestions: part name', async () => {
    const lines = await get('/parts/demand/suggestions.csv?weeks=4');
    const line = lines.find((l) => l.startsWith('SK-X,'));
    expect(line).toMatch(new RegExp(`^SK-X,'@SUM\\(A1\\),`));
  });

  it('advance log: BOM, and numbers (never neutralised) written in full for re-import', async () => {
    const lines = await get('/strokes/export.csv');
    expect(lines[0]).toBe(
      'ring,start_time,end_time,chainage_start_m,chainage_end_m,revolutions,penetration_mm_per_rev,rpm,thrust_kn,torque_knm',
    );
    // 2026-03-24T02:00Z is 03:00 at UTC+1 (CET) in Zurich.
    expect(lines[2]).toBe('2,2026-03-24T03:00:00+01:00,2026-03-24T04:00:00+01:00,102.5,105,,,,,');
  });
});
