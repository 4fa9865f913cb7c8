import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';

/** Hours with one decimal, e.g. 13.25 → "13.3 h"; "—" when unknown. */
export const hoursText = (h: number | null | undefined) => (h == null ? '—' : `${h.toFixed(1)} h`);

/** A moment as the value of a datetime-local field in the site's time zone. */
export const siteLocalValue = (at: string | number | Date, timeZone: string) => format(new TZDate(new Date(at).getTime(), timeZone), "yyyy-MM-dd'T'HH:mm");

/** A datetime-local value read as site time, as an ISO instant; null when it is not a date. */
export function siteLocalToIso(value: string, timeZone: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(value);
  if (!m) return null;
  const [y, mo, d, h, mi] = m.slice(1).map(Number);
  return new Date(new TZDate(y, mo - 1, d, h, mi, timeZone).getTime()).toISOString();
}
