import { and, asc, eq, sql } from 'drizzle-orm';
import { Router } from 'express';
import { z } from 'zod';
import { geologySectionFields } from '../../shared/csv-headers';
import { classifyCai } from '../../shared/domain/cerchar';
import { validateGeologySections } from '../../shared/domain/geology';
import { geologySectionColumnMappingSchema, type GeologyImported, type GeologyMapping } from '../../shared/schemas/advance-log';
import {
  groundTypeInputSchema,
  longSectionInputSchema,
  type Geology,
  type GroundType,
  type LongSectionSaved,
} from '../../shared/schemas/geology';
import { db } from '../db/client';
import { geologySections, groundTypes, strokes } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { badRequest, conflict, notFound } from '../lib/http-error';
import { readGeologyCsv } from '../lib/csv/geology';
import type { CsvIssue } from '../../shared/schemas/advance-log';
import {
  csvRefusal,
  chosenMapping,
  rememberMapping,
  requireRawCsv,
  storedMapping,
  unusedColumnWarnings,
  uploadStream,
} from '../lib/csv/upload';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import { driveDataChanged } from '../services/drive-data';

export const groundTypesRouter = Router({ mergeParams: true });
export const geologyRouter = Router({ mergeParams: true });

const withClass = (g: typeof groundTypes.$inferSelect) => ({ ...g, caiClass: g.cai == null ? null : classifyCai(g.cai) });

groundTypesRouter.get('/', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const rows = await db.select().from(groundTypes).where(eq(groundTypes.projectId, projectId)).orderBy(asc(groundTypes.name));
  reply<GroundType[]>(res, 200, rows.map(withClass));
});

groundTypesRouter.post('/', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const input = groundTypeInputSchema.parse(req.body);
  const row = await db.transaction(async (tx) => {
    const [dup] = await tx
      .select({ id: groundTypes.id })
      .from(groundTypes)
      .where(and(eq(groundTypes.projectId, projectId), eq(groundTypes.name, input.name)));
    if (dup) throw conflict(`There is already a ground type called ${input.name}.`);
    const [g] = await tx
      .insert(groundTypes)
      .values({ ...input, projectId })
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'ground_type', entityId: g.id, action: 'create', after: g });
    return g;
  });
  reply<GroundType>(res, 201, withClass(row));
});

groundTypesRouter.patch('/:groundTypeId', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const id = idParam(req.params, 'groundTypeId', 'That ground type');
  const me = requireUser(req);
  const input = groundTypeInputSchema.partial().parse(req.body);
  const row = await db.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(groundTypes)
      .where(and(eq(groundTypes.id, id), eq(groundTypes.projectId, projectId)))
      .for('update');
    if (!before) throw notFound('That ground type');
    const [after] = await tx.update(groundTypes).set(input).where(eq(groundTypes.id, id)).returning();
    await audit(tx, { userId: me.id, projectId, entity: 'ground_type', entityId: id, action: 'update', before, after });
    return after;
  });
  reply<GroundType>(res, 200, withClass(row));
});

groundTypesRouter.delete('/:groundTypeId', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const id = idParam(req.params, 'groundTypeId', 'That ground type');
  const me = requireUser(req);
  await db.transaction(async (tx) => {
    // 404 before the in-use check: another project's ground type must not show that it exists.
    const [mine] = await tx
      .select({ id: groundTypes.id })
      .from(groundTypes)
      .where(and(eq(groundTypes.id, id), eq(groundTypes.projectId, projectId)))
      .for('update');
    if (!mine) throw notFound('That ground type');
    const [used] = await tx
      .select({ id: geologySections.id })
      .from(geologySections)
      .where(and(eq(geologySections.groundTypeId, id), eq(geologySections.projectId, projectId)))
      .limit(1);
    if (used) throw conflict('This ground type is used in the long section; change those sections first.');
    const [before] = await tx
      .delete(groundTypes)
      .where(and(eq(groundTypes.id, id), eq(groundTypes.projectId, projectId)))
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'ground_type', entityId: id, action: 'delete', before });
  });
  res.status(204).end();
});

/** The long section in chainage order, its gaps (warnings), and where the machine stands now. */
geologyRouter.get('/', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const sections = await db
    .select()
    .from(geologySections)
    .where(eq(geologySections.projectId, projectId))
    .orderBy(asc(geologySections.chainageFromM));
  const [last] = await db
    .select({ chainageM: strokes.chainageEndM })
    .from(strokes)
    .where(eq(strokes.projectId, projectId))
    .orderBy(sql`${strokes.ringNumber} desc`)
    .limit(1);
  const { warnings } = validateGeologySections(sections);
  reply<Geology>(res, 200, { sections, warnings, currentChainageM: last?.chainageM ?? null });
});

/** Replaces the whole long section (the table form). Overlaps are errors; gaps come back as warnings. */
geologyRouter.put('/', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const { sections } = longSectionInputSchema.parse(req.body);
  const known = new Set(
    (await db.select({ id: groundTypes.id }).from(groundTypes).where(eq(groundTypes.projectId, projectId))).map((g) => g.id),
  );
  const issues = sections.flatMap((s, i) =>
    known.has(s.groundTypeId) ? [] : [{ path: `sections.${i}.groundTypeId`, message: 'Choose one of this drive’s ground types.' }],
  );
  const check = validateGeologySections(sections);
  for (const e of check.errors) {
    if (e.kind === 'overlap')
      issues.push({
        path: `sections.${e.indexB}.chainageFromM`,
        message: `Overlaps section ${e.indexA + 1} between ${e.fromM} m and ${e.toM} m.`,
      });
    else issues.push({ path: `sections.${e.index}.chainageToM`, message: 'Chainage to must be greater than chainage from.' });
  }
  if (issues.length > 0) throw badRequest(`The long section has ${issues.length} problem(s); nothing was saved.`, issues);
  await db.transaction(async (tx) => {
    const before = await tx.delete(geologySections).where(eq(geologySections.projectId, projectId)).returning();
    const after = sections.length
      ? await tx
          .insert(geologySections)
          .values(sections.map((s) => ({ ...s, projectId })))
          .returning()
      : [];
    await audit(tx, { userId: me.id, projectId, entity: 'geology', entityId: projectId, action: 'replace', before, after });
    // Ground attribution changes everywhere: recompute the rolled distances of the whole drive.
    await driveDataChanged(tx, projectId, { rewritesPast: true, refreshNow: true });
  });
  reply<LongSectionSaved>(res, 200, { saved: sections.length, warnings: check.warnings });
});

const importQuerySchema = z.object({
  /** JSON object: field → header, chosen on the mapping screen; the stored mapping is used when absent. */
  mapping: z.string().max(4000).optional(),
});

/** Lines of the file, for a warning: "lines 3, 5 and 2 more". */
function linesText(lines: number[]): string {
  const shown = lines.slice(0, 10).join(', ');
  return `line${lines.length === 1 ? '' : 's'} ${shown}${lines.length > 10 ? ` and ${lines.length - 10} more` : ''}`;
}

/**
 * Imports the long section from a CSV sent as the raw body and replaces the stored one, all or
 * nothing. Columns are mapped like the advance log's (an explicit mapping wins and is remembered
 * for the project). Ground types are found by name; names not yet known become new ground types.
 * UCS and CAI given in the file fill or change the ground type; every such change, every empty
 * water head stored as 0 m and every column not read comes back as a warning.
 */
geologyRouter.post('/import', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const query = importQuerySchema.parse(req.query);
  requireRawCsv(req);
  const columns = await chosenMapping(
    projectId,
    'geology',
    query.mapping,
    geologySectionColumnMappingSchema as z.ZodType<Record<string, string>>,
  );
  const upload = uploadStream(req);
  const result = await readGeologyCsv(upload.body, columns);
  await upload.drain();
  if (!result.ok) throw csvRefusal(result.errors, result.errorCount, result.detected);
  const notes: CsvIssue[] = [];
  const waterHeadColumn = result.detected.mapping.waterHeadM;
  if (!waterHeadColumn) {
    notes.push({
      row: 1,
      column: 'Water head above axis (m)',
      message:
        'The file has no water head column, so every section is stored with 0 m of water above the axis. Compressed-air stops depend on it: add the column, or choose it in the column mapping.',
    });
  } else {
    const empty = result.rows.filter((r) => r.data.waterHeadM === null).map((r) => r.line);
    if (empty.length > 0)
      notes.push({
        row: empty[0],
        column: waterHeadColumn,
        message: `The water head is empty on ${linesText(empty)}; those sections are stored with 0 m above the axis. Fill it in where there is groundwater.`,
      });
  }
  const outcome = await db.transaction(async (tx) => {
    const known = await tx.select().from(groundTypes).where(eq(groundTypes.projectId, projectId));
    const byName = new Map(known.map((g) => [g.name.toLowerCase(), g]));
    const created: string[] = [];
    for (const r of result.rows) {
      const name = r.data.groundTypeName.trim();
      const key = name.toLowerCase();
      const given = { ...(r.data.ucsMpa !== undefined && { ucsMpa: r.data.ucsMpa }), ...(r.data.cai !== undefined && { cai: r.data.cai }) };
      const before = byName.get(key);
      if (!before) {
        const [g] = await tx
          .insert(groundTypes)
          .values({ projectId, name, ...given })
          .returning();
        await audit(tx, { userId: me.id, projectId, entity: 'ground_type', entityId: g.id, action: 'create', after: g });
        byName.set(key, g);
        created.push(g.name);
        continue;
      }
      const changes = (Object.keys(given) as (keyof typeof given)[]).filter((k) => before[k] !== given[k]);
      if (changes.length === 0) continue;
      const [after] = await tx.update(groundTypes).set(given).where(eq(groundTypes.id, before.id)).returning();
      await audit(tx, { userId: me.id, projectId, entity: 'ground_type', entityId: before.id, action: 'update', before, after });
      byName.set(key, after);
      const words = changes
        .map((k) => `${k === 'cai' ? 'CAI' : 'UCS'} ${before[k] ?? 'not set'} → ${after[k]}${k === 'ucsMpa' ? ' MPa' : ''}`)
        .join(', ');
      notes.push({
        row: r.line,
        column: 'Ground type',
        message: `Ground type "${before.name}" changed from the file: ${words}. Forecasts use the new values.`,
      });
    }
    const previous = await tx.delete(geologySections).where(eq(geologySections.projectId, projectId)).returning();
    const saved = await tx
      .insert(geologySections)
      .values(
        result.rows.map((r) => ({
          projectId,
          chainageFromM: r.data.chainageFromM,
          chainageToM: r.data.chainageToM,
          groundTypeId: byName.get(r.data.groundTypeName.trim().toLowerCase())!.id,
          waterHeadM: r.data.waterHeadM ?? 0,
          stopAllowed: r.data.stopAllowed,
          stopReason: r.data.stopReason ?? '',
        })),
      )
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'geology', entityId: projectId, action: 'import', before: previous, after: saved });
    await rememberMapping(tx, projectId, 'geology', result.detected.mapping as Record<string, string>);
    await driveDataChanged(tx, projectId, { rewritesPast: true, refreshNow: true });
    return { saved: saved.length, createdGroundTypes: created };
  });
  const warnings = [
    ...unusedColumnWarnings(result.unusedColumns, { what: 'the long section', canMap: true }),
    ...result.warnings,
    ...notes,
    ...outcome.createdGroundTypes
      .filter((name) => byNameHasNoCai(result.rows, name))
      .map((name) => ({
        row: 0,
        column: 'Ground type',
        message: `New ground type "${name}" was created; add its CAI so wear can be forecast before site data exists.`,
      })),
  ];
  reply<GeologyImported>(res, 201, { saved: outcome.saved, warnings, detected: result.detected });
});

/** Whether the file gave no CAI for the ground type `name`. */
function byNameHasNoCai(rows: { data: { groundTypeName: string; cai?: number } }[], name: string): boolean {
  return !rows.some((r) => r.data.groundTypeName.trim().toLowerCase() === name.toLowerCase() && r.data.cai !== undefined);
}

/** The remembered column mapping of the long-section import, with the fields Kerfwise knows. */
geologyRouter.get('/mapping', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  reply<GeologyMapping>(res, 200, { mapping: await storedMapping(projectId, 'geology'), fields: geologySectionFields });
});
