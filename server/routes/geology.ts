import { and, asc, eq, sql } from 'drizzle-orm';
import { Router } from 'express';
import { classifyCai } from '../../shared/domain/cerchar';
import { validateGeologySections } from '../../shared/domain/geology';
import { groundTypeInputSchema, longSectionInputSchema } from '../../shared/schemas/geology';
import { db } from '../db/client';
import { geologySections, groundTypes, strokes } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { badRequest, conflict, notFound } from '../lib/http-error';
import { readGeologyCsv } from '../lib/csv-import';
import { idParam } from '../lib/params';
import { csvRefusal, uploadStream } from './strokes';
import { invalidateRolledDistance, refreshRolledDistance } from '../services/rolled-distance';
import { driveDataChanged } from '../services/drive-data';

export const groundTypesRouter = Router({ mergeParams: true });
export const geologyRouter = Router({ mergeParams: true });

const withClass = (g: typeof groundTypes.$inferSelect) => ({ ...g, caiClass: g.cai == null ? null : classifyCai(g.cai) });

groundTypesRouter.get('/', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const rows = await db.select().from(groundTypes).where(eq(groundTypes.projectId, projectId)).orderBy(asc(groundTypes.name));
  res.json(rows.map(withClass));
});

groundTypesRouter.post('/', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const input = groundTypeInputSchema.parse(req.body);
  const row = await db.transaction(async (tx) => {
    const [dup] = await tx.select({ id: groundTypes.id }).from(groundTypes).where(and(eq(groundTypes.projectId, projectId), eq(groundTypes.name, input.name)));
    if (dup) throw conflict(`There is already a ground type called ${input.name}.`);
    const [g] = await tx.insert(groundTypes).values({ ...input, projectId }).returning();
    await audit(tx, { userId: me.id, projectId, entity: 'ground_type', entityId: g.id, action: 'create', after: g });
    return g;
  });
  res.status(201).json(withClass(row));
});

groundTypesRouter.patch('/:groundTypeId', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const id = idParam(req.params, 'groundTypeId', 'That ground type');
  const me = requireUser(req);
  const input = groundTypeInputSchema.partial().parse(req.body);
  const row = await db.transaction(async (tx) => {
    const [before] = await tx.select().from(groundTypes).where(and(eq(groundTypes.id, id), eq(groundTypes.projectId, projectId))).for('update');
    if (!before) throw notFound('That ground type');
    const [after] = await tx.update(groundTypes).set(input).where(eq(groundTypes.id, id)).returning();
    await audit(tx, { userId: me.id, projectId, entity: 'ground_type', entityId: id, action: 'update', before, after });
    return after;
  });
  res.json(withClass(row));
});

groundTypesRouter.delete('/:groundTypeId', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const id = idParam(req.params, 'groundTypeId', 'That ground type');
  const me = requireUser(req);
  await db.transaction(async (tx) => {
    const [used] = await tx.select({ id: geologySections.id }).from(geologySections).where(eq(geologySections.groundTypeId, id)).limit(1);
    if (used) throw conflict('This ground type is used in the long section; change those sections first.');
    const [before] = await tx.delete(groundTypes).where(and(eq(groundTypes.id, id), eq(groundTypes.projectId, projectId))).returning();
    if (!before) throw notFound('That ground type');
    await audit(tx, { userId: me.id, projectId, entity: 'ground_type', entityId: id, action: 'delete', before });
  });
  res.status(204).end();
});

/** The long section in chainage order, its gaps (warnings), and where the machine stands now. */
geologyRouter.get('/', requireProject('drive.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const sections = await db.select().from(geologySections).where(eq(geologySections.projectId, projectId)).orderBy(asc(geologySections.chainageFromM));
  const [last] = await db.select({ chainageM: strokes.chainageEndM }).from(strokes).where(eq(strokes.projectId, projectId)).orderBy(sql`${strokes.ringNumber} desc`).limit(1);
  const { warnings } = validateGeologySections(sections);
  res.json({ sections, warnings, currentChainageM: last?.chainageM ?? null });
});

/** Replaces the whole long section (the table form). Overlaps are errors; gaps come back as warnings. */
geologyRouter.put('/', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const { sections } = longSectionInputSchema.parse(req.body);
  const known = new Set((await db.select({ id: groundTypes.id }).from(groundTypes).where(eq(groundTypes.projectId, projectId))).map((g) => g.id));
  const issues = sections.flatMap((s, i) => (known.has(s.groundTypeId) ? [] : [{ path: `sections.${i}.groundTypeId`, message: 'Choose one of this drive’s ground types.' }]));
  const check = validateGeologySections(sections);
  for (const e of check.errors) {
    if (e.kind === 'overlap') issues.push({ path: `sections.${e.indexB}.chainageFromM`, message: `Overlaps section ${e.indexA + 1} between ${e.fromM} m and ${e.toM} m.` });
    else issues.push({ path: `sections.${e.index}.chainageToM`, message: 'Chainage to must be greater than chainage from.' });
  }
  if (issues.length > 0) throw badRequest(`The long section has ${issues.length} problem(s); nothing was saved.`, issues);
  await db.transaction(async (tx) => {
    const before = await tx.delete(geologySections).where(eq(geologySections.projectId, projectId)).returning();
    const after = sections.length ? await tx.insert(geologySections).values(sections.map((s) => ({ ...s, projectId }))).returning() : [];
    await audit(tx, { userId: me.id, projectId, entity: 'geology', entityId: projectId, action: 'replace', before, after });
    // Ground attribution changes everywhere: recompute the rolled distances of the whole drive.
    await driveDataChanged(tx, projectId, { rewritesPast: true, refreshNow: true });
  });
  res.json({ saved: sections.length, warnings: check.warnings });
});

/**
 * Imports the long section from a CSV sent as the raw body and replaces the stored one, all or
 * nothing. Ground types are found by name; names not yet known become new ground types (listed
 * in the warnings so the planner adds their CAI).
 */
geologyRouter.post('/import', requireProject('drive.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  if (req.is('application/json') || req.is('multipart/form-data')) throw badRequest('Send the CSV file itself as the request body (Content-Type text/csv).');
  const upload = uploadStream(req);
  const result = await readGeologyCsv(upload.body);
  await upload.drain();
  if (!result.ok) throw csvRefusal(result.errors, result.errorCount, result.detected);
  const outcome = await db.transaction(async (tx) => {
    const known = await tx.select().from(groundTypes).where(eq(groundTypes.projectId, projectId));
    const byName = new Map(known.map((g) => [g.name.toLowerCase(), g.id]));
    const created: string[] = [];
    for (const r of result.rows) {
      const key = r.data.groundTypeName.trim().toLowerCase();
      if (byName.has(key)) continue;
      const [g] = await tx.insert(groundTypes).values({ projectId, name: r.data.groundTypeName.trim() }).returning();
      byName.set(key, g.id);
      created.push(g.name);
    }
    const before = await tx.delete(geologySections).where(eq(geologySections.projectId, projectId)).returning();
    const after = await tx.insert(geologySections).values(result.rows.map((r) => ({
      projectId, chainageFromM: r.data.chainageFromM, chainageToM: r.data.chainageToM, groundTypeId: byName.get(r.data.groundTypeName.trim().toLowerCase())!,
      waterHeadM: r.data.waterHeadM ?? 0, stopAllowed: r.data.stopAllowed, stopReason: r.data.stopReason ?? '',
    }))).returning();
    await audit(tx, { userId: me.id, projectId, entity: 'geology', entityId: projectId, action: 'import', before, after });
    await invalidateRolledDistance(tx, projectId);
    await refreshRolledDistance(tx, projectId);
    return { saved: after.length, createdGroundTypes: created };
  });
  const warnings = [
    ...result.warnings,
    ...outcome.createdGroundTypes.map((name) => ({ row: 0, column: 'Ground type', message: `New ground type "${name}" was created; add its CAI so wear can be forecast before site data exists.` })),
  ];
  res.status(201).json({ saved: outcome.saved, warnings, detected: result.detected });
});
