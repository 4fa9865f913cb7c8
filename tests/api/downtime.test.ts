/**
 * Downtime through the API: causes created with the project (a read never writes) and kept by the site manager; events split
 * across a week boundary, a shift boundary and both daylight-saving changes of 2026 in the report;
 * gap proposals that leave no standstill unexplained and repeat nothing; cutter cost per metre and
 * per m³; bad input that changes nothing.
 *
 * Europe/Zurich keeps CET (UTC+1) in winter and CEST (UTC+2) in summer; in 2026 the clocks go from
 * 02:00 CET to 03:00 CEST on 29 March and from 03:00 CEST back to 02:00 CET on 25 October
 * (derived: EU summer-time rules, Directive 2000/84/EC — last Sunday of March / October, 01:00 UTC).
 */
import { eq, sql } from 'drizzle-orm';
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { cutterEvents, cutters, geologySections, groundTypes, parts, projects, strokes } from '../../server/db/schema';
import type { DowntimeEventList, DowntimeReport } from '../../shared/schemas/downtime';
import { addMember, makeProject, makeUser, signedInAgent, uniq } from '../support/fixtures';
import { springEvents, springStrokes } from '../support/downtime-fixtures';
import { ensureDefaultCauses } from '../../server/services/downtime';
import { csvLines } from '../support/csv';
import { insertStop } from '../support/stops-fixtures';

const app: Express = createApp();
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

/** A new drive (Europe/Zurich, makeProject) with a site manager signed in. */
async function driveWithManager() {
  const project = await makeProject();
  // makeProject inserts directly; the admin API creates the causes with the project (tested below).
  await ensureDefaultCauses(db, project.id, null);
  const manager = await makeUser();
  await addMember(project.id, manager.id, 'site_manager');
  const agent: Agent = await signedInAgent(app, manager.email);
  const url = (rest: string) => `/api/projects/${project.id}/downtime${rest}`;
  const causes = (await agent.get(url('/causes'))).body as { id: string; name: string; cutterWork: boolean }[];
  const causeId = (name: string) => causes.find((c) => c.name === name)!.id;
  return { project, agent, url, causes, causeId };
}

/** Everything a downtime request may change in a project: events, causes, settings and audit rows. */
async function snapshot(projectId: string) {
  const [row] = (
    await db.execute<{ events: string; causes: string; settings: string; audits: number }>(sql`
    select (select md5(coalesce(string_agg(row_to_json(e)::text, ',' order by e.id), '')) from downtime_events e where e.project_id = ${projectId}) as events,
           (select md5(coalesce(string_agg(row_to_json(c)::text, ',' order by c.id), '')) from downtime_causes c where c.project_id = ${projectId}) as causes,
           (select md5(coalesce(row_to_json(s)::text, '')) from site_settings s where s.project_id = ${projectId}) as settings,
           (select count(*)::int from audit_log where project_id = ${projectId}) as audits`)
  ).rows;
  return row;
}

const byKey = <T>(rows: T[], key: (r: T) => string, value: (r: T) => number) => Object.fromEntries(rows.map((r) => [key(r), value(r)]));

describe('causes', () => {
  it('a project created through the admin API has the defaults, with cutter inspection, cutter change and compressed-air stops as cutter work', async () => {
    const admin = await makeUser({ isAdmin: true });
    const adminAgent: Agent = await signedInAgent(app, admin.email);
    const created = await adminAgent.post('/api/admin/projects').send({
      name: uniq('Causes drive'),
      excavatedDiameterM: 6.2,
      startChainageM: 0,
      driveDirection: 'increasing',
      siteTimeZone: 'Europe/Zurich',
    });
    expect(created.status).toBe(201);
    const manager = await makeUser();
    await addMember(created.body.id, manager.id, 'site_manager');
    const agent: Agent = await signedInAgent(app, manager.email);
    const causes = (await agent.get(`/api/projects/${created.body.id}/downtime/causes`)).body as { name: string; cutterWork: boolean }[];
    expect(causes.map((c) => c.name)).toEqual([
      'Cutter inspection',
      'Cutter change',
      'Compressed-air stop',
      'Machine breakdown',
      'Lining supply',
      'Muck removal',
      'Survey',
      'Waiting',
      'Other',
    ]);
    expect(causes.filter((c) => c.cutterWork).map((c) => c.name)).toEqual(['Cutter inspection', 'Cutter change', 'Compressed-air stop']);
  });

  it('GET causes on a project without causes writes nothing (a GET never writes)', async () => {
    const project = await makeProject();
    const manager = await makeUser();
    await addMember(project.id, manager.id, 'site_manager');
    const agent: Agent = await signedInAgent(app, manager.email);
    const before = await snapshot(project.id);
    const res = await agent.get(`/api/projects/${project.id}/downtime/causes`);
    expect(res.status).toBe(200);
    expect(res.body).toEqual([]);
    expect(await snapshot(project.id)).toEqual(before);
    const [{ n }] = (await db.execute<{ n: number }>(sql`select count(*)::int as n from downtime_causes where project_id = ${project.id}`))
      .rows;
    expect(n).toBe(0);
  });

  it('adds, renames and deactivates a cause; a second cause of the same name is refused', async () => {
    const { project, agent, url } = await driveWithManager();
    const added = await agent.post(url('/causes')).send({ name: 'Grouting', cutterWork: false });
    expect(added.status).toBe(201);
    const renamed = await agent.patch(url(`/causes/${added.body.id}`)).send({ name: 'Probe drilling and grouting' });
    expect(renamed.body).toMatchObject({ name: 'Probe drilling and grouting', active: true });
    expect((await agent.patch(url(`/causes/${added.body.id}`)).send({ active: false })).body.active).toBe(false);
    const before = await snapshot(project.id);
    const dup = await agent.post(url('/causes')).send({ name: 'Survey' });
    expect(dup.status).toBe(409);
    expect(await snapshot(project.id)).toEqual(before);
    // An inactive cause cannot be given to a new event.
    const refused = await agent
      .post(url('/events'))
      .send({ startAt: '2026-05-01T08:00:00Z', endAt: '2026-05-01T09:00:00Z', causeId: added.body.id });
    expect(refused.status).toBe(400);
    expect(refused.body.error.message).toMatch(/no longer in use/);
  });
});

describe('the report, hand-worked across a week boundary, a shift boundary and both daylight-saving changes', () => {
  let ctx: Awaited<ReturnType<typeof driveWithManager>>;
  beforeAll(async () => {
    ctx = await driveWithManager();
    const put = await ctx.agent.put(ctx.url('/settings')).send({
      shifts: [
        { name: 'Day', start: '06:00' },
        { name: 'Night', start: '18:00' },
      ],
      labourRatePerHour: 80,
      gapMinutes: 90,
    });
    expect(put.status).toBe(200);
    for (const e of springEvents) {
      const res = await ctx.agent.post(ctx.url('/events')).send({ startAt: e.startAt, endAt: e.endAt, causeId: ctx.causeId(e.cause) });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
    }
    // Autumn: lining supply, Sat 2026-10-24 18:00 CEST (16:00Z) → Sun 2026-10-25 06:00 CET (05:00Z).
    await ctx.agent
      .post(ctx.url('/events'))
      .send({ startAt: '2026-10-24T18:00:00+02:00', endAt: '2026-10-25T06:00:00+01:00', causeId: ctx.causeId('Lining supply') });
    await db.insert(strokes).values(springStrokes.map((s) => ({ ...s, projectId: ctx.project.id })));
  });

  it('splits spring downtime by ISO week and by shift in site time, with a 23-hour Sunday', async () => {
    const res = await ctx.agent.get(ctx.url('/report?from=2026-03-16&to=2026-03-29'));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const r: DowntimeReport = res.body;
    // derived: Mon 2026-03-16 00:00 CET = 2026-03-15T23:00Z; Mon 2026-03-30 00:00 CEST = 2026-03-29T22:00Z;
    // 14 days × 24 h − 1 h lost at the spring change = 335 h.
    expect(r.startAt).toBe('2026-03-15T23:00:00.000Z');
    expect(r.endAt).toBe('2026-03-29T22:00:00.000Z');
    expect(r.hours).toBe(335);
    expect(r.weeks).toEqual(['2026-W12', '2026-W13']);
    // derived: cutter change Sun 16:00 → Mon 00:00 CET = 8 h in W12, Mon 00:00 → 04:00 = 4 h in W13;
    // machine breakdown 2026-03-28T17:00Z → 2026-03-29T04:00Z = 11 h, all in W13.
    expect(
      byKey(
        r.byWeek,
        (x) => `${x.cause}|${x.isoWeek}`,
        (x) => x.hours,
      ),
    ).toEqual({
      'Cutter change|2026-W12': 8,
      'Cutter change|2026-W13': 4,
      'Machine breakdown|2026-W13': 11,
    });
    // derived: cutter change 16:00–18:00 = 2 h Day, 18:00–04:00 = 10 h Night; the breakdown's night
    // from 18:00 CET to 06:00 CEST is 11 real hours (the clocks skip 02:00–03:00).
    expect(
      byKey(
        r.byShift,
        (x) => `${x.cause}|${x.shift}`,
        (x) => x.hours,
      ),
    ).toEqual({
      'Cutter change|Day': 2,
      'Cutter change|Night': 10,
      'Machine breakdown|Night': 11,
    });
    // derived: 12 h + 11 h = 23 h of downtime, 12 h of it cutter work.
    expect(r.downtimeHours).toBe(23);
    expect(r.cutterWorkShare).toBeCloseTo(12 / 23, 12);
    expect(r.pareto).toEqual([
      { cause: 'Cutter change', cutterWork: true, hours: 12, share: 12 / 23, cumulativeShare: 12 / 23 },
      { cause: 'Machine breakdown', cutterWork: false, hours: 11, share: 11 / 23, cumulativeShare: 1 },
    ]);
    // derived: two strokes of 2 h and 1.5 m each → utilisation 4 h / 335 h; 3 m over 335/24 days.
    expect(r.boringHours).toBeCloseTo(4, 9);
    expect(r.utilisation).toBeCloseTo(4 / 335, 12);
    expect(r.advanceM).toBe(3);
    expect(r.metresPerDay).toBeCloseTo(3 / (335 / 24), 12);
    expect(r).toMatchObject({ unexplainedEvents: 0, unexplainedHours: 0, shifts: ['Day', 'Night'] });
  });

  it('clips events to the period asked for', async () => {
    const r: DowntimeReport = (await ctx.agent.get(ctx.url('/report?from=2026-03-23&to=2026-03-29'))).body;
    // derived: only the 4 h of the cutter change after Mon 2026-03-23 00:00 CET fall in the week.
    expect(
      byKey(
        r.pareto,
        (x) => x.cause,
        (x) => x.hours,
      ),
    ).toEqual({ 'Cutter change': 4, 'Machine breakdown': 11 });
    // derived: 7 × 24 − 1 = 167 h in the week of the spring change.
    expect(r.hours).toBe(167);
  });

  it('gives the autumn night its 13 real hours and the week its 169', async () => {
    const r = (await ctx.agent.get(ctx.url('/report?from=2026-10-19&to=2026-10-25'))).body;
    // derived: 2026-10-24T16:00Z → 2026-10-25T05:00Z = 13 h (02:00–03:00 happens twice); 7 × 24 + 1 = 169 h.
    expect(r.hours).toBe(169);
    expect(r.byWeek).toEqual([{ cause: 'Lining supply', isoWeek: '2026-W43', hours: 13, cutterWork: false }]);
    expect(r.byShift).toEqual([{ cause: 'Lining supply', shift: 'Night', hours: 13, cutterWork: false }]);
    expect(r.cutterWorkShare).toBe(0);
  });

  it('exports each table as CSV', async () => {
    const week = await ctx.agent.get(ctx.url('/report?from=2026-03-16&to=2026-03-29&format=csv&table=week'));
    expect(week.headers['content-type']).toMatch(/text\/csv/);
    expect(csvLines(week.text)).toEqual([
      'cause,cutter_work,2026-W12,2026-W13,total',
      'Cutter change,yes,8.00,4.00,12.00',
      'Machine breakdown,no,0.00,11.00,11.00',
    ]);
    const shift = await ctx.agent.get(ctx.url('/report?from=2026-03-16&to=2026-03-29&format=csv&table=shift'));
    expect(csvLines(shift.text)[1]).toBe('Cutter change,yes,2.00,10.00,12.00');
    const pareto = await ctx.agent.get(ctx.url('/report?from=2026-03-16&to=2026-03-29&format=csv&table=pareto'));
    // derived: 12/23 = 52.17 %, 11/23 = 47.83 %.
    expect(csvLines(pareto.text)).toEqual([
      'cause,cutter_work,hours,share_pct,cumulative_pct',
      'Cutter change,yes,12.00,52.2,52.2',
      'Machine breakdown,no,11.00,47.8,100.0',
    ]);
    const events = await ctx.agent.get(ctx.url('/events?format=csv&to=2026-03-31'));
    // Site-local times with their offset: the breakdown ends in summer time.
    expect(events.text).toContain('2026-03-28T18:00:00+01:00,2026-03-29T06:00:00+02:00,11.00,Machine breakdown,no,manual');
  });
});

describe('bad input changes nothing', () => {
  let ctx: Awaited<ReturnType<typeof driveWithManager>>;
  let first: { id: string };
  let second: { id: string };
  beforeAll(async () => {
    ctx = await driveWithManager();
    first = (
      await ctx.agent
        .post(ctx.url('/events'))
        .send({ startAt: springEvents[0].startAt, endAt: springEvents[0].endAt, causeId: ctx.causeId('Cutter change') })
    ).body;
    second = (
      await ctx.agent
        .post(ctx.url('/events'))
        .send({ startAt: springEvents[1].startAt, endAt: springEvents[1].endAt, causeId: ctx.causeId('Machine breakdown') })
    ).body;
  });

  it('refuses an event that ends before (or when) it starts', async () => {
    const before = await snapshot(ctx.project.id);
    for (const endAt of ['2026-05-01T07:00:00Z', '2026-05-01T08:00:00Z']) {
      const res = await ctx.agent.post(ctx.url('/events')).send({ startAt: '2026-05-01T08:00:00Z', endAt, causeId: ctx.causeId('Survey') });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toBe('The end must be after the start.');
    }
    const edit = await ctx.agent
      .put(ctx.url(`/events/${first.id}`))
      .send({ startAt: '2026-03-23T04:00:00+01:00', endAt: '2026-03-22T16:00:00+01:00', causeId: ctx.causeId('Cutter change') });
    expect(edit.status).toBe(400);
    expect(await snapshot(ctx.project.id)).toEqual(before);
  });

  it('refuses an event that overlaps another, naming that one', async () => {
    const before = await snapshot(ctx.project.id);
    const res = await ctx.agent
      .post(ctx.url('/events'))
      .send({ startAt: '2026-03-23T03:00:00+01:00', endAt: '2026-03-23T09:00:00+01:00', causeId: ctx.causeId('Survey') });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe(
      'This overlaps the downtime event from 2026-03-22 16:00 to 2026-03-23 04:00 (Cutter change). Change the times, or edit that event instead.',
    );
    expect(res.body.error.overlapsEventId).toBe(first.id);
    // Moving the second event onto the first is refused the same way.
    const moved = await ctx.agent
      .put(ctx.url(`/events/${second.id}`))
      .send({ startAt: '2026-03-22T20:00:00+01:00', endAt: '2026-03-23T08:00:00+01:00', causeId: ctx.causeId('Machine breakdown') });
    expect(moved.status).toBe(400);
    expect(moved.body.error.overlapsEventId).toBe(first.id);
    // A cause or stop of another drive is refused too.
    const other = await driveWithManager();
    const foreign = await ctx.agent
      .post(ctx.url('/events'))
      .send({ startAt: '2026-06-01T08:00:00Z', endAt: '2026-06-01T09:00:00Z', causeId: other.causeId('Survey') });
    expect(foreign.status).toBe(400);
    expect(await snapshot(ctx.project.id)).toEqual(before);
  });

  it('lets events touch end to start, edits and deletes them with an audit row each', async () => {
    const touching = await ctx.agent.post(ctx.url('/events')).send({
      startAt: '2026-03-23T04:00:00+01:00',
      endAt: '2026-03-23T06:00:00+01:00',
      causeId: ctx.causeId('Survey'),
      note: 'Laser moved',
    });
    expect(touching.status).toBe(201);
    expect(touching.body).toMatchObject({ hours: 2, causeName: 'Survey', note: 'Laser moved', source: 'manual' });
    const edited = await ctx.agent
      .put(ctx.url(`/events/${touching.body.id}`))
      .send({ startAt: '2026-03-23T04:00:00+01:00', endAt: '2026-03-23T05:00:00+01:00', causeId: ctx.causeId('Waiting') });
    expect(edited.body).toMatchObject({ hours: 1, causeName: 'Waiting' });
    expect((await ctx.agent.delete(ctx.url(`/events/${touching.body.id}`))).status).toBe(204);
    const audits = await db.execute<{ action: string }>(
      sql`select action from audit_log where entity = 'downtime_event' and entity_id = ${touching.body.id} order by id`,
    );
    expect(audits.rows.map((a) => a.action)).toEqual(['create', 'update', 'delete']);
    expect((await ctx.agent.delete(ctx.url(`/events/${touching.body.id}`))).status).toBe(404);
  });
});

describe('proposals from gaps in the advance log', () => {
  it('proposes each standstill longer than the setting, less what events already cover, once', async () => {
    const { project, agent, url, causeId } = await driveWithManager();
    const at = (hhmm: string) => new Date(`2026-06-10T${hhmm}:00Z`);
    // Strokes 06:00–07:00, 07:30–08:30 (30 min gap: ring build), 12:30–13:30 (4 h gap), 20:00–21:00 (6.5 h gap).
    await db.insert(strokes).values(
      [
        ['06:00', '07:00'],
        ['07:30', '08:30'],
        ['12:30', '13:30'],
        ['20:00', '21:00'],
      ].map(([s, e], i) => ({
        projectId: project.id,
        ringNumber: i + 1,
        startTime: at(s),
        endTime: at(e),
        chainageStartM: i * 1.5,
        chainageEndM: (i + 1) * 1.5,
      })),
    );
    // A survey already explains 14:00–18:00 of the 6.5 h gap.
    await agent
      .post(url('/events'))
      .send({ startAt: at('14:00').toISOString(), endAt: at('18:00').toISOString(), causeId: causeId('Survey') });
    const first = await agent.post(url('/propose-from-gaps'));
    expect(first.status).toBe(200);
    // derived: 08:30–12:30 (4 h) and 18:00–20:00 (2 h); 13:30–14:00 is only 30 min, under the 90 min default.
    expect(first.body).toEqual({ created: 2, hours: 6, gapMinutes: 90 });
    const { events: open } = (await agent.get(url('/events?unexplained=true'))).body as DowntimeEventList;
    expect(open.map((e) => [e.startAt, e.endAt, e.source])).toEqual([
      ['2026-06-10T08:30:00.000Z', '2026-06-10T12:30:00.000Z', 'gap'],
      ['2026-06-10T18:00:00.000Z', '2026-06-10T20:00:00.000Z', 'gap'],
    ]);
    const before = await snapshot(project.id);
    expect((await agent.post(url('/propose-from-gaps'))).body).toEqual({ created: 0, hours: 0, gapMinutes: 90 });
    expect(await snapshot(project.id)).toEqual(before);
    // Unexplained time shows in the report under its own label.
    const r = (await agent.get(url('/report?from=2026-06-10&to=2026-06-10'))).body;
    expect(r).toMatchObject({ unexplainedEvents: 2, unexplainedHours: 6 });
    expect(r.pareto[0]).toMatchObject({ cause: 'No cause given', hours: 6 });
  });
});

describe('cutter cost', () => {
  it('costs parts and labour per metre and per m³ of an 8.0 m bore, by week and by ground type', async () => {
    const { project, agent, url, causeId } = await driveWithManager();
    await db.update(projects).set({ excavatedDiameterM: 8 }).where(eq(projects.id, project.id));
    await agent.put(url('/settings')).send({
      shifts: [
        { name: 'Day', start: '06:00' },
        { name: 'Night', start: '18:00' },
      ],
      labourRatePerHour: 80,
      gapMinutes: 90,
    });
    const [granite] = await db
      .insert(groundTypes)
      .values({ projectId: project.id, name: uniq('Granite') })
      .returning();
    await db.insert(geologySections).values({ projectId: project.id, chainageFromM: 0, chainageToM: 1000, groundTypeId: granite.id });
    // 4 strokes of 2.5 m on Tue 2026-03-24 (W13), chainage 100 → 110 m.
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
    // 3 h of cutter inspection; two discs removed at 105 m, one rebuilt with a new ring and seals, one scrapped.
    await agent
      .post(url('/events'))
      .send({ startAt: '2026-03-24T10:00:00+01:00', endAt: '2026-03-24T13:00:00+01:00', causeId: causeId('Cutter inspection') });
    const [a, b] = await db
      .insert(cutters)
      .values([
        { projectId: project.id, serial: uniq('A'), discSizeIn: 17 },
        { projectId: project.id, serial: uniq('B'), discSizeIn: 17 },
      ])
      .returning();
    const removedAt = new Date('2026-03-24T10:00:00+01:00');
    await db.insert(cutterEvents).values([
      { projectId: project.id, cutterId: a.id, kind: 'removed', at: removedAt, details: { chainageM: 105 } },
      { projectId: project.id, cutterId: b.id, kind: 'removed', at: removedAt, details: { chainageM: 105 } },
      {
        projectId: project.id,
        cutterId: a.id,
        kind: 'rebuilt',
        at: new Date('2026-03-31T09:00:00Z'),
        details: { outcome: 'rebuilt', newRing: true, newBearings: false, newSeals: true },
      },
      {
        projectId: project.id,
        cutterId: b.id,
        kind: 'scrapped',
        at: new Date('2026-04-02T09:00:00Z'),
        details: { outcome: 'scrapped', reason: 'Hub damaged' },
      },
    ]);
    const part = (
      code: string,
      kind: 'ring' | 'seal-kit' | 'cutter-assembly' | 'bearing-kit',
      discSizeIn: number | null,
      unitCost: string,
    ) => ({ projectId: project.id, code, name: code, kind, discSizeIn, unitCost, leadTimeMeanDays: 30 });
    await db
      .insert(parts)
      .values([
        part('R17', 'ring', 17, '400.00'),
        part('R19', 'ring', 19, '500.00'),
        part('SK', 'seal-kit', null, '150.00'),
        part('BK17', 'bearing-kit', 17, '900.00'),
        part('CA17', 'cutter-assembly', 17, '2400.00'),
      ]);

    const res = await agent.get(url('/cost?from=2026-03-23&to=2026-03-29'));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const c = res.body;
    // derived: face area π·D²/4 = π·8²/4 = 16π m²; 10 m of advance → 160π ≈ 502.65 m³.
    expect(c.faceAreaM2).toBeCloseTo(16 * Math.PI, 12);
    // derived: parts = ring 400 + seal kit 150 (rebuild; no bearings) + assembly 2400 (scrap) = 2950;
    // labour = 3 h × 80 = 240; total 3190 → 319 per m, 3190 / 160π ≈ 6.3463 per m³;
    // rings used = 2 (the rebuild's new ring, the scrapped assembly's) → 2 / 160π × 1000 ≈ 3.9789 per 1,000 m³.
    const expected = {
      advanceM: 10,
      excavatedM3: 160 * Math.PI,
      partsCost: 2950,
      labourCost: 240,
      totalCost: 3190,
      costPerM: 319,
      costPerM3: 3190 / (160 * Math.PI),
      ringsPer1000M3: (2 / (160 * Math.PI)) * 1000,
    };
    for (const row of [c.total, c.byWeek[0], c.byGround[0]]) {
      for (const [k, v] of Object.entries(expected)) expect(row[k], k).toBeCloseTo(v, 9);
    }
    expect(c.total.costPerM3).toBeCloseTo(6.3463, 4);
    expect(c.byWeek.map((r: { key: string }) => r.key)).toEqual(['2026-W13']);
    expect(c.byGround.map((r: { key: string }) => r.key)).toEqual([granite.name]);
    expect(c).toMatchObject({ unpricedParts: 0, currency: 'EUR', labourRatePerHour: 80, diameterM: 8 });

    const csv = await agent.get(url('/cost?from=2026-03-23&to=2026-03-29&format=csv&table=ground'));
    expect(csvLines(csv.text)[1]).toBe(`${granite.name},10.0,502.7,2950.00,240.00,3190.00,319.00,6.35,3.979`);

    // Without a catalogue only labour is counted, and the three parts show as not priced.
    await db.delete(parts).where(eq(parts.projectId, project.id));
    const labourOnly = (await agent.get(url('/cost?from=2026-03-23&to=2026-03-29'))).body;
    expect(labourOnly.total).toMatchObject({ partsCost: 0, labourCost: 240, totalCost: 240 });
    expect(labourOnly).toMatchObject({ unpricedParts: 3, currency: null });
    // The row names the prices it lacks instead of showing parts at 0 (issue 16).
    expect(labourOnly.byWeek[0]).toMatchObject({ changes: 2, missingPrices: ['17″ cutter assembly', '17″ ring', '17″ seal kit'] });
  });

  it('costs a change the workshop has not finished in the week it happened, as an estimated rebuild with a new ring', async () => {
    const { project, agent, url } = await driveWithManager();
    const [c17, c19] = await db
      .insert(cutters)
      .values([
        { projectId: project.id, serial: uniq('C'), discSizeIn: 17 },
        { projectId: project.id, serial: uniq('D'), discSizeIn: 19 },
      ])
      .returning();
    // Two changes on Wed 2026-03-25 (W13); neither has a workshop outcome yet. Only a 17″ ring is priced.
    const at = new Date('2026-03-25T10:00:00+01:00');
    await db.insert(cutterEvents).values([
      { projectId: project.id, cutterId: c17.id, kind: 'removed', at, details: { chainageM: 50 } },
      { projectId: project.id, cutterId: c19.id, kind: 'removed', at, details: { chainageM: 50 } },
    ]);
    await db
      .insert(parts)
      .values({ projectId: project.id, code: 'R17', name: 'R17', kind: 'ring', discSizeIn: 17, unitCost: '400.00', leadTimeMeanDays: 30 });
    const c = (await agent.get(url('/cost?from=2026-03-23&to=2026-03-29'))).body;
    // derived: rule of changePartsCost — each unfinished change is one ring; 17″ at 400, 19″ has no price.
    expect(c.byWeek).toHaveLength(1);
    expect(c.byWeek[0]).toMatchObject({
      key: '2026-W13',
      partsCost: 400,
      changes: 2,
      estimatedChanges: 2,
      missingPrices: ['19″ ring'],
    });
    expect(c.unpricedParts).toBe(1);
  });
});

describe('events ahead (issue 16)', () => {
  it('refuses a future event unless it belongs to a planned stop, and keeps the default period on the data up to today', async () => {
    const ctx = await driveWithManager();
    for (const e of springEvents) {
      const res = await ctx.agent.post(ctx.url('/events')).send({ startAt: e.startAt, endAt: e.endAt, causeId: ctx.causeId(e.cause) });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
    }
    const ahead = {
      startAt: new Date(Date.now() + 20 * 86_400_000).toISOString(),
      endAt: new Date(Date.now() + 21 * 86_400_000).toISOString(),
    };
    const before = await snapshot(ctx.project.id);
    const refused = await ctx.agent.post(ctx.url('/events')).send({ ...ahead, causeId: ctx.causeId('Cutter change') });
    expect(refused.status).toBe(400);
    expect(refused.body.error.message).toMatch(/after now .*only for a planned stop: link the event to that stop/);
    expect(refused.body.error.issues[0].path).toBe('endAt');
    // A stop already done or cancelled is no planned stop.
    const cancelled = await insertStop(ctx.project.id, { status: 'cancelled' });
    const toCancelled = await ctx.agent.post(ctx.url('/events')).send({ ...ahead, stopId: cancelled.id });
    expect(toCancelled.status).toBe(400);
    expect(await snapshot(ctx.project.id)).toEqual(before);

    const planned = await insertStop(ctx.project.id, { status: 'scheduled', plannedStart: new Date(ahead.startAt), expectedHours: 24 });
    const accepted = await ctx.agent.post(ctx.url('/events')).send({ ...ahead, stopId: planned.id, causeId: ctx.causeId('Cutter change') });
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(201);

    // derived (fixture): the last spring event ends Sun 2026-03-29 in site time; eight ISO weeks back start Mon 2026-02-02.
    // The event ahead (after today, 2026-12 or later on this machine's clock) must not move the default period.
    const events = await ctx.agent.get(ctx.url('/events'));
    expect(events.body).toMatchObject({ from: '2026-02-02', to: '2026-03-29' });
    const report = await ctx.agent.get(ctx.url('/report'));
    expect(report.body).toMatchObject({ from: '2026-02-02', to: '2026-03-29' });
    const cost = await ctx.agent.get(ctx.url('/cost'));
    expect(cost.body).toMatchObject({ from: '2026-02-02', to: '2026-03-29' });
  });
});
