import { and, asc, count, desc, eq, gte, lte, sql, type SQL } from 'drizzle-orm';
import { Router } from 'express';
import { csvHead, csvRecord } from '../../shared/csv-writer';
import { z } from 'zod';
import { advanceLogFields } from '../../shared/csv-headers';
import {
  advanceLogColumnMappingSchema,
  type AdvanceLogImported,
  type AdvanceLogMapping,
  type DailyAdvance,
  type StrokePage,
} from '../../shared/schemas/advance-log';
import { strokeListQuerySchema } from '../../shared/schemas/geology';
import { isoWithSiteOffset } from '../../shared/site-time';
import { db } from '../db/client';
import { projects, strokes } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { readAdvanceLogCsv } from '../lib/csv/advance-log';
import { chosenMapping, csvRefusal, requireRawCsv, storedMapping, unusedColumnWarnings, uploadStream } from '../lib/csv/upload';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import { importAdvanceLog } from '../services/advance-log-import';

export const strokesRouter = Router({ mergeParams: true });

const sortable = {
  ringNumber: strokes.ringNumber,
  startTime: strokes.startTime,
  chainageStartM: strokes.chainageStartM,
  penetrationMmPerRev: strokes.penetrationMmPerRev,
  revolutions: strokes.revolutions,
  thrustKn: strokes.thrustKn,
  torqueKnm: strokes.torqueKnm,
  rpm: strokes.rpm,
};

async function siteTimeZone(projectId: string) {
  const [p] = await db.select({ tz: projects.siteTimeZone }).from(projects).where(eq(projects.id, projectId));
  return p.tz;
}

function filters(projectId: string, q: ReturnType<typeof strokeListQuerySchema.parse>, tz: string): SQL | undefined {
  return and(
    eq(strokes.projectId, projectId),
    q.ringFrom !== undefined ? gte(strokes.ringNumber, q.ringFrom) : undefined,
    q.ringTo !== undefined ? lte(strokes.ringNumber, q.ringTo) : undefined,
    // Dates are the site's calendar days.
    q.from ? sql`${strokes.startTime} >= (${q.from}::date::timestamp at time zone ${tz})` : undefined,
    q.to ? sql`${strokes.startTime} < ((${q.to}::date + 1)::timestamp at time zone ${tz})` : undefined,
  );
}

/** One page of the advance log, sorted and filtered in PostgreSQL (50,000 rows stay fast). */
strokesRouter.get('/', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const q = strokeListQuerySchema.parse(req.query);
  const where = filters(projectId, q, await siteTimeZone(projectId));
  const column = sortable[q.sort];
  const [rows, [{ total }]] = await Promise.all([
    db
      .select()
      .from(strokes)
      .where(where)
      .orderBy(q.dir === 'asc' ? asc(column) : desc(column), asc(strokes.ringNumber))
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize),
    db.select({ total: count() }).from(strokes).where(where),
  ]);
  reply<StrokePage>(res, 200, { rows, total, page: q.page, pageSize: q.pageSize });
});

/** The filtered log as CSV, streamed. */
strokesRouter.get('/export.csv', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const q = strokeListQuerySchema.parse(req.query);
  const tz = await siteTimeZone(projectId);
  const rows = await db
    .select()
    .from(strokes)
    .where(filters(projectId, q, tz))
    .orderBy(asc(strokes.ringNumber));
  res.set({ 'Content-Type': 'text/csv; charset=utf-8', 'Content-Disposition': 'attachment; filename="advance-log.csv"' });
  // Numbers in full (no `decimals`): this file is read back by the import and must change nothing.
  let chunk = csvHead([
    'ring',
    'start_time',
    'end_time',
    'chainage_start_m',
    'chainage_end_m',
    'revolutions',
    'penetration_mm_per_rev',
    'rpm',
    'thrust_kn',
    'torque_knm',
  ]);
  for (const r of rows) {
    // Site time with its offset: what the site reads, unambiguous, and read back by the import.
    chunk += csvRecord([
      r.ringNumber,
      isoWithSiteOffset(r.startTime, tz),
      isoWithSiteOffset(r.endTime, tz),
      r.chainageStartM,
      r.chainageEndM,
      r.revolutions,
      r.penetrationMmPerRev,
      r.rpm,
      r.thrustKn,
      r.torqueKnm,
    ]);
    if (chunk.length > 64 * 1024) {
      res.write(chunk);
      chunk = '';
    }
  }
  res.end(chunk);
});

/** Metres advanced per calendar day in the site's time zone (for the small chart). */
strokesRouter.get('/daily', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const tz = await siteTimeZone(projectId);
  const rows = await db.execute<{ day: string; advance_m: number; strokes: number }>(sql`
    select to_char((end_time at time zone ${tz})::date, 'YYYY-MM-DD') as day,
           sum(abs(chainage_end_m - chainage_start_m))::float8 as advance_m, count(*)::int as strokes
    from strokes where project_id = ${projectId}
    group by 1 order by 1`);
  reply<DailyAdvance[]>(
    res,
    200,
    rows.rows.map((r) => ({ day: r.day, advanceM: r.advance_m, strokes: r.strokes })),
  );
});

const importQuerySchema = z.object({
  replace: z
    .enum(['true', 'false'])
    .default('false')
    .transform((v) => v === 'true'),
  /** JSON object: field → header, chosen on the mapping screen; the stored mapping is used when absent. */
  mapping: z.string().max(4000).optional(),
});

/**
 * Imports an advance-log CSV sent as the raw request body (streamed, up to 50 MB / 50,000 rows).
 * All or nothing; rows already stored with the same values are skipped; conflicts need replace=true.
 */
strokesRouter.post('/import', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const query = importQuerySchema.parse(req.query);
  requireRawCsv(req);
  const columns = await chosenMapping(
    projectId,
    'advance_log',
    query.mapping,
    advanceLogColumnMappingSchema as z.ZodType<Record<string, string>>,
  );
  const [project] = await db.select().from(projects).where(eq(projects.id, projectId));
  const upload = uploadStream(req);
  const result = await readAdvanceLogCsv(upload.body, { timeZone: project.siteTimeZone, direction: project.driveDirection, ...columns });
  await upload.drain();
  if (!result.ok) throw csvRefusal(result.errors, result.errorCount, result.detected);
  const outcome = await db.transaction((tx) =>
    importAdvanceLog(tx, projectId, me.id, result.rows, {
      replace: query.replace,
      mapping: result.detected.mapping as Record<string, string>,
    }),
  );
  const warnings = [
    ...unusedColumnWarnings(result.unusedColumns, { what: 'the advance log', keptAs: 'with each ring as extra data', canMap: true }),
    ...result.warnings,
  ];
  reply<AdvanceLogImported>(res, outcome.inserted + outcome.replaced > 0 ? 201 : 200, { ...outcome, warnings, detected: result.detected });
});

/** The remembered column mapping of the advance log, with the fields Kerfwise knows. */
strokesRouter.get('/mapping', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  reply<AdvanceLogMapping>(res, 200, { mapping: await storedMapping(projectId, 'advance_log'), fields: advanceLogFields });
});
