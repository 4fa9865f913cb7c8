/** Chainage in metres as `km+mmm.m`, the trade's way of writing it (e.g. 1234.5 → "1+234.5"); '—' when unknown. */
export function formatChainage(chainageM: number | null | undefined): string {
  if (chainageM == null) return '—';
  const km = Math.floor(Math.abs(chainageM) / 1000);
  const rest = (Math.abs(chainageM) - km * 1000).toFixed(1).padStart(5, '0');
  return `${chainageM < 0 ? '-' : ''}${km}+${rest}`;
}
