/**
 * New strokes go to PostgreSQL in COPY's binary format (decision 46, second pass). Reference:
 * the same rows written through ordinary query parameters (text, as Drizzle sends them) into a
 * second invented drive; every stored value must be the same, compared in PostgreSQL's own text
 * output (exact for doubles since PostgreSQL 12). Check values: derived — the parameter path is
 * the reference; edge values (times before 2000, the largest and smallest doubles, -0, nulls,
 * JSON with escapes and non-Latin text, rows across chunk boundaries) chosen by hand.
 */
import { sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { strokes } from '../../server/db/schema';
import { importAdvanceLog } from '../../server/services/advance-log-import';
import type { AdvanceLogRow } from '../../shared/schemas/advance-log';
import { makeProject, makeUser } from '../support/fixtures';

const base = (ring: number, startIso: string, endIso: string, from: number, to: number): AdvanceLogRow => ({
  ringNumber: ring,
  startTime: startIso,
  endTime: endIso,
  chainageStartM: from,
  chainageEndM: to,
  revolutions: 180.5,
  penetrationMmPerRev: 8.3,
  rpm: 5.5,
  thrustKn: 12000,
  torqueKnm: 2400,
  extra: {},
});

function edgeRows(): AdvanceLogRow[] {
  const rows: AdvanceLogRow[] = [
    {
      ...base(0, '1990-01-02T00:00:00+00:00', '1990-01-02T00:30:00-03:30', -0, 0.5),
      revolutions: 0,
      penetrationMmPerRev: 1e-300,
      rpm: null,
      thrustKn: 1.7976931348623157e308,
      torqueKnm: 5e-324,
    },
    {
      ...base(1, '1999-12-31T23:59:59+00:00', '2000-01-01T00:00:01+00:00', 0.5, 1.1),
      revolutions: null,
      extra: { Remarks: 'back\\slash "quoted"\ttab\nline', 'Schicht Ü': '漢字 😀', empty: '' },
    },
  ];
  // Enough rows, some with long extra text, to cross several 64 KB chunks.
  for (let i = 2; i < 1200; i++) {
    const t = Date.UTC(2026, 2, 29, 0, 0, 0) + i * 3_600_000;
    const row = base(
      i,
      new Date(t).toISOString().replace('.000Z', '+02:00'),
      new Date(t + 1_800_000).toISOString().replace('.000Z', '+02:00'),
      1.1 + i * 1.5,
      1.1 + (i + 1) * 1.5,
    );
    if (i % 97 === 0) row.extra = { a: 'x'.repeat(1900 + i), b: 'ä'.repeat(900) };
    rows.push(row);
  }
  rows.push({ ...base(2147483647, '2100-12-31T23:59:59+14:00', '2100-12-31T23:59:59+00:00', 9999.25, 10000.75), extra: { z: 'last' } });
  return rows;
}

describe('binary COPY of new strokes', () => {
  it('stores exactly what query parameters store, value for value', async () => {
    const rows = edgeRows();
    const [viaCopy, viaParams] = [await makeProject(), await makeProject()];
    const user = await makeUser();
    const outcome = await db.transaction((tx) =>
      importAdvanceLog(
        tx,
        viaCopy.id,
        user.id,
        rows.map((data, i) => ({ line: i + 2, data })),
        { replace: false, mapping: {} },
      ),
    );
    expect(outcome.inserted).toBe(rows.length);
    for (let i = 0; i < rows.length; i += 500)
      await db
        .insert(strokes)
        .values(
          rows
            .slice(i, i + 500)
            .map((r) => ({ ...r, projectId: viaParams.id, startTime: new Date(r.startTime), endTime: new Date(r.endTime) })),
        );
    const differing = await db
      .execute<{ ring_number: number }>(
        sql`select a.ring_number from strokes a full join strokes b on b.project_id = ${viaParams.id} and b.ring_number = a.ring_number
            where a.project_id = ${viaCopy.id}
              and (b.id is null
                or (a.start_time, a.end_time, a.chainage_start_m::text, a.chainage_end_m::text, a.revolutions::text,
                    a.penetration_mm_per_rev::text, a.rpm::text, a.thrust_kn::text, a.torque_knm::text, a.extra)
                   is distinct from
                   (b.start_time, b.end_time, b.chainage_start_m::text, b.chainage_end_m::text, b.revolutions::text,
                    b.penetration_mm_per_rev::text, b.rpm::text, b.thrust_kn::text, b.torque_knm::text, b.extra))`,
      )
      .then((r) => r.rows);
    expect(differing).toEqual([]);
    const [{ n }] = await db
      .execute<{ n: number }>(sql`select count(*)::int as n from strokes where project_id = ${viaCopy.id}`)
      .then((r) => r.rows);
    expect(n).toBe(rows.length);
    // derived: the hand-written values read back as written (times to the second, -0 as 0, the JSON text unchanged).
    const [first] = await db
      .execute<{ s: string; c: string; t: string; e: Record<string, string> }>(
        sql`select (start_time at time zone 'UTC')::text as s, chainage_start_m::text as c, thrust_kn::text as t, extra as e
            from strokes where project_id = ${viaCopy.id} and ring_number in (0, 1) order by ring_number`,
      )
      .then((r) => r.rows);
    expect(first).toEqual({ s: '1990-01-02 00:00:00', c: '0', t: '1.7976931348623157e+308', e: {} });
    const [second] = await db
      .execute<{ e: Record<string, string> }>(sql`select extra as e from strokes where project_id = ${viaCopy.id} and ring_number = 1`)
      .then((r) => r.rows);
    expect(second.e).toEqual(rows[1].extra);
  }, 60_000);
});
