/** A small invented parts catalogue with stock and workshop settings, made through the real database. */
import { db } from '../../server/db/client';
import { parts, stockMovements, workshopSettings } from '../../server/db/schema';
import { workshopConditionKeys, type RebuildOutcomeInput, type WorkshopCondition } from '../../shared/schemas/parts';

/** Every workshop condition mapped to `scrap`, except those given. */
export function bomFor(given: Partial<Record<WorkshopCondition, RebuildOutcomeInput>>): Record<WorkshopCondition, RebuildOutcomeInput> {
  return Object.fromEntries(workshopConditionKeys.map((c) => [c, given[c] ?? 'scrap'])) as Record<WorkshopCondition, RebuildOutcomeInput>;
}

/**
 * 17″ assembly (3 in ready stock, lead time 42 days), ring (3 on hand, 14 ± 7 days, MOQ 10) and
 * bolts (20 on hand, 7 days, MOQ 50); a worn cutter is rebuilt with 1 ring and 4 bolts in 10 days.
 */
export async function makeSmallCatalogue(projectId: string) {
  const [assembly, ring, bolt] = await db
    .insert(parts)
    .values([
      {
        projectId,
        code: 'ASM17',
        name: '17″ disc cutter, complete',
        kind: 'cutter-assembly' as const,
        discSizeIn: 17,
        unitCost: '2500.00',
        leadTimeMeanDays: 42,
        minOrderQty: 1,
        supplier: 'Invented Cutter Works',
      },
      {
        projectId,
        code: 'RING17',
        name: '17″ ring, constant section',
        kind: 'ring' as const,
        discSizeIn: 17,
        unitCost: '380.00',
        leadTimeMeanDays: 14,
        leadTimeSdDays: 7,
        minOrderQty: 10,
        supplier: 'Invented Forge',
      },
      {
        projectId,
        code: 'BOLT',
        name: 'Hub bolt M20',
        kind: 'small-part' as const,
        unitCost: '4.50',
        leadTimeMeanDays: 7,
        minOrderQty: 50,
      },
    ])
    .returning();
  await db.insert(stockMovements).values([
    { projectId, partId: assembly.id, qty: 3, kind: 'count' },
    { projectId, partId: ring.id, qty: 3, kind: 'count' },
    { projectId, partId: bolt.id, qty: 20, kind: 'count' },
  ]);
  await db.insert(workshopSettings).values({
    projectId,
    turnaroundDays: 10,
    maxRebuilds: 3,
    serviceLevel: 0.95,
    boms: {
      [assembly.id]: bomFor({
        worn: [
          { partId: ring.id, qty: 1 },
          { partId: bolt.id, qty: 4 },
        ],
      }),
    },
  });
  return { assembly, ring, bolt };
}
