import { and, asc, eq, gt, isNull, lt, max, ne, type SQL } from 'drizzle-orm';
import { Router, type Request, type Response } from 'express';
import {
  costQuerySchema,
  downtimeCauseInputSchema,
  downtimeCauseUpdateSchema,
  downtimeEventInputSchema,
  eventListQuerySchema,
  reportQuerySchema,
  siteSettingsInputSchema,
  type CutterCostReport,
  type DowntimeCause,
  type DowntimeEventInput,
  type DowntimeEventList,
  type DowntimeEventRow,
  type DowntimeReport,
  type ProposeFromGapsResult,
  type SiteSettings,
} from '../../shared/schemas/downtime';
import { writeCsv, type CsvCell, type CsvColumn } from '../../shared/csv-writer';
import { formatSiteDateTime, isoWithSiteOffset } from '../../shared/site-time';
import { db, type DbOrTx } from '../db/client';
import { downtimeCauses, downtimeEvents, projects, siteSettings, stops } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { badRequest, conflict, HttpError, notFound } from '../lib/http-error';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import {
  buildCutterCost,
  buildDowntimeReport,
  ensureDefaultCauses,
  listCauses,
  lockDowntime,
  proposeGapEvents,
  readSiteSettings,
  resolvePeriod,
} from '../services/downtime';

/** Downtime events, causes and site settings; the site manager's downtime and cutter-cost reports. */
export const downtimeRouter = Router({ mergeParams: true });

const projectIdOf = (req: Request) => idParam(req.params, 'projectId', 'That project');

async function loadProject(tx: DbOrTx, projectId: string) {
  const [project] = await tx.select().from(projects).where(eq(projects.id, projectId));
  return project;
}

/** A CSV through the one writer (formula cells neutralised, numbers as on screen, BOM). */
function sendCsv(res: Response, name: string, columns: (string | CsvColumn)[], rows: CsvCell[][]) {
  res.set({ 'Content-Type': 'text/csv; charset=utf-8', 'Content-Disposition': `attachment; filename="${name}.csv"` });
  res.send(writeCsv(columns, rows));
}

/** Decimals as the downtime and cost screens show them: hours 2, shares 1 (%), metres and m³ 1, money 2. */
const hoursCol = (header: string): CsvColumn => ({ header, decimals: 2 });
const pctCol = (header: string): CsvColumn => ({ header, decimals: 1 });

// Causes ----------------------------------------------------------------------------------------

/** The drive's causes (the defaults are created with the project: a read never writes). */
downtimeRouter.get('/causes', requireProject('downtime.read'), async (req, res) => {
  reply<DowntimeCause[]>(res, 200, await listCauses(db, projectIdOf(req)));
});

async function refuseDuplicateName(tx: DbOrTx, projectId: string, name: string, selfId: string | null) {
  const [dup] = await tx
    .select({ id: downtimeCauses.id })
    .from(downtimeCauses)
    .where(and(eq(downtimeCauses.projectId, projectId), eq(downtimeCauses.name, name), selfId ? ne(downtimeCauses.id, selfId) : undefined));
  if (dup) throw conflict(`There is already a cause called ${name}.`);
}

downtimeRouter.post('/causes', requireProject('downtime.edit'), async (req, res) => {
  const projectId = projectIdOf(req);
  const me = requireUser(req);
  const input = downtimeCauseInputSchema.parse(req.body);
  const cause = await db.transaction(async (tx) => {
    await ensureDefaultCauses(tx, projectId, me.id);
    await refuseDuplicateName(tx, projectId, input.name, null);
    const [{ last }] = await tx
      .select({ last: max(downtimeCauses.sortOrder) })
      .from(downtimeCauses)
      .where(eq(downtimeCauses.projectId, projectId));
    const [row] = await tx
      .insert(downtimeCauses)
      .values({ projectId, name: input.name, cutterWork: input.cutterWork, sortOrder: (last ?? 0) + 10 })
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'downtime_cause', entityId: row.id, action: 'create', after: row });
    return row;
  });
  reply<DowntimeCause>(res, 201, cause);
});

/** Rename, flag, reorder, deactivate or reactivate a cause (causes stay, so past events keep theirs). */
downtimeRouter.patch('/causes/:causeId', requireProject('downtime.edit'), async (req, res) => {
  const projectId = projectIdOf(req);
  const causeId = idParam(req.params, 'causeId', 'That cause');
  const me = requireUser(req);
  const input = downtimeCauseUpdateSchema.parse(req.body);
  const cause = await db.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(downtimeCauses)
      .where(and(eq(downtimeCauses.id, causeId), eq(downtimeCauses.projectId, projectId)))
      .for('update');
    if (!before) throw notFound('That cause');
    if (input.name) await refuseDuplicateName(tx, projectId, input.name, causeId);
    const [after] = await tx.update(downtimeCauses).set(input).where(eq(downtimeCauses.id, causeId)).returning();
    await audit(tx, { userId: me.id, projectId, entity: 'downtime_cause', entityId: causeId, action: 'update', before, after });
    return after;
  });
  reply<DowntimeCause>(res, 200, cause);
});

// Site settings ---------------------------------------------------------------------------------

downtimeRouter.get('/settings', requireProject('downtime.read'), async (req, res) => {
  reply<SiteSettings>(res, 200, await readSiteSettings(db, projectIdOf(req)));
});

downtimeRouter.put('/settings', requireProject('downtime.edit'), async (req, res) => {
  const projectId = projectIdOf(req);
  const me = requireUser(req);
  const input = siteSettingsInputSchema.parse(req.body);
  const saved = await db.transaction(async (tx) => {
    const before = await readSiteSettings(tx, projectId);
    const values = { shifts: input.shifts, labourRatePerHour: input.labourRatePerHour.toFixed(2), gapMinutes: input.gapMinutes };
    await tx
      .insert(siteSettings)
      .values({ projectId, ...values })
      .onConflictDoUpdate({ target: siteSettings.projectId, set: { ...values, updatedAt: new Date() } });
    const after = await readSiteSettings(tx, projectId);
    await audit(tx, {
      userId: me.id,
      projectId,
      entity: 'site_settings',
      entityId: projectId,
      action: before.saved ? 'update' : 'create',
      before: before.saved ? before : null,
      after,
    });
    return after;
  });
  reply<SiteSettings>(res, 200, saved);
});

// Events ----------------------------------------------------------------------------------------

async function listEvents(tx: DbOrTx, projectId: string, where?: SQL): Promise<DowntimeEventRow[]> {
  const rows = await tx
    .select({ e: downtimeEvents, causeName: downtimeCauses.name, cutterWork: downtimeCauses.cutterWork, stopChainageM: stops.chainageM })
    .from(downtimeEvents)
    .leftJoin(downtimeCauses, eq(downtimeCauses.id, downtimeEvents.causeId))
    .leftJoin(stops, eq(stops.id, downtimeEvents.stopId))
    .where(and(eq(downtimeEvents.projectId, projectId), where))
    .orderBy(asc(downtimeEvents.startAt));
  return rows.map(({ e, causeName, cutterWork, stopChainageM }) => ({
    id: e.id,
    startAt: e.startAt.toISOString(),
    endAt: e.endAt.toISOString(),
    hours: (e.endAt.getTime() - e.startAt.getTime()) / 3_600_000,
    causeId: e.causeId,
    causeName,
    cutterWork: cutterWork ?? false,
    note: e.note,
    stopId: e.stopId,
    stopChainageM,
    source: e.source,
  }));
}

/**
 * Events overlapping a period of site days (the last eight ISO weeks with data when none is given),
 * optionally of one cause or still without a cause; JSON or CSV.
 */
downtimeRouter.get('/events', requireProject('downtime.read'), async (req, res) => {
  const projectId = projectIdOf(req);
  const q = eventListQuerySchema.parse(req.query);
  const project = await loadProject(db, projectId);
  const tz = project.siteTimeZone;
  const period = await resolvePeriod(db, project, q, new Date());
  const rows = await listEvents(
    db,
    projectId,
    and(
      lt(downtimeEvents.startAt, period.end),
      gt(downtimeEvents.endAt, period.start),
      q.causeId ? eq(downtimeEvents.causeId, q.causeId) : undefined,
      q.unexplained ? isNull(downtimeEvents.causeId) : undefined,
    ),
  );
  if (q.format === 'json') {
    reply<DowntimeEventList>(res, 200, { from: period.from, to: period.to, timeZone: tz, events: rows });
    return;
  }
  sendCsv(
    res,
    'downtime-events',
    ['start', 'end', hoursCol('hours'), 'cause', 'cutter_work', 'source', 'stop_chainage_m', 'note'],
    rows.map((r) => [
      // With the site's offset then: unambiguous across daylight-saving changes.
      isoWithSiteOffset(r.startAt, tz),
      isoWithSiteOffset(r.endAt, tz),
      r.hours,
      r.causeName ?? '',
      r.cutterWork ? 'yes' : 'no',
      r.source,
      r.stopChainageM ?? '',
      r.note,
    ]),
  );
});

/** Stops still ahead or under way: the only ones a future downtime event may belong to. */
const plannedStopStatuses: readonly string[] = ['proposed', 'scheduled', 'in_progress'];
const FUTURE_TOLERANCE_MS = 15 * 60_000;

/**
 * Checks an event against the drive: its cause (active, unless an edit keeps the one it had), its
 * stop, and that it overlaps no other event (the message names that event). Call under lockDowntime.
 */
async function checkEvent(
  tx: DbOrTx,
  projectId: string,
  tz: string,
  input: DowntimeEventInput,
  before: { id: string; causeId: string | null } | null,
) {
  if (input.causeId) {
    const [cause] = await tx
      .select()
      .from(downtimeCauses)
      .where(and(eq(downtimeCauses.id, input.causeId), eq(downtimeCauses.projectId, projectId)));
    if (!cause)
      throw badRequest('That cause is not one of this drive’s causes. Reload and choose again.', [
        { path: 'causeId', message: 'Unknown cause.' },
      ]);
    if (!cause.active && before?.causeId !== cause.id) {
      throw badRequest(`${cause.name} is no longer in use; choose another cause or reactivate it.`, [
        { path: 'causeId', message: 'Cause not in use.' },
      ]);
    }
  }
  let stopStatus: string | null = null;
  if (input.stopId) {
    const [stop] = await tx
      .select({ id: stops.id, status: stops.status })
      .from(stops)
      .where(and(eq(stops.id, input.stopId), eq(stops.projectId, projectId)));
    if (!stop) throw badRequest('That stop is not one of this drive’s stops.', [{ path: 'stopId', message: 'Unknown stop.' }]);
    stopStatus = stop.status;
  }
  const start = new Date(input.startAt);
  const end = new Date(input.endAt);
  // Downtime that has not happened yet is only a planned stop's (decision 41); a few minutes allow for clocks.
  const now = new Date();
  if (end.getTime() > now.getTime() + FUTURE_TOLERANCE_MS && !(stopStatus && plannedStopStatuses.includes(stopStatus))) {
    const message = `This event ends ${formatSiteDateTime(end, tz)}, after now (${formatSiteDateTime(now, tz)}, site time). Downtime ahead can be recorded only for a planned stop: link the event to that stop, or record it once it has happened.`;
    throw badRequest(message, [{ path: 'endAt', message: 'In the future, and not linked to a planned stop.' }]);
  }
  const [other] = await tx
    .select({ id: downtimeEvents.id, startAt: downtimeEvents.startAt, endAt: downtimeEvents.endAt, cause: downtimeCauses.name })
    .from(downtimeEvents)
    .leftJoin(downtimeCauses, eq(downtimeCauses.id, downtimeEvents.causeId))
    .where(
      and(
        eq(downtimeEvents.projectId, projectId),
        lt(downtimeEvents.startAt, end),
        gt(downtimeEvents.endAt, start),
        before ? ne(downtimeEvents.id, before.id) : undefined,
      ),
    )
    .orderBy(asc(downtimeEvents.startAt))
    .limit(1);
  if (other) {
    const named = `the downtime event from ${formatSiteDateTime(other.startAt, tz)} to ${formatSiteDateTime(other.endAt, tz)} (${other.cause ?? 'no cause given yet'})`;
    throw new HttpError(
      400,
      `This overlaps ${named}. Change the times, or edit that event instead.`,
      [{ path: 'startAt', message: `Overlaps ${named}.` }],
      { overlapsEventId: other.id },
    );
  }
  return { startAt: start, endAt: end, causeId: input.causeId, note: input.note, stopId: input.stopId };
}

downtimeRouter.post('/events', requireProject('downtime.edit'), async (req, res) => {
  const projectId = projectIdOf(req);
  const me = requireUser(req);
  const input = downtimeEventInputSchema.parse(req.body);
  const row = await db.transaction(async (tx) => {
    await lockDowntime(tx, projectId);
    const project = await loadProject(tx, projectId);
    const values = await checkEvent(tx, projectId, project.siteTimeZone, input, null);
    const [created] = await tx
      .insert(downtimeEvents)
      .values({ projectId, ...values, source: 'manual', createdBy: me.id })
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'downtime_event', entityId: created.id, action: 'create', after: created });
    return (await listEvents(tx, projectId, eq(downtimeEvents.id, created.id)))[0];
  });
  reply<DowntimeEventRow>(res, 201, row);
});

downtimeRouter.put('/events/:eventId', requireProject('downtime.edit'), async (req, res) => {
  const projectId = projectIdOf(req);
  const eventId = idParam(req.params, 'eventId', 'That downtime event');
  const me = requireUser(req);
  const input = downtimeEventInputSchema.parse(req.body);
  const row = await db.transaction(async (tx) => {
    await lockDowntime(tx, projectId);
    const [before] = await tx
      .select()
      .from(downtimeEvents)
      .where(and(eq(downtimeEvents.id, eventId), eq(downtimeEvents.projectId, projectId)));
    if (!before) throw notFound('That downtime event');
    const project = await loadProject(tx, projectId);
    const values = await checkEvent(tx, projectId, project.siteTimeZone, input, before);
    const [after] = await tx.update(downtimeEvents).set(values).where(eq(downtimeEvents.id, eventId)).returning();
    await audit(tx, { userId: me.id, projectId, entity: 'downtime_event', entityId: eventId, action: 'update', before, after });
    return (await listEvents(tx, projectId, eq(downtimeEvents.id, eventId)))[0];
  });
  reply<DowntimeEventRow>(res, 200, row);
});

downtimeRouter.delete('/events/:eventId', requireProject('downtime.edit'), async (req, res) => {
  const projectId = projectIdOf(req);
  const eventId = idParam(req.params, 'eventId', 'That downtime event');
  const me = requireUser(req);
  await db.transaction(async (tx) => {
    const [before] = await tx
      .delete(downtimeEvents)
      .where(and(eq(downtimeEvents.id, eventId), eq(downtimeEvents.projectId, projectId)))
      .returning();
    if (!before) throw notFound('That downtime event');
    await audit(tx, { userId: me.id, projectId, entity: 'downtime_event', entityId: eventId, action: 'delete', before });
  });
  res.status(204).end();
});

/** Proposes every unexplained standstill between strokes as a 'gap' event (idempotent). */
downtimeRouter.post('/propose-from-gaps', requireProject('downtime.edit'), async (req, res) => {
  const projectId = projectIdOf(req);
  const me = requireUser(req);
  reply<ProposeFromGapsResult>(res, 200, await db.transaction((tx) => proposeGapEvents(tx, projectId, me.id)));
});

// Reports ---------------------------------------------------------------------------------------

/** Pivot of (cause, column, hours) rows: one line per cause with a column each and a total. */
function pivot(rows: { cause: string; cutterWork: boolean; hours: number; column: string }[], columns: string[]) {
  const causes = [...new Set(rows.map((r) => r.cause))].sort();
  return causes.map((cause) => {
    const mine = rows.filter((r) => r.cause === cause);
    const cells = columns.map((c) => mine.filter((r) => r.column === c).reduce((s, r) => s + r.hours, 0));
    return [cause, mine[0].cutterWork ? 'yes' : 'no', ...cells, cells.reduce((s, h) => s + h, 0)];
  });
}

/** Downtime by cause × ISO week and × shift, utilisation, cutter-work share, metres per day, Pareto; or one table as CSV. */
downtimeRouter.get('/report', requireProject('downtime.read'), async (req, res) => {
  const projectId = projectIdOf(req);
  const q = reportQuerySchema.parse(req.query);
  const report = await db.transaction(async (tx) => {
    const project = await loadProject(tx, projectId);
    return buildDowntimeReport(tx, project, await resolvePeriod(tx, project, q, new Date()));
  });
  if (q.format === 'json') {
    reply<DowntimeReport>(res, 200, report);
    return;
  }
  const name = `downtime-${q.table}-${report.from}-${report.to}`;
  if (q.table === 'week')
    sendCsv(
      res,
      name,
      ['cause', 'cutter_work', ...report.weeks.map(hoursCol), hoursCol('total')],
      pivot(
        report.byWeek.map((r) => ({ ...r, column: r.isoWeek })),
        report.weeks,
      ),
    );
  else if (q.table === 'shift')
    sendCsv(
      res,
      name,
      ['cause', 'cutter_work', ...report.shifts.map(hoursCol), hoursCol('total')],
      pivot(
        report.byShift.map((r) => ({ ...r, column: r.shift })),
        report.shifts,
      ),
    );
  else {
    sendCsv(
      res,
      name,
      ['cause', 'cutter_work', hoursCol('hours'), pctCol('share_pct'), pctCol('cumulative_pct')],
      report.pareto.map((r) => [r.cause, r.cutterWork ? 'yes' : 'no', r.hours, r.share * 100, r.cumulativeShare * 100]),
    );
  }
});

/** Cutter cost per metre and per m³ by week and by ground type; or one table as CSV. */
downtimeRouter.get('/cost', requireProject('downtime.read'), async (req, res) => {
  const projectId = projectIdOf(req);
  const q = costQuerySchema.parse(req.query);
  const cost = await db.transaction(async (tx) => {
    const project = await loadProject(tx, projectId);
    return buildCutterCost(tx, project, await resolvePeriod(tx, project, q, new Date()));
  });
  if (q.format === 'json') {
    reply<CutterCostReport>(res, 200, cost);
    return;
  }
  const rows = q.table === 'week' ? cost.byWeek : cost.byGround;
  const money = (header: string): CsvColumn => ({ header, decimals: 2 });
  sendCsv(
    res,
    `cutter-cost-${q.table}-${cost.from}-${cost.to}`,
    [
      q.table === 'week' ? 'iso_week' : 'ground_type',
      { header: 'advance_m', decimals: 1 },
      { header: 'excavated_m3', decimals: 1 },
      money('parts_cost'),
      money('labour_cost'),
      money('total_cost'),
      money('cost_per_m'),
      money('cost_per_m3'),
      { header: 'rings_per_1000_m3', decimals: 3 },
    ],
    rows.map((r) => [r.key, r.advanceM, r.excavatedM3, r.partsCost, r.labourCost, r.totalCost, r.costPerM, r.costPerM3, r.ringsPer1000M3]),
  );
});
