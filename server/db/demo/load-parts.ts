/**
 * The demo drive's spare parts: an invented catalogue for 17″ disc cutters (complete assemblies,
 * rings, bearing and seal kits, hubs, small parts) with plausible costs and lead times, stock as
 * counted at the end of November (ready assemblies = the serials in store), one open purchase order partly received, and the workshop
 * loop. Suppliers, codes and prices are invented. Dates sit at the end of the simulated history
 * (simulate-drive.ts, to 30 November 2026).
 */
import { workshopConditionKeys, type RebuildOutcomeInput, type WorkshopCondition } from '../../../shared/schemas/parts';
import { and, count, eq } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { cutters, parts, purchaseOrderLines, purchaseOrders, stockMovements, workshopSettings } from '../schema';

const demoParts = [
  {
    code: 'CA17-S',
    name: '17″ single disc cutter, complete assembly',
    kind: 'cutter-assembly',
    discSizeIn: 17,
    unitCost: '3450.00',
    supplier: 'Harrowgate Cutter Supply',
    leadTimeMeanDays: 56,
    leadTimeSdDays: 14,
    minOrderQty: 2,
    stock: null,
  },
  {
    code: 'RG17-CS',
    name: '17″ ring, constant cross-section, 19 mm tip',
    kind: 'ring',
    discSizeIn: 17,
    unitCost: '420.00',
    supplier: 'Northvale Forge',
    leadTimeMeanDays: 28,
    leadTimeSdDays: 7,
    minOrderQty: 20,
    stock: 90,
  },
  {
    code: 'BK17',
    name: '17″ bearing kit (2 taper roller bearings with cups)',
    kind: 'bearing-kit',
    discSizeIn: 17,
    unitCost: '610.00',
    supplier: 'Harrowgate Cutter Supply',
    leadTimeMeanDays: 42,
    leadTimeSdDays: 10,
    minOrderQty: 4,
    stock: 14,
  },
  {
    code: 'SK17',
    name: '17″ seal kit (metal face seals, O-rings)',
    kind: 'seal-kit',
    discSizeIn: 17,
    unitCost: '185.00',
    supplier: 'Harrowgate Cutter Supply',
    leadTimeMeanDays: 21,
    leadTimeSdDays: 5,
    minOrderQty: 10,
    stock: 30,
  },
  {
    code: 'HB17',
    name: '17″ hub with shaft',
    kind: 'hub',
    discSizeIn: 17,
    unitCost: '980.00',
    supplier: 'Harrowgate Cutter Supply',
    leadTimeMeanDays: 70,
    leadTimeSdDays: 21,
    minOrderQty: 2,
    stock: 3,
  },
  {
    code: 'RR17',
    name: '17″ ring retainer (snap ring)',
    kind: 'small-part',
    discSizeIn: 17,
    unitCost: '12.00',
    supplier: 'Northvale Forge',
    leadTimeMeanDays: 14,
    leadTimeSdDays: 4,
    minOrderQty: 50,
    stock: 140,
  },
  {
    code: 'WB-M24',
    name: 'Wedge bolt M24 with washer',
    kind: 'small-part',
    discSizeIn: null,
    unitCost: '9.20',
    supplier: 'Calder Fixings',
    leadTimeMeanDays: 10,
    leadTimeSdDays: 3,
    minOrderQty: 100,
    stock: 300,
  },
] as const;

export async function loadDemoParts(tx: DbOrTx, projectId: string): Promise<void> {
  const rows = await tx
    .insert(parts)
    .values(demoParts.map(({ stock: _stock, ...p }) => ({ ...p, projectId })))
    .returning();
  const id = new Map(rows.map((r) => [r.code, r.id]));
  const line = (code: string, qty: number) => ({ partId: id.get(code)!, qty });

  // Ready assemblies: the 17″ serials in the store of the simulated history, so both views agree.
  const [{ inStore }] = await tx
    .select({ inStore: count() })
    .from(cutters)
    .where(and(eq(cutters.projectId, projectId), eq(cutters.status, 'in_store'), eq(cutters.discSizeIn, 17)));
  await tx.insert(stockMovements).values(
    demoParts.map((p) => ({
      projectId,
      partId: id.get(p.code)!,
      qty: p.stock ?? inStore,
      kind: 'count',
      at: new Date('2026-11-30T16:00:00Z'),
      note: 'Stock count at the end of November',
    })),
  );

  // One open order: seal kits partly received, rings still to come.
  const [order] = await tx
    .insert(purchaseOrders)
    .values({
      projectId,
      number: 'PO-2026-0412',
      supplier: 'Harrowgate Cutter Supply / Northvale Forge',
      orderedAt: new Date('2026-11-16T09:00:00Z'),
      note: 'Top-up before the fault zone',
    })
    .returning();
  const [seals] = await tx
    .insert(purchaseOrderLines)
    .values([
      { purchaseOrderId: order.id, partId: id.get('SK17')!, qtyOrdered: 20, qtyReceived: 8, dueDate: '2026-12-07' },
      { purchaseOrderId: order.id, partId: id.get('RG17-CS')!, qtyOrdered: 40, dueDate: '2026-12-21' },
    ])
    .returning();
  await tx.insert(stockMovements).values({
    projectId,
    partId: id.get('SK17')!,
    qty: 8,
    kind: 'receipt',
    at: new Date('2026-11-27T10:30:00Z'),
    note: 'Order PO-2026-0412, first delivery',
    purchaseOrderLineId: seals.id,
  });

  // The workshop loop, by the worst condition a removed cutter comes back with (practice, invented quantities).
  const ringOnly: RebuildOutcomeInput = [line('RG17-CS', 1), line('RR17', 1), line('WB-M24', 2)];
  const ringAndSeals: RebuildOutcomeInput = [...ringOnly, line('SK17', 1)];
  const full: RebuildOutcomeInput = [...ringAndSeals, line('BK17', 1)];
  const byCondition: Record<WorkshopCondition, RebuildOutcomeInput> = Object.fromEntries(
    workshopConditionKeys.map((c) => [c, ringOnly]),
  ) as Record<WorkshopCondition, RebuildOutcomeInput>;
  Object.assign(byCondition, { seal_leaking: ringAndSeals, flat_spot: full, bearing_fault: full, hub_damage: 'scrap' });
  await tx
    .insert(workshopSettings)
    .values({ projectId, turnaroundDays: 12, maxRebuilds: 3, serviceLevel: 0.95, boms: { [id.get('CA17-S')!]: byCondition } });
}
