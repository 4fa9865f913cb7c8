/** A small cutterhead with a cutter on every position, spares in store and one earlier round, for the round screen tests. Invented data. */
import { entryInputSchema, startRoundInputSchema } from '../../shared/schemas/inspection';
import { db } from '../../server/db/client';
import { cutterEvents, cutters, fittings, positions } from '../../server/db/schema';
import { recordEntry, startRound } from '../../server/services/inspections';
import { uniq } from './fixtures';

const DAY_MS = 24 * 3600 * 1000;

/**
 * `count` positions (1 centre, face, 1 gauge; 17″ discs, limit 20 mm) on a 6.2 m bore, each with a
 * fitted serial since 30 days ago at chainage 100 m; `inStore` spare 17″ serials; and a round two
 * days ago that measured every position at `earlierWearMm`, walking them from the highest number down.
 */
export async function makeRoundSetup(
  projectId: string,
  userId: string,
  opts: { count?: number; inStore?: number; earlierWearMm?: number } = {},
) {
  const count = opts.count ?? 6;
  const tag = uniq('R').slice(2);
  const now = Date.now();
  const layout = await db
    .insert(positions)
    .values(
      Array.from({ length: count }, (_, i) => {
        const gauge = i === count - 1;
        return {
          projectId,
          number: i + 1,
          trackRadiusMm: 150 + i * 450,
          positionClass: i === 0 ? ('centre' as const) : gauge ? ('gauge' as const) : ('face' as const),
          discSizeIn: 17,
          tiltDeg: gauge ? 30 : null,
          wearLimitMm: 20,
        };
      }),
    )
    .returning();
  const fitted = await db
    .insert(cutters)
    .values(layout.map((p) => ({ projectId, serial: `${tag}-F${p.number}`, discSizeIn: 17, status: 'fitted' as const })))
    .returning();
  const fittedAt = new Date(now - 30 * DAY_MS);
  await db
    .insert(fittings)
    .values(
      layout.map((p, i) => ({ projectId, cutterId: fitted[i].id, positionId: p.id, fittedAt, fittedChainageM: 100, fittedRing: 60 })),
    );
  await db
    .insert(cutterEvents)
    .values(layout.map((p, i) => ({ projectId, cutterId: fitted[i].id, kind: 'fitted', positionId: p.id, at: fittedAt })));
  const spares = await db
    .insert(cutters)
    .values(Array.from({ length: opts.inStore ?? 2 }, (_, i) => ({ projectId, serial: `${tag}-S${i + 1}`, discSizeIn: 17 })))
    .returning();

  const earlier = await db.transaction((tx) =>
    startRound(
      tx,
      projectId,
      userId,
      startRoundInputSchema.parse({
        startedAt: new Date(now - 2 * DAY_MS).toISOString(),
        chainageM: 180,
        ringNumber: 110,
        crew: 'Earlier crew',
      }),
    ),
  );
  for (const p of [...layout].reverse()) {
    await db.transaction((tx) =>
      recordEntry(
        tx,
        projectId,
        earlier.id,
        userId,
        entryInputSchema.parse({
          clientKey: crypto.randomUUID(),
          positionId: p.id,
          wearMm: opts.earlierWearMm ?? 8,
          conditions: ['even_wear'],
        }),
      ),
    );
  }
  return { positions: layout, fitted, spares, earlierRound: earlier };
}
