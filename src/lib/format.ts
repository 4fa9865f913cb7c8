/** Display formats shared by the field screens: chainage as km+m, dates in the site's time zone. */

export { formatChainage } from '../../shared/domain/chainage';

/** A date (ISO text or Date) as YYYY-MM-DD in `timeZone`. */
export function formatDate(at: string | Date | null | undefined, timeZone: string): string {
  if (at == null) return '—';
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date(at));
}

/** A date and time as YYYY-MM-DD HH:mm in `timeZone`. */
export function formatDateTime(at: string | Date | null | undefined, timeZone: string): string {
  if (at == null) return '—';
  const d = new Date(at);
  const time = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(d);
  return `${formatDate(d, timeZone)} ${time}`;
}
