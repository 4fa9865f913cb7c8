import { and, asc, eq, ilike, isNull, sql } from 'drizzle-orm';
import { Router } from 'express';
import {
  cutterListQuerySchema,
  receiveCutterInputSchema,
  workshopInputSchema,
  type Cutter,
  type CutterLife,
  type CutterListItem,
} from '../../shared/schemas/cutter';
import { db } from '../db/client';
import { cutterEvents, cutters, fittings, positions } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { conflict, notFound } from '../lib/http-error';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';

export const cuttersRouter = Router({ mergeParams: true });

/** The store list: every serial with its state and, when fitted, where. */
cuttersRouter.get('/', requireProject('cutters.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const query = cutterListQuerySchema.parse(req.query);
  const rows = await db
    .select({ cutter: cutters, positionNumber: positions.number, fittedAt: fittings.fittedAt })
    .from(cutters)
    .leftJoin(fittings, and(eq(fittings.cutterId, cutters.id), isNull(fittings.removedAt)))
    .leftJoin(positions, eq(positions.id, fittings.positionId))
    .where(
      and(
        eq(cutters.projectId, projectId),
        query.status ? eq(cutters.status, query.status) : undefined,
        query.q ? ilike(cutters.serial, `%${query.q.replace(/[%_\\]/g, '\\$&')}%`) : undefined,
      ),
    )
    .orderBy(asc(cutters.serial));
  reply<CutterListItem[]>(
    res,
    200,
    rows.map((r) => ({ ...r.cutter, positionNumber: r.positionNumber, fittedAt: r.fittedAt })),
  );
});

/** Receives a cutter assembly into the store. */
cuttersRouter.post('/', requireProject('cutters.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const input = receiveCutterInputSchema.parse(req.body);
  const cutter = await db.transaction(async (tx) => {
    const [dup] = await tx
      .select({ status: cutters.status })
      .from(cutters)
      .where(and(eq(cutters.projectId, projectId), eq(cutters.serial, input.serial)));
    if (dup) throw conflict(`Serial ${input.serial} is already in Kerfwise (${dup.status.replace('_', ' ')}).`);
    const [row] = await tx
      .insert(cutters)
      .values({ ...input, projectId })
      .returning();
    await tx.insert(cutterEvents).values({ projectId, cutterId: row.id, kind: 'received', userId: me.id });
    await audit(tx, { userId: me.id, projectId, entity: 'cutter', entityId: row.id, action: 'create', after: row });
    return row;
  });
  reply<Cutter>(res, 201, cutter);
});

/** A serial's whole life: fitted periods and events. */
cuttersRouter.get('/:cutterId', requireProject('cutters.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const cutterId = idParam(req.params, 'cutterId', 'That cutter');
  const [cutter] = await db
    .select()
    .from(cutters)
    .where(and(eq(cutters.id, cutterId), eq(cutters.projectId, projectId)));
  if (!cutter) throw notFound('That cutter');
  const periods = await db
    .select({ fitting: fittings, positionNumber: positions.number })
    .from(fittings)
    .innerJoin(positions, eq(positions.id, fittings.positionId))
    .where(eq(fittings.cutterId, cutterId))
    .orderBy(asc(fittings.fittedAt));
  const events = await db
    .select({ event: cutterEvents, positionNumber: positions.number })
    .from(cutterEvents)
    .leftJoin(positions, eq(positions.id, cutterEvents.positionId))
    .where(eq(cutterEvents.cutterId, cutterId))
    .orderBy(asc(cutterEvents.at), asc(cutterEvents.id));
  reply<CutterLife>(res, 200, {
    cutter,
    periods: periods.map((p) => ({ ...p.fitting, positionNumber: p.positionNumber })),
    events: events.map((e) => ({ ...e.event, positionNumber: e.positionNumber })),
  });
});

/** The workshop's outcome for a removed cutter: rebuilt and back in store, or scrapped. */
cuttersRouter.post('/:cutterId/workshop', requireProject('cutters.edit'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const cutterId = idParam(req.params, 'cutterId', 'That cutter');
  const me = requireUser(req);
  const input = workshopInputSchema.parse(req.body);
  const cutter = await db.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(cutters)
      .where(and(eq(cutters.id, cutterId), eq(cutters.projectId, projectId)))
      .for('update');
    if (!before) throw notFound('That cutter');
    if (before.status !== 'workshop') throw conflict(`Serial ${before.serial} is ${before.status.replace('_', ' ')}, not in the workshop.`);
    const [after] = await tx
      .update(cutters)
      .set(
        input.outcome === 'rebuilt'
          ? { status: 'in_store', rebuildCount: before.rebuildCount + 1, updatedAt: sql`now()` }
          : { status: 'scrapped', updatedAt: sql`now()` },
      )
      .where(eq(cutters.id, cutterId))
      .returning();
    await tx.insert(cutterEvents).values({ projectId, cutterId, kind: input.outcome, userId: me.id, details: input });
    await audit(tx, { userId: me.id, projectId, entity: 'cutter', entityId: cutterId, action: input.outcome, before, after });
    return after;
  });
  reply<Cutter>(res, 200, cutter);
});
