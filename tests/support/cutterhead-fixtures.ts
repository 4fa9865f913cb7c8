/** A cutterhead with a worn history, and a signed-in browser page, for the cutterhead tests. Invented data. */
import type { Browser } from 'playwright-core';
import { entryInputSchema, startRoundInputSchema } from '../../shared/schemas/inspection';
import type { PositionClass } from '../../shared/cutters';
import { db } from '../../server/db/client';
import { positions } from '../../server/db/schema';
import { recordEntry, startRound } from '../../server/services/inspections';
import { PASSWORD, uniq } from './fixtures';

/**
 * A plausible layout for a bore of `excavatedDiameterM` (common practice, no source): four twin
 * centre hubs within 330 mm, face discs every 85 mm, gauge discs every 55 mm over the last
 * 250 mm with a tilt rising to 60°; limits 25 mm (face, centre) and 12 mm (gauge), DOMAIN.md §4.
 */
export function plausibleLayout(excavatedDiameterM: number) {
  const radiusMm = (excavatedDiameterM * 1000) / 2;
  const rows: { trackRadiusMm: number; positionClass: PositionClass; twinDisc: boolean; tiltDeg: number | null; wearLimitMm: number }[] =
    [];
  for (const r of [60, 150, 240, 330])
    rows.push({ trackRadiusMm: r, positionClass: 'centre', twinDisc: true, tiltDeg: null, wearLimitMm: 25 });
  for (let r = 420; r <= radiusMm - 300; r += 85)
    rows.push({ trackRadiusMm: r, positionClass: 'face', twinDisc: false, tiltDeg: null, wearLimitMm: 25 });
  const gauge = [250, 195, 140, 85, 30];
  gauge.forEach((inset, i) =>
    rows.push({ trackRadiusMm: radiusMm - inset, positionClass: 'gauge', twinDisc: false, tiltDeg: 20 + i * 10, wearLimitMm: 12 }),
  );
  return rows.map((r, i) => ({ ...r, number: i + 1, discSizeIn: 17, angleDeg: null }));
}

/**
 * Fits a serial on every position but the last, then measures three rounds 150 m apart, wear
 * growing with track radius so the outer gauge discs end over their limit; position 6 is
 * changed in the second round and not measured in the third. Goes through the same service
 * the rounds routes use, so periods, serial states and events are the real ones.
 */
export async function makeWornCutterhead(projectId: string, userId: string, excavatedDiameterM: number) {
  const rows = await db
    .insert(positions)
    .values(plausibleLayout(excavatedDiameterM).map((p) => ({ ...p, projectId })))
    .returning();
  const radiusMm = (excavatedDiameterM * 1000) / 2;
  const tag = uniq('K').slice(2);
  const day = 24 * 3600 * 1000;
  const start = Date.parse('2026-09-01T07:00:00Z');
  const round = (j: number) =>
    db.transaction((tx) =>
      startRound(
        tx,
        projectId,
        userId,
        startRoundInputSchema.parse({
          startedAt: new Date(start + j * 14 * day).toISOString(),
          chainageM: 100 + j * 150,
          ringNumber: 66 + j * 100,
          crew: 'Test crew',
        }),
      ),
    );
  const entry = async (round: { id: string; startedAt: Date }, input: Record<string, unknown>) => {
    const recordedAt = round.startedAt.toISOString();
    await db.transaction((tx) =>
      recordEntry(
        tx,
        projectId,
        round.id,
        userId,
        entryInputSchema.parse({ clientKey: crypto.randomUUID(), wearMm: null, recordedAt, ...input }),
      ),
    );
  };
  const fitting = await round(0);
  for (const p of rows.slice(0, -1)) {
    await entry(fitting, {
      positionId: p.id,
      action: 'changed',
      fitted: { serial: `${tag}-${p.number}`, isNew: true },
      changeReason: 'First set',
    });
  }
  for (const j of [1, 2, 3]) {
    const r = await round(j);
    for (const p of rows.slice(0, -1)) {
      if (j === 3 && p.number === 6) continue;
      const wearMm = Math.round(10 * (1 + (p.trackRadiusMm / radiusMm) * j * (p.positionClass === 'gauge' ? 4.5 : 6.5))) / 10;
      const change = j === 2 && p.number === 6;
      await entry(r, {
        positionId: p.id,
        wearMm,
        conditions: change ? ['chipped_ring'] : ['even_wear'],
        ...(change ? { action: 'changed', fitted: { serial: `${tag}-${p.number}b`, isNew: true }, changeReason: 'Chipped ring' } : {}),
      });
    }
  }
  return rows;
}

/** A page in its own browser context, signed in as `email` through the API (the cookie is shared). */
export async function signedInPage(browser: Browser, appUrl: string, email: string, viewport = { width: 768, height: 1024 }) {
  const context = await browser.newContext({ viewport });
  const res = await context.request.post(`${appUrl}/api/auth/sign-in`, { data: { email, password: PASSWORD } });
  if (!res.ok()) throw new Error(`sign-in as ${email} failed: ${res.status()}`);
  return context.newPage();
}
