/** The cutterhead's positions as the screens read them: shared by the positions and rounds routes. */
import { sql } from 'drizzle-orm';
import type { DiscCondition, PositionClass } from '../../shared/cutters';
import { db } from '../db/client';

/** The query behind GET …/positions; the benchmark runs the same text in bare pg as its limit. */
export function positionsListSql(projectId: string) {
  return sql`
    select p.id, p.number, p.track_radius_mm, p.position_class, p.disc_size_in, p.tilt_deg, p.wear_limit_mm, p.twin_disc, p.angle_deg,
           f.id as fitting_id, c.serial, c.id as cutter_id, f.fitted_at, f.fitted_chainage_m,
           w.wear_mm as last_wear_mm, w.recorded_at as last_measured_at, w.conditions as last_conditions
    from positions p
    left join fittings f on f.position_id = p.id and f.removed_at is null
    left join cutters c on c.id = f.cutter_id
    left join lateral (
      select e.wear_mm, e.recorded_at, e.conditions from inspection_entries e
      join inspection_rounds r on r.id = e.round_id
      where e.fitting_id = f.id and e.wear_mm is not null and e.action = 'none'
      order by r.started_at desc, e.recorded_at desc limit 1
    ) w on true
    where p.project_id = ${projectId}
    order by p.number`;
}

type PositionRow = {
  id: string;
  number: number;
  track_radius_mm: number;
  position_class: PositionClass;
  disc_size_in: number;
  tilt_deg: number | null;
  wear_limit_mm: number;
  twin_disc: boolean;
  angle_deg: number | null;
  last_wear_mm: number | null;
  last_measured_at: Date | null;
  last_conditions: DiscCondition[] | null;
} & ( // the fitted disc's columns are all there when a disc is fitted (fittings and cutters columns are not null), else all null
  | { fitting_id: string; serial: string; cutter_id: string; fitted_at: Date; fitted_chainage_m: number }
  | { fitting_id: null; serial: null; cutter_id: null; fitted_at: null; fitted_chainage_m: null }
);

/** Positions with the serial on each now and the last wear measured on that disc. */
export async function listPositions(projectId: string) {
  const rows = await db.execute<PositionRow>(positionsListSql(projectId));
  return rows.rows.map((r) => ({
    id: r.id,
    number: r.number,
    trackRadiusMm: r.track_radius_mm,
    positionClass: r.position_class,
    discSizeIn: r.disc_size_in,
    tiltDeg: r.tilt_deg,
    wearLimitMm: r.wear_limit_mm,
    twinDisc: r.twin_disc,
    angleDeg: r.angle_deg,
    current: r.fitting_id
      ? { fittingId: r.fitting_id, cutterId: r.cutter_id, serial: r.serial, fittedAt: r.fitted_at, fittedChainageM: r.fitted_chainage_m }
      : null,
    lastWearMm: r.last_wear_mm,
    lastMeasuredAt: r.last_measured_at,
    lastConditions: r.last_conditions ?? [],
  }));
}
