import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';

export { formatChainage } from '../../../shared/domain/chainage';

/** A moment shown in the site's time zone, e.g. "4 Mar 2025 07:40". */
export const formatSiteTime = (iso: string, timeZone: string) => format(new TZDate(iso, timeZone), 'd MMM yyyy HH:mm');

/** Now, as the value of a datetime-local field in the site's time zone. */
export const siteNowLocalValue = (timeZone: string, nowMs: number) => format(new TZDate(nowMs, timeZone), "yyyy-MM-dd'T'HH:mm");

/** A datetime-local value read as site time, as an ISO instant; null when it is not a date. */
export function siteLocalToIso(value: string, timeZone: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/.exec(value);
  if (!m) return null;
  const [y, mo, d, h, mi] = m.slice(1).map(Number);
  return new Date(new TZDate(y, mo - 1, d, h, mi, timeZone).getTime()).toISOString();
}
