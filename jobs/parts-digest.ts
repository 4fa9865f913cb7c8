/**
 * Monday morning: sends every buyer of each drive (who has not turned it off) the order
 * suggestions of the next 12 weeks — what to order now, how many, why (which stops), and what else
 * runs low — one message per buyer, queued in the outbox in one transaction per drive.
 */
import { and, eq, exists } from 'drizzle-orm';
import { db } from '../server/db/client';
import { parts, projects } from '../server/db/schema';
import { configuredAppUrl } from '../server/lib/app-url';
import { enqueueMail, kickMailDelivery } from '../server/lib/mail';
import type { JobContext } from '../server/services/job-runner';
import { siteIsoWeek } from '../shared/site-time';
import { claimDigestWeek } from './digest-weeks';
import type { PartsDemand } from '../shared/schemas/parts';
import { computePartsDemand, sourcesText } from '../server/services/parts';
import { recipientsFor } from '../server/services/recipients';

/** Weeks the digest looks ahead (about a quarter: longer than most lead times; common practice, no source). */
export const DIGEST_WEEKS = 12;

const money = (v: number, currency: string) =>
  `${v.toLocaleString('en-GB', { minimumFractionDigits: 2, maximumFractionDigits: 2 })} ${currency}`;
const units = (v: number) => (Number.isInteger(v) ? String(v) : v.toFixed(1));

/** The digest text: order-now lines with their reasons, then parts that reach their reorder point. */
export function partsDigestText(driveName: string, demand: PartsDemand<Date>, link: string | null): { subject: string; text: string } {
  const stopsById = new Map(demand.stops.map((s) => [s.id, s]));
  const now = demand.suggestions.filter((s) => s.orderNow);
  const low = demand.suggestions.filter((s) => !s.orderNow && s.firstShortageDate);
  const lines = [
    `${driveName}: parts order suggestions for the ${demand.horizonWeeks} weeks from ${demand.startDate} (service level ${(demand.serviceLevel * 100).toFixed(1)} %).`,
    '',
    ...(now.length === 0
      ? ['Nothing needs ordering now: stock and open orders cover the demand over each part’s lead time plus safety stock.']
      : [
          `Order now (${now.length}):`,
          ...now.flatMap((s) => [
            `  • ${s.code} ${s.name}: order ${s.orderQty}${s.orderQty === s.minOrderQty ? ' (minimum order)' : ''} from ${s.supplier || 'the usual supplier'}, about ${money(s.orderValue, s.currency)}.`,
            `    On hand ${s.onHand}, on order ${s.onOrder}; lead time ${units(s.leadTimeWeeks)} weeks; demand over it ${units(s.leadTimeDemand)} + safety stock ${units(s.safetyStock)}.`,
            ...(s.firstShortageDate ? [`    Runs out in the week starting ${s.firstShortageDate}.`] : []),
            ...(s.sources.length > 0 ? [`    Demand from: ${sourcesText(s.sources, stopsById)}.`] : []),
          ]),
        ]),
    ...(low.length > 0
      ? [
          '',
          'Projected to run short later (covered by the lead time for now):',
          ...low.map((s) => `  • ${s.code} ${s.name}: week starting ${s.firstShortageDate}`),
        ]
      : []),
    ...(demand.problems.length > 0 ? ['', 'Please note:', ...demand.problems.map((p) => `  • ${p}`)] : []),
    '',
    link
      ? `The demand chart, the CSV export and receiving are on the Parts page: ${link}`
      : 'The demand chart, the CSV export and receiving are on the Parts page in Kerfwise.',
  ];
  return {
    subject: `${driveName}: ${now.length === 0 ? 'no parts to order this week' : `${now.length} part(s) to order now`}`,
    text: `${lines.join('\n')}\n`,
  };
}

/** The week a digest sent at `now` covers: the current ISO week in the site's zone (it looks ahead from there). */
export const partsDigestWeek = (now: Date, timeZone: string) => siteIsoWeek(now, timeZone);

export async function partsDigestJob({ now, again }: JobContext, options: { projectId?: string } = {}): Promise<string> {
  // Drives with a catalogue: without parts there is nothing to suggest.
  const drives = await db
    .select({ id: projects.id, name: projects.name, siteTimeZone: projects.siteTimeZone })
    .from(projects)
    .where(
      and(
        options.projectId ? eq(projects.id, options.projectId) : undefined,
        exists(db.select({ id: parts.id }).from(parts).where(eq(parts.projectId, projects.id))),
      ),
    );
  let sent = 0;
  let alreadySent = 0;
  for (const drive of drives) {
    sent += await db.transaction(async (tx) => {
      const to = await recipientsFor(tx, drive.id, 'parts_digest');
      if (to.length === 0) return 0;
      // Once per week and drive, whichever trigger comes first (decision 19).
      if (!(await claimDigestWeek(tx, 'parts_digest', drive.id, partsDigestWeek(now, drive.siteTimeZone), to.length, again))) {
        alreadySent++;
        return 0;
      }
      const demand = await computePartsDemand(tx, drive.id, now, { weeks: DIGEST_WEEKS });
      const appUrl = configuredAppUrl();
      const { subject, text } = partsDigestText(drive.name, demand, appUrl ? `${appUrl}/projects/${drive.id}/parts` : null);
      // One message per buyer: buyers do not see each other's addresses.
      for (const b of to) await enqueueMail(tx, { kind: 'parts_digest', projectId: drive.id, to: [b.email], subject, text });
      return to.length;
    });
  }
  if (sent > 0) kickMailDelivery();
  return `${drives.length} drive(s) with a catalogue; ${sent} digest(s) queued.${alreadySent > 0 ? ` ${alreadySent} drive(s) left out: their week was already sent.` : ''}`;
}
