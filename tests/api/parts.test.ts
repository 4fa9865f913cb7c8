/**
 * Parts through the API: a hand-worked demand projection and order suggestions on a small invented
 * drive (a scheduled stop, the workshop loop, an open order), the estimate of rolled km and sudden
 * failures ahead, an undated stop at the forecast's dates, and bad input that changes nothing.
 */
import quantile from '@stdlib/stats-base-dists-normal-quantile';
import { randomUUID } from 'node:crypto';
import { and, count, eq } from 'drizzle-orm';
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { weekIndexOf } from '../../shared/domain/parts-projection';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { auditLog, geologySections, positions, purchaseOrderLines, purchaseOrders, stockMovements } from '../../server/db/schema';
import type { DemandWeek } from '../../shared/schemas/parts';
import { siteDay } from '../../shared/site-time';
import type { OrderSuggestion } from '../../shared/schemas/parts';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';
import { csvLines } from '../support/csv';
import { makeCutterhead } from '../support/drive-fixtures';
import { bomFor, makeSmallCatalogue } from '../support/parts-fixtures';
import { insertStop, makeStopsDrive } from '../support/stops-fixtures';

const app: Express = createApp();
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

async function buyerOf(projectId: string): Promise<Agent> {
  const buyer = await makeUser();
  await addMember(projectId, buyer.id, 'buyer');
  return signedInAgent(app, buyer.email);
}

const DAY = 86_400_000;

describe('demand and order suggestions, worked by hand', () => {
  // A drive without an advance log: the forecast has nothing to say, so only the dated stop makes demand.
  let agent: Agent;
  let projectId: string;
  const id: Record<string, string> = {};
  let stopId: string;

  beforeAll(async () => {
    const project = await makeProject(); // Europe/Zurich
    projectId = project.id;
    const drive = await makeCutterhead(projectId, 4); // four 17″ positions with fitted cutters, rebuilt 0 times
    agent = await buyerOf(projectId);
    const catalogue = [
      {
        code: 'ASM17',
        name: '17″ disc cutter, complete',
        kind: 'cutter-assembly',
        discSizeIn: 17,
        unitCost: 2500,
        leadTimeMeanDays: 42,
        minOrderQty: 1,
      },
      {
        code: 'RING17',
        name: '17″ ring',
        kind: 'ring',
        discSizeIn: 17,
        unitCost: 380,
        leadTimeMeanDays: 14,
        leadTimeSdDays: 7,
        minOrderQty: 10,
      },
      { code: 'SEAL', name: 'Seal kit', kind: 'seal-kit', unitCost: 95, leadTimeMeanDays: 21, minOrderQty: 5 },
      { code: 'BOLT', name: 'Hub bolt M20', kind: 'small-part', unitCost: 4.5, leadTimeMeanDays: 7, minOrderQty: 50 },
    ];
    for (const part of catalogue) {
      const res = await agent.post(`/api/projects/${projectId}/parts`).send(part);
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      id[part.code] = res.body.id;
    }
    const settings = await agent.put(`/api/projects/${projectId}/parts/workshop`).send({
      turnaroundDays: 10,
      maxRebuilds: 3,
      serviceLevel: 0.95,
      boms: {
        [id.ASM17]: bomFor({
          worn: [
            { partId: id.RING17, qty: 1 },
            { partId: id.BOLT, qty: 4 },
          ],
          seal_leaking: [
            { partId: id.RING17, qty: 1 },
            { partId: id.SEAL, qty: 1 },
          ],
        }),
      },
    });
    expect(settings.status, JSON.stringify(settings.body)).toBe(200);
    for (const [code, countedQty] of [
      ['ASM17', 3],
      ['RING17', 3],
      ['BOLT', 20],
    ] as const) {
      expect((await agent.post(`/api/projects/${projectId}/parts/${id[code]}/count`).send({ countedQty })).status).toBe(200);
    }
    // 10 rings due 15 days from today (site date): week 2.
    const today = siteDay(new Date(), 'Europe/Zurich');
    const due = new Date(Date.parse(`${today}T00:00:00Z`) + 15 * DAY).toISOString().slice(0, 10);
    const order = await agent
      .post(`/api/projects/${projectId}/parts/orders`)
      .send({ number: 'PO-HAND-1', lines: [{ partId: id.RING17, qtyOrdered: 10, dueDate: due }] });
    expect(order.status, JSON.stringify(order.body)).toBe(201);
    // A scheduled stop 8.5 days ahead (site date 8 or 9 days on: week 1) changing positions 2 and 3.
    const stop = await insertStop(projectId, { status: 'scheduled', plannedStart: new Date(Date.now() + 8.5 * DAY) }, [
      drive.positions[1].id,
      drive.positions[2].id,
    ]);
    stopId = stop.id;
  });

  it('projects stock per part and week through the workshop loop', async () => {
    const res = await agent.get(`/api/projects/${projectId}/parts/demand?weeks=4`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const rows = (code: string) => (res.body.weeks as DemandWeek[]).filter((w) => w.partId === id[code]);
    const pick = (code: string, field: 'demand' | 'receipts' | 'rebuildReturns' | 'projectedStock') => rows(code).map((r) => r[field]);
    // derived by hand: the stop removes 2 worn cutters in week 1; 2 assemblies leave ready stock (3 → 1);
    // each is rebuilt with 1 ring + 4 bolts drawn in week 1; the turnaround of 10 days rounds up to 2 weeks,
    // so both are back in week 3 (1 → 3). Rings: 3 − 2 = 1, then +10 from the order in week 2.
    expect(pick('ASM17', 'demand')).toEqual([0, 2, 0, 0]);
    expect(pick('ASM17', 'rebuildReturns')).toEqual([0, 0, 0, 2]);
    expect(pick('ASM17', 'projectedStock')).toEqual([3, 1, 1, 3]);
    expect(pick('RING17', 'demand')).toEqual([0, 2, 0, 0]);
    expect(pick('RING17', 'receipts')).toEqual([0, 0, 10, 0]);
    expect(pick('RING17', 'projectedStock')).toEqual([3, 1, 11, 11]);
    expect(pick('BOLT', 'projectedStock')).toEqual([20, 12, 12, 12]);
    expect(pick('SEAL', 'demand')).toEqual([0, 0, 0, 0]);
    // Which stop the demand comes from.
    expect(rows('RING17')[1].sources).toEqual([{ kind: 'stop', stopId, qty: 2 }]);
    expect(res.body.stops).toHaveLength(1);
    expect(res.body.stops[0]).toMatchObject({ id: stopId, dateBasis: 'planned', positionNumbers: [2, 3] });
    expect(res.body.problems.join(' ')).toMatch(/No advance log yet/);
  });

  it('suggests orders with safety stock and reorder point from the lead time and its spread', async () => {
    const res = await agent.get(`/api/projects/${projectId}/parts/demand?weeks=4`);
    const s = (code: string) => (res.body.suggestions as OrderSuggestion[]).find((x) => x.partId === id[code])!;
    const z95 = quantile(0.95, 0, 1); // source: @stdlib normal quantile (1.6449, DOMAIN.md §6)
    expect(res.body.z).toBeCloseTo(z95, 10);
    // Rings, derived by hand: weekly demand 0, 2, 0, 0 → d̄ = 0.5, σ_d = √((3·0.5² + 1.5²)/4) = √0.75;
    // L = 14/7 = 2 weeks, σ_L = 7/7 = 1 week → SS = z·√(L·σ_d² + d̄²·σ_L²) = z·√1.75 (DOMAIN.md §6), ROP = d̄·L + SS = 1 + SS.
    const ringSs = z95 * Math.sqrt(1.75);
    expect(s('RING17').safetyStock).toBeCloseTo(ringSs, 9);
    expect(s('RING17').safetyStock).toBeCloseTo(2.176, 3);
    expect(s('RING17').reorderPoint).toBeCloseTo(1 + ringSs, 9);
    // Window 2 weeks: demand 2. The 10 on order come in week 2, after the window, yet an order on the way
    // always counts (issue 16): position 3 + 10 = 13 ≥ 2 + 2.176 → nothing more to order.
    expect(s('RING17')).toMatchObject({
      leadTimeWindowWeeks: 2,
      leadTimeDemand: 2,
      rebuildsWithinLeadTime: 0,
      inventoryPosition: 13,
      orderQty: 0,
      orderNow: false,
      orderValue: 0,
      weeksOfCover: 6,
    });
    expect(s('RING17').sources).toEqual([{ kind: 'stop', stopId, qty: 2 }]);
    // Assemblies: same weekly demand, L = 6 weeks → SS = z·√(6·0.75) = z·√4.5 = 3.489; window 6 weeks beyond the
    // 4-week horizon: 2 + 2 × d̄ = 3 demand; 2 rebuilt come back in it → position 5 < 3 + 3.489 → order 2.
    expect(s('ASM17').safetyStock).toBeCloseTo(z95 * Math.sqrt(4.5), 9);
    expect(s('ASM17')).toMatchObject({ leadTimeDemand: 3, rebuildsWithinLeadTime: 2, inventoryPosition: 5, orderQty: 2, orderNow: true });
    // Bolts: 0, 8, 0, 0 → d̄ = 2, σ_d = √12; L = 1 week → SS = z·√12 = 5.70; window week 0 has no demand → 20 covers it.
    expect(s('BOLT').safetyStock).toBeCloseTo(z95 * Math.sqrt(12), 9);
    expect(s('BOLT')).toMatchObject({ orderQty: 0, orderNow: false, weeksOfCover: 10 });
    expect(s('SEAL')).toMatchObject({ safetyStock: 0, orderQty: 0, orderNow: false, weeksOfCover: null });

    // A higher service level raises the safety stock by the ratio of the quantiles.
    const at99 = await agent.get(`/api/projects/${projectId}/parts/demand?weeks=4&serviceLevel=0.99`);
    const ring99 = (at99.body.suggestions as OrderSuggestion[]).find((x) => x.partId === id.RING17)!;
    expect(ring99.safetyStock).toBeCloseTo(quantile(0.99, 0, 1) * Math.sqrt(1.75), 9); // 2.3263 · 1.3229 = 3.077
  });

  it('lists the parts with stock, on order, weeks of cover and the order-now flag, and exports the suggestions as CSV', async () => {
    const list = await agent.get(`/api/projects/${projectId}/parts`);
    expect(list.status).toBe(200);
    const ring = list.body.parts.find((p: { code: string }) => p.code === 'RING17');
    expect(ring).toMatchObject({ onHand: 3, onOrder: 10, orderNow: false, orderQty: 0, unitCost: 380 });
    const csv = await agent.get(`/api/projects/${projectId}/parts/demand/suggestions.csv?weeks=4`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/attachment; filename="order-suggestions-\d{4}-\d{2}-\d{2}\.csv"/);
    const lines = csvLines(csv.text);
    expect(lines[0]).toMatch(/^code,name,supplier,on_hand,on_order/);
    const ringLine = lines.find((l) => l.startsWith('RING17,'))!;
    expect(ringLine).toContain(',no,0,380,EUR,0,');
    expect(ringLine).toMatch(/Stop at 0\+500\.0, scheduled on \d{4}-\d{2}-\d{2}: 2/);
  });

  it('refuses bad input with a clear 4xx and changes nothing', async () => {
    const base = `/api/projects/${projectId}/parts`;
    const movements = async () =>
      (await db.select({ n: count() }).from(stockMovements).where(eq(stockMovements.projectId, projectId)))[0].n;
    const audits = async () => (await db.select({ n: count() }).from(auditLog).where(eq(auditLog.projectId, projectId)))[0].n;
    const before = { movements: await movements(), audits: await audits() };

    // Negative stock.
    const negative = await agent.post(`${base}/${id.RING17}/count`).send({ countedQty: -2 });
    expect(negative.status).toBe(400);
    expect(negative.body.error.message).toMatch(/Stock cannot be negative/);

    // Receiving more than ordered.
    const [order] = (await agent.get(`${base}/orders`)).body;
    const line = order.lines[0];
    const tooMany = await agent.post(`${base}/orders/${order.id}/lines/${line.id}/receive`).send({ qty: 11 });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.message).toMatch(
      /^Receiving more than ordered: order PO-HAND-1 has 10 × RING17, 0 received so far, so at most 10 more/,
    );

    // Unknown part: on an order line, in a count, in an edit, in a bill of materials.
    const unknown = randomUUID();
    const badLine = await agent
      .post(`${base}/orders`)
      .send({ number: 'PO-BAD', lines: [{ partId: unknown, qtyOrdered: 1, dueDate: '2030-01-01' }] });
    expect(badLine.status).toBe(400);
    expect(badLine.body.error.issues[0].path).toBe('lines.0.partId');
    expect((await agent.post(`${base}/${unknown}/count`).send({ countedQty: 1 })).status).toBe(404);
    expect(
      (await agent.put(`${base}/${unknown}`).send({ code: 'X', name: 'X', kind: 'hub', unitCost: 1, leadTimeMeanDays: 1 })).status,
    ).toBe(404);
    const badBom = await agent.put(`${base}/workshop`).send({
      turnaroundDays: 10,
      maxRebuilds: 3,
      serviceLevel: 0.95,
      boms: { [id.ASM17]: bomFor({ worn: [{ partId: unknown, qty: 1 }] }) },
    });
    expect(badBom.status).toBe(400);
    // A ring without its disc size, and a duplicate code.
    expect(
      (await agent.post(base).send({ code: 'R2', name: 'Ring', kind: 'ring', unitCost: 1, leadTimeMeanDays: 1 })).body.error.issues[0].path,
    ).toBe('discSizeIn');
    expect(
      (await agent.post(base).send({ code: 'BOLT', name: 'Again', kind: 'small-part', unitCost: 1, leadTimeMeanDays: 1 })).status,
    ).toBe(409);

    expect(await movements()).toBe(before.movements);
    expect(await audits()).toBe(before.audits);
    expect(
      await db
        .select()
        .from(purchaseOrders)
        .where(and(eq(purchaseOrders.projectId, projectId), eq(purchaseOrders.number, 'PO-BAD'))),
    ).toHaveLength(0);
    const [unchanged] = await db.select().from(purchaseOrderLines).where(eq(purchaseOrderLines.id, line.id));
    expect(unchanged.qtyReceived).toBe(0);
    const ring = (await agent.get(base)).body.parts.find((p: { code: string }) => p.code === 'RING17');
    expect(ring.onHand).toBe(3);
  });

  it('receives part of a line as a receipt movement in stock, audited, then refuses more than is left', async () => {
    const base = `/api/projects/${projectId}/parts`;
    const [order] = (await agent.get(`${base}/orders`)).body;
    const line = order.lines[0];
    const res = await agent.post(`${base}/orders/${order.id}/lines/${line.id}/receive`).send({ qty: 4, note: 'First crate' });
    expect(res.status).toBe(200);
    expect(res.body.lines[0]).toMatchObject({ qtyReceived: 4, qtyOpen: 6 });
    const receipts = await db
      .select()
      .from(stockMovements)
      .where(and(eq(stockMovements.purchaseOrderLineId, line.id), eq(stockMovements.kind, 'receipt')));
    expect(receipts.map((m) => m.qty)).toEqual([4]);
    const [audited] = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'purchase_order_line'), eq(auditLog.entityId, line.id)));
    expect(audited.action).toBe('receive');
    const list = (await agent.get(base)).body.parts;
    expect(list.find((p: { code: string }) => p.code === 'RING17')).toMatchObject({ onHand: 7, onOrder: 6 });
    expect((await agent.post(`${base}/orders/${order.id}/lines/${line.id}/receive`).send({ qty: 7 })).status).toBe(400);
    // A count writes the difference as a movement: 7 on the books, 5 on the shelf → −2.
    const counted = await agent.post(`${base}/${id.RING17}/count`).send({ countedQty: 5, note: 'Two rings found cracked' });
    expect(counted.body).toMatchObject({ onHand: 5, difference: -2 });
  });
});

describe('stops without a date and positions due without a stop', () => {
  it('count an undated stop’s positions at their P90 dates and uncovered due positions as forecast demand', async () => {
    const drive = await makeStopsDrive(); // CAI 4 ground: the wear prior gives rates; machine at 200 m
    const agent = await buyerOf(drive.project.id);
    const catalogue = await makeSmallCatalogue(drive.project.id);
    const stop = await insertStop(drive.project.id, { status: 'proposed' }, [drive.drive.positions[0].id]);
    const forecastRes = await agent.get(`/api/projects/${drive.project.id}/forecast`);
    const byId = new Map(forecastRes.body.positions.map((p: { position: { positionId: string } }) => [p.position.positionId, p]));
    const res = await agent.get(`/api/projects/${drive.project.id}/parts/demand?weeks=52`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const start = res.body.startDate as string;
    const weekOf = (iso: string) => Math.max(0, weekIndexOf(siteDay(new Date(iso), 'Europe/Zurich'), start));
    const assemblyRows = (res.body.weeks as DemandWeek[]).filter((w) => w.partId === catalogue.assembly.id);

    const onStop = byId.get(drive.drive.positions[0].id) as { p90: { status: string; date: string } };
    expect(onStop.p90.status).not.toBe('beyond_known_ground');
    const stopWeek = weekOf(onStop.p90.date);
    expect(stopWeek).toBeLessThan(52);
    expect(assemblyRows[stopWeek].sources).toContainEqual({ kind: 'stop', stopId: stop.id, qty: 1 });
    expect(res.body.stops[0]).toMatchObject({ id: stop.id, dateBasis: 'p90', positionNumbers: [1] });

    // The two other positions are on no stop: their first change is forecast demand in their P90 week.
    for (const p of drive.drive.positions.slice(1)) {
      const f = byId.get(p.id) as { p90: { status: string; date: string } };
      if (f.p90.status === 'beyond_known_ground' || weekOf(f.p90.date) >= 52) continue;
      expect(assemblyRows[weekOf(f.p90.date)].sources.some((s) => s.kind === 'forecast')).toBe(true);
    }
    // The machine keeps boring after the first changes, so the discs fitted then are changed again within a year.
    const forecastChanges = assemblyRows
      .flatMap((w) => w.sources)
      .filter((s) => s.kind === 'forecast')
      .reduce((sum, s) => sum + s.qty, 0);
    expect(forecastChanges).toBeGreaterThan(2);
    expect(res.body.estimate.rolledKmPerWeek[0]).toBeGreaterThan(0);
  });
});

describe('orders filled from the suggestions of two suppliers', () => {
  let agent: Agent;
  let projectId: string;
  let catalogue: Awaited<ReturnType<typeof makeSmallCatalogue>>;

  beforeAll(async () => {
    const project = await makeProject();
    projectId = project.id;
    const drive = await makeCutterhead(projectId, 4);
    agent = await buyerOf(projectId);
    catalogue = await makeSmallCatalogue(projectId); // assembly from Invented Cutter Works, ring from Invented Forge
    await insertStop(projectId, { status: 'scheduled', plannedStart: new Date(Date.now() + 8.5 * DAY) }, [
      drive.positions[1].id,
      drive.positions[2].id,
    ]);
  });

  const suggestions = async () => {
    const res = await agent.get(`/api/projects/${projectId}/parts/demand?weeks=4`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    return res.body.suggestions as OrderSuggestion[];
  };
  const orderCount = async () => (await db.select({ n: count() }).from(purchaseOrders).where(eq(purchaseOrders.projectId, projectId)))[0].n;

  it('saves one order per supplier in one transaction, and the suggestions then ask for nothing more', async () => {
    const before = await suggestions();
    const toOrder = before.filter((s) => s.orderNow);
    // derived as in the hand-worked drive above with no open order: rings short 1.18 → 10 (MOQ); assemblies 2.
    expect(toOrder.map((s) => [s.code, s.orderQty, s.supplier]).sort()).toEqual([
      ['ASM17', 2, 'Invented Cutter Works'],
      ['RING17', 10, 'Invented Forge'],
    ]);
    // Due far beyond the lead time and the horizon: the orders must count all the same (issue 16).
    const res = await agent.post(`/api/projects/${projectId}/parts/orders/batch`).send({
      orders: toOrder.map((s, i) => ({
        number: `PO-SPLIT-${i + 1}`,
        supplier: s.supplier,
        lines: [{ partId: s.partId, qtyOrdered: s.orderQty, dueDate: '2099-06-01' }],
      })),
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toHaveLength(2);
    const bySupplier = Object.fromEntries(
      (res.body as { supplier: string; lines: { partCode: string; qtyOrdered: number }[] }[]).map((o) => [
        o.supplier,
        o.lines.map((l) => [l.partCode, l.qtyOrdered]),
      ]),
    );
    expect(bySupplier).toEqual({ 'Invented Cutter Works': [['ASM17', 2]], 'Invented Forge': [['RING17', 10]] });
    const after = await suggestions();
    // derived: rings 3 + 10 = 13 ≥ 2 + 2.18; assemblies 3 + 2 on order + 2 rebuilt = 7 ≥ 3 + 3.49.
    expect(after.filter((s) => s.orderNow)).toEqual([]);
    expect(after.find((s) => s.partId === catalogue.ring.id)!.inventoryPosition).toBe(13);
  });

  it('refuses a batch with an unknown part, a supplier twice or a number taken, and saves none of it', async () => {
    const n = await orderCount();
    const line = { partId: catalogue.ring.id, qtyOrdered: 1, dueDate: '2027-03-01' };
    const unknown = await agent.post(`/api/projects/${projectId}/parts/orders/batch`).send({
      orders: [
        { number: 'PO-OK-1', supplier: 'A', lines: [line] },
        { number: 'PO-OK-2', supplier: 'B', lines: [{ ...line, partId: randomUUID() }] },
      ],
    });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.message).toMatch(/Order PO-OK-2, line 1 names a part that is not in this drive’s catalogue/);
    const twice = await agent.post(`/api/projects/${projectId}/parts/orders/batch`).send({
      orders: [
        { number: 'PO-OK-3', supplier: 'Same Supplier', lines: [line] },
        { number: 'PO-OK-4', supplier: 'same supplier', lines: [line] },
      ],
    });
    expect(twice.status).toBe(400);
    expect(JSON.stringify(twice.body)).toMatch(/same supplier/);
    const taken = await agent.post(`/api/projects/${projectId}/parts/orders/batch`).send({
      orders: [
        { number: 'PO-OK-5', supplier: 'A', lines: [line] },
        { number: 'PO-SPLIT-1', supplier: 'B', lines: [line] },
      ],
    });
    expect(taken.status).toBe(409);
    expect(taken.body.error.message).toMatch(/already an order numbered PO-SPLIT-1/);
    expect(await orderCount()).toBe(n);
  });
});

describe('stored values the computation cannot use', () => {
  it('a position with track radius 0 or wear limit 0 does not break the parts pages: it is skipped and named', async () => {
    const drive = await makeStopsDrive();
    const agent = await buyerOf(drive.project.id);
    await makeSmallCatalogue(drive.project.id);
    const broken = drive.drive.positions[1];
    // A value the input schemas refuse, stored before they did (or written around them).
    await db.update(positions).set({ trackRadiusMm: 0 }).where(eq(positions.id, broken.id));
    const noLimit = drive.drive.positions[2];
    await db.update(positions).set({ wearLimitMm: 0 }).where(eq(positions.id, noLimit.id));
    for (const path of ['parts', 'parts/demand?weeks=12', 'parts/demand/suggestions.csv?weeks=12']) {
      const res = await agent.get(`/api/projects/${drive.project.id}/${path}`);
      expect(res.status, `${path}: ${res.text.slice(0, 300)}`).toBe(200);
    }
    const list = await agent.get(`/api/projects/${drive.project.id}/parts`);
    expect(list.body.problems.join(' ')).toMatch(new RegExp(`Position ${broken.number}\\b.*track radius`));
    expect(list.body.problems.join(' ')).toMatch(new RegExp(`Position ${noLimit.number} has a wear limit of 0 mm`));
  });
});

describe('geology sections the computation cannot use', () => {
  it('a section of no length or ending before it starts is left out and named, and the parts pages answer', async () => {
    const drive = await makeStopsDrive();
    const agent = await buyerOf(drive.project.id);
    await makeSmallCatalogue(drive.project.id);
    const [g] = await db.select().from(geologySections).where(eq(geologySections.projectId, drive.project.id));
    await db.insert(geologySections).values([
      { projectId: drive.project.id, chainageFromM: 600, chainageToM: 600, groundTypeId: g.groundTypeId },
      { projectId: drive.project.id, chainageFromM: 900, chainageToM: 800, groundTypeId: g.groundTypeId },
    ]);
    for (const path of ['parts', 'parts/demand?weeks=52', 'parts/demand/suggestions.csv?weeks=12']) {
      const res = await agent.get(`/api/projects/${drive.project.id}/${path}`);
      expect(res.status, `${path}: ${res.text.slice(0, 300)}`).toBe(200);
    }
    const problems = (await agent.get(`/api/projects/${drive.project.id}/parts`)).body.problems.join(' ');
    expect(problems).toMatch(/The geology section from 0\+600\.0 to 0\+600\.0 has no length/);
    expect(problems).toMatch(/The geology section from 0\+900\.0 to 0\+800\.0 has no length/);
    // The positions themselves are forecast: the bad sections do not take them out.
    expect(problems).not.toMatch(/Position \d+ is left out/);
  });
});
