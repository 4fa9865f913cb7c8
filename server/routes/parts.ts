import { and, asc, desc, eq, inArray, sql } from 'drizzle-orm';
import { Router } from 'express';
import { writeCsv } from '../../shared/csv-writer';
import {
  demandQuerySchema,
  partInputSchema,
  purchaseOrderBatchInputSchema,
  purchaseOrderInputSchema,
  type PurchaseOrderInput,
  receiveLineInputSchema,
  stockCountInputSchema,
  workshopSettingsInputSchema,
  type PartList,
  type PartMovements,
  type PartRow,
  type PartsDemand,
  type PurchaseOrder,
  type StockCounted,
  type WorkshopSettings,
} from '../../shared/schemas/parts';
import { db, type DbOrTx } from '../db/client';
import { parts, purchaseOrderLines, purchaseOrders, stockMovements, workshopSettings } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { badRequest, conflict, notFound } from '../lib/http-error';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import { computePartsDemand, loadWorkshopSettings, lockPartStock, suggestionsCsvRows } from '../services/parts';

/** The buyer's parts: catalogue, stock, purchase orders, workshop loop and demand. Planners and site managers read. */
export const partsRouter = Router({ mergeParams: true });

const projectOf = (params: Record<string, unknown>) => idParam(params, 'projectId', 'That project');

/** The catalogue with stock on hand, on order, weeks of cover and whether to order now (12-week demand). */
partsRouter.get('/', requireProject('parts.read'), async (req, res) => {
  const projectId = projectOf(req.params);
  const demand = await db.transaction((tx) => computePartsDemand(tx, projectId, new Date(), { weeks: 12 }));
  const byPart = new Map(demand.suggestions.map((s) => [s.partId, s]));
  reply<PartList>(res, 200, {
    parts: demand.parts.map((p) => {
      const s = byPart.get(p.id)!;
      return {
        ...p,
        weeksOfCover: s.weeksOfCover,
        orderNow: s.orderNow,
        orderQty: s.orderQty,
        safetyStock: s.safetyStock,
        reorderPoint: s.reorderPoint,
        firstShortageDate: s.firstShortageDate,
      };
    }),
    problems: demand.problems,
  });
});

partsRouter.post('/', requireProject('parts.edit'), async (req, res) => {
  const projectId = projectOf(req.params);
  const me = requireUser(req);
  const input = partInputSchema.parse(req.body);
  const part = await db.transaction(async (tx) => {
    const [dup] = await tx
      .select({ id: parts.id })
      .from(parts)
      .where(and(eq(parts.projectId, projectId), eq(parts.code, input.code)));
    if (dup) throw conflict(`There is already a part with code ${input.code}.`);
    const [row] = await tx
      .insert(parts)
      .values({ ...input, unitCost: input.unitCost.toFixed(2), projectId })
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'part', entityId: row.id, action: 'create', after: row });
    return row;
  });
  reply<PartRow>(res, 201, { ...part, unitCost: Number(part.unitCost) });
});

/** The workshop loop settings (defaults until the buyer saves them). */
partsRouter.get('/workshop', requireProject('parts.read'), async (req, res) => {
  reply<WorkshopSettings>(res, 200, await loadWorkshopSettings(db, projectOf(req.params)));
});

partsRouter.put('/workshop', requireProject('parts.edit'), async (req, res) => {
  const projectId = projectOf(req.params);
  const me = requireUser(req);
  const input = workshopSettingsInputSchema.parse(req.body);
  await db.transaction(async (tx) => {
    const catalogue = await tx
      .select({ id: parts.id, code: parts.code, kind: parts.kind })
      .from(parts)
      .where(eq(parts.projectId, projectId));
    const kindOf = new Map(catalogue.map((p) => [p.id, p]));
    for (const [assemblyId, bom] of Object.entries(input.boms)) {
      const assembly = kindOf.get(assemblyId);
      if (!assembly)
        throw badRequest('A bill of materials names a cutter assembly that is not in this drive’s catalogue.', [
          { path: `boms.${assemblyId}`, message: 'Unknown part.' },
        ]);
      if (assembly.kind !== 'cutter-assembly')
        throw badRequest(`${assembly.code} is not a complete cutter assembly, so it has no workshop bill of materials.`, [
          { path: `boms.${assemblyId}`, message: 'Not a cutter assembly.' },
        ]);
      for (const [condition, outcome] of Object.entries(bom)) {
        if (outcome === 'scrap') continue;
        const unknown = outcome.findIndex((l) => !kindOf.has(l.partId));
        if (unknown >= 0)
          throw badRequest(`The bill of materials of ${assembly.code} names a part that is not in this drive’s catalogue.`, [
            { path: `boms.${assemblyId}.${condition}.${unknown}.partId`, message: 'Unknown part.' },
          ]);
      }
    }
    const before = await loadWorkshopSettings(tx, projectId);
    await tx
      .insert(workshopSettings)
      .values({ projectId, ...input })
      .onConflictDoUpdate({ target: workshopSettings.projectId, set: { ...input, updatedAt: sql`now()` } });
    await audit(tx, { userId: me.id, projectId, entity: 'workshop_settings', entityId: projectId, action: 'update', before, after: input });
  });
  reply<WorkshopSettings>(res, 200, await loadWorkshopSettings(db, projectId));
});

/** Demand per part per week, projected stock, where it comes from, and order suggestions. */
partsRouter.get('/demand', requireProject('parts.read'), async (req, res) => {
  const projectId = projectOf(req.params);
  const query = demandQuerySchema.parse(req.query);
  reply<PartsDemand>(res, 200, await db.transaction((tx) => computePartsDemand(tx, projectId, new Date(), query)));
});

partsRouter.get('/demand/suggestions.csv', requireProject('parts.read'), async (req, res) => {
  const projectId = projectOf(req.params);
  const query = demandQuerySchema.parse(req.query);
  const demand = await db.transaction((tx) => computePartsDemand(tx, projectId, new Date(), query));
  res.set({
    'Content-Type': 'text/csv; charset=utf-8',
    'Content-Disposition': `attachment; filename="order-suggestions-${demand.startDate}.csv"`,
  });
  const [header, ...rows] = suggestionsCsvRows(demand);
  res.send(writeCsv(header.map(String), rows));
});

/** Purchase orders, newest first, with their lines. */
async function listOrders(tx: DbOrTx, projectId: string, orderId?: string) {
  const orders = await tx
    .select()
    .from(purchaseOrders)
    .where(and(eq(purchaseOrders.projectId, projectId), orderId ? eq(purchaseOrders.id, orderId) : undefined))
    .orderBy(desc(purchaseOrders.orderedAt), desc(purchaseOrders.number));
  const lines =
    orders.length === 0
      ? []
      : await tx
          .select({ line: purchaseOrderLines, code: parts.code, name: parts.name })
          .from(purchaseOrderLines)
          .innerJoin(parts, eq(parts.id, purchaseOrderLines.partId))
          .where(
            inArray(
              purchaseOrderLines.purchaseOrderId,
              orders.map((o) => o.id),
            ),
          )
          .orderBy(asc(purchaseOrderLines.dueDate), asc(parts.code));
  return orders.map((o) => {
    const own = lines
      .filter((l) => l.line.purchaseOrderId === o.id)
      .map((l) => ({ ...l.line, partCode: l.code, partName: l.name, qtyOpen: l.line.qtyOrdered - l.line.qtyReceived }));
    return { ...o, open: own.some((l) => l.qtyOpen > 0), lines: own };
  });
}

partsRouter.get('/orders', requireProject('parts.read'), async (req, res) => {
  reply<PurchaseOrder[]>(res, 200, await listOrders(db, projectOf(req.params)));
});

/** Saves purchase orders inside a transaction: every part must be in the catalogue and every number new. */
async function insertOrders(tx: DbOrTx, projectId: string, userId: string, inputs: readonly PurchaseOrderInput[]) {
  const partIds = [...new Set(inputs.flatMap((o) => o.lines.map((l) => l.partId)))];
  const known = new Set(
    (
      await tx
        .select({ id: parts.id })
        .from(parts)
        .where(and(eq(parts.projectId, projectId), inArray(parts.id, partIds)))
    ).map((p) => p.id),
  );
  const batch = inputs.length > 1;
  inputs.forEach((input, k) => {
    const unknown = input.lines.findIndex((l) => !known.has(l.partId));
    if (unknown >= 0)
      throw badRequest(
        `${batch ? `Order ${input.number}, line` : 'Line'} ${unknown + 1} names a part that is not in this drive’s catalogue.`,
        [{ path: `${batch ? `orders.${k}.` : ''}lines.${unknown}.partId`, message: 'Unknown part.' }],
      );
  });
  const dups = await tx
    .select({ number: purchaseOrders.number })
    .from(purchaseOrders)
    .where(
      and(
        eq(purchaseOrders.projectId, projectId),
        inArray(
          purchaseOrders.number,
          inputs.map((o) => o.number),
        ),
      ),
    );
  if (dups.length > 0)
    throw conflict(
      dups.length === 1
        ? `There is already an order numbered ${dups[0].number}.`
        : `There are already orders numbered ${dups.map((d) => d.number).join(', ')}.`,
    );
  const ids: string[] = [];
  for (const input of inputs) {
    const [order] = await tx
      .insert(purchaseOrders)
      .values({ projectId, number: input.number, supplier: input.supplier, note: input.note, createdBy: userId })
      .returning();
    await tx.insert(purchaseOrderLines).values(input.lines.map((l) => ({ ...l, purchaseOrderId: order.id })));
    await audit(tx, { userId, projectId, entity: 'purchase_order', entityId: order.id, action: 'create', after: input });
    ids.push(order.id);
  }
  return ids;
}

partsRouter.post('/orders', requireProject('parts.edit'), async (req, res) => {
  const projectId = projectOf(req.params);
  const me = requireUser(req);
  const input = purchaseOrderInputSchema.parse(req.body);
  const [orderId] = await db.transaction((tx) => insertOrders(tx, projectId, me.id, [input]));
  reply<PurchaseOrder>(res, 201, (await listOrders(db, projectId, orderId))[0]);
});

/** Several orders at once, one per supplier (the suggestions filled in for two suppliers): all or none. */
partsRouter.post('/orders/batch', requireProject('parts.edit'), async (req, res) => {
  const projectId = projectOf(req.params);
  const me = requireUser(req);
  const input = purchaseOrderBatchInputSchema.parse(req.body);
  const ids = await db.transaction((tx) => insertOrders(tx, projectId, me.id, input.orders));
  const all = await listOrders(db, projectId);
  reply<PurchaseOrder[]>(
    res,
    201,
    ids.map((id) => all.find((o) => o.id === id)!),
  );
});

partsRouter.get('/orders/:orderId', requireProject('parts.read'), async (req, res) => {
  const [order] = await listOrders(db, projectOf(req.params), idParam(req.params, 'orderId', 'That order'));
  if (!order) throw notFound('That order');
  reply<PurchaseOrder>(res, 200, order);
});

/** Receives a quantity of one order line: a receipt movement, in one transaction with the line, audited. */
partsRouter.post('/orders/:orderId/lines/:lineId/receive', requireProject('parts.edit'), async (req, res) => {
  const projectId = projectOf(req.params);
  const orderId = idParam(req.params, 'orderId', 'That order');
  const lineId = idParam(req.params, 'lineId', 'That order line');
  const me = requireUser(req);
  const input = receiveLineInputSchema.parse(req.body);
  await db.transaction(async (tx) => {
    const [found] = await tx
      .select({ line: purchaseOrderLines, number: purchaseOrders.number, code: parts.code })
      .from(purchaseOrderLines)
      .innerJoin(purchaseOrders, eq(purchaseOrders.id, purchaseOrderLines.purchaseOrderId))
      .innerJoin(parts, eq(parts.id, purchaseOrderLines.partId))
      .where(and(eq(purchaseOrderLines.id, lineId), eq(purchaseOrders.id, orderId), eq(purchaseOrders.projectId, projectId)))
      .for('update', { of: purchaseOrderLines });
    if (!found) throw notFound('That order line');
    const { line } = found;
    const open = line.qtyOrdered - line.qtyReceived;
    if (input.qty > open) {
      throw badRequest(
        `Receiving more than ordered: order ${found.number} has ${line.qtyOrdered} × ${found.code}, ${line.qtyReceived} received so far, so at most ${open} more can be received.`,
        [{ path: 'qty', message: `At most ${open}.` }],
      );
    }
    const [after] = await tx
      .update(purchaseOrderLines)
      .set({ qtyReceived: line.qtyReceived + input.qty })
      .where(eq(purchaseOrderLines.id, lineId))
      .returning();
    await tx.insert(stockMovements).values({
      projectId,
      partId: line.partId,
      qty: input.qty,
      kind: 'receipt',
      note: input.note || `Order ${found.number}`,
      purchaseOrderLineId: lineId,
      userId: me.id,
    });
    await audit(tx, {
      userId: me.id,
      projectId,
      entity: 'purchase_order_line',
      entityId: lineId,
      action: 'receive',
      before: line,
      after: { ...after, received: input.qty, note: input.note },
    });
  });
  reply<PurchaseOrder>(res, 200, (await listOrders(db, projectId, orderId))[0]);
});

partsRouter.put('/:partId', requireProject('parts.edit'), async (req, res) => {
  const projectId = projectOf(req.params);
  const partId = idParam(req.params, 'partId', 'That part');
  const me = requireUser(req);
  const input = partInputSchema.parse(req.body);
  const part = await db.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(parts)
      .where(and(eq(parts.id, partId), eq(parts.projectId, projectId)))
      .for('update');
    if (!before) throw notFound('That part');
    const [dup] = await tx
      .select({ id: parts.id })
      .from(parts)
      .where(and(eq(parts.projectId, projectId), eq(parts.code, input.code)));
    if (dup && dup.id !== partId) throw conflict(`There is already a part with code ${input.code}.`);
    const [after] = await tx
      .update(parts)
      .set({ ...input, unitCost: input.unitCost.toFixed(2) })
      .where(eq(parts.id, partId))
      .returning();
    await audit(tx, { userId: me.id, projectId, entity: 'part', entityId: partId, action: 'update', before, after });
    return after;
  });
  reply<PartRow>(res, 200, { ...part, unitCost: Number(part.unitCost) });
});

/** Removes a part that has no stock history, no order lines and no place in a workshop bill of materials. */
partsRouter.delete('/:partId', requireProject('parts.edit'), async (req, res) => {
  const projectId = projectOf(req.params);
  const partId = idParam(req.params, 'partId', 'That part');
  const me = requireUser(req);
  await db.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(parts)
      .where(and(eq(parts.id, partId), eq(parts.projectId, projectId)))
      .for('update');
    if (!before) throw notFound('That part');
    const [moved] = await tx.select({ id: stockMovements.id }).from(stockMovements).where(eq(stockMovements.partId, partId)).limit(1);
    const [ordered] = await tx
      .select({ id: purchaseOrderLines.id })
      .from(purchaseOrderLines)
      .where(eq(purchaseOrderLines.partId, partId))
      .limit(1);
    if (moved || ordered) throw conflict(`${before.code} has stock movements or order lines, so it stays in the catalogue for the record.`);
    const settings = await loadWorkshopSettings(tx, projectId);
    if (JSON.stringify(settings.boms).includes(partId))
      throw conflict(`${before.code} is in the workshop bills of materials: take it out there first.`);
    await tx.delete(parts).where(eq(parts.id, partId));
    await audit(tx, { userId: me.id, projectId, entity: 'part', entityId: partId, action: 'delete', before });
  });
  res.status(204).end();
});

/** A stock count: the counted quantity replaces the book stock; the difference is a 'count' movement (audited). */
partsRouter.post('/:partId/count', requireProject('parts.edit'), async (req, res) => {
  const projectId = projectOf(req.params);
  const partId = idParam(req.params, 'partId', 'That part');
  const me = requireUser(req);
  const input = stockCountInputSchema.parse(req.body);
  const result = await db.transaction(async (tx) => {
    const stock = await lockPartStock(tx, projectId, partId);
    if (!stock) throw notFound('That part');
    const difference = input.countedQty - stock.onHand;
    if (difference !== 0) {
      await tx.insert(stockMovements).values({ projectId, partId, qty: difference, kind: 'count', note: input.note, userId: me.id });
    }
    await audit(tx, {
      userId: me.id,
      projectId,
      entity: 'part',
      entityId: partId,
      action: 'count',
      before: { onHand: stock.onHand },
      after: { onHand: input.countedQty, difference, note: input.note },
    });
    return { partId, onHand: input.countedQty, difference };
  });
  reply<StockCounted>(res, 200, result);
});

/** The stock movements of one part, newest first. */
partsRouter.get('/:partId/movements', requireProject('parts.read'), async (req, res) => {
  const projectId = projectOf(req.params);
  const partId = idParam(req.params, 'partId', 'That part');
  const [part] = await db
    .select()
    .from(parts)
    .where(and(eq(parts.id, partId), eq(parts.projectId, projectId)));
  if (!part) throw notFound('That part');
  const movements = await db
    .select()
    .from(stockMovements)
    .where(eq(stockMovements.partId, partId))
    .orderBy(desc(stockMovements.at), desc(stockMovements.id))
    .limit(200);
  reply<PartMovements>(res, 200, { part: { ...part, unitCost: Number(part.unitCost) }, movements });
});
