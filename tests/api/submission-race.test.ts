/**
 * Two identical submissions arriving at the same moment (two tabs, a retry racing the original)
 * are both answered as stored, with the same entry, and stored once (DEVELOPERS.md, decision 14).
 */
import { randomUUID } from 'node:crypto';
import { and, eq, inArray } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { cutters, entrySubmissions, fittings, inspectionEntries } from '../../server/db/schema';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';
import { makeCutterhead } from '../support/drive-fixtures';

const app = createApp();
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

let projectId: string;
let roundId: string;
let tabs: [Agent, Agent];
let drive: Awaited<ReturnType<typeof makeCutterhead>>;

beforeAll(async () => {
  const project = await makeProject();
  projectId = project.id;
  drive = await makeCutterhead(projectId, 4);
  const u = await makeUser();
  await addMember(projectId, u.id, 'fitter');
  // Two tabs of one fitter: two sessions, two connections.
  tabs = [await signedInAgent(app, u.email), await signedInAgent(app, u.email)];
  const res = await tabs[0]
    .post(`/api/projects/${projectId}/rounds`)
    .send({ startedAt: '2026-11-02T08:00:00Z', chainageM: 400, ringNumber: 267, crew: 'A shift' });
  expect(res.status).toBe(201);
  roundId = res.body.id;
});

const entry = (positionId: string, wearMm: number) => ({
  clientKey: randomUUID(),
  positionId,
  wearMm,
  conditions: ['even_wear'],
  action: 'none',
});

describe('identical submissions at the same moment', () => {
  it('both succeed with the same stored entry; one row is stored', async () => {
    // Several rounds of the race on different positions: a single pair may happen not to overlap.
    const bodies = drive.positions.map((p, i) => entry(p.id, 3 + i));
    const answers = await Promise.all(
      bodies.flatMap((body) => tabs.map((tab) => tab.post(`/api/projects/${projectId}/rounds/${roundId}/entries`).send(body))),
    );
    for (let i = 0; i < bodies.length; i++) {
      const pair = answers.slice(2 * i, 2 * i + 2);
      // One is the original (201 created), the other its replay (200) — never a refusal.
      expect(pair.map((r) => r.status).sort()).toEqual([200, 201]);
      expect(pair[0].body.entry.id).toBe(pair[1].body.entry.id);
      expect(pair.filter((r) => r.body.replayed)).toHaveLength(1);
    }
    const keys = bodies.map((b) => b.clientKey);
    expect(await db.select().from(inspectionEntries).where(inArray(inspectionEntries.clientKey, keys))).toHaveLength(bodies.length);
    expect(await db.select().from(entrySubmissions).where(inArray(entrySubmissions.clientKey, keys))).toHaveLength(bodies.length);
  });

  it('a burst of four copies of one change stores one change', async () => {
    const position = drive.positions[0];
    const body = {
      clientKey: randomUUID(),
      positionId: position.id,
      wearMm: 14,
      conditions: ['even_wear'],
      action: 'changed',
      changeReason: 'worn',
      fitted: { serial: `RACE-${randomUUID().slice(0, 6)}`, isNew: true },
    };
    const answers = await Promise.all(
      [0, 1, 2, 3].map((i) => tabs[i % 2].post(`/api/projects/${projectId}/rounds/${roundId}/entries`).send(body)),
    );
    expect(answers.map((r) => r.status).sort()).toEqual([200, 200, 200, 201]);
    expect(new Set(answers.map((r) => r.body.entry.id)).size).toBe(1);
    // It edits the position's entry from the first test: one submission row, one new serial, one open period.
    expect(await db.select().from(entrySubmissions).where(eq(entrySubmissions.clientKey, body.clientKey))).toHaveLength(1);
    const [fitted] = await db
      .select()
      .from(cutters)
      .where(and(eq(cutters.projectId, projectId), eq(cutters.serial, body.fitted.serial)));
    expect(await db.select().from(fittings).where(eq(fittings.cutterId, fitted.id))).toHaveLength(1);
  });
});
