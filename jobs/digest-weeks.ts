/**
 * The week record of the weekly digests (DEVELOPERS.md, decision 19): a digest claims
 * (digest, drive, ISO week) in `digest_weeks` in the transaction that queues its mail, so a week
 * is sent once — whichever of the schedule, the start-up catch-up or 'run now' comes first, and
 * on however many servers. Only 'run now', confirmed by an administrator, sends a week again.
 */
import { and, eq, inArray, sql } from 'drizzle-orm';
import { formatSiteDateTime } from '../shared/site-time';
import { db, type DbOrTx } from '../server/db/client';
import { digestWeeks, projects } from '../server/db/schema';

export type DigestName = 'downtime_digest' | 'parts_digest';

/**
 * Claims the week for a drive. Returns false when the week was already sent (and `again` is not
 * set); a concurrent claim waits for the other transaction and then sees its row.
 */
export async function claimDigestWeek(
  tx: DbOrTx,
  digest: DigestName,
  projectId: string,
  isoWeek: string,
  mails: number,
  again = false,
): Promise<boolean> {
  const row = { digest, projectId, isoWeek, mails };
  if (again) {
    await tx
      .insert(digestWeeks)
      .values(row)
      .onConflictDoUpdate({
        target: [digestWeeks.digest, digestWeeks.projectId, digestWeeks.isoWeek],
        set: { mails, sentAt: sql`now()`, resent: sql`${digestWeeks.resent} + 1` },
      });
    return true;
  }
  const claimed = await tx.insert(digestWeeks).values(row).onConflictDoNothing().returning({ isoWeek: digestWeeks.isoWeek });
  return claimed.length > 0;
}

/**
 * For 'run now': the drives whose week (as `weekOf` gives it at `now`) was already sent, as one
 * sentence for the administrator's confirmation, or null when nothing would be sent twice.
 */
export async function alreadySentText(
  digest: DigestName,
  now: Date,
  weekOf: (now: Date, timeZone: string) => string,
): Promise<string | null> {
  const drives = await db.select({ id: projects.id, name: projects.name, timeZone: projects.siteTimeZone }).from(projects);
  if (drives.length === 0) return null;
  const weeks = new Map(drives.map((d) => [d.id, weekOf(now, d.timeZone)]));
  const sent = await db
    .select()
    .from(digestWeeks)
    .where(and(eq(digestWeeks.digest, digest), inArray(digestWeeks.isoWeek, [...new Set(weeks.values())])));
  const hits = drives.flatMap((d) => {
    const row = sent.find((s) => s.projectId === d.id && s.isoWeek === weeks.get(d.id));
    return row ? [`${d.name} (week ${row.isoWeek}, sent ${formatSiteDateTime(row.sentAt, d.timeZone, { withZone: true })})`] : [];
  });
  return hits.length === 0 ? null : `Already sent for ${hits.join('; ')}. Send it again?`;
}
