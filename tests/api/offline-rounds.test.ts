/** Rounds and entries made on a tablet with no network and sent later (issue 13, decision 42). */
import { and, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { auditLog, inspectionEntries, inspectionRounds } from '../../server/db/schema';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';
import { makeRoundSetup } from '../support/rounds-fixtures';

const app = createApp();

async function fitterOnDrive() {
  const project = await makeProject();
  const fitters = [await makeUser(), await makeUser()];
  for (const f of fitters) await addMember(project.id, f.id, 'fitter');
  const setup = await makeRoundSetup(project.id, fitters[0].id, { count: 3, inStore: 1 });
  return { project, fitters, setup, agents: await Promise.all(fitters.map((f) => signedInAgent(app, f.email))) };
}

describe('a round started offline', () => {
  it('is created with the id, time and chainage the fitter gave, and a resend answers 200 with the same round', async () => {
    const { project, agents } = await fitterOnDrive();
    const id = crypto.randomUUID();
    const body = { id, startedAt: '2026-09-14T05:40:00.000Z', chainageM: 2417.3, ringNumber: 1611, crew: 'Crew C' };
    const first = await agents[0].post(`/api/projects/${project.id}/rounds`).send(body);
    expect(first.status).toBe(201);
    expect(first.body).toMatchObject({ id, chainageM: 2417.3, ringNumber: 1611 });
    // derived: the same instant the fitter typed, whenever it arrives.
    expect(new Date(first.body.startedAt).toISOString()).toBe('2026-09-14T05:40:00.000Z');
    const again = await agents[0].post(`/api/projects/${project.id}/rounds`).send(body);
    expect(again.status).toBe(200);
    expect(again.body.id).toBe(id);
    expect(await db.select().from(inspectionRounds).where(eq(inspectionRounds.id, id))).toHaveLength(1);
  });

  it('refuses an id that is not a UUID, and an id already used on another drive, changing nothing', async () => {
    const { project, agents } = await fitterOnDrive();
    const bad = await agents[0]
      .post(`/api/projects/${project.id}/rounds`)
      .send({ id: 'tablet-1', startedAt: '2026-09-14T05:40:00Z', chainageM: 10 });
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toContain('The round id must be a UUID');

    const other = await fitterOnDrive();
    const id = crypto.randomUUID();
    const body = { id, startedAt: '2026-09-14T05:40:00Z', chainageM: 10 };
    expect((await other.agents[0].post(`/api/projects/${other.project.id}/rounds`).send(body)).status).toBe(201);
    const clash = await agents[0].post(`/api/projects/${project.id}/rounds`).send(body);
    expect(clash.status).toBe(409);
    expect(await db.select().from(inspectionRounds).where(eq(inspectionRounds.projectId, project.id))).toHaveLength(1); // the fixture's earlier round
  });
});

describe('two tablets record the same position offline', () => {
  const entry = (positionId: string, wearMm: number, recordedAt: string) => ({
    clientKey: crypto.randomUUID(),
    positionId,
    wearMm,
    recordedAt,
  });

  it.each([
    ['the later-recorded arrives first', true],
    ['the earlier-recorded arrives first', false],
  ])('%s: the later-recorded wins, the earlier stays in the audit trail', async (_name, laterFirst) => {
    const { project, setup, agents, fitters } = await fitterOnDrive();
    const round = await agents[0].post(`/api/projects/${project.id}/rounds`).send({ startedAt: new Date().toISOString(), chainageM: 300 });
    const pos = setup.positions[1];
    // derived: 09:05 is later than 09:01, so fitter B's 11.5 mm is the value that stands.
    const early = entry(pos.id, 10.5, '2026-09-14T09:01:00.000Z');
    const late = entry(pos.id, 11.5, '2026-09-14T09:05:00.000Z');
    const url = `/api/projects/${project.id}/rounds/${round.body.id}/entries`;
    const sends = laterFirst
      ? [() => agents[1].post(url).send(late), () => agents[0].post(url).send(early)]
      : [() => agents[0].post(url).send(early), () => agents[1].post(url).send(late)];
    const answers = [];
    for (const s of sends) answers.push(await s());
    for (const a of answers) expect(a.status).toBe(201);
    const earlyAnswer = laterFirst ? answers[1] : answers[0];
    expect(earlyAnswer.body.overtaken).toBe(laterFirst);

    const [stored] = await db
      .select()
      .from(inspectionEntries)
      .where(and(eq(inspectionEntries.roundId, round.body.id), eq(inspectionEntries.positionId, pos.id)));
    expect(stored.wearMm).toBe(11.5);
    expect(stored.recordedBy).toBe(fitters[1].id);

    const trail = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'inspection_entry'), eq(auditLog.entityId, stored.id)));
    const wears = trail.flatMap((a) => [a.before, a.after]).map((v) => (v as { wearMm?: number } | null)?.wearMm);
    expect(wears).toContain(10.5);
    expect(wears).toContain(11.5);
    // Both arrival orders leave one overtaken event naming fitter A's entry as the one overtaken.
    const overtakenEvents = trail.filter((a) => a.action === 'overtaken');
    expect(overtakenEvents).toHaveLength(1);
    expect((overtakenEvents[0].before as { recordedBy: string; wearMm: number }).recordedBy).toBe(fitters[0].id);
    expect((overtakenEvents[0].before as { wearMm: number }).wearMm).toBe(10.5);

    // Fitter A is told, whichever arrived first: by fitter B, for this round and position.
    const mine = await agents[0].get(`/api/projects/${project.id}/rounds/overtaken`);
    expect(mine.status).toBe(200);
    expect(mine.body).toHaveLength(1);
    expect(mine.body[0]).toMatchObject({ roundId: round.body.id, positionId: pos.id, byName: fitters[1].name });
    // Fitter B's entry stands: nothing of theirs was overtaken.
    const theirs = await agents[1].get(`/api/projects/${project.id}/rounds/overtaken`);
    expect(theirs.body).toHaveLength(0);

    // The overtaken entry sent again (the tablet did not get the answer) is a replay: nothing changes.
    const replay = await agents[0].post(url).send(early);
    expect(replay.status).toBe(200);
    const [after] = await db.select().from(inspectionEntries).where(eq(inspectionEntries.id, stored.id));
    expect(after.wearMm).toBe(11.5);
  });
});
