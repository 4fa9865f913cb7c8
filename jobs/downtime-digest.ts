/**
 * Monday morning: tells every site manager of each drive (who has not turned it off) last week's
 * downtime by cause, in the site's time zone — hours, share and running share, the cutter-work
 * share, utilisation and advance — and how many standstills still wait for a cause.
 */
import { asc, eq } from 'drizzle-orm';
import type { DowntimeReport } from '../shared/schemas/downtime';
import { db } from '../server/db/client';
import { projects } from '../server/db/schema';
import { configuredAppUrl } from '../server/lib/app-url';
import { enqueueMail, kickMailDelivery } from '../server/lib/mail';
import { buildDowntimeReport, previousIsoWeek } from '../server/services/downtime';
import type { JobContext } from '../server/services/job-runner';
import { recipientsFor } from '../server/services/recipients';
import { claimDigestWeek } from './digest-weeks';

const pct = (share: number) => `${(share * 100).toFixed(1)} %`;
const escapeHtml = (s: string) => s.replace(/[&<>"]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' })[c]!);

/** The week's table by cause as plain text (fixed columns) and as HTML. */
function digestBodies(driveName: string, isoWeek: string, r: DowntimeReport, link: string | null): { text: string; html: string } {
  const heading = `${driveName}: downtime in week ${isoWeek} (${r.from} to ${r.to}, ${r.timeZone})`;
  const width = Math.max(12, ...r.pareto.map((p) => p.cause.length + (p.cutterWork ? 2 : 0)));
  const line = (cause: string, hours: string, share: string, running: string) =>
    `${cause.padEnd(width)}  ${hours.padStart(8)}  ${share.padStart(8)}  ${running.padStart(10)}`.trimEnd();
  const summary = [
    `Downtime ${r.downtimeHours.toFixed(1)} h of ${r.hours.toFixed(0)} h; cutter work ${pct(r.cutterWorkShare)} of the downtime.`,
    `Utilisation ${pct(r.utilisation)} (boring ${r.boringHours.toFixed(1)} h); ${r.advanceM.toFixed(1)} m advanced, ${r.metresPerDay.toFixed(1)} m a day.`,
    ...(r.unexplainedEvents > 0
      ? [
          `${r.unexplainedEvents} standstill(s), ${r.unexplainedHours.toFixed(1)} h, still without a cause: give them one on the Downtime page.`,
        ]
      : []),
  ];
  const text = [
    heading,
    '',
    ...(r.pareto.length === 0
      ? ['No downtime was recorded last week.']
      : [
          line('Cause', 'Hours', 'Share', 'Running'),
          ...r.pareto.map((p) => line(`${p.cause}${p.cutterWork ? ' *' : ''}`, p.hours.toFixed(1), pct(p.share), pct(p.cumulativeShare))),
          line('Total', r.downtimeHours.toFixed(1), '100.0 %', ''),
          '* cutter work',
        ]),
    '',
    ...summary,
    ...(link ? ['', `The full report: ${link}`] : []),
  ].join('\n');
  const cell = (v: string, right = false) => `<td style="padding:2px 10px;${right ? 'text-align:right' : ''}">${escapeHtml(v)}</td>`;
  const html = [
    `<p><strong>${escapeHtml(heading)}</strong></p>`,
    r.pareto.length === 0
      ? '<p>No downtime was recorded last week.</p>'
      : `<table style="border-collapse:collapse"><thead><tr><th align="left">Cause</th><th align="right">Hours</th><th align="right">Share</th><th align="right">Running</th></tr></thead><tbody>${r.pareto
          .map(
            (p) =>
              `<tr>${cell(`${p.cause}${p.cutterWork ? ' (cutter work)' : ''}`)}${cell(p.hours.toFixed(1), true)}${cell(pct(p.share), true)}${cell(pct(p.cumulativeShare), true)}</tr>`,
          )
          .join('')}<tr>${cell('Total')}${cell(r.downtimeHours.toFixed(1), true)}${cell('100.0 %', true)}${cell('')}</tr></tbody></table>`,
    ...summary.map((s) => `<p>${escapeHtml(s)}</p>`),
    ...(link ? [`<p><a href="${escapeHtml(link)}">Open the full report in Kerfwise</a></p>`] : []),
  ].join('\n');
  return { text: `${text}\n`, html };
}

/** The week a digest sent at `now` covers: the last full ISO week in the site's zone. */
export const downtimeDigestWeek = (now: Date, timeZone: string) => previousIsoWeek(now, timeZone).isoWeek;

export async function downtimeDigestJob({ now, again }: JobContext, options: { projectId?: string } = {}): Promise<string> {
  const drives = await db
    .select()
    .from(projects)
    .where(options.projectId ? eq(projects.id, options.projectId) : undefined)
    .orderBy(asc(projects.name));
  let mails = 0;
  let alreadySent = 0;
  for (const drive of drives) {
    const queued = await db.transaction(async (tx) => {
      const to = (await recipientsFor(tx, drive.id, 'downtime_digest')).map((r) => r.email);
      if (to.length === 0) return 0;
      const week = previousIsoWeek(now, drive.siteTimeZone);
      // Once per week and drive, whichever trigger comes first (decision 19).
      if (!(await claimDigestWeek(tx, 'downtime_digest', drive.id, week.isoWeek, to.length, again))) {
        alreadySent++;
        return 0;
      }
      const report = await buildDowntimeReport(tx, drive, week);
      const appUrl = configuredAppUrl();
      const link = appUrl ? `${appUrl}/projects/${drive.id}/downtime/report?from=${week.from}&to=${week.to}` : null;
      const { text, html } = digestBodies(drive.name, week.isoWeek, report, link);
      const subject = `${drive.name}: downtime in week ${week.isoWeek} — ${report.downtimeHours.toFixed(1)} h, cutter work ${pct(report.cutterWorkShare)}`;
      // One message per manager, so no one sees the others' addresses.
      for (const address of to) await enqueueMail(tx, { kind: 'downtime_digest', projectId: drive.id, to: [address], subject, text, html });
      return to.length;
    });
    mails += queued;
  }
  if (mails > 0) kickMailDelivery();
  return `${mails} downtime digest(s) queued for ${drives.length} drive(s).${alreadySent > 0 ? ` ${alreadySent} drive(s) left out: their week was already sent.` : ''}`;
}
