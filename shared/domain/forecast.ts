/**
 * Change-out forecast: where, in which ring and on which date each cutterhead position reaches
 * its allowable radial wear, as a central (P50) and a cautious (P90) value.
 *
 * Method: wear grows in proportion to distance rolled within one ground type (Archard, DOMAIN.md
 * §2). Per metre of advance a disc at track radius r rolls 2·π·r·1000/p m = 2·π·r/p km with r in m
 * and p in mm/rev (DOMAIN.md §1), so it wears rate_g × classFactor × rolledKmPerM mm per metre. The
 * forecast walks the geology ahead section by section, adding that wear, until the limit is reached.
 *
 * Wear-rate interface (filled from the wear fit): per ground type a P50 rate and a P90 rate in mm
 * of radial wear per km rolled for a face disc, and one factor per position class (face = 1).
 * The P90 rate is the rate the fit expects to be exceeded with probability 10 %, e.g. the upper
 * one-sided 90 % prediction bound rate + t(0.90, df)·se; computing it is the fit's job, so the
 * forecast needs no distribution quantiles. Using each ground's P90 rate in every section ahead
 * is more cautious than the P90 of the summed wear when several grounds lie ahead (their errors
 * need not all sit at their bounds at once); accepted because it errs towards an early change.
 * The class factor is taken as exact for both.
 *
 * Unknown ground (a section without a ground type, a gap between sections, or a ground type the
 * inputs know nothing about) takes the cautious extreme of the known ground types for each
 * quantity separately — highest P50 and P90 rate, lowest penetration (more revolutions per
 * metre), highest advance per day (earlier date) — and is flagged in the explanation.
 *
 * Discs per position does not change a disc's wear: discs on one hub roll at about the same track
 * radius and the fitted class factor carries any difference; it is echoed for parts demand.
 */
import { chainageAhead, directionSign, ringAtAhead, type DriveDirection } from './chainage';
import { gaugeBoreCheck, type GaugeBoreCheck } from './gauge-bore';

export type PositionClass = 'centre' | 'face' | 'gauge';
export type { DriveDirection } from './chainage';
export type Quantile = 'p50' | 'p90';

/** Wear rates of one ground type, mm of radial ring wear per km rolled, for a face disc. */
export interface GroundWearRate {
  p50MmPerKm: number;
  p90MmPerKm: number;
}

export interface WearRateSet {
  byGround: Record<string, GroundWearRate>;
  /** Multiplier on the ground rate per position class; face = 1 by definition. */
  classFactors: Record<PositionClass, number>;
}

export interface ForecastPosition {
  positionId: string;
  positionNumber: number;
  positionClass: PositionClass;
  trackRadiusMm: number;
  discsPerPosition: number;
  allowableWearMm: number;
  /** Tilt from the tunnel axis (see gauge-bore.ts); required for gauge positions, null otherwise. */
  gaugeTiltDeg: number | null;
}

export interface WearNow {
  lastMeasuredWearMm: number;
  measuredAtChainageM: number;
  /** Wear modelled from the km rolled since that inspection (see modelledWearSinceMm). */
  modelledSinceMm: Record<Quantile, number>;
}

export interface GeologySection {
  fromChainageM: number;
  toChainageM: number;
  /** Null where the long section gives no ground type. */
  groundTypeId: string | null;
}

export interface ForecastInput {
  position: ForecastPosition;
  wearNow: WearNow;
  currentChainageM: number;
  /** Ring last built, ending at the current chainage; rings count up as the machine advances. */
  currentRingNumber: number;
  ringLengthM: number;
  driveDirection: DriveDirection;
  geology: GeologySection[];
  rates: WearRateSet;
  penetrationMmPerRevByGround: Record<string, number>;
  advanceMPerDayByGround: Record<string, number>;
  /** Project overcut margin on the diameter, mm (used for gauge positions). */
  overcutMarginMm: number;
  now: Date;
}

/**
 * - reaches_limit: the wear reaches the limit at this point.
 * - over_limit: at or over the limit now; the point is the current one, remainingM 0.
 * - beyond_known_ground: the limit lies past the end of the geology; the point is that end,
 *   remainingM is "at least", wearThereMm the wear reached there.
 */
export type LimitStatus = 'reaches_limit' | 'over_limit' | 'beyond_known_ground';

export interface LimitPoint {
  status: LimitStatus;
  wearNowMm: number;
  remainingM: number;
  chainageM: number;
  ringNumber: number;
  date: Date;
  wearThereMm: number;
}

export type Fallback = 'wear_rate' | 'penetration' | 'advance';

export interface ExplainedSection {
  fromChainageM: number;
  toChainageM: number;
  lengthM: number;
  groundTypeId: string | null;
  penetrationMmPerRev: number;
  rolledKmPerM: number;
  rateMmPerKm: Record<Quantile, number>;
  wearMmPerM: Record<Quantile, number>;
  advanceMPerDay: number;
  days: number;
  /** Quantities taken from the unknown-ground fallback in this section. */
  fallbacks: Fallback[];
}

export interface ChangeOutForecast {
  position: ForecastPosition;
  p50: LimitPoint;
  p90: LimitPoint;
  explanation: {
    classFactor: number;
    wearNow: WearNow;
    wearNowMm: Record<Quantile, number>;
    currentChainageM: number;
    driveDirection: DriveDirection;
    /** Sections walked, clipped to the farther of the P50 and P90 points. */
    sections: ExplainedSection[];
    usesFallback: boolean;
  };
  /** Gauge positions: bore loss at the most wear the disc carries before change-out, max(limit, P90 wear now). */
  gaugeBore: GaugeBoreCheck | null;
}

const QUANTILES: Quantile[] = ['p50', 'p90'];
const MS_PER_DAY = 86_400_000;
const EPS = 1e-9;

/** Km rolled by a disc at track radius `trackRadiusMm` per metre of advance at penetration `penetrationMmPerRev`: 2·π·r/p. */
export function rolledKmPerMetre(trackRadiusMm: number, penetrationMmPerRev: number): number {
  if (!(trackRadiusMm > 0)) throw new RangeError(`track radius must be > 0 mm, got ${trackRadiusMm}`);
  if (!(penetrationMmPerRev > 0)) throw new RangeError(`penetration must be > 0 mm/rev, got ${penetrationMmPerRev}`);
  return (2 * Math.PI * (trackRadiusMm / 1000) * (1000 / penetrationMmPerRev)) / 1000;
}

/** Wear rates (mm/km, face disc) for a ground type; unknown ground takes the highest known rates, flagged. */
function rateFor(groundTypeId: string | null, rates: WearRateSet): { rate: GroundWearRate; fallback: boolean } {
  if (groundTypeId !== null && Object.hasOwn(rates.byGround, groundTypeId)) {
    return { rate: rates.byGround[groundTypeId], fallback: false };
  }
  const known = Object.values(rates.byGround);
  if (known.length === 0) throw new RangeError('no wear rate known for any ground type');
  return {
    rate: {
      p50MmPerKm: Math.max(...known.map((r) => r.p50MmPerKm)),
      p90MmPerKm: Math.max(...known.map((r) => r.p90MmPerKm)),
    },
    fallback: true,
  };
}

/** A per-ground value, or the cautious extreme (`pick`) of the known values when the ground is unknown. */
function valueFor(groundTypeId: string | null, byGround: Record<string, number>, pick: (...v: number[]) => number, name: string) {
  if (groundTypeId !== null && Object.hasOwn(byGround, groundTypeId)) return { value: byGround[groundTypeId], fallback: false };
  const known = Object.values(byGround);
  if (known.length === 0) throw new RangeError(`no ${name} known for any ground type`);
  return { value: pick(...known), fallback: true };
}

/**
 * Modelled radial wear (mm, P50 and P90) of a disc of class `positionClass` from the km it rolled in
 * each ground type since its last inspection; ground types without a rate use the fallback and are listed.
 */
export function modelledWearSinceMm(
  rolledSince: { groundTypeId: string | null; rolledKm: number }[],
  rates: WearRateSet,
  positionClass: PositionClass,
): { wearMm: Record<Quantile, number>; fallbackGroundIds: (string | null)[] } {
  const factor = rates.classFactors[positionClass];
  const wearMm = { p50: 0, p90: 0 };
  const fallbackGroundIds: (string | null)[] = [];
  for (const { groundTypeId, rolledKm } of rolledSince) {
    if (!(rolledKm >= 0)) throw new RangeError(`rolled distance must be >= 0 km, got ${rolledKm}`);
    const { rate, fallback } = rateFor(groundTypeId, rates);
    if (fallback) fallbackGroundIds.push(groundTypeId);
    wearMm.p50 += rate.p50MmPerKm * factor * rolledKm;
    wearMm.p90 += rate.p90MmPerKm * factor * rolledKm;
  }
  return { wearMm, fallbackGroundIds };
}

/** Geology ahead as distances from the current chainage (m, along the drive), sorted, gaps filled with unknown ground. */
function groundAhead(geology: GeologySection[], currentChainageM: number, sign: number) {
  const ahead = geology
    .map((s) => {
      const a = (s.fromChainageM - currentChainageM) * sign;
      const b = (s.toChainageM - currentChainageM) * sign;
      return { startM: Math.max(0, Math.min(a, b)), endM: Math.max(a, b), groundTypeId: s.groundTypeId };
    })
    .filter((s) => s.endM > s.startM)
    .sort((x, y) => x.startM - y.startM);
  const out: { startM: number; endM: number; groundTypeId: string | null }[] = [];
  let atM = 0;
  for (const s of ahead) {
    if (s.startM < atM - EPS) throw new RangeError(`geology sections overlap near ${currentChainageM + sign * s.startM} m`);
    if (s.startM > atM + EPS) out.push({ startM: atM, endM: s.startM, groundTypeId: null });
    out.push({ ...s, startM: Math.max(s.startM, atM) });
    atM = s.endM;
  }
  return out;
}

/**
 * Change-out forecast of one position: chainage, ring number, date and remaining metres at which
 * its radial wear reaches the allowable wear, for P50 and P90, with the explanation of each section used.
 */
export function forecastChangeOut(input: ForecastInput): ChangeOutForecast {
  const { position, wearNow, currentChainageM, currentRingNumber, ringLengthM, rates, now } = input;
  if (!(ringLengthM > 0)) throw new RangeError(`ring length must be > 0 m, got ${ringLengthM}`);
  if (!(position.allowableWearMm > 0)) throw new RangeError(`allowable wear must be > 0 mm, got ${position.allowableWearMm}`);
  if (position.positionClass === 'gauge' && position.gaugeTiltDeg === null) {
    throw new RangeError(`gauge position ${position.positionNumber} has no tilt angle`);
  }
  const sign = directionSign(input.driveDirection);
  const classFactor = rates.classFactors[position.positionClass];

  const segments = groundAhead(input.geology, currentChainageM, sign).map((s) => {
    const rate = rateFor(s.groundTypeId, rates);
    const pen = valueFor(s.groundTypeId, input.penetrationMmPerRevByGround, Math.min, 'penetration');
    const adv = valueFor(s.groundTypeId, input.advanceMPerDayByGround, Math.max, 'advance per day');
    if (!(adv.value > 0)) throw new RangeError(`advance per day must be > 0 m, got ${adv.value}`);
    const rolledKmPerM = rolledKmPerMetre(position.trackRadiusMm, pen.value);
    const fallbacks: Fallback[] = [];
    if (rate.fallback) fallbacks.push('wear_rate');
    if (pen.fallback) fallbacks.push('penetration');
    if (adv.fallback) fallbacks.push('advance');
    return {
      ...s,
      penetrationMmPerRev: pen.value,
      rolledKmPerM,
      rateMmPerKm: { p50: rate.rate.p50MmPerKm, p90: rate.rate.p90MmPerKm },
      wearMmPerM: {
        p50: rate.rate.p50MmPerKm * classFactor * rolledKmPerM,
        p90: rate.rate.p90MmPerKm * classFactor * rolledKmPerM,
      },
      advanceMPerDay: adv.value,
      fallbacks,
    };
  });

  const pointAt = (status: LimitStatus, wearNowMm: number, distanceM: number, wearThereMm: number, days: number): LimitPoint => ({
    status,
    wearNowMm,
    remainingM: distanceM,
    chainageM: chainageAhead(currentChainageM, distanceM, input.driveDirection),
    // The point lies in the ring during whose stroke the machine reaches it.
    ringNumber: ringAtAhead(currentRingNumber, distanceM, ringLengthM),
    date: new Date(now.getTime() + days * MS_PER_DAY),
    wearThereMm,
  });

  const limitMm = position.allowableWearMm;
  const walk = (q: Quantile, wearNowMm: number): LimitPoint => {
    if (wearNowMm >= limitMm) return pointAt('over_limit', wearNowMm, 0, wearNowMm, 0);
    let wearMm = wearNowMm;
    let days = 0;
    let atM = 0;
    for (const s of segments) {
      const lengthM = s.endM - s.startM;
      const perM = s.wearMmPerM[q];
      if (wearMm + perM * lengthM >= limitMm) {
        const intoM = (limitMm - wearMm) / perM;
        return pointAt('reaches_limit', wearNowMm, s.startM + intoM, limitMm, days + intoM / s.advanceMPerDay);
      }
      wearMm += perM * lengthM;
      days += lengthM / s.advanceMPerDay;
      atM = s.endM;
    }
    return pointAt('beyond_known_ground', wearNowMm, atM, wearMm, days);
  };

  const wearNowMm = {
    p50: wearNow.lastMeasuredWearMm + wearNow.modelledSinceMm.p50,
    p90: wearNow.lastMeasuredWearMm + wearNow.modelledSinceMm.p90,
  };
  const [p50, p90] = QUANTILES.map((q) => walk(q, wearNowMm[q]));

  const reachM = Math.max(p50.remainingM, p90.remainingM);
  const sections: ExplainedSection[] = segments
    .filter((s) => s.startM < reachM)
    .map(({ startM, endM, ...s }) => {
      const lengthM = Math.min(endM, reachM) - startM;
      return {
        ...s,
        fromChainageM: currentChainageM + sign * startM,
        toChainageM: currentChainageM + sign * (startM + lengthM),
        lengthM,
        days: lengthM / s.advanceMPerDay,
      };
    });

  return {
    position,
    p50,
    p90,
    explanation: {
      classFactor,
      wearNow,
      wearNowMm,
      currentChainageM,
      driveDirection: input.driveDirection,
      sections,
      usesFallback: sections.some((s) => s.fallbacks.length > 0),
    },
    gaugeBore:
      position.positionClass === 'gauge' && position.gaugeTiltDeg !== null
        ? gaugeBoreCheck(Math.max(limitMm, wearNowMm.p90), position.gaugeTiltDeg, input.overcutMarginMm)
        : null,
  };
}

/** One stroke of the advance log as the drive-rate estimate needs it. */
export interface StrokeRecord {
  endedAt: Date;
  fromChainageM: number;
  toChainageM: number;
  groundTypeId: string | null;
  cutterheadRevolutions: number | null;
  penetrationMmPerRev: number | null;
}

export type EstimateBasis = { source: 'planner' } | { source: 'recent_strokes'; strokeCount: number; advanceM: number };

export interface DriveRateEstimate {
  penetrationMmPerRevByGround: Record<string, number>;
  advanceMPerDayByGround: Record<string, number>;
  basis: Record<string, { penetration: EstimateBasis | null; advance: EstimateBasis | null }>;
}

/** Window of the drive-rate estimate: the last 30 strokes in a ground type (about 30 rings). Common practice, no source. */
export const DEFAULT_WINDOW_STROKES = 30;

/**
 * Expected penetration (mm/rev) and advance per calendar day (m/day) per ground type from the last
 * `windowStrokes` strokes in each ground; a planner override wins for the quantity it sets.
 *
 * Both are ratios of sums (metre-weighted means), not medians: penetration = Σ advance / Σ
 * revolutions, because the forecast turns metres back into revolutions and only this ratio returns
 * the revolutions the log holds (a stroke without revolutions counts advance / its penetration);
 * advance per day = Σ advance / Σ calendar time, where a stroke's calendar time runs from the end of
 * the stroke before it (any ground) to its own end, so ring building and every stoppage count. The
 * first stroke of the log has no such time and counts for penetration only.
 */
export function estimateDriveRates(
  strokes: StrokeRecord[],
  overrides: Record<string, { penetrationMmPerRev?: number; advanceMPerDay?: number }>,
  windowStrokes: number = DEFAULT_WINDOW_STROKES,
): DriveRateEstimate {
  if (!(Number.isInteger(windowStrokes) && windowStrokes >= 1))
    throw new RangeError(`window must be a whole number of strokes >= 1, got ${windowStrokes}`);
  const ordered = [...strokes].sort((a, b) => a.endedAt.getTime() - b.endedAt.getTime());
  const byGround = new Map<string, { advanceM: number; revolutions: number | null; days: number | null }[]>();
  ordered.forEach((s, i) => {
    if (s.groundTypeId === null) return;
    const advanceM = Math.abs(s.toChainageM - s.fromChainageM);
    const revolutions =
      s.cutterheadRevolutions ??
      (s.penetrationMmPerRev !== null && s.penetrationMmPerRev > 0 ? (advanceM * 1000) / s.penetrationMmPerRev : null);
    const days = i > 0 ? (s.endedAt.getTime() - ordered[i - 1].endedAt.getTime()) / MS_PER_DAY : null;
    const list = byGround.get(s.groundTypeId) ?? [];
    list.push({ advanceM, revolutions, days });
    byGround.set(s.groundTypeId, list);
  });

  const estimate: DriveRateEstimate = { penetrationMmPerRevByGround: {}, advanceMPerDayByGround: {}, basis: {} };
  const groundIds = new Set([...byGround.keys(), ...Object.keys(overrides)]);
  for (const id of groundIds) {
    const window = (byGround.get(id) ?? []).slice(-windowStrokes);
    const withRevs = window.filter((s) => s.revolutions !== null);
    const withDays = window.filter((s) => s.days !== null);
    const revs = withRevs.reduce((t, s) => t + (s.revolutions as number), 0);
    const revM = withRevs.reduce((t, s) => t + s.advanceM, 0);
    const days = withDays.reduce((t, s) => t + (s.days as number), 0);
    const dayM = withDays.reduce((t, s) => t + s.advanceM, 0);
    const override = Object.hasOwn(overrides, id) ? overrides[id] : {};
    const basis: DriveRateEstimate['basis'][string] = { penetration: null, advance: null };

    if (override.penetrationMmPerRev !== undefined) {
      estimate.penetrationMmPerRevByGround[id] = override.penetrationMmPerRev;
      basis.penetration = { source: 'planner' };
    } else if (revs > 0 && revM > 0) {
      estimate.penetrationMmPerRevByGround[id] = (revM * 1000) / revs;
      basis.penetration = { source: 'recent_strokes', strokeCount: withRevs.length, advanceM: revM };
    }
    if (override.advanceMPerDay !== undefined) {
      estimate.advanceMPerDayByGround[id] = override.advanceMPerDay;
      basis.advance = { source: 'planner' };
    } else if (days > 0 && dayM > 0) {
      estimate.advanceMPerDayByGround[id] = dayM / days;
      basis.advance = { source: 'recent_strokes', strokeCount: withDays.length, advanceM: dayM };
    }
    estimate.basis[id] = basis;
  }
  return estimate;
}
