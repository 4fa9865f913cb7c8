/**
 * Nightly: refreshes every drive's forecast and, when a position's cautious (P90) change-out falls
 * inside the planning horizon and no open stop covers it, proposes a stop and tells the planners.
 * The proposal follows the simple rule a planner would use — the last place where a stop is
 * allowed before the first uncovered position is due, changing what is due within the horizon —
 * and the planner refines it on the plan screen.
 */
import { and, eq, inArray } from 'drizzle-orm';
import { needsCompressedAir, workingPressureFromHead } from '../shared/domain/compressed-air';
import { db } from '../server/db/client';
import { geologySections, memberships, positions, projects, stopPositions, stops, users } from '../server/db/schema';
import { enqueueMail, kickMailDelivery, optedOut } from '../server/lib/mail';
import { computeForecast } from '../server/services/forecast';
import type { JobContext } from '../server/services/job-runner';

/** Positions due within this many metres ahead get a proposed stop (common practice, no source; about a month of boring). */
export const PROPOSAL_HORIZON_M = 500;

export async function refreshForecastsJob({ now }: JobContext, options: { projectId?: string } = {}): Promise<string> {
  const drives = await db.selectDistinct({ id: projects.id, name: projects.name, direction: projects.driveDirection, ringLengthM: projects.ringLengthM, airAboveHeadM: projects.compressedAirAboveHeadM })
    .from(projects).innerJoin(positions, eq(positions.projectId, projects.id))
    .where(options.projectId ? eq(projects.id, options.projectId) : undefined);
  let proposed = 0;
  for (const drive of drives) {
    const made = await db.transaction(async (tx) => {
      const forecast = await computeForecast(tx, drive.id, now);
      const currentM = forecast.currentChainageM;
      if (currentM == null) return false;
      const covered = new Set(
        (await tx
          .select({ positionId: stopPositions.positionId })
          .from(stopPositions)
          .innerJoin(stops, eq(stops.id, stopPositions.stopId))
          .where(and(eq(stops.projectId, drive.id), inArray(stops.status, ['proposed', 'scheduled', 'in_progress']))))
          .map((r) => r.positionId),
      );
      const due = forecast.positions.filter((p) => p.p90.remainingM <= PROPOSAL_HORIZON_M && !covered.has(p.position.positionId));
      if (due.length === 0) return false;
      const sign = drive.direction === 'increasing' ? 1 : -1;
      const firstDueAhead = Math.min(...due.map((p) => p.p90.remainingM));
      const sections = await tx.select().from(geologySections).where(eq(geologySections.projectId, drive.id));
      // The last allowed chainage at or before the first due point (walking back from it).
      const target = currentM + sign * firstDueAhead;
      const allowed = sections
        .filter((s) => s.stopAllowed)
        .map((s) => ({ s, at: sign > 0 ? Math.min(s.chainageToM, target) : Math.max(s.chainageFromM, target) }))
        .filter(({ s, at }) => at >= s.chainageFromM && at <= s.chainageToM && (at - currentM) * sign >= 0)
        .sort((a, b) => (b.at - a.at) * sign)[0];
      const chainageM = allowed ? allowed.at : currentM;
      const head = allowed?.s.waterHeadM ?? 0;
      const pressure = head > 0 ? workingPressureFromHead(head).pressureBar : null;
      const aheadM = (chainageM - currentM) * sign;
      const [stop] = await tx.insert(stops).values({
        projectId: drive.id, source: 'job', status: 'proposed', chainageM,
        ringNumber: forecast.currentRingNumber != null ? forecast.currentRingNumber + Math.ceil(aheadM / drive.ringLengthM) : null,
        compressedAir: needsCompressedAir(head, { headAboveAxisM: drive.airAboveHeadM }),
        workingPressureBar: pressure,
        notes: `Proposed by the nightly forecast: ${due.length} position(s) reach their cautious limit within ${PROPOSAL_HORIZON_M} m.`,
      }).returning();
      await tx.insert(stopPositions).values(due.map((p) => ({ stopId: stop.id, positionId: p.position.positionId, expectedWearMm: Math.min(p.position.allowableWearMm, p.p90.wearNowMm) })));
      const planners = await tx
        .select({ id: users.id, email: users.email })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(and(eq(memberships.projectId, drive.id), eq(memberships.role, 'planner'), eq(users.active, true)));
      const off = await optedOut(tx, planners.map((p) => p.id), 'stop_proposed');
      const to = planners.filter((p) => !off.has(p.id)).map((p) => p.email);
      if (to.length > 0) {
        await enqueueMail(tx, {
          kind: 'stop_proposed',
          projectId: drive.id,
          to,
          subject: `${drive.name}: a cutter stop is proposed at ${chainageM.toFixed(1)} m`,
          text: `The nightly forecast found ${due.length} position(s) reaching their cautious (P90) limit within ${PROPOSAL_HORIZON_M} m of the machine (now at ${currentM.toFixed(1)} m): ${due.map((p) => p.position.positionNumber).join(', ')}.\n\nA stop is proposed at ${chainageM.toFixed(1)} m${pressure != null ? ` (water head ${head} m, indicative ${pressure.toFixed(2)} bar)` : ''}. Review it on the stop plan in Kerfwise, then schedule and publish it.\n`,
        });
      }
      return true;
    });
    if (made) proposed++;
  }
  if (proposed > 0) kickMailDelivery();
  return `${drives.length} drive(s) forecast; ${proposed} stop(s) proposed.`;
}
