/**
 * Date-times in the downtime form are site time (Europe/Zurich here). Clocks in 2026: 02:00 CET →
 * 03:00 CEST on 29 March, 03:00 CEST → 02:00 CET on 25 October (derived: EU summer-time rules,
 * Directive 2000/84/EC — last Sunday of March / October, 01:00 UTC).
 */
import { describe, expect, it } from 'vitest';
import { fromSiteInput as fromSiteInputUtc, isoWithSiteOffset, toSiteInput } from '../../shared/site-time';

/** What the downtime form shows and sends: the wall time read in the site's zone, with the offset then. */
const fromSiteInput = (value: string, timeZone: string) => {
  const at = fromSiteInputUtc(value, timeZone);
  return at == null ? null : isoWithSiteOffset(at, timeZone);
};

const ZONE = 'Europe/Zurich';

describe('site time in the downtime form', () => {
  it('reads a wall time with the offset in force on that day', () => {
    expect(fromSiteInput('2026-03-29T01:30', ZONE)).toBe('2026-03-29T01:30:00+01:00'); // derived: before the change, CET
    expect(fromSiteInput('2026-03-29T03:30', ZONE)).toBe('2026-03-29T03:30:00+02:00'); // derived: after it, CEST
    expect(fromSiteInput('2026-10-25T06:00', ZONE)).toBe('2026-10-25T06:00:00+01:00'); // derived: back to CET
  });

  it('moves a wall time the spring change skips an hour later', () => {
    // derived: 02:30 does not exist on 2026-03-29; the same instant as 01:30 UTC is 03:30 CEST.
    expect(fromSiteInput('2026-03-29T02:30', ZONE)).toBe('2026-03-29T03:30:00+02:00');
  });

  it('shows both instants of the autumn hour that happens twice as 02:30', () => {
    // derived: 00:30 UTC = 02:30 CEST, 01:30 UTC = 02:30 CET.
    expect(toSiteInput('2026-10-25T00:30:00Z', ZONE)).toBe('2026-10-25T02:30');
    expect(toSiteInput('2026-10-25T01:30:00Z', ZONE)).toBe('2026-10-25T02:30');
  });

  it('gives null for what is not a date and time', () => {
    expect(fromSiteInput('', ZONE)).toBeNull();
    expect(fromSiteInput('2026-03-29', ZONE)).toBeNull();
  });
});
