/**
 * Reminds the crew of a published stop 24 h and 2 h before it starts, with the stop's work pack
 * (the same text as when it was published, from the stop service) and its cautions, times in the
 * site's time zone. A reminder row per stop and kind (primary key) makes each reminder go out once,
 * whichever instance runs the job.
 */
import { and, asc, eq, gt, isNotNull, sql } from 'drizzle-orm';
import { formatChainage } from '../shared/domain/chainage';
import { workPackText } from '../shared/domain/work-pack';
import { formatSiteDateTime } from '../shared/site-time';
import { db } from '../server/db/client';
import { projects, stopReminders, stops } from '../server/db/schema';
import { configuredAppUrl } from '../server/lib/app-url';
import { enqueueMail, kickMailDelivery } from '../server/lib/mail';
import type { JobContext } from '../server/services/job-runner';
import { recipientsFor } from '../server/services/recipients';
import { loadWorkPack } from '../server/services/stops';

export const reminderLeads = [
  { kind: '24h', hours: 24, words: '24 hours' },
  { kind: '2h', hours: 2, words: '2 hours' },
] as const;

export async function stopRemindersJob({ now }: JobContext): Promise<string> {
  const due = await db
    .select({ stop: stops, project: projects })
    .from(stops)
    .innerJoin(projects, eq(projects.id, stops.projectId))
    .where(
      and(
        eq(stops.status, 'scheduled'),
        isNotNull(stops.publishedAt),
        gt(stops.plannedStart, now),
        sql`${stops.plannedStart} <= ${new Date(now.getTime() + 24 * 3600_000)}`,
      ),
    )
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
      const to = (await recipientsFor(tx, project.id, 'stop_reminder', { crewId: stop.crewId })).map((r) => r.email);
      if (to.length === 0) return false;
      const pack = await loadWorkPack(tx, project.id, stop.id);
      const appUrl = configuredAppUrl();
      const when = formatSiteDateTime(stop.plannedStart, project.siteTimeZone, { withZone: true });
      await enqueueMail(tx, {
        kind: 'stop_reminder',
        projectId: project.id,
        about: { stopId: stop.id },
        to,
        subject: `Reminder (${lead.words}): cutter stop at ${formatChainage(stop.chainageM)}, ${when}`,
        text: `This cutter stop starts in about ${lead.words}.\n\n${workPackText(pack, project, appUrl ? `${appUrl}/projects/${project.id}/stops/${stop.id}` : null)}`,
      });
      return true;
    });
    if (didSend) sent++;
  }
  if (sent > 0) kickMailDelivery();
  return `${sent} reminder(s) queued for ${due.length} stop(s) starting within 24 h.`;
}
