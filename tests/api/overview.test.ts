/**
 * Each role's Overview (GET /api/projects/:projectId/overview): every role gets its own section
 * and no other, with values checked against the rows this file inserts (worked by hand beside
 * each check). Drive A (tests/support/stops-fixtures.ts) carries rounds, stops, the forecast and
 * parts; drive B carries a site manager's two weeks; drive C has stale data.
 */
import { randomUUID } from 'node:crypto';
import { and, eq, isNull } from 'drizzle-orm';
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { daysUntil } from '../../shared/domain/overview';
import type { OverviewWire } from '../../shared/schemas/overview';
import type { ProjectRole } from '../../shared/roles';
import { addSiteDays, siteDay, siteWeekStart } from '../../shared/site-time';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import {
  downtimeCauses,
  downtimeEvents,
  fittings,
  inspectionEntries,
  inspectionRounds,
  purchaseOrderLines,
  purchaseOrders,
  strokes,
} from '../../server/db/schema';
import { ensureDefaultCauses } from '../../server/services/downtime';
import { makeCutterhead } from '../support/drive-fixtures';
import { addMember, makeProject, makeUser, signedInAgent, uniq } from '../support/fixtures';
import { makeSmallCatalogue } from '../support/parts-fixtures';
import { insertStop, makeStopsDrive } from '../support/stops-fixtures';

const app: Express = createApp();
const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const sections = ['fitter', 'planner', 'buyer', 'siteManager'] as const;
const sectionOf: Record<ProjectRole, (typeof sections)[number]> = {
  fitter: 'fitter',
  planner: 'planner',
  buyer: 'buyer',
  site_manager: 'siteManager',
};

type Agent = Awaited<ReturnType<typeof signedInAgent>>;

async function member(projectId: string, role: ProjectRole): Promise<Agent> {
  const u = await makeUser();
  await addMember(projectId, u.id, role);
  return signedInAgent(app, u.email);
}

async function overviewOf(agent: Agent, projectId: string): Promise<OverviewWire> {
  const res = await agent.get(`/api/projects/${projectId}/overview`);
  expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
  return res.body as OverviewWire;
}

describe('each role gets its own sections and no other', () => {
  let drive: Awaited<ReturnType<typeof makeStopsDrive>>;
  const agents = {} as Record<ProjectRole, Agent>;
  const bodies = {} as Record<ProjectRole, OverviewWire>;
  let roundB: string;
  let stops: Record<'proposed' | 'scheduledNear' | 'scheduledFar' | 'done', string>;
  let lines: Record<'late' | 'due' | 'later' | 'received', string>;
  let today: string;

  beforeAll(async () => {
    drive = await makeStopsDrive();
    const now = Date.now();
    const [p1, p2, p3] = drive.drive.positions; // limits 25, 25, 12 mm (tests/support/drive-fixtures.ts)
    const fits = await db
      .select()
      .from(fittings)
      .where(and(eq(fittings.projectId, drive.project.id), isNull(fittings.removedAt)));
    const fitOf = (positionId: string) => fits.find((f) => f.positionId === positionId)!.id;
    // Close the fixture's round: only rounds started here stay open.
    await db
      .update(inspectionRounds)
      .set({ closedAt: new Date(now) })
      .where(eq(inspectionRounds.id, drive.roundId));
    const [roundA] = await db
      .insert(inspectionRounds)
      .values({ projectId: drive.project.id, startedAt: new Date(now - 3 * DAY), chainageM: 195, closedAt: new Date(now - 3 * DAY + HOUR) })
      .returning();
    const [b] = await db
      .insert(inspectionRounds)
      .values({ projectId: drive.project.id, startedAt: new Date(now - HOUR), chainageM: 200, ringNumber: 133 })
      .returning();
    roundB = b.id;
    const entry = (roundId: string, positionId: string, wearMm: number) => ({
      projectId: drive.project.id,
      roundId,
      positionId,
      clientKey: randomUUID(),
      fittingId: fitOf(positionId),
      wearMm,
    });
    await db.insert(inspectionEntries).values([
      entry(roundA.id, p1.id, 10),
      entry(roundA.id, p2.id, 21),
      entry(roundA.id, p3.id, 12),
      // The open round measured position 1 again: 20 mm is its newest wear.
      entry(roundB, p1.id, 20),
    ]);
    stops = {
      proposed: (await insertStop(drive.project.id, { status: 'proposed', chainageM: 250 }, [p1.id])).id,
      scheduledFar: (await insertStop(drive.project.id, { status: 'scheduled', chainageM: 400 }, [p1.id])).id,
      scheduledNear: (
        await insertStop(drive.project.id, { status: 'scheduled', chainageM: 300, plannedStart: new Date(now + DAY) }, [p3.id, p2.id])
      ).id,
      done: (await insertStop(drive.project.id, { status: 'done', chainageM: 210 }, [p2.id])).id,
    };

    const catalogue = await makeSmallCatalogue(drive.project.id);
    today = siteDay(new Date(now), drive.project.siteTimeZone);
    const [order] = await db
      .insert(purchaseOrders)
      .values({ projectId: drive.project.id, number: uniq('PO'), supplier: 'Invented Forge' })
      .returning();
    const line = async (dueInDays: number, qtyOrdered: number, qtyReceived: number) =>
      (
        await db
          .insert(purchaseOrderLines)
          .values({
            purchaseOrderId: order.id,
            partId: catalogue.ring.id,
            qtyOrdered,
            qtyReceived,
            dueDate: addSiteDays(today, dueInDays, drive.project.siteTimeZone),
          })
          .returning()
      )[0].id;
    lines = { late: await line(-1, 10, 4), due: await line(3, 10, 0), later: await line(30, 10, 0), received: await line(-2, 10, 10) };

    for (const role of ['fitter', 'planner', 'buyer', 'site_manager'] as const) {
      agents[role] = await member(drive.project.id, role);
      bodies[role] = await overviewOf(agents[role], drive.project.id);
    }
  });

  it('answers only the section of the caller’s role', () => {
    for (const role of ['fitter', 'planner', 'buyer', 'site_manager'] as const) {
      const body = bodies[role] as unknown as Record<string, unknown>;
      expect(body.role).toBe(role);
      expect(
        sections.filter((s) => body[s] !== undefined),
        role,
      ).toEqual([sectionOf[role]]);
    }
  });

  it('the fitter: the open round, the next scheduled stop with its positions, discs over or near their limit', () => {
    const f = bodies.fitter.fitter!;
    // derived: round B is the only open round; it measured 1 of the 3 positions.
    expect(f.openRound).toMatchObject({ id: roundB, entries: 1, positionCount: 3, chainageM: 200, ringNumber: 133 });
    // derived: no stop is under way; of the two scheduled ones the drive (increasing) reaches 300 m before 400 m.
    expect(f.nextStop).toMatchObject({ id: stops.scheduledNear, status: 'scheduled', chainageM: 300, positionCount: 2 });
    expect(f.nextStop!.positions.map((p) => p.number)).toEqual([2, 3]);
    // derived: position 3 at 12 of 12 mm (100 %, over), position 2 at 21 of 25 mm (84 %, near),
    // position 1 at 20 of 25 mm (its newest, 80 %, near; round A's 10 mm is older). Worst share first.
    expect(f.discs.map((d) => [d.positionNumber, d.wearMm, d.band])).toEqual([
      [3, 12, 'over'],
      [2, 21, 'near'],
      [1, 20, 'near'],
    ]);
    expect(f.nearLimitShare).toBe(0.8);
  });

  it('the planner: next change-outs by P90, open and proposed stops in drive order, data not stale', async () => {
    const p = bodies.planner.planner!;
    // derived: the forecast screen's own order (most urgent P90 first) for the same drive.
    const forecast = await agents.planner.get(`/api/projects/${drive.project.id}/forecast`);
    expect(forecast.status).toBe(200);
    const expected = (forecast.body.positions as { position: { positionNumber: number }; p90: { remainingM: number } }[]).slice(0, 8);
    expect(expected.length).toBe(3);
    expect(p.changeOuts.map((c) => c.positionNumber)).toEqual(expected.map((e) => e.position.positionNumber));
    p.changeOuts.forEach((c, i) => expect(c.remainingM).toBeCloseTo(expected[i].p90.remainingM, 6));
    // derived: open = proposed, scheduled, under way; the done stop at 210 m is left out; increasing chainage.
    expect(p.openStops.map((s) => [s.id, s.chainageM])).toEqual([
      [stops.proposed, 250],
      [stops.scheduledNear, 300],
      [stops.scheduledFar, 400],
    ]);
    expect(p.staleAfterDays).toBe(7);
    // derived: the last stroke ended 2 days ago less 12 h 40 min (13 strokes an hour apart); the newest inspection is an hour old.
    expect(p.strokes.stale).toBe(false);
    expect(p.inspections.stale).toBe(false);
    expect(Date.parse(p.inspections.lastAt!)).toBe(Date.parse(bodies.fitter.fitter!.openRound!.startedAt));
  });

  it('the buyer: parts to order now as the parts screen says, order lines late or due within 7 days', async () => {
    const b = bodies.buyer.buyer!;
    // derived: the parts screen's "order now" for the same drive (same 12-week demand).
    const catalogue = await agents.buyer.get(`/api/projects/${drive.project.id}/parts`);
    expect(catalogue.status).toBe(200);
    const toOrder = (catalogue.body.parts as { code: string; orderNow: boolean; orderQty: number }[]).filter((x) => x.orderNow);
    // The small catalogue holds 3 rings against the stops' changes: something must be ordered, or the check says nothing.
    expect(toOrder.length).toBeGreaterThan(0);
    expect(b.orderNow.map((o) => [o.code, o.orderQty])).toEqual(toOrder.map((x) => [x.code, x.orderQty]));
    // derived: due yesterday with 6 of 10 outstanding is late; due in 3 days is due; in 30 days is not yet;
    // fully received is no longer open.
    expect(b.dueWithinDays).toBe(7);
    expect(b.orderLines.map((l) => [l.lineId, l.state, l.outstanding])).toEqual([
      [lines.late, 'late', 6],
      [lines.due, 'due', 10],
    ]);
  });
});

describe('the site manager’s two weeks', () => {
  it('this week’s boring, downtime and cutter-work hours against last week’s, and unexplained standstills', async () => {
    const project = await makeProject(); // Europe/Zurich
    const tz = project.siteTimeZone;
    await ensureDefaultCauses(db, project.id, null);
    const causes = new Map(
      (await db.select().from(downtimeCauses).where(eq(downtimeCauses.projectId, project.id))).map((c) => [c.name, c.id]),
    );
    const now = new Date();
    const W = siteWeekStart(now, tz).getTime(); // Monday 00:00 of this week, site time
    const L = siteWeekStart(now, tz, -1).getTime(); // Monday 00:00 of last week
    const at = (base: number, hours: number) => new Date(base + hours * HOUR);
    await db.insert(strokes).values([
      // Last week: 1 h and 1.5 h of boring, 1.5 m each.
      { projectId: project.id, ringNumber: 1, startTime: at(L, 32), endTime: at(L, 33), chainageStartM: 100, chainageEndM: 101.5 },
      { projectId: project.id, ringNumber: 2, startTime: at(L, 34), endTime: at(L, 35.5), chainageStartM: 101.5, chainageEndM: 103 },
      // This week (Monday just after midnight): 0.5 h, 1.2 m.
      { projectId: project.id, ringNumber: 3, startTime: at(W, 1 / 6), endTime: at(W, 2 / 3), chainageStartM: 103, chainageEndM: 104.2 },
    ]);
    await db.insert(downtimeEvents).values([
      { projectId: project.id, startAt: at(L, 56), endAt: at(L, 60), causeId: causes.get('Cutter change')! },
      { projectId: project.id, startAt: at(L, 80), endAt: at(L, 82), causeId: causes.get('Machine breakdown')! },
      { projectId: project.id, startAt: at(W, 1), endAt: at(W, 2), causeId: causes.get('Cutter inspection')! },
      { projectId: project.id, startAt: at(W, 2), endAt: at(W, 2.75), source: 'gap' },
      // Two weeks ago, without a cause: in neither week, but still unexplained.
      { projectId: project.id, startAt: at(L - 7 * DAY, 10), endAt: at(L - 7 * DAY, 13) },
    ]);
    const manager = await member(project.id, 'site_manager');
    const body = await overviewOf(manager, project.id);
    expect(sections.filter((s) => (body as unknown as Record<string, unknown>)[s] !== undefined)).toEqual(['siteManager']);
    const s = body.siteManager!;
    // derived: last week 1 + 1.5 = 2.5 h boring, 3.0 m; 4 h cutter change + 2 h breakdown = 6 h down, 4 h of it cutter work.
    expect(s.lastWeek.from).toBe(siteDay(new Date(L), tz));
    expect(s.lastWeek.boringHours).toBeCloseTo(2.5, 9);
    expect(s.lastWeek.advanceM).toBeCloseTo(3, 9);
    expect(s.lastWeek.downtimeHours).toBeCloseTo(6, 9);
    expect(s.lastWeek.cutterWorkHours).toBeCloseTo(4, 9);
    // derived: this week (Monday to today) 0.5 h boring, 1.2 m; 1 h inspection + 0.75 h without a cause = 1.75 h down, 1 h cutter work.
    expect(s.thisWeek.from).toBe(siteDay(new Date(W), tz));
    expect(s.thisWeek.to).toBe(siteDay(now, tz));
    expect(s.thisWeek.boringHours).toBeCloseTo(0.5, 9);
    expect(s.thisWeek.advanceM).toBeCloseTo(1.2, 9);
    expect(s.thisWeek.downtimeHours).toBeCloseTo(1.75, 9);
    expect(s.thisWeek.cutterWorkHours).toBeCloseTo(1, 9);
    // derived: last week over the same days as this week so far (Monday to the same weekday): the rows
    // above that start before that day's end — the strokes on Tuesday 08:00, the change on Wednesday 08:00,
    // the breakdown on Thursday 08:00 (all hours away from midnight, so a clock change does not move them).
    const days = daysUntil(siteDay(now, tz), siteDay(new Date(W), tz)) + 1;
    const upTo = L + days * DAY;
    const inSameDays = (startHours: number) => L + startHours * HOUR < upTo;
    expect(s.lastWeekSameDays.from).toBe(s.lastWeek.from);
    expect(s.lastWeekSameDays.to).toBe(addSiteDays(s.lastWeek.from, days - 1, tz));
    expect(s.lastWeekSameDays.boringHours).toBeCloseTo((inSameDays(32) ? 1 : 0) + (inSameDays(34) ? 1.5 : 0), 9);
    expect(s.lastWeekSameDays.advanceM).toBeCloseTo((inSameDays(32) ? 1.5 : 0) + (inSameDays(34) ? 1.5 : 0), 9);
    expect(s.lastWeekSameDays.downtimeHours).toBeCloseTo((inSameDays(56) ? 4 : 0) + (inSameDays(80) ? 2 : 0), 9);
    expect(s.lastWeekSameDays.cutterWorkHours).toBeCloseTo(inSameDays(56) ? 4 : 0, 9);
    // derived: two events without a cause, 0.75 h + 3 h, the newest first.
    expect(s.unexplainedCount).toBe(2);
    expect(s.unexplainedHours).toBeCloseTo(3.75, 9);
    expect(s.unexplained.map((u) => [Date.parse(u.startAt), u.hours])).toEqual([
      [W + 2 * HOUR, 0.75],
      [L - 7 * DAY + 10 * HOUR, 3],
    ]);
  });
});

describe('stale drive data', () => {
  it('names strokes older than 7 days as stale and recent inspections as fresh', async () => {
    const project = await makeProject();
    const now = Date.now();
    await db.insert(strokes).values({
      projectId: project.id,
      ringNumber: 1,
      startTime: new Date(now - 8 * DAY - HOUR),
      endTime: new Date(now - 8 * DAY),
      chainageStartM: 0,
      chainageEndM: 1.5,
    });
    const { positions: pos } = await makeCutterhead(project.id, 2);
    const [fit] = await db.select().from(fittings).where(eq(fittings.positionId, pos[0].id));
    const [round] = await db
      .insert(inspectionRounds)
      .values({ projectId: project.id, startedAt: new Date(now - 6 * DAY), chainageM: 1.5, closedAt: new Date(now - 6 * DAY + HOUR) })
      .returning();
    await db.insert(inspectionEntries).values({
      projectId: project.id,
      roundId: round.id,
      positionId: pos[0].id,
      clientKey: randomUUID(),
      fittingId: fit.id,
      wearMm: 3,
    });
    const body = await overviewOf(await member(project.id, 'planner'), project.id);
    const p = body.planner!;
    // derived: the stroke ended 8 days ago (> 7): stale; the inspection is 6 days old (≤ 7): fresh.
    expect(Date.parse(p.strokes.lastAt!)).toBe(now - 8 * DAY);
    expect(p.strokes.stale).toBe(true);
    expect(p.inspections.stale).toBe(false);
    // derived: 2 positions, no ground types or geology: the forecast says why it cannot forecast, and lists nothing.
    expect(p.changeOuts).toEqual([]);
    expect(p.changeOutProblems.length).toBeGreaterThan(0);
  });
});
