/**
 * Nightly: refreshes every drive's forecast and, when a position's cautious (P90) change-out falls
 * inside the planning horizon and no open stop covers it, proposes a stop and tells the planners.
 * The proposal follows the simple rule a planner would use — the last place where a stop is
 * allowed before the first uncovered position is due, changing what is due within the horizon —
 * and the planner refines it on the plan screen.
 */
import { and, eq, exists, inArray } from 'drizzle-orm';
import { formatChainage } from '../shared/domain/chainage';
import { db } from '../server/db/client';
import { positions, projects, stopPositions, stops } from '../server/db/schema';
import { enqueueMail, kickMailDelivery } from '../server/lib/mail';
import { computeForecast } from '../server/services/forecast';
import type { JobContext } from '../server/services/job-runner';
import { recipientsFor } from '../server/services/recipients';
import { proposalStopPlace } from '../server/services/stops';

/** Positions due within this many metres ahead get a proposed stop (common practice, no source; about a month of boring). */
export const PROPOSAL_HORIZON_M = 500;

export async function refreshForecastsJob({ now }: JobContext, options: { projectId?: string } = {}): Promise<string> {
  // Drives with a cutterhead: without positions there is nothing to forecast.
  const drives = await db
    .select()
    .from(projects)
    .where(
      and(
        options.projectId ? eq(projects.id, options.projectId) : undefined,
        exists(db.select({ id: positions.id }).from(positions).where(eq(positions.projectId, projects.id))),
      ),
    );
  let proposed = 0;
  for (const drive of drives) {
    const made = await db.transaction(async (tx) => {
      const forecast = await computeForecast(tx, drive.id, now);
      const currentM = forecast.currentChainageM;
      if (currentM == null) return false;
      const covered = new Set(
        (
          await tx
            .select({ positionId: stopPositions.positionId })
            .from(stopPositions)
            .innerJoin(stops, eq(stops.id, stopPositions.stopId))
            .where(and(eq(stops.projectId, drive.id), inArray(stops.status, ['proposed', 'scheduled', 'in_progress'])))
        ).map((r) => r.positionId),
      );
      const due = forecast.positions.filter((p) => p.p90.remainingM <= PROPOSAL_HORIZON_M && !covered.has(p.position.positionId));
      if (due.length === 0) return false;
      const firstDueAhead = Math.min(...due.map((p) => p.p90.remainingM));
      // The last allowed place at or before the first due point, as the stop service sees it.
      const place = (await proposalStopPlace(tx, drive, firstDueAhead))!;
      const { chainageM, workingPressureBar: pressure } = place;
      const [stop] = await tx
        .insert(stops)
        .values({
          projectId: drive.id,
          source: 'job',
          status: 'proposed',
          chainageM,
          ringNumber: place.ringNumber,
          compressedAir: place.compressedAir,
          workingPressureBar: pressure,
          notes: `Proposed by the nightly forecast: ${due.length} position(s) reach their cautious limit within ${PROPOSAL_HORIZON_M} m.`,
        })
        .returning();
      await tx.insert(stopPositions).values(
        due.map((p) => ({
          stopId: stop.id,
          positionId: p.position.positionId,
          expectedWearMm: Math.min(p.position.allowableWearMm, p.p90.wearNowMm),
        })),
      );
      const to = (await recipientsFor(tx, drive.id, 'stop_proposed')).map((r) => r.email);
      if (to.length > 0) {
        await enqueueMail(tx, {
          kind: 'stop_proposed',
          projectId: drive.id,
          about: { stopId: stop.id },
          to,
          subject: `${drive.name}: a cutter stop is proposed at ${formatChainage(chainageM)}`,
          text: `The nightly forecast found ${due.length} position(s) reaching their cautious (P90) limit within ${PROPOSAL_HORIZON_M} m of the machine (now at ${formatChainage(currentM)}): ${due.map((p) => p.position.positionNumber).join(', ')}.\n\nA stop is proposed at ${formatChainage(chainageM)}${pressure != null ? ` (water head ${place.waterHeadM} m, indicative ${pressure.toFixed(2)} bar)` : ''}. Review it on the stop plan in Kerfwise, then schedule and publish it.\n`,
        });
      }
      return true;
    });
    if (made) proposed++;
  }
  if (proposed > 0) kickMailDelivery();
  return `${drives.length} drive(s) forecast; ${proposed} stop(s) proposed.`;
}
