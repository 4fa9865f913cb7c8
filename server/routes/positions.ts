import { and, asc, eq, sql } from 'drizzle-orm';
import { Router } from 'express';
import { Readable } from 'node:stream';
import {
  layoutCsvInputSchema,
  layoutInputSchema,
  type LayoutPosition,
  type LayoutSaved,
  type Measurement,
  type PositionDetail,
  type PositionHistories,
  positionHistoryQuerySchema,
  type PositionInput,
} from '../../shared/schemas/cutterhead';
import type { Sendable } from '../../shared/schemas/wire';
import { db } from '../db/client';
import { cutters, fittings, inspectionEntries, photos, positions, projects } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { readLayoutCsv } from '../lib/csv/layout';
import { csvRefusal, unusedColumnWarnings } from '../lib/csv/upload';
import { badRequest, HttpError, notFound } from '../lib/http-error';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import { driveDataChanged } from '../services/drive-data';
import { listPositions } from '../services/positions';

export const positionsRouter = Router({ mergeParams: true });

positionsRouter.get('/', requireProject('layout.read'), async (req, res) => {
  reply<LayoutPosition[]>(res, 200, await listPositions(idParam(req.params, 'projectId', 'That project')));
});

/** Checks a whole layout against the drive: unique numbers, radii inside the bore. Returns issues by row. */
function layoutIssues(list: PositionInput[], excavatedDiameterM: number, rowLabel: (i: number) => string) {
  const issues: { path: string; message: string }[] = [];
  const maxRadiusMm = (excavatedDiameterM * 1000) / 2;
  const seen = new Map<number, number>();
  list.forEach((p, i) => {
    const first = seen.get(p.number);
    if (first !== undefined)
      issues.push({ path: `${rowLabel(i)}.number`, message: `Position ${p.number} appears twice (also ${rowLabel(first)}).` });
    else seen.set(p.number, i);
    if (p.trackRadiusMm > maxRadiusMm) {
      issues.push({
        path: `${rowLabel(i)}.trackRadiusMm`,
        message: `Track radius ${p.trackRadiusMm} mm is beyond the excavated radius (${maxRadiusMm} mm).`,
      });
    }
  });
  return issues;
}

/** Saves the layout (create or update by position number) in one transaction; wear-limit changes are audited. */
async function saveLayout(projectId: string, userId: string, list: PositionInput[], rowLabel: (i: number) => string) {
  const [project] = await db.select().from(projects).where(eq(projects.id, projectId));
  const issues = layoutIssues(list, project.excavatedDiameterM, rowLabel);
  if (issues.length > 0) throw badRequest(`The layout has ${issues.length} problem(s); nothing was saved.`, issues);
  return db.transaction(async (tx) => {
    const existing = await tx.select().from(positions).where(eq(positions.projectId, projectId));
    const byNumber = new Map(existing.map((p) => [p.number, p]));
    let created = 0;
    let updated = 0;
    for (const p of list) {
      const before = byNumber.get(p.number);
      if (!before) {
        const [row] = await tx
          .insert(positions)
          .values({ ...p, projectId })
          .returning();
        await audit(tx, { userId, projectId, entity: 'position', entityId: row.id, action: 'create', after: row });
        created++;
        continue;
      }
      const changed = (Object.keys(p) as (keyof PositionInput)[]).some((k) => p[k] !== before[k]);
      if (!changed) continue;
      const [after] = await tx
        .update(positions)
        .set({ ...p, updatedAt: sql`now()` })
        .where(eq(positions.id, before.id))
        .returning();
      // A new radius changes every distance the position's discs have rolled.
      if (before.trackRadiusMm !== p.trackRadiusMm) await driveDataChanged(tx, projectId, { rewritesPast: true, refreshNow: false });
      await audit(tx, {
        userId,
        projectId,
        entity: 'position',
        entityId: before.id,
        action: before.wearLimitMm !== p.wearLimitMm ? 'change_wear_limit' : 'update',
        before,
        after,
      });
      updated++;
    }
    return { created, updated, unchanged: list.length - created - updated };
  });
}

positionsRouter.put('/', requireProject('layout.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const { positions: list } = layoutInputSchema.parse(req.body);
  reply<LayoutSaved>(res, 200, await saveLayout(projectId, requireUser(req).id, list, (i) => `positions.${i}`));
});

/**
 * Imports the layout from CSV text (`{ csv }`), read by the one CSV reader (server/lib/csv/):
 * columns by name (number, track_radius_mm, class, disc_size_in, tilt_deg, wear_limit_mm,
 * twin_disc, angle_deg and their synonyms), every problem by row and column, all or nothing.
 * Issue paths are "row N.field", as for the layout rules checked when saving.
 */
positionsRouter.post('/import', requireProject('layout.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const { csv } = layoutCsvInputSchema.parse(req.body);
  const result = await readLayoutCsv(Readable.from([Buffer.from(csv, 'utf8')]));
  const fieldOf = new Map(Object.entries(result.detected.mapping).map(([field, header]) => [header, field]));
  if (!result.ok) {
    const refusal = csvRefusal(result.errors, result.errorCount, result.detected);
    const issues = refusal.issues.map((issue) =>
      issue.row ? { ...issue, path: `row ${issue.row}${issue.column ? `.${fieldOf.get(issue.column) ?? issue.column}` : ''}` } : issue,
    );
    throw new HttpError(refusal.status, refusal.message, issues, refusal.details);
  }
  const rows = result.rows;
  const saved = await saveLayout(
    projectId,
    requireUser(req).id,
    rows.map((r) => r.data),
    (i) => `row ${rows[i].line}`,
  );
  reply<LayoutSaved>(res, 200, {
    ...saved,
    warnings: unusedColumnWarnings(result.unusedColumns, { what: 'a cutterhead layout', canMap: false }),
  });
});

/** A measurement's columns (shared/schemas Measurement) and the tables they come from, for both history reads. */
const measurementColumns =
  sql.raw(`e.id, e.wear_mm as "wearMm", e.conditions, e.action, e.note, e.remeasured, e.recorded_at as "recordedAt",
  r.started_at as "roundAt", r.chainage_m as "chainageM", r.ring_number as "ringNumber", e.fitting_id as "fittingId",
  c.serial, rc.serial as "removedSerial", fc.serial as "fittedSerial", e.change_reason as "changeReason"`);
const measurementTables = sql.raw(`inspection_entries e
  join inspection_rounds r on r.id = e.round_id
  left join fittings f on f.id = e.fitting_id
  left join cutters c on c.id = f.cutter_id
  left join cutters rc on rc.id = e.removed_cutter_id
  left join cutters fc on fc.id = e.fitted_cutter_id`);

/**
 * Every position of the drive with its recent history — fitted periods, the newest `last`
 * measurements and their photos' ids — in one read of four queries, so a tablet keeps every
 * position's history for offline use without 80 requests (decision 42). Registered before
 * `/:positionId`, which would otherwise take "history" for an id.
 */
positionsRouter.get('/history', requireProject('layout.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const { last } = positionHistoryQuerySchema.parse(req.query);
  const readAt = new Date().toISOString();
  const rows = await db.select().from(positions).where(eq(positions.projectId, projectId)).orderBy(asc(positions.number));
  const periods = await db
    .select({ fitting: fittings, serial: cutters.serial })
    .from(fittings)
    .innerJoin(cutters, eq(cutters.id, fittings.cutterId))
    .innerJoin(positions, eq(positions.id, fittings.positionId))
    .where(eq(positions.projectId, projectId))
    .orderBy(asc(fittings.fittedAt));
  // The same columns as GET /:positionId, the newest `last` per position, each with its position's total.
  const measurements = await db.execute<Sendable<Measurement> & { positionId: string; total: number; newest: string }>(sql`
    select * from (
      select ${measurementColumns}, e.position_id as "positionId",
             (count(*) over (partition by e.position_id))::int as total,
             row_number() over (partition by e.position_id order by r.started_at desc, e.recorded_at desc) as newest
      from ${measurementTables}
      join positions p on p.id = e.position_id
      where p.project_id = ${projectId}
    ) m
    where m.newest <= ${last}
    order by m."roundAt", m."recordedAt"`);
  const photoRows = await db
    .select({ id: photos.id, entryId: photos.entryId, createdAt: photos.createdAt, mimeType: photos.mimeType })
    .from(photos)
    .innerJoin(inspectionEntries, eq(inspectionEntries.id, photos.entryId))
    .innerJoin(positions, eq(positions.id, inspectionEntries.positionId))
    .where(eq(positions.projectId, projectId))
    .orderBy(asc(photos.createdAt));
  const measurementsOf = new Map<string, typeof measurements.rows>();
  for (const m of measurements.rows) {
    const own = measurementsOf.get(m.positionId);
    if (own) own.push(m);
    else measurementsOf.set(m.positionId, [m]);
  }
  reply<PositionHistories>(res, 200, {
    readAt,
    last,
    positions: rows.map((position) => {
      const own = measurementsOf.get(position.id) ?? [];
      const ownIds = new Set(own.map((m) => m.id));
      return {
        position,
        periods: periods.filter((p) => p.fitting.positionId === position.id).map((p) => ({ ...p.fitting, serial: p.serial })),
        measurements: own.map(({ positionId: _p, total: _t, newest: _n, ...m }) => m),
        photos: photoRows.filter((ph) => ownIds.has(ph.entryId)),
        olderMeasurements: own.length === 0 ? 0 : own[0].total - own.length,
      };
    }),
  });
});

/** One position: the serial on it now, every fitted period, every measurement, and photos. */
positionsRouter.get('/:positionId', requireProject('layout.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const positionId = idParam(req.params, 'positionId', 'That position');
  const [position] = await db
    .select()
    .from(positions)
    .where(and(eq(positions.id, positionId), eq(positions.projectId, projectId)));
  if (!position) throw notFound('That position');
  const periods = await db
    .select({ fitting: fittings, serial: cutters.serial })
    .from(fittings)
    .innerJoin(cutters, eq(cutters.id, fittings.cutterId))
    .where(eq(fittings.positionId, positionId))
    .orderBy(asc(fittings.fittedAt));
  // The row shape the query below selects (timestamps come back as Dates).
  const measurements = await db.execute<Sendable<Measurement>>(sql`
    select ${measurementColumns}
    from ${measurementTables}
    where e.position_id = ${positionId}
    order by r.started_at, e.recorded_at`);
  const photoRows = await db
    .select({ id: photos.id, entryId: photos.entryId, createdAt: photos.createdAt, mimeType: photos.mimeType })
    .from(photos)
    .innerJoin(inspectionEntries, eq(inspectionEntries.id, photos.entryId))
    .where(eq(inspectionEntries.positionId, positionId))
    .orderBy(asc(photos.createdAt));
  reply<PositionDetail>(res, 200, {
    position,
    periods: periods.map((p) => ({ ...p.fitting, serial: p.serial })),
    measurements: measurements.rows,
    photos: photoRows,
  });
});
