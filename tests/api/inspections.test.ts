import { randomUUID } from 'node:crypto';
import { and, eq, isNull } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { auditLog, cutterEvents, cutters, fittings, inspectionEntries, photos } from '../../server/db/schema';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';
import { makeCutterhead } from '../support/drive-fixtures';

const app = createApp();
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

// The smallest valid PNG: 1×1 pixel (PNG signature per ISO/IEC 15948 / RFC 2083; bytes from memory, checked by the server's own detection).
const PNG_1x1 = Buffer.from(
  '89504e470d0a1a0a0000000d4948445200000001000000010806000000' +
    '1f15c4890000000d49444154789c6360000002000100' +
    '05fe02fea7d6a3a30000000049454e44ae426082',
  'hex',
);

let projectId: string;
let fitter: Agent;
let drive: Awaited<ReturnType<typeof makeCutterhead>>;
let roundId: string;

const entry = (over: Record<string, unknown>) => ({ clientKey: randomUUID(), wearMm: null, conditions: [], action: 'none', ...over });

async function newRound(agent: Agent, startedAt: string, chainageM: number) {
  const res = await agent
    .post(`/api/projects/${projectId}/rounds`)
    .send({ startedAt, chainageM, ringNumber: Math.round(chainageM / 1.5), crew: 'A shift' });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

beforeAll(async () => {
  const project = await makeProject();
  projectId = project.id;
  drive = await makeCutterhead(projectId);
  const u = await makeUser();
  await addMember(projectId, u.id, 'fitter');
  fitter = await signedInAgent(app, u.email);
  roundId = await newRound(fitter, '2026-11-02T08:00:00Z', 400);
});

describe('inspection entries', () => {
  it('stores a measured position and flags wear over the limit without refusing it', async () => {
    const gauge = drive.positions[3]; // limit 12 mm
    const res = await fitter
      .post(`/api/projects/${projectId}/rounds/${roundId}/entries`)
      .send(entry({ positionId: gauge.id, wearMm: 13.5, conditions: ['even_wear'] }));
    expect(res.status).toBe(201);
    expect(res.body.overLimit).toBe(true);
    expect(res.body.needsChange).toBe(true);
  });

  it('a queued entry sent twice is stored once', async () => {
    const body = entry({ positionId: drive.positions[1].id, wearMm: 4.2 });
    const first = await fitter.post(`/api/projects/${projectId}/rounds/${roundId}/entries`).send(body);
    const again = await fitter.post(`/api/projects/${projectId}/rounds/${roundId}/entries`).send(body);
    expect(first.status).toBe(201);
    expect(again.status).toBe(200);
    expect(again.body.replayed).toBe(true);
    expect(again.body.entry.id).toBe(first.body.entry.id);
    const rows = await db.select().from(inspectionEntries).where(eq(inspectionEntries.clientKey, body.clientKey));
    expect(rows).toHaveLength(1);
  });

  it('refuses negative wear, a second decimal and an unknown position, storing nothing', async () => {
    const before = (await db.select().from(inspectionEntries).where(eq(inspectionEntries.projectId, projectId))).length;
    const negative = await fitter
      .post(`/api/projects/${projectId}/rounds/${roundId}/entries`)
      .send(entry({ positionId: drive.positions[0].id, wearMm: -1 }));
    expect(negative.status).toBe(400);
    expect(negative.body.error.issues[0]).toMatchObject({ path: 'wearMm', message: 'Wear cannot be negative.' });
    const decimals = await fitter
      .post(`/api/projects/${projectId}/rounds/${roundId}/entries`)
      .send(entry({ positionId: drive.positions[0].id, wearMm: 3.25 }));
    expect(decimals.status).toBe(400);
    const unknown = await fitter
      .post(`/api/projects/${projectId}/rounds/${roundId}/entries`)
      .send(entry({ positionId: randomUUID(), wearMm: 3 }));
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.message).toMatch(/position/);
    expect((await db.select().from(inspectionEntries).where(eq(inspectionEntries.projectId, projectId))).length).toBe(before);
  });

  it('wear of the same disc may not fall without a change, unless confirmed as re-measured (audited)', async () => {
    const face = drive.positions[2];
    await fitter
      .post(`/api/projects/${projectId}/rounds/${roundId}/entries`)
      .send(entry({ positionId: face.id, wearMm: 9.0 }))
      .expect(201);
    const later = await newRound(fitter, '2026-11-09T08:00:00Z', 520);
    const fell = await fitter.post(`/api/projects/${projectId}/rounds/${later}/entries`).send(entry({ positionId: face.id, wearMm: 7.5 }));
    expect(fell.status).toBe(409);
    expect(fell.body.error.message).toMatch(/less than the 9 mm measured on 2026-11-02/);
    expect(fell.body.error.issues[0].path).toBe('wearMm');
    const confirmed = await fitter
      .post(`/api/projects/${projectId}/rounds/${later}/entries`)
      .send(entry({ positionId: face.id, wearMm: 7.5, remeasured: true }));
    expect(confirmed.status).toBe(201);
    const trail = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.projectId, projectId), eq(auditLog.action, 'remeasured_correction')));
    expect(trail).toHaveLength(1);
    expect(trail[0].before).toMatchObject({ lastWearMm: 9 });
  });

  it('a change closes the removed serial’s period and opens the fitted one’s', async () => {
    const centre = drive.positions[0];
    const removed = drive.fitted[0];
    const fitted = drive.store[0];
    const res = await fitter.post(`/api/projects/${projectId}/rounds/${roundId}/entries`).send(
      entry({
        positionId: centre.id,
        wearMm: 21.0,
        conditions: ['even_wear'],
        action: 'changed',
        removedSerial: removed.serial,
        fitted: { serial: fitted.serial },
        changeReason: 'Worn to limit',
      }),
    );
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const periods = await db.select().from(fittings).where(eq(fittings.positionId, centre.id));
    expect(periods).toHaveLength(2);
    const closed = periods.find((p) => p.cutterId === removed.id)!;
    expect(closed.removedAt?.toISOString()).toBe('2026-11-02T08:00:00.000Z');
    expect(closed.removedChainageM).toBe(400);
    expect(periods.find((p) => p.cutterId === fitted.id)!.removedAt).toBeNull();
    const [r] = await db.select().from(cutters).where(eq(cutters.id, removed.id));
    const [f] = await db.select().from(cutters).where(eq(cutters.id, fitted.id));
    expect([r.status, f.status]).toEqual(['workshop', 'fitted']);
    const events = await db.select().from(cutterEvents).where(eq(cutterEvents.cutterId, removed.id));
    expect(events.map((e) => e.kind)).toContain('removed');
  });

  it('a serial is never fitted in two places at once', async () => {
    const other = drive.positions[1];
    const alreadyFitted = drive.store[0]; // fitted at position 1 by the test above
    const res = await fitter.post(`/api/projects/${projectId}/rounds/${roundId}/entries`).send(
      entry({
        positionId: other.id,
        wearMm: null,
        action: 'changed',
        fitted: { serial: alreadyFitted.serial },
        changeReason: 'Seal leaking',
      }),
    );
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/already fitted at position 1/);
    // Named on the fitted serial, so the round screen shows it beside the cutter picker.
    expect(res.body.error.issues).toEqual([{ path: 'fitted.serial', message: expect.stringMatching(/already fitted at position 1/) }]);
    const open = await db
      .select()
      .from(fittings)
      .where(and(eq(fittings.cutterId, alreadyFitted.id), isNull(fittings.removedAt)));
    expect(open).toHaveLength(1);
  });

  it('a wrong removed serial or an unknown fitted serial is refused with the serial named', async () => {
    const pos = drive.positions[2];
    const wrong = await fitter.post(`/api/projects/${projectId}/rounds/${roundId}/entries`).send(
      entry({
        positionId: pos.id,
        action: 'changed',
        removedSerial: 'NOT-ON-HUB',
        fitted: { serial: drive.store[1].serial },
        changeReason: 'x',
      }),
    );
    expect(wrong.status).toBe(409);
    expect(wrong.body.error.message).toMatch(/not NOT-ON-HUB/);
    expect(wrong.body.error.issues).toEqual([{ path: 'removedSerial', message: expect.stringMatching(/not NOT-ON-HUB/) }]);
    const unknown = await fitter
      .post(`/api/projects/${projectId}/rounds/${roundId}/entries`)
      .send(entry({ positionId: pos.id, action: 'changed', fitted: { serial: 'NEVER-SEEN-1' }, changeReason: 'x' }));
    expect(unknown.status).toBe(404);
    const asNew = await fitter.post(`/api/projects/${projectId}/rounds/${roundId}/entries`).send(
      entry({
        positionId: pos.id,
        wearMm: 10.0,
        action: 'changed',
        fitted: { serial: 'NEW-AT-FACE-1', isNew: true },
        changeReason: 'Chipped ring',
        conditions: ['chipped_ring'],
      }),
    );
    expect(asNew.status, JSON.stringify(asNew.body)).toBe(201);
  });

  it('the rounds list counts each round’s entries and changes', async () => {
    const list = await fitter.get(`/api/projects/${projectId}/rounds`);
    const first = list.body.find((r: { id: string }) => r.id === roundId);
    const stored = await db.select().from(inspectionEntries).where(eq(inspectionEntries.roundId, roundId));
    expect(first.entryCount).toBe(stored.length);
    expect(first.changeCount).toBe(stored.filter((e) => e.action === 'changed').length);
    expect(first.changeCount).toBeGreaterThan(0);
  });

  it('editing an entry after the fact keeps the previous values in the audit log', async () => {
    const pos = drive.positions[1];
    const r = await newRound(fitter, '2026-11-16T08:00:00Z', 640);
    await fitter
      .post(`/api/projects/${projectId}/rounds/${r}/entries`)
      .send(entry({ positionId: pos.id, wearMm: 6.0, note: 'first look' }))
      .expect(201);
    const edit = await fitter
      .post(`/api/projects/${projectId}/rounds/${r}/entries`)
      .send(entry({ positionId: pos.id, wearMm: 6.5, note: 'measured again with gauge' }));
    expect(edit.status).toBe(201);
    const history = await fitter.get(`/api/projects/${projectId}/rounds/${r}/history`);
    const update = history.body.find((h: { action: string }) => h.action === 'update');
    expect(update.before).toMatchObject({ wearMm: 6, note: 'first look' });
    expect(update.after).toMatchObject({ wearMm: 6.5, note: 'measured again with gauge' });
    expect(update.userName).toBeTruthy();
  });
});

describe('photos', () => {
  let entryKey: string;
  beforeAll(async () => {
    entryKey = randomUUID();
    // An edit of position 2's entry is a new submission; its key names the same entry.
    const res = await fitter
      .post(`/api/projects/${projectId}/rounds/${roundId}/entries`)
      .send({ clientKey: entryKey, positionId: drive.positions[1].id, wearMm: 4.4, conditions: ['chipped_ring'] });
    expect(res.status).toBe(201);
  });
  const countPhotos = async () => (await db.select().from(photos).where(eq(photos.projectId, projectId))).length;

  it('accepts a PNG by its bytes, serves it to members only, and stores a resend once', async () => {
    const key = randomUUID();
    const up = await fitter
      .post(`/api/projects/${projectId}/photos`)
      .field('entryClientKey', entryKey)
      .field('clientKey', key)
      .attach('photo', PNG_1x1, { filename: 'chip.png', contentType: 'image/png' });
    expect(up.status, JSON.stringify(up.body)).toBe(201);
    expect(up.body.storedName).not.toContain('chip');
    const again = await fitter
      .post(`/api/projects/${projectId}/photos`)
      .field('entryClientKey', entryKey)
      .field('clientKey', key)
      .attach('photo', PNG_1x1, 'chip.png');
    expect(again.status).toBe(200);
    const got = await fitter.get(`/api/projects/${projectId}/photos/${up.body.id}`);
    expect(got.status).toBe(200);
    expect(got.headers['content-type']).toBe('image/png');
    // A member of another project gets 404, not the photo.
    const outsider = await makeUser();
    const other = await makeProject();
    await addMember(other.id, outsider.id, 'fitter');
    const stranger = await signedInAgent(app, outsider.email);
    expect((await stranger.get(`/api/projects/${projectId}/photos/${up.body.id}`)).status).toBe(404);
    expect((await stranger.get(`/api/projects/${other.id}/photos/${up.body.id}`)).status).toBe(404);
  });

  it('refuses a text file renamed to .jpg, storing nothing', async () => {
    const before = await countPhotos();
    const res = await fitter
      .post(`/api/projects/${projectId}/photos`)
      .field('entryClientKey', entryKey)
      .field('clientKey', randomUUID())
      .attach('photo', Buffer.from('this is not a picture, just text\n'.repeat(20)), { filename: 'disc.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(415);
    expect(res.body.error.message).toMatch(/JPEG, PNG or WebP/);
    expect(await countPhotos()).toBe(before);
  });

  it('refuses a photo over 10 MB, storing nothing', async () => {
    const before = await countPhotos();
    const big = Buffer.concat([PNG_1x1, Buffer.alloc(10 * 1024 * 1024)]);
    const res = await fitter
      .post(`/api/projects/${projectId}/photos`)
      .field('entryClientKey', entryKey)
      .field('clientKey', randomUUID())
      .attach('photo', big, 'big.png');
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/10 MB/);
    expect(await countPhotos()).toBe(before);
  });

  it('answers 400, not 500, to a multipart body cut off in the middle (no closing boundary), storing nothing', async () => {
    const before = await countPhotos();
    const boundary = 'kerfwise-cut-boundary';
    // RFC 7578 multipart/form-data whose file part stops mid-way: the closing --boundary-- never comes.
    const body = Buffer.concat([
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="entryClientKey"\r\n\r\n${entryKey}\r\n`),
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="clientKey"\r\n\r\n${randomUUID()}\r\n`),
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="photo"; filename="cut.png"\r\nContent-Type: image/png\r\n\r\n`),
      PNG_1x1.subarray(0, 20),
    ]);
    const res = await fitter
      .post(`/api/projects/${projectId}/photos`)
      .set('Content-Type', `multipart/form-data; boundary=${boundary}`)
      .send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/did not arrive whole.*send it again/);
    expect(await countPhotos()).toBe(before);
  });
});
