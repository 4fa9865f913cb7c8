/**
 * Intervention stops through the API: the plan on a small drive whose long section has a fault
 * zone without stops and a stretch under 40 m of water head (tests/support/stops-fixtures.ts),
 * the life of a stop with its 409s, bad input that changes nothing, the work pack, and the
 * publish mail in the outbox.
 */
import { and, eq, sql } from 'drizzle-orm';
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { CUTTERHEAD_ENTRY_CAUTION } from '../../shared/cautions';
import { COMPRESSED_AIR_CAUTION, workingPressureFromHead } from '../../shared/domain/compressed-air';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { auditLog, cutters, outbox, stops } from '../../server/db/schema';
import { addMember, makeUser, signedInAgent, waitForMail } from '../support/fixtures';
import { insertStop, makeStopsDrive } from '../support/stops-fixtures';

const app: Express = createApp();

type Drive = Awaited<ReturnType<typeof makeStopsDrive>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

/** A drive with a planner and a fitter signed in. */
async function driveWithPeople() {
  const drive = await makeStopsDrive();
  const agents: Record<'planner' | 'fitter', Agent> = {} as never;
  for (const role of ['planner', 'fitter'] as const) {
    const u = await makeUser();
    await addMember(drive.project.id, u.id, role);
    agents[role] = await signedInAgent(app, u.email);
  }
  const url = (rest = '') => `/api/projects/${drive.project.id}/stops${rest}`;
  return { drive, ...agents, url };
}

/** Everything a stop request may change in a project: stops, their positions, audit rows, mail. */
async function snapshot(projectId: string) {
  const [row] = (
    await db.execute<{ stops: string; positions: number; audits: number; mails: number }>(sql`
    select (select md5(coalesce(string_agg(row_to_json(s)::text, ',' order by s.id), '')) from stops s where s.project_id = ${projectId}) as stops,
           (select count(*)::int from stop_positions sp join stops s on s.id = sp.stop_id where s.project_id = ${projectId}) as positions,
           (select count(*)::int from audit_log where project_id = ${projectId}) as audits,
           (select count(*)::int from outbox where project_id = ${projectId}) as mails`)
  ).rows;
  return row;
}

// ρ·g·h with ρ = 1000 kg/m³ (fresh water) and g = 9.80665 m/s² (standard gravity, 3rd CGPM 1901), in bar (1 bar = 100 kPa).
const barFromHead = (headM: number) => (1000 * 9.80665 * headM) / 100_000;

describe('compressed-air pressure', () => {
  it('10 m of fresh water is 0.980665 bar (ρ = 1000 kg/m³, g = 9.80665 m/s², CGPM 1901)', () => {
    // derived: 1000 kg/m³ · 9.80665 m/s² · 10 m = 98,066.5 Pa = 0.980665 bar
    expect(workingPressureFromHead(10).pressureBar).toBeCloseTo(0.980665, 12);
  });
});

describe('the plan', () => {
  let ctx: Awaited<ReturnType<typeof driveWithPeople>>;
  beforeAll(async () => {
    ctx = await driveWithPeople();
  });

  it('stops only at ring boundaries where the long section allows, with compressed air and ρ·g·h pressure from the water head', async () => {
    const res = await ctx.fitter.get(ctx.url('/plan?horizonM=600'));
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    const plan = res.body;
    // The defaults (common practice, no source) with the override, and the project's compressed-air rule (30 m, its default).
    expect(plan.settings).toEqual({
      horizonM: 600,
      freeAirStopH: 6,
      compressedAirStopH: 14,
      changeHByClass: { centre: 1.5, face: 1, gauge: 1.25 },
      wastedRingLifeHPerMm: 0.2,
      compressedAirAboveHeadM: 30,
      practiceChangeSharePercent: 80,
      fixedIntervalM: 250,
    });
    expect(plan.currentChainageM).toBe(ctx.drive.currentChainageM);
    expect(plan.horizonEndChainageM).toBe(800);
    expect(plan.infeasible).toEqual([]);
    expect(plan.optimised.stops.length).toBeGreaterThan(1);
    for (const which of ['optimised', 'practice', 'fixedInterval'] as const) {
      let stopH = 0;
      for (const s of plan[which].stops) {
        // A ring boundary k rings ahead of the machine (1.5 m rings, ring 133 ends at 200 m), in ring 133 + k.
        const k = (s.chainageM - 200) / 1.5;
        expect(k).toBeCloseTo(Math.round(k), 9);
        expect(s.ringNumber).toBe(133 + Math.round(k));
        expect(s.chainageM).toBeLessThanOrEqual(800);
        // Not in the fault zone, nor on its boundaries (230 and 260 m).
        expect(s.chainageM < 230 || s.chainageM > 260).toBe(true);
        const headM = s.chainageM < 230 ? 10 : 40;
        expect(s.waterHeadM).toBe(headM);
        expect(s.compressedAir).toBe(headM > 30);
        expect(s.workingPressureBar).toBeCloseTo(barFromHead(headM), 12);
        expect(s.stopH).toBe(s.compressedAir ? 14 : 6);
        stopH += s.stopH;
        for (const c of s.changes) expect(c.wearAtChangeMm).toBeLessThanOrEqual(c.limitMm + 1e-9);
      }
      const cost = plan[which].cost;
      expect(cost.stopH).toBe(stopH);
      expect(cost.totalH).toBeCloseTo(cost.stopH + cost.changeH + cost.wastedRingLifeH, 9);
    }
    // The savings are differences of the plans' own totals, and each total is the sum of its table.
    expect(plan.savingVsPracticeH).toBeCloseTo(plan.practice.cost.totalH - plan.optimised.cost.totalH, 9);
    expect(plan.savingVsIntervalH).toBeCloseTo(plan.fixedInterval.cost.totalH - plan.optimised.cost.totalH, 9);
    expect(plan.savingVsPracticeH).toBeGreaterThanOrEqual(0);
    for (const which of ['optimised', 'practice', 'fixedInterval'] as const) {
      const rowsH = plan[which].stops.reduce(
        (t: number, s: { stopH: number; changeH: number; wastedRingLifeH: number }) => t + s.stopH + s.changeH + s.wastedRingLifeH,
        0,
      );
      expect(rowsH).toBeCloseTo(plan[which].cost.totalH, 9);
    }
    // A small drive: the search runs to the end, so the plan is proven cheapest.
    expect(plan.certificate).toMatchObject({ proven: true, gapPercent: 0, cutAfterS: null });
    expect(plan.certificate.lowerBoundH).toBeCloseTo(plan.optimised.cost.totalH, 9);
    // The long section of the planned stretch, with the fault zone (230–260 m) where no stop is allowed.
    expect(plan.longSection.some((s: { chainageFromM: number; stopAllowed: boolean }) => s.chainageFromM === 230 && !s.stopAllowed)).toBe(
      true,
    );
    expect(plan.compressedAirAboveHeadM).toBe(30);
    // A stop under 40 m of head: compressed air at 3.92266 bar (derived: 1000 · 9.80665 · 40 / 10⁵).
    const underHead = plan.optimised.stops.find((s: { chainageM: number }) => s.chainageM > 260);
    expect(underHead.compressedAir).toBe(true);
    expect(underHead.workingPressureBar).toBeCloseTo(3.92266, 12);
    expect(plan.cautions).toEqual([CUTTERHEAD_ENTRY_CAUTION, COMPRESSED_AIR_CAUTION]);
  });

  it('takes the site’s overrides: with compressed air only above 50 m of head, no stop needs it and its caution goes', async () => {
    const res = await ctx.planner.get(ctx.url('/plan?horizonM=600&compressedAirAboveHeadM=50&freeAirStopH=8'));
    expect(res.status).toBe(200);
    expect(res.body.optimised.stops.every((s: { compressedAir: boolean; stopH: number }) => !s.compressedAir && s.stopH === 8)).toBe(true);
    expect(res.body.cautions).toEqual([CUTTERHEAD_ENTRY_CAUTION]);
  });

  it('refuses overrides that are not numbers in range', async () => {
    const bad = await ctx.planner.get(ctx.url('/plan?horizonM=-5'));
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toBe('The horizon must be more than 0 m.');
    const word = await ctx.planner.get(ctx.url('/plan?changeHFace=soon'));
    expect(word.status).toBe(400);
    expect(word.body.error.issues[0].path).toBe('changeHFace');
    const share = await ctx.planner.get(ctx.url('/plan?practiceChangeSharePercent=120'));
    expect(share.status).toBe(400);
    expect(share.body.error.message).toBe('The change share cannot pass 100 % of the limit.');
    const interval = await ctx.planner.get(ctx.url('/plan?fixedIntervalM=0'));
    expect(interval.status).toBe(400);
    expect(interval.body.error.message).toBe('Stop at most every 10 m.');
  });

  it('takes the planner’s comparison rules: the practice share and the fixed interval', async () => {
    const res = await ctx.planner.get(ctx.url('/plan?horizonM=600&practiceChangeSharePercent=60&fixedIntervalM=100'));
    expect(res.status).toBe(200);
    expect(res.body.settings).toMatchObject({ practiceChangeSharePercent: 60, fixedIntervalM: 100 });
    // The optimised plan is never worse than either rule (both are plans it could have chosen).
    expect(res.body.savingVsPracticeH).toBeGreaterThanOrEqual(-1e-9);
    expect(res.body.savingVsIntervalH).toBeGreaterThanOrEqual(-1e-9);
  });
});

describe('a stop from proposal to done', () => {
  it('is proposed from the plan, scheduled, published to its crew, started and completed, every step audited', async () => {
    const { drive, planner, fitter, url } = await driveWithPeople();
    const plan = (await planner.get(url('/plan?horizonM=600'))).body;
    const first = plan.optimised.stops[0];
    expect(first.compressedAir).toBe(false);

    const created = await planner.post(url()).send({
      chainageM: first.chainageM,
      compressedAir: first.compressedAir,
      expectedHours: first.stopH + first.changeH,
      positions: first.changes.map((c: { positionId: string; wearAtChangeMm: number }) => ({
        positionId: c.positionId,
        expectedWearMm: c.wearAtChangeMm,
      })),
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const stopId = created.body.stop.id;
    expect(created.body.stop).toMatchObject({
      status: 'proposed',
      source: 'planner',
      chainageM: first.chainageM,
      ringNumber: first.ringNumber,
      compressedAir: false,
    });
    expect(created.body.stop.workingPressureBar).toBeCloseTo(barFromHead(10), 12);
    expect(created.body.positions.map((p: { positionId: string }) => p.positionId)).toEqual(
      expect.arrayContaining(first.changes.map((c: { positionId: string }) => c.positionId)),
    );
    // The plan now points at it, and a second proposal at the same place is refused.
    expect((await planner.get(url('/plan?horizonM=600'))).body.optimised.stops[0].existingStopId).toBe(stopId);
    const again = await planner.post(url()).send({ chainageM: first.chainageM, positions: [{ positionId: first.changes[0].positionId }] });
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already an open stop at 0\+228\.5 \(proposed\)/);

    const scheduled = await planner
      .post(url(`/${stopId}/schedule`))
      .send({ plannedStart: '2026-12-20T06:00:00+01:00', expectedHours: 9, crewId: drive.crew.id, compressedAir: false });
    expect(scheduled.status, JSON.stringify(scheduled.body)).toBe(200);
    expect(scheduled.body.stop).toMatchObject({
      status: 'scheduled',
      plannedStart: '2026-12-20T05:00:00.000Z',
      expectedHours: 9,
      crewId: drive.crew.id,
      publishedAt: null,
    });
    expect(scheduled.body.crew.members).toHaveLength(3);

    const published = await planner.post(url(`/${stopId}/publish`));
    expect(published.status, JSON.stringify(published.body)).toBe(200);
    expect(published.body.stop.publishedAt).not.toBeNull();
    // One message per crew member, in the outbox of the same transaction; the member who turned stop mail off gets none.
    const mails = await db
      .select()
      .from(outbox)
      .where(and(eq(outbox.projectId, drive.project.id), eq(outbox.kind, 'stop_published')));
    expect(mails.map((m) => m.toAddresses).sort()).toEqual(drive.memberEmails.map((e) => [e]).sort());
    const text = mails[0].textBody;
    expect(text).toContain('cutter stop at chainage 0+228.5, ring 152');
    // Site time with the zone named (05:00 UTC is 06:00 in Zurich in December, UTC+1 by the IANA tz database).
    expect(text).toContain('Planned start: 2026-12-20 06:00 Europe/Zurich, about 9 h.');
    expect(text).toContain('Worked in free air.');
    expect(text).toMatch(/position 3 \(gauge\), F-\w+ off, expected wear \d+\.\d of 12 mm/);
    expect(text).toContain(`From the store: ${published.body.storeSerials.map((c: { serial: string }) => c.serial).join(', ')}.`);
    expect(text).toContain(`/projects/${drive.project.id}/stops/${stopId}`);
    expect(text).toContain(CUTTERHEAD_ENTRY_CAUTION);
    expect(text).not.toContain(COMPRESSED_AIR_CAUTION);
    expect((await waitForMail(drive.memberEmails[0], 'cutter stop at 0+228.5')).subject).toContain('2026-12-20 06:00 Europe/Zurich');

    const republish = await planner.post(url(`/${stopId}/publish`));
    expect(republish.status).toBe(409);
    expect(republish.body.error.message).toMatch(/already published .* Change its schedule to publish it again/);

    const started = await fitter.post(url(`/${stopId}/start`)).send({ actualStart: '2026-12-20T06:10:00+01:00' });
    expect(started.status).toBe(200);
    expect(started.body.stop).toMatchObject({ status: 'in_progress', actualStart: '2026-12-20T05:10:00.000Z' });
    const done = await fitter.post(url(`/${stopId}/complete`)).send({ actualEnd: '2026-12-20T16:40:00+01:00', roundId: drive.roundId });
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    expect(done.body.stop).toMatchObject({
      status: 'done',
      actualEnd: '2026-12-20T15:40:00.000Z',
      roundId: drive.roundId,
      actualHours: 10.5,
    });
    expect(done.body.round.id).toBe(drive.roundId);
    // A done stop no longer takes serials from the store.
    expect(done.body.storeSerials).toEqual([]);

    const list = await fitter.get(url());
    expect(list.status).toBe(200);
    expect(list.body).toHaveLength(1);
    expect(list.body[0]).toMatchObject({
      id: stopId,
      status: 'done',
      chainageM: 228.5,
      expectedHours: 9,
      actualHours: 10.5,
      crewName: drive.crew.name,
      positionCount: first.changes.length,
    });
    expect((await fitter.get(url('?status=scheduled'))).body).toEqual([]);
    expect((await fitter.get(url('?status=done'))).body).toHaveLength(1);

    const trail = await db
      .select({ action: auditLog.action })
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'stop'), eq(auditLog.entityId, stopId)))
      .orderBy(auditLog.id);
    expect(trail.map((a) => a.action)).toEqual(['create', 'schedule', 'publish', 'start', 'complete']);
  });

  it('rescheduling a published stop clears the publication, so the crew hears of the change', async () => {
    const { drive, planner, url } = await driveWithPeople();
    const stop = await insertStop(
      drive.project.id,
      {
        status: 'scheduled',
        chainageM: 201.5,
        plannedStart: new Date('2026-12-20T05:00:00Z'),
        expectedHours: 8,
        crewId: drive.crew.id,
        publishedAt: new Date(),
      },
      [drive.drive.positions[0].id],
    );
    const same = await planner
      .post(url(`/${stop.id}/schedule`))
      .send({ plannedStart: '2026-12-20T06:00:00+01:00', expectedHours: 8, crewId: drive.crew.id, compressedAir: false });
    expect(same.body.stop.publishedAt).not.toBeNull();
    const moved = await planner
      .post(url(`/${stop.id}/schedule`))
      .send({ plannedStart: '2026-12-21T06:00:00+01:00', expectedHours: 8, crewId: drive.crew.id, compressedAir: false });
    expect(moved.status).toBe(200);
    expect(moved.body.stop.publishedAt).toBeNull();
    expect((await planner.post(url(`/${stop.id}/publish`))).status).toBe(200);
  });

  it('cancelling a published stop needs a reason and tells the crew', async () => {
    const { drive, planner, url } = await driveWithPeople();
    const stop = await insertStop(
      drive.project.id,
      {
        status: 'scheduled',
        chainageM: 201.5,
        plannedStart: new Date('2026-12-20T05:00:00Z'),
        expectedHours: 8,
        crewId: drive.crew.id,
        publishedAt: new Date(),
      },
      [drive.drive.positions[0].id],
    );
    const before = await snapshot(drive.project.id);
    const noReason = await planner.post(url(`/${stop.id}/cancel`)).send({ reason: '  ' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.message).toBe('Give the reason for cancelling.');
    expect(await snapshot(drive.project.id)).toEqual(before);
    const cancelled = await planner
      .post(url(`/${stop.id}/cancel`))
      .send({ reason: 'Machine stopped for a main bearing inspection instead' });
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.stop).toMatchObject({
      status: 'cancelled',
      cancelReason: 'Machine stopped for a main bearing inspection instead',
    });
    const mails = await db
      .select()
      .from(outbox)
      .where(and(eq(outbox.projectId, drive.project.id), sql`${outbox.subject} like '%CANCELLED'`));
    expect(mails.map((m) => m.toAddresses[0]).sort()).toEqual([...drive.memberEmails].sort());
    expect(mails[0].textBody).toContain('Reason: Machine stopped for a main bearing inspection instead');
  });
});

describe('wrong transitions are 409s that say what to do, and change nothing', () => {
  let ctx: Awaited<ReturnType<typeof driveWithPeople>>;
  beforeAll(async () => {
    ctx = await driveWithPeople();
  });

  const refused = async (stopId: string, action: string, body: object, message: RegExp) => {
    const before = await snapshot(ctx.drive.project.id);
    const agent = action === 'start' || action === 'complete' ? ctx.fitter : ctx.planner;
    const res = await agent.post(ctx.url(`/${stopId}/${action}`)).send(body);
    expect(res.status, `${action}: ${JSON.stringify(res.body)}`).toBe(409);
    expect(res.body.error.message).toMatch(message);
    expect(await snapshot(ctx.drive.project.id)).toEqual(before);
  };
  const schedule = () => ({
    plannedStart: '2026-12-22T07:00:00+01:00',
    expectedHours: 10,
    crewId: ctx.drive.crew.id,
    compressedAir: false,
  });

  it('a proposed stop cannot be published, started or completed', async () => {
    const stop = await insertStop(ctx.drive.project.id, { chainageM: 203 }, [ctx.drive.drive.positions[1].id]);
    await refused(
      stop.id,
      'publish',
      {},
      /^This stop is only proposed: schedule it \(date and time, crew, expected hours\) before it can be published\.$/,
    );
    await refused(stop.id, 'start', {}, /only proposed: schedule it .* before it can be started/);
    await refused(stop.id, 'complete', {}, /only proposed: schedule it .* and start it before it can be completed/);
  });

  it('a scheduled stop cannot be completed; a started one cannot be started or rescheduled', async () => {
    const stop = await insertStop(
      ctx.drive.project.id,
      {
        chainageM: 204.5,
        status: 'scheduled',
        plannedStart: new Date('2026-12-22T06:00:00Z'),
        expectedHours: 10,
        crewId: ctx.drive.crew.id,
      },
      [ctx.drive.drive.positions[1].id],
    );
    await refused(stop.id, 'complete', {}, /has not started yet: start it when work begins/);
    expect((await ctx.fitter.post(ctx.url(`/${stop.id}/start`))).status).toBe(200);
    await refused(stop.id, 'start', {}, /already in progress \(started/);
    await refused(stop.id, 'schedule', schedule(), /in progress .* complete it when the work is finished, or cancel it with a reason/);
    await refused(stop.id, 'publish', {}, /in progress/);
  });

  it('done and cancelled stops accept nothing more', async () => {
    const done = await insertStop(ctx.drive.project.id, {
      chainageM: 206,
      status: 'done',
      actualStart: new Date('2026-12-01T06:00:00Z'),
      actualEnd: new Date('2026-12-01T16:00:00Z'),
    });
    for (const [action, body] of [
      ['schedule', schedule()],
      ['publish', {}],
      ['start', {}],
      ['complete', {}],
      ['cancel', { reason: 'Too late' }],
    ] as const) {
      await refused(done.id, action, body, /^This stop is done \(finished 2026-12-01 17:00\), so it cannot be \w+\. Propose a new stop/);
    }
    const cancelled = await insertStop(ctx.drive.project.id, { chainageM: 207.5, status: 'cancelled', cancelReason: 'Plan changed' });
    await refused(cancelled.id, 'cancel', { reason: 'Again' }, /was cancelled \(Plan changed\), so it cannot be cancelled/);
    await refused(cancelled.id, 'schedule', schedule(), /was cancelled \(Plan changed\)/);
  });

  it('a stop of another drive, or no stop, is not found', async () => {
    const other = await makeStopsDrive();
    const foreign = await insertStop(other.project.id, { chainageM: 300 });
    expect((await ctx.planner.get(ctx.url(`/${foreign.id}`))).status).toBe(404);
    expect((await ctx.planner.post(ctx.url(`/${foreign.id}/cancel`)).send({ reason: 'Not mine' })).status).toBe(404);
    expect((await ctx.planner.get(ctx.url('/00000000-0000-4000-8000-000000000000'))).status).toBe(404);
    expect((await db.select().from(stops).where(eq(stops.id, foreign.id)))[0].status).toBe('proposed');
  });
});

describe('bad input is a 4xx and changes nothing', () => {
  let ctx: Awaited<ReturnType<typeof driveWithPeople>>;
  let other: Drive;
  let scheduledId: string;
  let startedId: string;
  beforeAll(async () => {
    ctx = await driveWithPeople();
    other = await makeStopsDrive();
    const p = ctx.drive.drive.positions;
    scheduledId = (
      await insertStop(
        ctx.drive.project.id,
        {
          chainageM: 201.5,
          status: 'scheduled',
          plannedStart: new Date('2026-12-20T05:00:00Z'),
          expectedHours: 8,
          crewId: ctx.drive.crew.id,
        },
        [p[0].id],
      )
    ).id;
    startedId = (
      await insertStop(ctx.drive.project.id, { chainageM: 203, status: 'in_progress', actualStart: new Date('2026-12-20T05:00:00Z') }, [
        p[1].id,
      ])
    ).id;
  });

  const positions = () => [{ positionId: ctx.drive.drive.positions[1].id, expectedWearMm: 21.5 }];
  const cases: [string, () => [string, string, object], number, RegExp][] = [
    [
      'a position of another drive',
      () => ['post', '', { chainageM: 210.5, positions: [{ positionId: other.drive.positions[0].id }] }],
      400,
      /1 of the positions are not on this drive’s cutterhead/,
    ],
    [
      'a chainage in the fault zone',
      () => ['post', '', { chainageM: 245, positions: positions() }],
      400,
      /^No stop may be made at 0\+245\.0: Fault zone: no stop\. Choose a chainage/,
    ],
    [
      'a chainage on the fault zone’s edge',
      () => ['post', '', { chainageM: 260, positions: positions() }],
      400,
      /No stop may be made at 0\+260\.0: Fault zone/,
    ],
    [
      'a chainage behind the machine',
      () => ['post', '', { chainageM: 150, positions: positions() }],
      400,
      /0\+150\.0 is behind the machine \(now at 0\+200\.0\)/,
    ],
    [
      'a chainage beyond the long section',
      () => ['post', '', { chainageM: 3000, positions: positions() }],
      400,
      /outside the geology long section/,
    ],
    ['no positions', () => ['post', '', { chainageM: 210.5, positions: [] }], 400, /^A stop needs at least one position to change\.$/],
    [
      'a position twice',
      () => ['post', '', { chainageM: 210.5, positions: [...positions(), ...positions()] }],
      400,
      /The same position is listed twice/,
    ],
    [
      'a chainage that is not a number',
      () => ['post', '', { chainageM: 'near the shaft', positions: positions() }],
      400,
      /Give the chainage of the stop, in metres/,
    ],
    [
      'a crew of another drive',
      () => [
        'post',
        `/${scheduledId}/schedule`,
        { plannedStart: '2026-12-20T06:00:00+01:00', expectedHours: 8, crewId: other.crew.id, compressedAir: false },
      ],
      400,
      /not a crew of this drive/,
    ],
    [
      'a start without a time-zone offset',
      () => [
        'post',
        `/${scheduledId}/schedule`,
        { plannedStart: '2026-12-20T06:00', expectedHours: 8, crewId: ctx.drive.crew.id, compressedAir: false },
      ],
      400,
      /Give the planned start as a date and time/,
    ],
    [
      'zero expected hours',
      () => [
        'post',
        `/${scheduledId}/schedule`,
        { plannedStart: '2026-12-20T06:00:00+01:00', expectedHours: 0, crewId: ctx.drive.crew.id, compressedAir: false },
      ],
      400,
      /Expected hours must be more than 0/,
    ],
    [
      'no air choice',
      () => [
        'post',
        `/${scheduledId}/schedule`,
        { plannedStart: '2026-12-20T06:00:00+01:00', expectedHours: 8, crewId: ctx.drive.crew.id },
      ],
      400,
      /free air or compressed air/,
    ],
    ['a round of another drive', () => ['post', `/${startedId}/complete`, { roundId: other.roundId }], 400, /not a round of this drive/],
    [
      'an end before the start',
      () => ['post', `/${startedId}/complete`, { actualEnd: '2026-12-20T05:00:00+01:00' }],
      400,
      /The end is before the start \(2026-12-20 06:00\)/,
    ],
    ['an unknown status filter', () => ['get', '?status=paused', {}], 400, /Unknown stop status/],
  ];

  it.each(cases)('%s', async (_name, make, status, message) => {
    const [method, path, body] = make();
    const before = await snapshot(ctx.drive.project.id);
    const agent = path.endsWith('/complete') ? ctx.fitter : ctx.planner;
    const res = method === 'get' ? await agent.get(ctx.url(path)) : await agent.post(ctx.url(path)).send(body);
    expect(res.status, JSON.stringify(res.body)).toBe(status);
    expect(res.body.error.message).toMatch(message);
    expect(await snapshot(ctx.drive.project.id)).toEqual(before);
  });
});

describe('the work pack', () => {
  it('lists the positions with expected wear, the store serials with fewest rebuilds first, the parts kit, the crew and the cautions', async () => {
    const { drive, planner, url } = await driveWithPeople();
    const [centre, face, gauge] = drive.drive.positions;
    const created = await planner.post(url()).send({
      chainageM: 201.5,
      compressedAir: true,
      positions: [
        { positionId: gauge.id, expectedWearMm: 11.6 },
        { positionId: centre.id, expectedWearMm: 24.1 },
        { positionId: face.id, expectedWearMm: null },
      ],
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const res = await planner.get(url(`/${created.body.stop.id}`));
    expect(res.status).toBe(200);
    const pack = res.body;
    // Chosen compressed air under 10 m of head: 0.980665 bar (derived: ρ·g·h, 1000 · 9.80665 · 10 / 10⁵).
    expect(pack.stop.compressedAir).toBe(true);
    expect(pack.stop.workingPressureBar).toBeCloseTo(0.980665, 12);
    expect(pack.stop.ringNumber).toBe(134); // one ring past ring 133, which ends at 200 m
    expect(
      pack.positions.map((p: { number: number; expectedWearMm: number | null; fittedSerial: string }) => [
        p.number,
        p.expectedWearMm,
        p.fittedSerial,
      ]),
    ).toEqual([
      [1, 24.1, drive.drive.fitted[0].serial],
      [2, null, drive.drive.fitted[1].serial],
      [3, 11.6, drive.drive.fitted[2].serial],
    ]);
    // Three 17″ cutters: the two never rebuilt, then the one rebuilt once; not the 19″ one nor the one in the workshop.
    const neverRebuilt = [drive.drive.store[0].serial, drive.drive.store[1].serial].sort();
    expect(pack.storeSerials.map((c: { serial: string }) => c.serial)).toEqual([...neverRebuilt, drive.extra[1].serial]);
    expect(pack.shortages).toEqual([]);
    // One assembly per change; spares one per 10 (rings, seals) and per 20 (bearings) changes, rounded up (common practice, no source).
    expect(pack.partsKit).toEqual([
      { item: '17″ disc cutter assembly', quantity: 3, basis: 'one per position changed' },
      { item: '17″ spare ring', quantity: 1, basis: 'one per 10 changes, rounded up' },
      { item: '17″ spare seal kit', quantity: 1, basis: 'one per 10 changes, rounded up' },
      { item: '17″ spare bearing kit', quantity: 1, basis: 'one per 20 changes, rounded up' },
    ]);
    expect(pack.crew).toBeNull();
    expect(pack.cautions).toEqual([CUTTERHEAD_ENTRY_CAUTION, COMPRESSED_AIR_CAUTION]);
    expect(pack.cautions[1]).toMatch(/does not compute decompression schedules/);

    // With one 17″ cutter left in store the pack says what is short.
    await db
      .update(cutters)
      .set({ status: 'workshop' })
      .where(
        and(eq(cutters.projectId, drive.project.id), eq(cutters.status, 'in_store'), sql`${cutters.serial} <> ${drive.extra[0].serial}`),
      );
    const short = (await planner.get(url(`/${created.body.stop.id}`))).body;
    expect(short.storeSerials.map((c: { serial: string }) => c.serial)).toEqual([drive.extra[0].serial]);
    expect(short.shortages).toEqual([{ discSizeIn: 17, needed: 3, inStore: 1 }]);
  });

  it('a free-air stop carries the cutterhead caution alone', async () => {
    const { drive, planner, url } = await driveWithPeople();
    const stop = await insertStop(drive.project.id, { chainageM: 201.5 }, [drive.drive.positions[0].id]);
    expect((await planner.get(url(`/${stop.id}`))).body.cautions).toEqual([CUTTERHEAD_ENTRY_CAUTION]);
  });
});
