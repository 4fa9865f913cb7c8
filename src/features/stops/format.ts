/** Hours with one decimal, e.g. 13.25 → "13.3 h"; "—" when unknown. Dates and times: shared/site-time.ts. */
export const hoursText = (h: number | null | undefined) => (h == null ? '—' : `${h.toFixed(1)} h`);
