/** Number formats of the wear-fit and forecast pages. */

/** A wear rate in mm/km to three significant figures (rates are small: 0.0343). */
export const formatRate = (mmPerKm: number | null | undefined) => (mmPerKm == null ? '—' : mmPerKm === 0 ? '0' : mmPerKm.toPrecision(3));

/** A number with a fixed count of decimals, or a dash. */
export const fixed = (value: number | null | undefined, decimals = 1) => (value == null ? '—' : value.toFixed(decimals));

/** A whole number with thousands separators (e.g. 138,098). */
export const whole = (value: number) => Math.round(value).toLocaleString('en-GB');

/** A PostgreSQL timestamp as the server sends it from raw SQL ("2026-11-30 08:23:23.601+00") as ISO text every browser reads. */
export const pgTimestampToIso = (text: string) => text.replace(' ', 'T').replace(/([+-]\d\d)$/, '$1:00');
