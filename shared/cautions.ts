/** Shown wherever work inside the cutterhead appears (plans, stops, work packs, e-mails). */
export const CUTTERHEAD_ENTRY_CAUTION =
  'Entering the cutterhead is confined-space work next to heavy rotating machinery. Follow the site’s ' +
  'approved procedure and local regulations: cutterhead isolated and locked out, permit to work, gas ' +
  'testing, a competent supervisor present, and the rescue plan in place. Kerfwise plans the work; it ' +
  'does not replace the site’s safe system of work.';
