/**
 * GET /api/projects/:projectId/positions/history?last=N (decision 42): every position's recent
 * history in one read, kept on the fitter's tablet so a position never opened online still shows
 * its history offline. Checked against the one-position route, which answers the whole history.
 */
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { auditLog } from '../../server/db/schema';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';
import { makeRoundSetup } from '../support/rounds-fixtures';

const app = createApp();
const DAY_MS = 24 * 3600 * 1000;

let projectId: string;
let fitter: Awaited<ReturnType<typeof signedInAgent>>;
let setup: Awaited<ReturnType<typeof makeRoundSetup>>;

beforeAll(async () => {
  const project = await makeProject();
  projectId = project.id;
  const user = await makeUser();
  await addMember(projectId, user.id, 'fitter');
  // 3 positions, each measured at 8 mm two days ago (tests/support/rounds-fixtures.ts).
  setup = await makeRoundSetup(projectId, user.id, { count: 3, earlierWearMm: 8 });
  fitter = await signedInAgent(app, user.email);
  // Two later rounds that measure position 1 only: 9 mm yesterday, 10 mm today — invented.
  for (const [daysAgo, wearMm] of [
    [1, 9],
    [0, 10],
  ]) {
    const round = await fitter
      .post(`/api/projects/${projectId}/rounds`)
      .send({ startedAt: new Date(Date.now() - daysAgo * DAY_MS - 60_000).toISOString(), chainageM: 200 - daysAgo, crew: 'Day crew' });
    expect(round.status).toBe(201);
    const entry = await fitter
      .post(`/api/projects/${projectId}/rounds/${round.body.id}/entries`)
      .send({ clientKey: crypto.randomUUID(), positionId: setup.positions[0].id, wearMm });
    expect(entry.status).toBeLessThan(300);
    expect((await fitter.post(`/api/projects/${projectId}/rounds/${round.body.id}/close`)).status).toBe(200);
  }
});

describe('GET …/positions/history', () => {
  it('answers every position as GET …/positions/:id does when ?last covers the whole history', async () => {
    const res = await fitter.get(`/api/projects/${projectId}/positions/history?last=200`);
    expect(res.status).toBe(200);
    expect(res.body.last).toBe(200);
    expect(Number.isNaN(Date.parse(res.body.readAt))).toBe(false);
    // derived: the fixture's layout numbers 1..3, answered in position order.
    expect(res.body.positions.map((p: { position: { number: number } }) => p.position.number)).toEqual([1, 2, 3]);
    for (const p of res.body.positions) {
      const one = await fitter.get(`/api/projects/${projectId}/positions/${p.position.id}`);
      expect(one.status).toBe(200);
      expect(p.olderMeasurements).toBe(0);
      const { olderMeasurements: _older, ...detail } = p;
      expect(detail).toEqual(one.body);
    }
    // derived: position 1 was measured in three rounds (8, 9, 10 mm, oldest first), the others once.
    expect(res.body.positions[0].measurements.map((m: { wearMm: number }) => m.wearMm)).toEqual([8, 9, 10]);
    expect(res.body.positions[1].measurements).toHaveLength(1);
  });

  it('keeps only the newest N measurements per position and says how many older ones it left out', async () => {
    const res = await fitter.get(`/api/projects/${projectId}/positions/history?last=2`);
    expect(res.status).toBe(200);
    // derived: of 8, 9, 10 mm the newest two are 9 and 10; one older measurement is left out.
    expect(res.body.positions[0].measurements.map((m: { wearMm: number }) => m.wearMm)).toEqual([9, 10]);
    expect(res.body.positions[0].olderMeasurements).toBe(1);
    expect(res.body.positions[2].measurements.map((m: { wearMm: number }) => m.wearMm)).toEqual([8]);
    expect(res.body.positions[2].olderMeasurements).toBe(0);
    // The fitted periods are the whole history (one serial each since 30 days ago).
    expect(res.body.positions[0].periods.map((p: { serial: string }) => p.serial)).toEqual([setup.fitted[0].serial]);
  });

  it.each([
    ['', /must be a whole number/],
    ['?last=0', /at least 1/],
    ['?last=201', /at most 200/],
    ['?last=2.5', /whole number/],
    ['?last=many', /whole number/],
  ])('refuses %s with a 400 that names ?last=, and writes nothing', async (query, message) => {
    const before = await db.select({ id: auditLog.id }).from(auditLog).where(eq(auditLog.projectId, projectId));
    const res = await fitter.get(`/api/projects/${projectId}/positions/history${query}`);
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body.error)).toMatch(/\?last=/);
    expect(JSON.stringify(res.body.error)).toMatch(message);
    expect(await db.select({ id: auditLog.id }).from(auditLog).where(eq(auditLog.projectId, projectId))).toHaveLength(before.length);
  });
});
