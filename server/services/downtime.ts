/**
 * Downtime for the site manager: the drive's causes (defaults created with the project), site settings,
 * gap proposals from the advance log, and the reports (downtime by cause × week and × shift,
 * utilisation, cutter-work share, metres per day, Pareto; cutter cost per m and per m³). Shared by
 * the downtime routes, the weekly digest job and the demo loader. All times in the site's zone.
 */
import { and, asc, eq, gt, gte, lt, lte, max, sql } from 'drizzle-orm';
import {
  changePartsCost,
  cutterCostBy,
  faceAreaM2,
  type ChangeOutcome,
  type ChangePartKind,
  type CutterCostEntry,
} from '../../shared/domain/cutter-cost';
import {
  cutterWorkShare,
  downtimeHoursByCauseAndShift,
  downtimeHoursByCauseAndWeek,
  isoWeeksTouching,
  metresPerDay,
  proposeDowntimeFromGaps,
  uncoveredParts,
  utilisation,
  type DowntimeEvent,
} from '../../shared/domain/downtime';
import {
  NO_CAUSE_LABEL,
  type CutterCostReport,
  type DowntimeCause,
  type DowntimeReport,
  type ProposeFromGapsResult,
  type ReportPeriod,
  type SiteSettings,
} from '../../shared/schemas/downtime';
import { addSiteDays, siteDay, siteIsoWeek, siteMidnight, siteWeekStart } from '../../shared/site-time';
import type { DbOrTx } from '../db/client';
import { downtimeCauses, downtimeEvents, geologySections, groundTypes, parts, projects, siteSettings, strokes } from '../db/schema';
import { audit } from '../lib/audit';

type Project = typeof projects.$inferSelect;

/**
 * The causes a drive starts with. Cutter inspection and cutter change are cutter work. A
 * compressed-air stop is counted as cutter work too: in Kerfwise an intervention under compressed
 * air is made to reach the discs, and its lock-in, lock-out and waiting time is part of what cutter
 * work costs. A site that also uses compressed air for other work records that under the matching
 * cause (machine breakdown, other) or clears the flag.
 */
export const DEFAULT_CAUSES: readonly { name: string; cutterWork: boolean }[] = [
  { name: 'Cutter inspection', cutterWork: true },
  { name: 'Cutter change', cutterWork: true },
  { name: 'Compressed-air stop', cutterWork: true },
  { name: 'Machine breakdown', cutterWork: false },
  { name: 'Lining supply', cutterWork: false },
  { name: 'Muck removal', cutterWork: false },
  { name: 'Survey', cutterWork: false },
  { name: 'Waiting', cutterWork: false },
  { name: 'Other', cutterWork: false },
];

/** Settings until the site manager saves its own: two 12-hour shifts; 90 min is the schema's default gap. */
export const DEFAULT_SITE_SETTINGS = {
  shifts: [
    { name: 'Day', start: '06:00' },
    { name: 'Night', start: '18:00' },
  ],
  labourRatePerHour: 0,
  gapMinutes: 90,
};

/** Seeds the default causes into a drive that has none (idempotent, also under a race); called when a project is created, never by a read. */
export async function ensureDefaultCauses(tx: DbOrTx, projectId: string, userId: string | null): Promise<void> {
  const [any] = await tx.select({ id: downtimeCauses.id }).from(downtimeCauses).where(eq(downtimeCauses.projectId, projectId)).limit(1);
  if (any) return;
  const rows = await tx
    .insert(downtimeCauses)
    .values(DEFAULT_CAUSES.map((c, i) => ({ projectId, name: c.name, cutterWork: c.cutterWork, sortOrder: (i + 1) * 10 })))
    .onConflictDoNothing()
    .returning();
  for (const row of rows) await audit(tx, { userId, projectId, entity: 'downtime_cause', entityId: row.id, action: 'create', after: row });
}

export async function listCauses(tx: DbOrTx, projectId: string): Promise<DowntimeCause[]> {
  return tx
    .select({
      id: downtimeCauses.id,
      name: downtimeCauses.name,
      cutterWork: downtimeCauses.cutterWork,
      sortOrder: downtimeCauses.sortOrder,
      active: downtimeCauses.active,
    })
    .from(downtimeCauses)
    .where(eq(downtimeCauses.projectId, projectId))
    .orderBy(asc(downtimeCauses.sortOrder), asc(downtimeCauses.name));
}

export async function readSiteSettings(tx: DbOrTx, projectId: string): Promise<SiteSettings> {
  const [row] = await tx.select().from(siteSettings).where(eq(siteSettings.projectId, projectId));
  if (!row) return { ...DEFAULT_SITE_SETTINGS, saved: false };
  return { shifts: row.shifts, labourRatePerHour: Number(row.labourRatePerHour), gapMinutes: row.gapMinutes, saved: true };
}

/** Serialises downtime writes of one drive, so two overlapping events cannot both pass the overlap check. */
export async function lockDowntime(tx: DbOrTx, projectId: string): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`kerfwise-downtime:${projectId}`}))`);
}

/**
 * Creates a 'gap' event (cause still to give) for every standstill between strokes longer than the
 * site's gap setting, less whatever existing events already cover; what remains must itself be
 * longer than the setting. Running it again creates nothing new.
 */
export async function proposeGapEvents(tx: DbOrTx, projectId: string, userId: string | null): Promise<ProposeFromGapsResult> {
  await lockDowntime(tx, projectId);
  const { gapMinutes } = await readSiteSettings(tx, projectId);
  const boring = await tx.select({ start: strokes.startTime, end: strokes.endTime }).from(strokes).where(eq(strokes.projectId, projectId));
  const covered = await tx
    .select({ start: downtimeEvents.startAt, end: downtimeEvents.endAt })
    .from(downtimeEvents)
    .where(eq(downtimeEvents.projectId, projectId))
    .orderBy(asc(downtimeEvents.startAt));
  const pieces = proposeDowntimeFromGaps(boring, gapMinutes)
    .flatMap((gap) => uncoveredParts(gap, covered))
    .filter((p) => p.end.getTime() - p.start.getTime() > gapMinutes * 60_000);
  if (pieces.length === 0) return { created: 0, hours: 0, gapMinutes };
  const rows = await tx
    .insert(downtimeEvents)
    .values(
      pieces.map((p) => ({
        projectId,
        startAt: p.start,
        endAt: p.end,
        source: 'gap',
        createdBy: userId,
        note: 'Standstill between strokes in the advance log',
      })),
    )
    .returning();
  for (const row of rows) await audit(tx, { userId, projectId, entity: 'downtime_event', entityId: row.id, action: 'create', after: row });
  const hours = pieces.reduce((s, p) => s + (p.end.getTime() - p.start.getTime()) / 3_600_000, 0);
  return { created: rows.length, hours, gapMinutes };
}

// Periods -------------------------------------------------------------------------------------

/** A period of site calendar days with the instants it spans. */
export interface Period {
  from: string;
  to: string;
  start: Date;
  end: Date;
  timeZone: string;
}

/** The period of days `from`–`to` (both included) in the site's zone. */
export function periodOfDays(from: string, to: string, timeZone: string): Period {
  return { from, to, timeZone, start: siteMidnight(from, timeZone), end: siteMidnight(addSiteDays(to, 1, timeZone), timeZone) };
}

/** The whole ISO week before the one that contains `now`, in the site's zone. */
export function previousIsoWeek(now: Date, timeZone: string): Period & { isoWeek: string } {
  const end = siteWeekStart(now, timeZone);
  const start = siteWeekStart(now, timeZone, -1);
  return {
    from: siteDay(start, timeZone),
    to: addSiteDays(siteDay(end, timeZone), -1, timeZone),
    start,
    end,
    timeZone,
    isoWeek: siteIsoWeek(start, timeZone),
  };
}

/**
 * The period asked for; without `to`, the last day up to today with strokes or downtime (today
 * without data, never before `from`): data after now (a planned stop's event ahead, a clock gone
 * wrong) never moves the default period into the future; without `from`, the Monday seven weeks
 * before `to`'s week (eight ISO weeks).
 */
export async function resolvePeriod(tx: DbOrTx, project: Project, q: { from?: string; to?: string }, now: Date): Promise<Period> {
  const tz = project.siteTimeZone;
  let to = q.to;
  if (!to) {
    // One query at a time: `tx` may be a transaction's single connection.
    const [s] = await tx
      .select({ at: max(strokes.endTime) })
      .from(strokes)
      .where(and(eq(strokes.projectId, project.id), lte(strokes.endTime, now)));
    // An event under way counts up to now; one that has not started yet does not count.
    const [e] = await tx
      .select({ at: sql<Date | string | null>`max(least(${downtimeEvents.endAt}, ${now.toISOString()}::timestamptz))` })
      .from(downtimeEvents)
      .where(and(eq(downtimeEvents.projectId, project.id), lte(downtimeEvents.startAt, now)));
    const latest = [s?.at, e?.at].flatMap((d) => (d ? [new Date(d)] : [])).sort((a, b) => b.getTime() - a.getTime())[0];
    // An event ending exactly at midnight belongs to the day before.
    to = siteDay(latest ? new Date(latest.getTime() - 1) : now, tz);
    if (q.from && q.from > to) to = q.from;
  }
  const from = q.from ?? siteDay(siteWeekStart(siteMidnight(to, tz), tz, -7), tz);
  return periodOfDays(from, to, tz);
}

function periodFields(p: Period): ReportPeriod {
  return {
    from: p.from,
    to: p.to,
    timeZone: p.timeZone,
    startAt: p.start.toISOString(),
    endAt: p.end.toISOString(),
    hours: (p.end.getTime() - p.start.getTime()) / 3_600_000,
  };
}

/** Events overlapping the period, clipped to it, each with its cause's label and cutter-work flag. */
async function eventsIn(tx: DbOrTx, projectId: string, p: Period) {
  const rows = await tx
    .select({
      id: downtimeEvents.id,
      start: downtimeEvents.startAt,
      end: downtimeEvents.endAt,
      cause: downtimeCauses.name,
      cutterWork: downtimeCauses.cutterWork,
    })
    .from(downtimeEvents)
    .leftJoin(downtimeCauses, eq(downtimeCauses.id, downtimeEvents.causeId))
    .where(and(eq(downtimeEvents.projectId, projectId), lt(downtimeEvents.startAt, p.end), gt(downtimeEvents.endAt, p.start)));
  return rows.map((r) => ({
    id: r.id,
    cause: r.cause ?? NO_CAUSE_LABEL,
    cutterWork: r.cutterWork ?? false,
    explained: r.cause != null,
    start: new Date(Math.max(r.start.getTime(), p.start.getTime())),
    end: new Date(Math.min(r.end.getTime(), p.end.getTime())),
  }));
}

const eventHours = (e: DowntimeEvent) => (e.end.getTime() - e.start.getTime()) / 3_600_000;

/** Downtime by cause × ISO week and × shift, utilisation, cutter-work share, metres per day and the Pareto of causes. */
export async function buildDowntimeReport(tx: DbOrTx, project: Project, p: Period): Promise<DowntimeReport> {
  const tz = p.timeZone;
  const events = await eventsIn(tx, project.id, p);
  const settings = await readSiteSettings(tx, project.id);
  const bored = await tx
    .select({ start: strokes.startTime, end: strokes.endTime, fromM: strokes.chainageStartM, toM: strokes.chainageEndM })
    .from(strokes)
    .where(and(eq(strokes.projectId, project.id), lt(strokes.startTime, p.end), gt(strokes.endTime, p.start)));
  const flag = new Map(events.map((e) => [e.cause, e.cutterWork]));
  const totals = new Map<string, number>();
  for (const e of events) totals.set(e.cause, (totals.get(e.cause) ?? 0) + eventHours(e));
  const downtimeHours = [...totals.values()].reduce((s, h) => s + h, 0);
  let running = 0;
  const pareto = [...totals]
    .sort(([a, x], [b, y]) => y - x || a.localeCompare(b))
    .map(([cause, hours]) => {
      running += hours;
      return { cause, cutterWork: flag.get(cause) ?? false, hours, share: hours / downtimeHours, cumulativeShare: running / downtimeHours };
    });
  // Advance counts in the period where its stroke ended (as the advance log's daily totals do).
  const advanceM = bored
    .filter((s) => s.end.getTime() >= p.start.getTime() && s.end.getTime() < p.end.getTime())
    .reduce((sum, s) => sum + Math.abs(s.toM - s.fromM), 0);
  const periodHours = (p.end.getTime() - p.start.getTime()) / 3_600_000;
  const used = utilisation(bored, p.start, p.end);
  const unexplained = events.filter((e) => !e.explained);
  return {
    ...periodFields(p),
    weeks: isoWeeksTouching(p.start, p.end, p.timeZone),
    shifts: settings.shifts.map((s) => s.name),
    byWeek: downtimeHoursByCauseAndWeek(events, tz).map((r) => ({ ...r, cutterWork: flag.get(r.cause) ?? false })),
    byShift: downtimeHoursByCauseAndShift(
      events,
      settings.shifts.map((s) => ({ name: s.name, startLocal: s.start })),
      tz,
    ).map((r) => ({ ...r, cutterWork: flag.get(r.cause) ?? false })),
    pareto,
    downtimeHours,
    unexplainedHours: unexplained.reduce((s, e) => s + eventHours(e), 0),
    unexplainedEvents: unexplained.length,
    boringHours: used * periodHours,
    utilisation: used,
    cutterWorkShare: cutterWorkShare(
      events,
      [...flag].filter(([, cutter]) => cutter).map(([cause]) => cause),
    ),
    advanceM,
    metresPerDay: metresPerDay(advanceM, p.start, p.end),
  };
}

// Cutter cost -----------------------------------------------------------------------------------

export const PARTS_RULE =
  'Every cutter change uses parts, counted in the week and ground of the change (the removal): a rebuild uses one ring (when a new ring ' +
  'was fitted), one bearing kit and one seal kit (when new bearings or seals were fitted); a scrapped cutter uses one cutter assembly; ' +
  'a change whose workshop outcome is not recorded yet counts as a rebuild with a new ring (estimated). Each is priced at the unit cost ' +
  'of the catalogue part of that kind for the cutter’s disc size (a part without a size fits every size; the lowest code first); a ' +
  'row names the parts without a price. Labour is cutter-work downtime × the labour rate, in the ground where the machine stood.';

const UNKNOWN_GROUND = 'Unknown ground';

/** Chainage reached by the last stroke started at or before each time; null before the first stroke. */
async function chainagesAt(tx: DbOrTx, projectId: string, times: Date[]): Promise<(number | null)[]> {
  if (times.length === 0) return [];
  const list = `{${times.map((t) => t.toISOString()).join(',')}}`;
  const { rows } = await tx.execute<{ chainage_m: number | null }>(sql`
    select (select s.chainage_end_m from strokes s where s.project_id = ${projectId} and s.start_time <= t.at order by s.start_time desc limit 1) as chainage_m
    from unnest(${list}::timestamptz[]) with ordinality as t(at, n) order by t.n`);
  return rows.map((r) => r.chainage_m);
}

/** Cutter cost (parts and labour) per metre and per m³ by week and by ground type, rings per 1,000 m³. */
export async function buildCutterCost(tx: DbOrTx, project: Project, p: Period): Promise<CutterCostReport> {
  const tz = p.timeZone;
  const sections = await tx
    .select({ fromM: geologySections.chainageFromM, toM: geologySections.chainageToM, ground: groundTypes.name })
    .from(geologySections)
    .innerJoin(groundTypes, eq(groundTypes.id, geologySections.groundTypeId))
    .where(eq(geologySections.projectId, project.id));
  const [first] = await tx
    .select({ m: strokes.chainageStartM })
    .from(strokes)
    .where(eq(strokes.projectId, project.id))
    .orderBy(asc(strokes.startTime))
    .limit(1);
  const groundAt = (m: number | null) => {
    const at = m ?? first?.m ?? project.startChainageM;
    return sections.find((s) => at >= s.fromM && at < s.toM)?.ground ?? UNKNOWN_GROUND;
  };
  const entries: CutterCostEntry[] = [];
  const zero = { advanceM: 0, partsCost: 0, labourHours: 0, ringsUsed: 0 };

  // Advance: each stroke ended in the period, in the ground at its middle.
  const bored = await tx
    .select({ end: strokes.endTime, fromM: strokes.chainageStartM, toM: strokes.chainageEndM })
    .from(strokes)
    .where(and(eq(strokes.projectId, project.id), gte(strokes.endTime, p.start), lt(strokes.endTime, p.end)));
  for (const s of bored)
    entries.push({
      ...zero,
      week: siteIsoWeek(s.end, tz),
      groundType: groundAt((s.fromM + s.toM) / 2),
      advanceM: Math.abs(s.toM - s.fromM),
    });

  // Labour: cutter-work downtime, split at local Mondays, in the ground where the machine stood.
  const cutterWork = (await eventsIn(tx, project.id, p)).filter((e) => e.cutterWork);
  const standing = await chainagesAt(
    tx,
    project.id,
    cutterWork.map((e) => e.start),
  );
  const labour = downtimeHoursByCauseAndWeek(
    cutterWork.map((e, i) => ({ ...e, cause: groundAt(standing[i]) })),
    tz,
  );
  for (const l of labour) entries.push({ ...zero, week: l.isoWeek, groundType: l.cause, labourHours: l.hours });

  // Parts: workshop outcomes, charged to the removal that sent the cutter there.
  const catalogue = await tx.select().from(parts).where(eq(parts.projectId, project.id)).orderBy(asc(parts.code));
  const partFor = (kind: string, discSizeIn: number) =>
    catalogue.find((x) => x.kind === kind && x.discSizeIn === discSizeIn) ?? catalogue.find((x) => x.kind === kind && x.discSizeIn == null);
  // Every change (a removal) in the period, with the workshop outcome that followed it if any; and outcomes
  // recorded for cutters with no removal on record, at the outcome's time.
  const { rows: changes } = await tx.execute<{
    at: Date | string;
    disc_size_in: number;
    chainage_m: number | null;
    outcome_kind: 'rebuilt' | 'scrapped' | null;
    outcome_details: Record<string, unknown> | null;
  }>(sql`
    select r.at, c.disc_size_in, (r.details->>'chainageM')::float8 as chainage_m, o.kind as outcome_kind, o.details as outcome_details
    from cutter_events r
    join cutters c on c.id = r.cutter_id
    left join lateral (
      select o.kind, o.details from cutter_events o
      where o.cutter_id = r.cutter_id and o.kind in ('rebuilt', 'scrapped') and o.at >= r.at
        and not exists (select 1 from cutter_events n where n.cutter_id = r.cutter_id and n.kind = 'removed' and n.at > r.at and n.at <= o.at)
      order by o.at asc limit 1) o on true
    where r.project_id = ${project.id} and r.kind = 'removed'
      and r.at >= ${p.start.toISOString()}::timestamptz and r.at < ${p.end.toISOString()}::timestamptz
    union all
    select e.at, c.disc_size_in, null, e.kind, e.details
    from cutter_events e
    join cutters c on c.id = e.cutter_id
    where e.project_id = ${project.id} and e.kind in ('rebuilt', 'scrapped')
      and not exists (select 1 from cutter_events r where r.cutter_id = e.cutter_id and r.kind = 'removed' and r.at <= e.at)
      and e.at >= ${p.start.toISOString()}::timestamptz and e.at < ${p.end.toISOString()}::timestamptz`);
  const missingChainage = changes.filter((o) => o.chainage_m == null);
  const machineAt = await chainagesAt(
    tx,
    project.id,
    missingChainage.map((o) => new Date(o.at)),
  );
  const partName: Record<ChangePartKind, string> = {
    ring: 'ring',
    'bearing-kit': 'bearing kit',
    'seal-kit': 'seal kit',
    'cutter-assembly': 'cutter assembly',
  };
  let unpricedParts = 0;
  for (const o of changes) {
    const d = o.outcome_details ?? {};
    const outcome: ChangeOutcome =
      o.outcome_kind === 'scrapped'
        ? { kind: 'scrapped' }
        : o.outcome_kind === 'rebuilt'
          ? { kind: 'rebuilt', newRing: d.newRing !== false, newBearings: d.newBearings === true, newSeals: d.newSeals === true }
          : { kind: 'not-recorded' };
    const cost = changePartsCost(outcome, (kind) => {
      const part = partFor(kind, o.disc_size_in);
      return part ? Number(part.unitCost) : null;
    });
    unpricedParts += cost.missing.length;
    const chainage = o.chainage_m ?? machineAt[missingChainage.indexOf(o)];
    entries.push({
      ...zero,
      week: siteIsoWeek(new Date(o.at), tz),
      groundType: groundAt(chainage),
      partsCost: cost.partsCost,
      ringsUsed: cost.ringsUsed,
      changes: 1,
      estimatedChanges: cost.estimated ? 1 : 0,
      missingPrices: cost.missing.map((k) => `${o.disc_size_in}″ ${partName[k]}`),
    });
  }

  const { labourRatePerHour } = await readSiteSettings(tx, project.id);
  const d = project.excavatedDiameterM;
  const [total] = cutterCostBy(
    [{ ...zero, week: 'Total', groundType: '' }, ...entries.map((e) => ({ ...e, week: 'Total' }))],
    'week',
    d,
    labourRatePerHour,
  );
  return {
    ...periodFields(p),
    diameterM: d,
    faceAreaM2: faceAreaM2(d),
    labourRatePerHour,
    currency: catalogue[0]?.currency ?? null,
    partsRule: PARTS_RULE,
    unpricedParts,
    byWeek: cutterCostBy(entries, 'week', d, labourRatePerHour),
    byGround: cutterCostBy(entries, 'groundType', d, labourRatePerHour),
    total,
  };
}
