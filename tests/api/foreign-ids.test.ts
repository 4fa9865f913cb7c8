/**
 * Objects of another project answer 404 before any other check (issue 11): deleting or changing a
 * ground type that belongs to another drive — and is in use there — must not answer 409 and so
 * reveal that it exists. Forecast overrides keyed by another drive's position, or by no position,
 * are refused with a 400 that names the key. Invented drives (makeStopsDrive).
 */
import { randomUUID } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { forecastSettings, groundTypes } from '../../server/db/schema';
import { addMember, makeUser, signedInAgent } from '../support/fixtures';
import { makeStopsDrive } from '../support/stops-fixtures';

const app: Express = createApp();
const settings = {
  classFactors: { centre: 0.8, face: 1, gauge: 1.5 },
  gehringSiteFactor: 1,
  priorStrength: 5,
  tipWidthMm: 19,
  overcutMarginMm: 20,
  windowStrokes: 30,
  overrides: {},
};

let mine: Awaited<ReturnType<typeof makeStopsDrive>>;
let theirs: Awaited<ReturnType<typeof makeStopsDrive>>;
let agent: Awaited<ReturnType<typeof signedInAgent>>;
let base: string;

beforeAll(async () => {
  mine = await makeStopsDrive();
  theirs = await makeStopsDrive(); // its ground type is used by its long section
  const planner = await makeUser();
  await addMember(mine.project.id, planner.id, 'planner');
  agent = await signedInAgent(app, planner.email);
  base = `/api/projects/${mine.project.id}`;
});

describe('another project’s ground type', () => {
  it('DELETE answers 404, not 409, although it is in use in its own project, and deletes nothing', async () => {
    const res = await agent.delete(`${base}/ground-types/${theirs.ground.id}`);
    expect(res.status).toBe(404);
    expect(await db.select().from(groundTypes).where(eq(groundTypes.id, theirs.ground.id))).toHaveLength(1);
  });

  it('PATCH answers 404 and changes nothing', async () => {
    const res = await agent.patch(`${base}/ground-types/${theirs.ground.id}`).send({ name: 'Taken over' });
    expect(res.status).toBe(404);
    const [g] = await db.select().from(groundTypes).where(eq(groundTypes.id, theirs.ground.id));
    expect(g.name).toBe(theirs.ground.name);
  });

  it('its own ground type in use still answers 409', async () => {
    const res = await agent.delete(`${base}/ground-types/${mine.ground.id}`);
    expect(res.status).toBe(409);
  });
});

describe('forecast overrides', () => {
  const saved = async () =>
    (
      await db
        .select()
        .from(forecastSettings)
        .where(and(eq(forecastSettings.projectId, mine.project.id)))
    )[0]?.overrides ?? null;

  it('refuses a key that is another drive’s position, naming the key, and saves nothing', async () => {
    const before = await saved();
    const foreign = theirs.drive.positions[0].id;
    const res = await agent.put(`${base}/forecast/settings`).send({ ...settings, overrides: { [foreign]: { advanceMPerDay: 12 } } });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain(foreign);
    expect(await saved()).toEqual(before);
  });

  it('refuses a key that is no position at all, and an empty key', async () => {
    const unknown = randomUUID();
    const a = await agent.put(`${base}/forecast/settings`).send({ ...settings, overrides: { [unknown]: { advanceMPerDay: 12 } } });
    expect(a.status).toBe(400);
    expect(a.body.error.message).toContain(unknown);
    const b = await agent.put(`${base}/forecast/settings`).send({ ...settings, overrides: { '': { advanceMPerDay: 12 } } });
    expect(b.status).toBe(400);
    expect(b.body.error.message).toMatch(/no cutter position/);
    const c = await agent.put(`${base}/forecast/settings`).send({ ...settings, overrides: { 'not-a-position': { advanceMPerDay: 12 } } });
    expect(c.status).toBe(400);
    expect(c.body.error.message).toContain('not-a-position');
  });

  it('accepts a key that is one of this drive’s positions', async () => {
    const own = mine.drive.positions[0].id;
    const res = await agent.put(`${base}/forecast/settings`).send({ ...settings, overrides: { [own]: { advanceMPerDay: 12 } } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(await saved()).toEqual({ [own]: { advanceMPerDay: 12 } });
  });
});
