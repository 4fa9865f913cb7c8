/**
 * Which backups to keep (DEVELOPERS.md, decision 28). The rule is the one of restic's and Borg's
 * `--keep-daily` / `--keep-weekly`: of the `daily` most recent calendar days that have at least one
 * backup, keep the newest backup of each day; of the `weekly` most recent ISO weeks that have at
 * least one backup, keep the newest backup of each week. A backup may be kept by both rules.
 * Counting days and weeks that *have* backups (rather than calendar days back from now) means
 * nights without a backup never make the set shrink. Backups dated after `now` (a clock set wrong)
 * are always kept: nothing is deleted that the rule does not understand.
 */
import { siteDay, siteIsoWeek } from '../site-time';

export interface BackupRetention {
  /** Days (that have backups) whose newest backup is kept. */
  daily: number;
  /** ISO weeks (that have backups) whose newest backup is kept. */
  weekly: number;
}

export interface DatedBackup {
  name: string;
  takenAt: Date;
}

/**
 * The names of the backups to keep, given every backup, the time now and the retention.
 * Days and ISO weeks are calendar days and weeks in `timeZone` (default UTC, as backup names are).
 */
export function backupsToKeep(backups: DatedBackup[], now: Date, retention: BackupRetention, timeZone = 'UTC'): Set<string> {
  const keep = new Set<string>();
  const past: DatedBackup[] = [];
  for (const b of backups) {
    if (b.takenAt.getTime() > now.getTime()) keep.add(b.name);
    else past.push(b);
  }
  // Newest first; equal times by name, so the answer does not depend on the input order.
  past.sort((a, b) => b.takenAt.getTime() - a.takenAt.getTime() || b.name.localeCompare(a.name));
  const pick = (bucketOf: (at: Date) => string, count: number) => {
    const seen = new Set<string>();
    for (const b of past) {
      if (seen.size >= count) break;
      const bucket = bucketOf(b.takenAt);
      if (seen.has(bucket)) continue;
      seen.add(bucket);
      keep.add(b.name);
    }
  };
  pick((at) => siteDay(at, timeZone), Math.max(0, retention.daily));
  pick((at) => siteIsoWeek(at, timeZone), Math.max(0, retention.weekly));
  return keep;
}
