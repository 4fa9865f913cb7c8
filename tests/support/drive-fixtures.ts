/** A small drive with a cutterhead, fitted cutters and a store, made through the real database. */
import { sql } from 'drizzle-orm';
import { db } from '../../server/db/client';
import { cutters, fittings, positions } from '../../server/db/schema';
import { uniq } from './fixtures';

export async function makeCutterhead(projectId: string, count = 4) {
  const rows = await db
    .insert(positions)
    .values(
      Array.from({ length: count }, (_, i) => ({
        projectId,
        number: i + 1,
        trackRadiusMm: 400 + i * 700,
        positionClass: (i === count - 1 ? 'gauge' : i === 0 ? 'centre' : 'face') as 'gauge' | 'centre' | 'face',
        discSizeIn: 17,
        wearLimitMm: i === count - 1 ? 12 : 25,
        tiltDeg: i === count - 1 ? 60 : null,
      })),
    )
    .returning();
  const fitted = [];
  for (const p of rows) {
    const [c] = await db
      .insert(cutters)
      .values({ projectId, serial: uniq('F'), discSizeIn: 17, status: 'fitted' })
      .returning();
    await db
      .insert(fittings)
      .values({ projectId, cutterId: c.id, positionId: p.id, fittedAt: sql`now() - interval '30 days'`, fittedChainageM: 100 });
    fitted.push(c);
  }
  const store = await db
    .insert(cutters)
    .values([1, 2, 3].map(() => ({ projectId, serial: uniq('S'), discSizeIn: 17, status: 'in_store' as const })))
    .returning();
  return { positions: rows, fitted, store };
}
