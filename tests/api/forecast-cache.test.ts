/**
 * The forecast is computed once per change of the drive's data (DEVELOPERS.md, decision 38): a
 * second request is served from the cache with the same ETag (304 when the client has it), any
 * write to a forecast input — through the API or straight in SQL — raises the data version in the
 * same transaction and makes the next request compute again, and a write to another drive leaves
 * this one's cache alone. Invented drive (makeStopsDrive).
 */
import { eq, sql } from 'drizzle-orm';
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { forecastCache, strokes } from '../../server/db/schema';
import { cachedForecast, forgetForecastCopies } from '../../server/services/forecast-cache';
import { addMember, makeUser, signedInAgent } from '../support/fixtures';
import { makeStopsDrive } from '../support/stops-fixtures';

const app: Express = createApp();

async function versionOf(projectId: string): Promise<number> {
  const { rows } = await db.execute<{ version: number }>(
    sql`select coalesce((select version from drive_data_versions where project_id = ${projectId}), 0) as version`,
  );
  return rows[0].version;
}

describe('forecast cache', () => {
  let agent: Awaited<ReturnType<typeof signedInAgent>>;
  let drive: Awaited<ReturnType<typeof makeStopsDrive>>;
  let other: Awaited<ReturnType<typeof makeStopsDrive>>;
  let base: string;

  beforeAll(async () => {
    drive = await makeStopsDrive();
    other = await makeStopsDrive();
    const planner = await makeUser();
    await addMember(drive.project.id, planner.id, 'planner');
    agent = await signedInAgent(app, planner.email);
    base = `/api/projects/${drive.project.id}`;
  });

  it('computes once, then answers from the cache with the same ETag, and 304 when the client has it', async () => {
    const first = await agent.get(`${base}/forecast`);
    expect(first.status).toBe(200);
    expect(first.body.positions.length).toBe(3);
    const etag = first.headers.etag;
    expect(etag).toMatch(/^"f-/);
    const [row] = await db.select().from(forecastCache).where(eq(forecastCache.projectId, drive.project.id));
    expect(row.dataVersion).toBe(await versionOf(drive.project.id));
    const second = await agent.get(`${base}/forecast`);
    expect(second.headers.etag).toBe(etag);
    expect(second.body).toEqual(first.body);
    const again = await cachedForecast(drive.project.id);
    expect(again.computed).toBe(false);
    const notModified = await agent.get(`${base}/forecast`).set('If-None-Match', etag);
    expect(notModified.status).toBe(304);
  });

  it('keeps one position’s explanation apart and adds it only when asked', async () => {
    const all = await agent.get(`${base}/forecast`);
    const id = all.body.positions[0].position.positionId as string;
    expect(all.body.positions[0].explanation).toBeUndefined();
    const one = await agent.get(`${base}/forecast`).query({ positionId: id });
    expect(one.status).toBe(200);
    expect(one.body.positions.find((p: { position: { positionId: string } }) => p.position.positionId === id).explanation).toBeTruthy();
    expect(one.headers.etag).not.toBe(all.headers.etag);
  });

  it('a write to a forecast input raises the version in its own transaction and the next answer is new', async () => {
    const before = await agent.get(`${base}/forecast`);
    const v0 = await versionOf(drive.project.id);
    const otherV0 = await versionOf(other.project.id);
    // A write straight in SQL, as a repair script would do: the trigger still sees it.
    await db.insert(strokes).values({
      projectId: drive.project.id,
      ringNumber: 134,
      startTime: new Date(Date.now() - 3600_000),
      endTime: new Date(Date.now() - 1800_000),
      chainageStartM: 200,
      chainageEndM: 201.5,
      revolutions: 187.5,
      penetrationMmPerRev: 8,
    });
    expect(await versionOf(drive.project.id)).toBe(v0 + 1);
    expect(await versionOf(other.project.id)).toBe(otherV0);
    const after = await agent.get(`${base}/forecast`).set('If-None-Match', before.headers.etag);
    expect(after.status).toBe(200);
    expect(after.headers.etag).not.toBe(before.headers.etag);
    // derived: the machine moved 1.5 m to ring 134, so the forecast now starts there.
    expect(after.body.currentChainageM).toBe(201.5);
    expect(after.body.currentRingNumber).toBe(134);
  });

  it('a rolled-back write leaves the version and the cache as they were', async () => {
    const v0 = await versionOf(drive.project.id);
    await expect(
      db.transaction(async (tx) => {
        await tx.update(strokes).set({ penetrationMmPerRev: 9 }).where(eq(strokes.projectId, drive.project.id));
        throw new Error('rolled back on purpose');
      }),
    ).rejects.toThrow('rolled back on purpose');
    expect(await versionOf(drive.project.id)).toBe(v0);
    expect((await cachedForecast(drive.project.id)).computed).toBe(false);
  });

  it('a settings change through the API makes the next answer new', async () => {
    const before = await agent.get(`${base}/forecast`);
    const settings = (await agent.get(`${base}/forecast/settings`)).body;
    const put = await agent.put(`${base}/forecast/settings`).send({
      classFactors: settings.classFactors,
      gehringSiteFactor: settings.gehringSiteFactor * 2,
      priorStrength: settings.priorStrength,
      tipWidthMm: settings.tipWidthMm,
      overcutMarginMm: settings.overcutMarginMm,
      windowStrokes: settings.windowStrokes,
      overrides: settings.overrides,
    });
    expect(put.status, JSON.stringify(put.body)).toBe(200);
    const after = await agent.get(`${base}/forecast`);
    expect(after.headers.etag).not.toBe(before.headers.etag);
    // derived: a prior twice as steep (no inspections, so the rate is the prior) wears the discs
    // out sooner, so the most urgent position has less distance left.
    expect(after.body.positions[0].p90.remainingM).toBeLessThan(before.body.positions[0].p90.remainingM);
  });

  it('two requests at the same moment compute once', async () => {
    await db.execute(sql`update forecast_cache set computed_at = now() - interval '2 hours' where project_id = ${drive.project.id}`);
    const answers = await Promise.all([
      cachedForecast(drive.project.id),
      cachedForecast(drive.project.id),
      cachedForecast(drive.project.id),
    ]);
    expect(answers.filter((a) => a.computed).length).toBe(1);
    expect(new Set(answers.map((a) => a.etag)).size).toBe(1);
  });

  it('an instance sends its own copy while the stored row is unchanged, and the stored body again once the row changes', async () => {
    forgetForecastCopies();
    const first = await cachedForecast(drive.project.id); // reads the stored body and keeps a copy
    expect(first.computed).toBe(false);
    expect(first.bytes.toString('utf8')).toBe(first.body);
    // The stored body is changed behind the row's back (same version, code and time): the copy is
    // what is sent, so the body did not cross from PostgreSQL for this request.
    const marker = JSON.stringify({ marker: 'stored body, changed in SQL' });
    await db.execute(sql`update forecast_cache set body = ${marker} where project_id = ${drive.project.id}`);
    const second = await cachedForecast(drive.project.id);
    expect(second.body).toBe(first.body);
    expect(second.etag).toBe(first.etag);
    // The row itself changes (another instance computed it a millisecond later): its body is read.
    await db.execute(
      sql`update forecast_cache set computed_at = computed_at + interval '1 millisecond' where project_id = ${drive.project.id}`,
    );
    const third = await cachedForecast(drive.project.id);
    expect(third.computed).toBe(false);
    expect(third.body).toBe(marker);
    expect(third.bytes.toString('utf8')).toBe(marker);
    expect(third.etag).not.toBe(first.etag);
    // A write to a forecast input: the copy is not sent, the forecast is computed again.
    await db.execute(sql`update strokes set revolutions = revolutions where project_id = ${drive.project.id}`);
    const fourth = await cachedForecast(drive.project.id);
    expect(fourth.computed).toBe(true);
    expect(JSON.parse(fourth.body).positions.length).toBe(3);
    // And over HTTP the answer is the new computation's, byte for byte.
    const answer = await agent.get(`${base}/forecast`);
    expect(answer.status).toBe(200);
    expect(answer.text).toBe(fourth.body);
    expect(answer.headers['content-type']).toMatch(/^application\/json/);
  });
});
