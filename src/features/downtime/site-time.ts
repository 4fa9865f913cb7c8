import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';

/** An instant as the value of a datetime-local input (YYYY-MM-DDTHH:mm) in the site's zone. */
export function toSiteInput(at: string | Date, timeZone: string): string {
  return format(new TZDate(new Date(at), timeZone), "yyyy-MM-dd'T'HH:mm");
}

/**
 * A datetime-local value read as site time, as ISO 8601 with the site's UTC offset then; null when
 * it is not a date and time. A wall time skipped by the spring change comes out an hour later.
 */
export function fromSiteInput(value: string, timeZone: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::\d{2})?$/.exec(value);
  if (!m) return null;
  const at = new TZDate(Number(m[1]), Number(m[2]) - 1, Number(m[3]), Number(m[4]), Number(m[5]), timeZone);
  return format(at, "yyyy-MM-dd'T'HH:mm:ssXXX");
}
