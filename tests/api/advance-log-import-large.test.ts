/**
 * The fast import path (decision 46) with 10,000 rows through the API: wall times across both 2026
 * clock changes of Europe/Zurich, a refused row that changes nothing, and COPY inside the
 * import's transaction. Invented drive.
 *
 * Outside reference for the times: EU summer-time directive 2000/84/EC (IANA tzdb Europe/Zurich):
 * in 2026 summer time (UTC+2) runs from 01:00 UTC on 29 March to 01:00 UTC on 25 October; wall
 * times 02:00–02:59 on 29 March do not exist, 02:00–02:59 on 25 October happen twice (Kerfwise
 * reads them as standard time, UTC+1, decision 17).
 */
import { eq, sql } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { fittingRolledKm, fittings, projects, strokes } from '../../server/db/schema';
import { importAdvanceLog } from '../../server/services/advance-log-import';
import { isoWithSiteOffset } from '../../shared/site-time';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';
import { makeCutterhead } from '../support/drive-fixtures';

const app = createApp();
const ZONE = 'Europe/Zurich';
const ROWS = 10_000;
const FIRST_START_MS = Date.parse('2026-03-28T00:10:00Z');
const STEP_MS = 40 * 60_000;
const STROKE_MS = 25 * 60_000;
/** The first pass through the repeated hour of 25 October (summer time): written with its offset. */
const REPEATED_FIRST_PASS = [Date.parse('2026-10-25T00:00:00Z'), Date.parse('2026-10-25T01:00:00Z')];

let projectId: string;
let planner: Awaited<ReturnType<typeof signedInAgent>>;

/** Site wall time without offset ("2026-03-29 01:50:00"), or with it in the first pass of the repeated hour. */
function written(ms: number): string {
  const iso = isoWithSiteOffset(ms, ZONE);
  if (ms >= REPEATED_FIRST_PASS[0] && ms < REPEATED_FIRST_PASS[1]) return iso;
  return iso.slice(0, 19).replace('T', ' ');
}

/** 10,000 strokes every 40 minutes from 28 March 2026, 1.5 m each from chainage 2,450 m. */
function advanceLog(change?: { index: number; start: string }): string {
  const lines = ['ring,start time,end time,chainage start,chainage end,revolutions,penetration'];
  for (let i = 0; i < ROWS; i += 1) {
    const start = FIRST_START_MS + i * STEP_MS;
    const startText = change?.index === i ? change.start : written(start);
    lines.push(`${i + 1},${startText},${written(start + STROKE_MS)},${2450 + i * 1.5},${2450 + (i + 1) * 1.5},180,8.3`);
  }
  return `${lines.join('\n')}\n`;
}

async function snapshot() {
  const [s] = await db
    .execute<{ n: number; h: string | null }>(
      sql`select count(*)::int as n, md5(string_agg(ring_number::text || start_time::text || end_time::text, ',' order by ring_number)) as h
          from strokes where project_id = ${projectId}`,
    )
    .then((r) => r.rows);
  const rolled = (await db.select().from(fittingRolledKm).where(eq(fittingRolledKm.projectId, projectId))).length;
  const [audits] = await db
    .execute<{ n: number }>(sql`select count(*)::int as n from audit_log where project_id = ${projectId}`)
    .then((r) => r.rows);
  const [mappings] = await db
    .execute<{ n: number }>(sql`select count(*)::int as n from import_mappings where project_id = ${projectId}`)
    .then((r) => r.rows);
  return { strokes: s, rolled, audits: audits.n, mappings: mappings.n };
}

const post = (body: string) =>
  planner.post(`/api/projects/${projectId}/strokes/import`).set('Content-Type', 'text/csv').send(Buffer.from(body));

beforeAll(async () => {
  const p = await makeProject();
  projectId = p.id;
  await db.update(projects).set({ startChainageM: 2400, siteTimeZone: ZONE }).where(eq(projects.id, projectId));
  await makeCutterhead(projectId, 3);
  await db
    .update(fittings)
    .set({ fittedAt: new Date('2026-01-05T06:00:00Z') })
    .where(eq(fittings.projectId, projectId));
  const u = await makeUser();
  await addMember(projectId, u.id, 'planner');
  planner = await signedInAgent(app, u.email);
});

describe('10,000 rows through the fast path', () => {
  it('one row at a wall time the spring change skips refuses the file and changes nothing', async () => {
    const before = await snapshot();
    // Ring 7,001 (line 7,002) starts at 02:30 on 29 March, a wall time that does not exist.
    const res = await post(advanceLog({ index: 7000, start: '2026-03-29 02:30' }));
    expect(res.status, JSON.stringify(res.body).slice(0, 400)).toBe(400);
    expect(res.body.error.issues).toEqual([
      {
        path: 'row 7002, start time',
        row: 7002,
        column: 'start time',
        message:
          "Start time: '2026-03-29 02:30' does not exist in Europe/Zurich (the clocks jump forward over it). Give the time with its UTC offset, like 2026-03-29T02:30+01:00.",
      },
    ]);
    expect(await snapshot()).toEqual(before);
  }, 60_000);

  it('imports 10,000 rows across both clock changes, each time at its instant, with rolled distances', async () => {
    const res = await post(advanceLog());
    expect(res.status, JSON.stringify(res.body).slice(0, 400)).toBe(201);
    expect(res.body.inserted).toBe(ROWS);
    const at = async (ring: number) => {
      const [row] = await db
        .select()
        .from(strokes)
        .where(sql`${strokes.projectId} = ${projectId} and ${strokes.ringNumber} = ${ring}`);
      return [row.startTime.toISOString(), row.endTime.toISOString()];
    };
    // Ring 38 starts 00:50 UTC on 29 March (wall 01:50, UTC+1) and ends 01:15 UTC (wall 03:15, UTC+2).
    expect(await at(38)).toEqual(['2026-03-29T00:50:00.000Z', '2026-03-29T01:15:00.000Z']);
    // Ring 7,599 starts 01:30 UTC on 25 October, written as wall 02:30 without offset: the second
    // pass, standard time. Ring 7,598 started 00:50 UTC, written with +02:00 (first pass).
    expect(await at(7599)).toEqual(['2026-10-25T01:30:00.000Z', '2026-10-25T01:55:00.000Z']);
    expect(await at(7598)).toEqual(['2026-10-25T00:50:00.000Z', '2026-10-25T01:15:00.000Z']);
    // derived: every ring at 40-minute steps, so no time was shifted by a clock change.
    const [{ bad }] = await db
      .execute<{ bad: number }>(
        sql`select count(*)::int as bad from strokes where project_id = ${projectId}
            and start_time <> ${new Date(FIRST_START_MS).toISOString()}::timestamptz + (ring_number - 1) * interval '40 minutes'`,
      )
      .then((r) => r.rows);
    expect(bad).toBe(0);
    // The rolled distances were brought up to date in the import's transaction.
    const rolled = await db.select().from(fittingRolledKm).where(eq(fittingRolledKm.projectId, projectId));
    expect(rolled.length).toBeGreaterThan(0);
  }, 60_000);

  it('the same file again adds nothing', async () => {
    const before = await snapshot();
    const res = await post(advanceLog());
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ inserted: 0, unchanged: ROWS, replaced: 0 });
    expect((await snapshot()).strokes).toEqual(before.strokes);
  }, 60_000);
});

describe('COPY inside the transaction', () => {
  it('rows written with COPY are gone when the transaction fails later', async () => {
    const before = await snapshot();
    const row = (ring: number) => ({
      line: ring,
      data: {
        ringNumber: ring,
        startTime: '2027-02-01T06:00:00+01:00',
        endTime: '2027-02-01T06:25:00+01:00',
        chainageStartM: 20_000 + ring * 1.5,
        chainageEndM: 20_000 + (ring + 1) * 1.5,
        revolutions: 180,
        penetrationMmPerRev: null,
        rpm: null,
        thrustKn: null,
        torqueKnm: null,
        extra: { note: 'back\\slash\ttab' },
      },
    });
    const [user] = await db.execute<{ id: string }>(sql`select id from users limit 1`).then((r) => r.rows);
    let countInside = 0;
    await expect(
      db.transaction(async (tx) => {
        await importAdvanceLog(tx, projectId, user.id, [row(20_001), row(20_002)], { replace: false, mapping: {} });
        const [{ n }] = await tx
          .execute<{ n: number }>(sql`select count(*)::int as n from strokes where project_id = ${projectId} and ring_number > 20000`)
          .then((r) => r.rows);
        countInside = n;
        const [stored] = await tx
          .select({ extra: strokes.extra })
          .from(strokes)
          .where(sql`${strokes.projectId} = ${projectId} and ${strokes.ringNumber} = 20001`);
        // A backslash and a tab in an extra column survive COPY's text format.
        expect(stored.extra).toEqual({ note: 'back\\slash\ttab' });
        throw new Error('refused after the COPY');
      }),
    ).rejects.toThrow('refused after the COPY');
    expect(countInside).toBe(2);
    expect(await snapshot()).toEqual(before);
  });

  it('COPY outside a transaction is refused, not written', async () => {
    const [user] = await db.execute<{ id: string }>(sql`select id from users limit 1`).then((r) => r.rows);
    const rows = [
      {
        line: 2,
        data: {
          ringNumber: 30_001,
          startTime: '2027-03-01T06:00:00+01:00',
          endTime: '2027-03-01T06:25:00+01:00',
          chainageStartM: 40_000,
          chainageEndM: 40_001.5,
          revolutions: 180,
          penetrationMmPerRev: null,
          rpm: null,
          thrustKn: null,
          torqueKnm: null,
          extra: {},
        },
      },
    ];
    await expect(importAdvanceLog(db, projectId, user.id, rows, { replace: false, mapping: {} })).rejects.toThrow(/needs a transaction/);
    const found = await db
      .select()
      .from(strokes)
      .where(sql`${strokes.projectId} = ${projectId} and ${strokes.ringNumber} = 30001`);
    expect(found).toHaveLength(0);
  });
});
