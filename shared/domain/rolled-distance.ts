/**
 * Rolled distance of disc cutters (DOMAIN.md §1): per cutterhead revolution a disc at track
 * radius r rolls 2·π·r (the helix of pitch p is longer by a negligible amount). Revolutions come
 * from the advance log when measured, otherwise from advance / penetration.
 */
import { chainageSplitter, type GeologySection } from './geology';

/** One stroke (or ring) of the advance log. */
export interface Stroke {
  id: string;
  ringNumber: number;
  chainageStartM: number;
  chainageEndM: number;
  /** Measured cutterhead revolutions over the stroke, null when the log has none. */
  revolutions: number | null;
  penetrationMmPerRev: number | null;
  /** ISO 8601 with an offset or Z. */
  startTime: string;
  endTime: string;
}

export interface CutterheadPosition {
  id: string;
  trackRadiusMm: number;
  /**
   * 2 for twin centre discs on one hub. Not a multiplier: each disc on the hub rolls the whole
   * track, and every rolled distance here is per disc.
   */
  discsPerPosition: 1 | 2;
}

export type StrokeErrorReason =
  | 'invalid_chainage'
  | 'invalid_time'
  | 'invalid_revolutions'
  /** Neither measured revolutions nor a positive penetration: the rolled distance is unknown, not zero. */
  | 'no_revolutions';

export interface StrokeError {
  strokeId: string;
  ringNumber: number;
  reason: StrokeErrorReason;
}

export type StrokeRevolutions = { revolutions: number; source: 'measured' | 'penetration' } | { error: StrokeErrorReason };

/** Distance per disc of one position in one ground type over one stroke, in km. */
export interface StrokeRolledKm {
  strokeId: string;
  positionId: string;
  /** Null for unknown ground (outside every geology section). */
  groundTypeId: string | null;
  rolledKm: number;
}

/**
 * The time a serial (one cutter) spent at a position. A change is made between strokes; for a
 * change made after stroke S, use S.endTime. A stroke counts in the period when
 * fromTime ≤ its startTime < toTime.
 */
export interface FittedPeriod {
  id: string;
  positionId: string;
  /** ISO 8601 with an offset or Z. */
  fromTime: string;
  /** Null while the cutter is still fitted. */
  toTime: string | null;
}

/** Distance per disc rolled in one ground type during a fitted period, in km. */
export interface PeriodRolledKm {
  periodId: string;
  groundTypeId: string | null;
  rolledKm: number;
}

const isoWithOffset = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/;

/** Milliseconds since the epoch of an ISO 8601 time that names its offset; null otherwise (a bare local time is ambiguous). */
function isoTimeMs(iso: string): number | null {
  const ms = isoWithOffset.test(iso) ? Date.parse(iso) : NaN;
  return Number.isNaN(ms) ? null : ms;
}

/** Number of entries of the ascending `times` that are < `ms` (binary search). */
function countBefore(times: readonly number[], ms: number): number {
  let lo = 0;
  let hi = times.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (times[mid] < ms) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

function requireTimeMs(iso: string, what: string): number {
  const ms = isoTimeMs(iso);
  if (ms === null) throw new RangeError(`${what}: not an ISO 8601 time with offset: ${iso}`);
  return ms;
}

/** Distance rolled per cutterhead revolution by a disc at track radius `trackRadiusM` (m), in m: 2·π·r. */
export function rolledMPerRevolution(trackRadiusM: number): number {
  return 2 * Math.PI * trackRadiusM;
}

/** Distance rolled by a disc at track radius `trackRadiusM` (m) over `revolutions` cutterhead revolutions, in km. */
export function rolledKm(trackRadiusM: number, revolutions: number): number {
  return (rolledMPerRevolution(trackRadiusM) * revolutions) / 1000;
}

/** Metres rolled by a disc at track radius `trackRadiusM` (m) per metre of advance at penetration `penetrationMmPerRev` (mm/rev). */
export function rolledMPerAdvanceM(trackRadiusM: number, penetrationMmPerRev: number): number {
  return (rolledMPerRevolution(trackRadiusM) * 1000) / penetrationMmPerRev;
}

/** Cutterhead revolutions over a stroke: the measured count when logged, else advance (mm) / penetration (mm/rev). */
export function strokeRevolutions(stroke: Omit<Stroke, 'startTime' | 'endTime'>): StrokeRevolutions {
  if (!Number.isFinite(stroke.chainageStartM) || !Number.isFinite(stroke.chainageEndM)) return { error: 'invalid_chainage' };
  if (stroke.revolutions !== null) {
    if (!Number.isFinite(stroke.revolutions) || stroke.revolutions < 0) return { error: 'invalid_revolutions' };
    return { revolutions: stroke.revolutions, source: 'measured' };
  }
  const p = stroke.penetrationMmPerRev;
  if (p === null || !Number.isFinite(p) || p <= 0) return { error: 'no_revolutions' };
  const advanceMm = Math.abs(stroke.chainageEndM - stroke.chainageStartM) * 1000;
  return { revolutions: advanceMm / p, source: 'penetration' };
}

/**
 * Distance rolled per disc (km) by every position over every stroke, split by ground type. A stroke
 * crossing section boundaries shares its revolutions among the pieces in proportion to the advance
 * in each (revolutions spread evenly along the advance); a stroke without advance puts them all in
 * the ground at its chainage. Strokes that cannot be computed are listed in `errors` and give no rows.
 */
export function rolledKmByStroke(
  strokes: readonly Stroke[],
  positions: readonly CutterheadPosition[],
  sections: readonly GeologySection[],
): { rows: StrokeRolledKm[]; errors: StrokeError[] } {
  for (const p of positions) {
    if (!(Number.isFinite(p.trackRadiusMm) && p.trackRadiusMm > 0)) throw new RangeError(`Position ${p.id}: track radius must be > 0 mm`);
  }
  const { pieces, errors } = revolutionsByGround(strokes, sections);
  const rows: StrokeRolledKm[] = [];
  for (const piece of pieces) {
    for (const position of positions) {
      rows.push({
        strokeId: piece.strokeId,
        positionId: position.id,
        groundTypeId: piece.groundTypeId,
        rolledKm: rolledKm(position.trackRadiusMm / 1000, piece.revolutions),
      });
    }
  }
  return { rows, errors };
}

/** Cutterhead revolutions of one stroke spent in one ground type. */
export interface StrokeGroundRevolutions {
  strokeId: string;
  /** Start of the stroke, ms since the epoch. */
  startMs: number;
  groundTypeId: string | null;
  revolutions: number;
}

/**
 * The revolutions of every stroke split by ground type (in proportion to the advance in each
 * section; all in the ground at its chainage when the stroke has no advance). Every disc of the
 * cutterhead turns with them, so this is computed once for all positions.
 */
export function revolutionsByGround(
  strokes: readonly Stroke[],
  sections: readonly GeologySection[],
): { pieces: StrokeGroundRevolutions[]; errors: StrokeError[] } {
  return revolutionsByGroundMs(
    strokes.map((s) => ({ ...s, startMs: isoTimeMs(s.startTime), endMs: isoTimeMs(s.endTime) })),
    sections,
  );
}

/** A stroke whose times are already ms since the epoch (null: not a time with an offset). */
export type TimedStroke = Omit<Stroke, 'startTime' | 'endTime'> & { startMs: number | null; endMs: number | null };

/**
 * `revolutionsByGround` for strokes whose times are already read (a stored stroke's times come
 * from the database as numbers): the same pieces and errors, without writing and re-reading ISO
 * text for every stroke.
 */
export function revolutionsByGroundMs(
  strokes: readonly TimedStroke[],
  sections: readonly GeologySection[],
): { pieces: StrokeGroundRevolutions[]; errors: StrokeError[] } {
  const pieces: StrokeGroundRevolutions[] = [];
  const errors: StrokeError[] = [];
  const splitStroke = chainageSplitter(sections);
  for (const stroke of strokes) {
    const revs = strokeRevolutions(stroke);
    const { startMs, endMs } = stroke;
    if ('error' in revs || startMs === null || endMs === null || endMs < startMs) {
      errors.push({ strokeId: stroke.id, ringNumber: stroke.ringNumber, reason: 'error' in revs ? revs.error : 'invalid_time' });
      continue;
    }
    const advanceM = Math.abs(stroke.chainageEndM - stroke.chainageStartM);
    const split = splitStroke(stroke.chainageStartM, stroke.chainageEndM);
    if (split.length === 1) {
      // Most strokes lie in one section: all their revolutions are in its ground.
      pieces.push({
        strokeId: stroke.id,
        startMs,
        groundTypeId: split[0].groundTypeId,
        revolutions: revs.revolutions * (advanceM > 0 ? split[0].lengthM / advanceM : 1),
      });
      continue;
    }
    const revsByGround = new Map<string | null, number>();
    for (const piece of split) {
      const share = advanceM > 0 ? piece.lengthM / advanceM : 1;
      revsByGround.set(piece.groundTypeId, (revsByGround.get(piece.groundTypeId) ?? 0) + revs.revolutions * share);
    }
    for (const [groundTypeId, revolutions] of revsByGround) pieces.push({ strokeId: stroke.id, startMs, groundTypeId, revolutions });
  }
  return { pieces, errors };
}

/** A fitted period (or any time window) at a position of known track radius. */
export interface RadiusPeriod extends FittedPeriod {
  trackRadiusMm: number;
}

/**
 * Rolled km per disc in each ground type for each period, from per-ground revolutions — the same
 * totals as `sumRolledKmByPeriod(periods, strokes, rolledKmByStroke(...).rows)`, but without a row
 * per stroke and position: running sums of revolutions per ground over time are shared by all
 * positions, and each period is the difference of two of them (binary search), scaled by 2·π·r.
 * `previous` totals are added, as in sumRolledKmByPeriod.
 */
export function sumRolledKmForPeriods(
  periods: readonly RadiusPeriod[],
  pieces: readonly StrokeGroundRevolutions[],
  previous: readonly PeriodRolledKm[] = [],
): PeriodRolledKm[] {
  const byGround = new Map<string | null, { times: number[]; cum: number[] }>();
  // Pieces of strokes in ring order mostly come in time order already; sorting (stable) would keep that order.
  let inOrder = periods.length > 0;
  for (let i = 1; inOrder && i < pieces.length; i++) inOrder = pieces[i - 1].startMs <= pieces[i].startMs;
  const sorted = periods.length === 0 ? [] : inOrder ? pieces : [...pieces].sort((a, b) => a.startMs - b.startMs);
  // (No periods: only the previous totals come back, and no piece needs sorting.)
  for (const piece of sorted) {
    let series = byGround.get(piece.groundTypeId);
    if (!series) byGround.set(piece.groundTypeId, (series = { times: [], cum: [0] }));
    series.times.push(piece.startMs);
    series.cum.push(series.cum[series.cum.length - 1] + piece.revolutions);
  }
  const totals = new Map<string, Map<string | null, number>>();
  const add = (periodId: string, groundTypeId: string | null, km: number) => {
    let forPeriod = totals.get(periodId);
    if (!forPeriod) totals.set(periodId, (forPeriod = new Map()));
    forPeriod.set(groundTypeId, (forPeriod.get(groundTypeId) ?? 0) + km);
  };
  for (const t of previous) add(t.periodId, t.groundTypeId, t.rolledKm);
  for (const p of periods) {
    if (!(Number.isFinite(p.trackRadiusMm) && p.trackRadiusMm > 0)) throw new RangeError(`Period ${p.id}: track radius must be > 0 mm`);
    const fromMs = requireTimeMs(p.fromTime, `Period ${p.id}`);
    const toMs = p.toTime === null ? Infinity : requireTimeMs(p.toTime, `Period ${p.id}`);
    for (const [groundTypeId, s] of byGround) {
      const revolutions = s.cum[countBefore(s.times, toMs)] - s.cum[countBefore(s.times, fromMs)];
      if (revolutions !== 0) add(p.id, groundTypeId, rolledKm(p.trackRadiusMm / 1000, revolutions));
    }
  }
  return [...totals].flatMap(([periodId, forPeriod]) =>
    [...forPeriod].map(([groundTypeId, km]) => ({ periodId, groundTypeId, rolledKm: km })),
  );
}

/**
 * Rolled km per disc in each ground type for each fitted period: `previous` totals plus the rows of
 * `strokes` that fall in each period at the row's position. For a full recompute pass every stroke
 * and no previous totals; when strokes are only appended, pass the new strokes, their rows and the
 * stored totals, and the result equals the full recompute.
 */
export function sumRolledKmByPeriod(
  periods: readonly FittedPeriod[],
  strokes: readonly Stroke[],
  rows: readonly StrokeRolledKm[],
  previous: readonly PeriodRolledKm[] = [],
): PeriodRolledKm[] {
  const totals = new Map<string, Map<string | null, number>>();
  const add = (periodId: string, groundTypeId: string | null, km: number) => {
    let byGround = totals.get(periodId);
    if (!byGround) totals.set(periodId, (byGround = new Map()));
    byGround.set(groundTypeId, (byGround.get(groundTypeId) ?? 0) + km);
  };
  for (const t of previous) add(t.periodId, t.groundTypeId, t.rolledKm);

  const startMsByStroke = new Map(strokes.map((s) => [s.id, requireTimeMs(s.startTime, `Stroke ${s.id}`)]));
  // Per position and ground: the rows' stroke start times in order and the running sum of their km,
  // so a period's total is a difference of two running sums found by binary search (many periods,
  // e.g. one per inspection, stay cheap).
  const series = new Map<string, { times: number[]; cumKm: number[]; groundTypeId: string | null }[]>();
  const byKey = new Map<string, { ms: number; km: number }[]>();
  for (const row of rows) {
    const startMs = startMsByStroke.get(row.strokeId);
    if (startMs === undefined) throw new Error(`Row of stroke ${row.strokeId}, which is not among the strokes given`);
    const key = `${row.positionId}\u0000${row.groundTypeId ?? ''}`;
    let list = byKey.get(key);
    if (!list) {
      byKey.set(key, (list = []));
      const forPosition = series.get(row.positionId) ?? [];
      series.set(row.positionId, forPosition);
    }
    list.push({ ms: startMs, km: row.rolledKm });
  }
  for (const [key, list] of byKey) {
    const [positionId, ground] = key.split('\u0000');
    list.sort((a, b) => a.ms - b.ms);
    const cumKm = [0];
    for (const item of list) cumKm.push(cumKm[cumKm.length - 1] + item.km);
    series.get(positionId)!.push({ times: list.map((i) => i.ms), cumKm, groundTypeId: ground === '' ? null : ground });
  }
  for (const p of periods) {
    const fromMs = requireTimeMs(p.fromTime, `Period ${p.id}`);
    const toMs = p.toTime === null ? Infinity : requireTimeMs(p.toTime, `Period ${p.id}`);
    for (const s of series.get(p.positionId) ?? []) {
      const km = s.cumKm[countBefore(s.times, toMs)] - s.cumKm[countBefore(s.times, fromMs)];
      if (km !== 0) add(p.id, s.groundTypeId, km);
    }
  }
  return [...totals].flatMap(([periodId, byGround]) =>
    [...byGround].map(([groundTypeId, km]) => ({ periodId, groundTypeId, rolledKm: km })),
  );
}
