/**
 * Downtime of the demo drive, after its simulated history is loaded (load-drive.ts): the default
 * causes, the site settings, every inspection round's stop as a cutter inspection or cutter change,
 * and the other standstills between strokes proposed from the advance log and given plausible
 * causes by a seeded generator — except the last week's, which wait for the site manager. Does
 * nothing to a drive that already has downtime events. Everything here is invented.
 */
import { and, asc, eq, gt, max, sql } from 'drizzle-orm';
import seedrandom from 'seedrandom';
import type { DbOrTx } from '../client';
import { downtimeCauses, downtimeEvents, inspectionRounds, siteSettings, strokes } from '../schema';
import { ensureDefaultCauses, proposeGapEvents } from '../../services/downtime';

/** Causes of the other standstills with their weight and typical notes (invented). */
const otherStandstills: { cause: string; weight: number; notes: string[] }[] = [
  {
    cause: 'Machine breakdown',
    weight: 0.25,
    notes: ['Hydraulic hose burst on the gripper', 'Main drive motor tripped', 'Grease pump fault'],
  },
  { cause: 'Lining supply', weight: 0.2, notes: ['Rock bolts and mesh late to the face', 'Shotcrete delivery late'] },
  { cause: 'Muck removal', weight: 0.2, notes: ['Conveyor belt splice', 'Conveyor belt misaligned', 'Muck train derailed'] },
  { cause: 'Survey', weight: 0.1, notes: ['Guidance laser station moved forward', 'Guidance system reset'] },
  { cause: 'Waiting', weight: 0.15, notes: ['Shift change over-ran', 'Waiting for power after a grid outage'] },
  { cause: 'Other', weight: 0.1, notes: ['Ventilation duct extended', 'Water inflow: pumps set up'] },
];

const UNEXPLAINED_DAYS = 7;

export async function loadDemoDowntime(tx: DbOrTx, projectId: string): Promise<void> {
  await ensureDefaultCauses(tx, projectId, null);
  // A crew hour of cutter work at the demo's invented rate (four people at 70 an hour).
  await tx
    .insert(siteSettings)
    .values({
      projectId,
      shifts: [
        { name: 'Day', start: '06:00' },
        { name: 'Night', start: '18:00' },
      ],
      labourRatePerHour: '280.00',
      gapMinutes: 90,
    })
    .onConflictDoNothing();
  const [existing] = await tx
    .select({ id: downtimeEvents.id })
    .from(downtimeEvents)
    .where(eq(downtimeEvents.projectId, projectId))
    .limit(1);
  if (existing) return;

  const causes = new Map(
    (await tx.select().from(downtimeCauses).where(eq(downtimeCauses.projectId, projectId))).map((c) => [c.name, c.id]),
  );

  // Each round's stop: from the round's start until the next stroke starts.
  const rounds = await tx
    .select({
      startedAt: inspectionRounds.startedAt,
      chainageM: inspectionRounds.chainageM,
      ringNumber: inspectionRounds.ringNumber,
      // Qualified by hand: inside a select list drizzle names columns without their table.
      changed: sql<number>`(select count(*)::int from inspection_entries e where e.round_id = inspection_rounds.id and e.action = 'changed')`,
    })
    .from(inspectionRounds)
    .where(eq(inspectionRounds.projectId, projectId))
    .orderBy(asc(inspectionRounds.startedAt));
  const roundEvents = [];
  for (const r of rounds) {
    const [next] = await tx
      .select({ at: strokes.startTime })
      .from(strokes)
      .where(and(eq(strokes.projectId, projectId), gt(strokes.startTime, r.startedAt)))
      .orderBy(asc(strokes.startTime))
      .limit(1);
    roundEvents.push({
      projectId,
      startAt: r.startedAt,
      endAt: next?.at ?? new Date(r.startedAt.getTime() + 6 * 3_600_000),
      causeId: causes.get(r.changed > 0 ? 'Cutter change' : 'Cutter inspection')!,
      note: `Inspection round at ring ${r.ringNumber}${r.changed > 0 ? `: ${r.changed} disc(s) changed` : ''}`,
    });
  }
  if (roundEvents.length > 0) await tx.insert(downtimeEvents).values(roundEvents);

  // The other standstills: proposed from the log, then explained as a site manager would.
  await proposeGapEvents(tx, projectId, null);
  const [{ lastEnd }] = await tx
    .select({ lastEnd: max(strokes.endTime) })
    .from(strokes)
    .where(eq(strokes.projectId, projectId));
  const explainedUntilMs = lastEnd ? new Date(lastEnd).getTime() - UNEXPLAINED_DAYS * 86_400_000 : Infinity;
  const gaps = await tx
    .select({ id: downtimeEvents.id, startAt: downtimeEvents.startAt })
    .from(downtimeEvents)
    .where(and(eq(downtimeEvents.projectId, projectId), eq(downtimeEvents.source, 'gap')))
    .orderBy(asc(downtimeEvents.startAt));
  const rand = seedrandom('eskerholt-north-downtime');
  for (const gap of gaps) {
    if (gap.startAt.getTime() >= explainedUntilMs) continue;
    let pick = rand();
    const choice = otherStandstills.find((c) => (pick -= c.weight) < 0) ?? otherStandstills[otherStandstills.length - 1];
    const note = choice.notes[Math.floor(rand() * choice.notes.length)];
    await tx
      .update(downtimeEvents)
      .set({ causeId: causes.get(choice.cause)!, note })
      .where(eq(downtimeEvents.id, gap.id));
  }
}
