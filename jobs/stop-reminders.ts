/**
 * Reminds the crew of a published stop 24 h and 2 h before it starts, with the work pack summary
 * and the cautions, times in the site's time zone. A reminder row per stop and kind (primary key)
 * makes each reminder go out once, whichever instance runs the job.
 */
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { and, asc, eq, gt, isNotNull, sql } from 'drizzle-orm';
import { COMPRESSED_AIR_CAUTION } from '../shared/domain/compressed-air';
import { CUTTERHEAD_ENTRY_CAUTION } from '../shared/cautions';
import { formatChainage } from '../shared/domain/chainage';
import { db } from '../server/db/client';
import { crewMembers, crews, positions, projects, stopPositions, stopReminders, stops } from '../server/db/schema';
import { enqueueMail, kickMailDelivery, optedOut } from '../server/lib/mail';
import type { JobContext } from '../server/services/job-runner';

export const reminderLeads = [
  { kind: '24h', hours: 24 },
  { kind: '2h', hours: 2 },
] as const;

export async function stopRemindersJob({ now }: JobContext): Promise<string> {
  const due = await db
    .select({ stop: stops, project: projects })
    .from(stops)
    .innerJoin(projects, eq(projects.id, stops.projectId))
    .where(and(eq(stops.status, 'scheduled'), isNotNull(stops.publishedAt), gt(stops.plannedStart, now), sql`${stops.plannedStart} <= ${new Date(now.getTime() + 24 * 3600_000)}`))
    .orderBy(asc(stops.plannedStart));
  let sent = 0;
  for (const { stop, project } of due) {
    const hoursLeft = (stop.plannedStart!.getTime() - now.getTime()) / 3600_000;
    // The nearest lead that has come; earlier ones that were missed are not sent late.
    const lead = [...reminderLeads].reverse().find((l) => hoursLeft <= l.hours);
    if (!lead) continue;
    const didSend = await db.transaction(async (tx) => {
      const inserted = await tx
        .insert(stopReminders)
        .values(reminderLeads.filter((l) => l.hours >= lead.hours).map((l) => ({ stopId: stop.id, kind: l.kind })))
        .onConflictDoNothing()
        .returning();
      if (!inserted.some((r) => r.kind === lead.kind)) return false;
      const members = stop.crewId ? await tx.select().from(crewMembers).where(eq(crewMembers.crewId, stop.crewId)) : [];
      const off = await optedOut(tx, members.flatMap((m) => (m.userId ? [m.userId] : [])), 'stop_reminder');
      const to = members.filter((m) => !m.userId || !off.has(m.userId)).map((m) => m.email);
      if (to.length === 0) return false;
      const [crew] = stop.crewId ? await tx.select().from(crews).where(eq(crews.id, stop.crewId)) : [];
      const changes = await tx
        .select({ number: positions.number, expectedWearMm: stopPositions.expectedWearMm, limitMm: positions.wearLimitMm })
        .from(stopPositions)
        .innerJoin(positions, eq(positions.id, stopPositions.positionId))
        .where(eq(stopPositions.stopId, stop.id))
        .orderBy(asc(positions.number));
      const local = format(new TZDate(stop.plannedStart!, project.siteTimeZone), "EEEE d MMMM yyyy, HH:mm");
      const chainage = formatChainage(stop.chainageM);
      const lines = [
        `${project.name}: cutter stop at chainage ${chainage}${stop.ringNumber ? ` (ring ${stop.ringNumber})` : ''}`,
        `Starts: ${local} (${project.siteTimeZone}), about ${stop.expectedHours ?? '?'} h. Crew: ${crew?.name ?? '—'}.`,
        stop.compressedAir ? `Work in COMPRESSED AIR${stop.workingPressureBar != null ? ` (indicative ${stop.workingPressureBar.toFixed(2)} bar)` : ''}.` : 'Work in free air.',
        '',
        `Positions to change (${changes.length}):`,
        ...changes.map((c) => `  • position ${c.number}${c.expectedWearMm != null ? ` — expected wear ${c.expectedWearMm.toFixed(1)} of ${c.limitMm} mm` : ''}`),
        '',
        'The full work pack (serials from the store, parts kit) is on the stop page in Kerfwise.',
        '',
        CUTTERHEAD_ENTRY_CAUTION,
        ...(stop.compressedAir ? ['', COMPRESSED_AIR_CAUTION] : []),
      ];
      await enqueueMail(tx, {
        kind: 'stop_reminder',
        projectId: project.id,
        to,
        subject: `Reminder (${lead.kind === '24h' ? '24 hours' : '2 hours'}): cutter stop at ${chainage}, ${local}`,
        text: `${lines.join('\n')}\n`,
      });
      return true;
    });
    if (didSend) sent++;
  }
  if (sent > 0) kickMailDelivery();
  return `${sent} reminder(s) queued for ${due.length} stop(s) starting within 24 h.`;
}
