/**
 * The stop planner's input from a drive's forecast and long section: pure, so the service only
 * loads data and calls it (server/services/stops.ts). The planner itself is ./stop-planner.ts.
 */
import { aheadM, chainageAhead } from './chainage';
import { needsCompressedAir } from './compressed-air';
import { forecastChangeOut, type ChangeOutForecast, type DriveDirection, type PositionClass, type WearRateSet } from './forecast';
import type { StopPlanInput, WearStretch } from './stop-planner';

/** The long section as the planner reads it, and how chainage turns into rings. */
export interface DriveGeology {
  sections: {
    chainageFromM: number;
    chainageToM: number;
    groundTypeId: string | null;
    waterHeadM: number;
    stopAllowed: boolean;
    stopReason: string;
  }[];
  ringLengthM: number;
  direction: DriveDirection;
}

/** What the planner needs of a drive's forecast (the server's ProjectForecast has all of it). */
export interface PlannerForecast {
  now: Date;
  currentChainageM: number | null;
  currentRingNumber: number | null;
  rates: WearRateSet;
  driveRates: { penetrationMmPerRevByGround: Record<string, number>; advanceMPerDayByGround: Record<string, number> };
  positions: Pick<ChangeOutForecast, 'position' | 'explanation'>[];
}

/** The settings the input is built from (see StopPlanSettings in shared/schemas/stop.ts). */
export interface PlanInputSettings {
  horizonM: number;
  freeAirStopH: number;
  compressedAirStopH: number;
  changeHByClass: Record<PositionClass, number>;
  wastedRingLifeHPerMm: number;
  compressedAirAboveHeadM: number;
}

/** Chainage tolerance, m: absorbs rounding when a stop is matched to a section boundary or a plan place. */
export const PLACE_EPS_M = 1e-6;

/**
 * Whether a stop may be made at `chainageM`, and the water head there (m). On a boundary between
 * two sections both must allow a stop, and the higher head counts (cautious).
 */
export function stopPlaceAt(
  sections: DriveGeology['sections'],
  chainageM: number,
): { allowed: boolean; waterHeadM: number | null; reason: string | null } {
  const touching = sections.filter((s) => s.chainageFromM - PLACE_EPS_M <= chainageM && chainageM <= s.chainageToM + PLACE_EPS_M);
  if (touching.length === 0) return { allowed: false, waterHeadM: null, reason: 'it lies outside the geology long section' };
  const waterHeadM = Math.max(...touching.map((s) => s.waterHeadM));
  const refusing = touching.find((s) => !s.stopAllowed);
  if (refusing) return { allowed: false, waterHeadM, reason: refusing.stopReason || 'the long section allows no stop there' };
  return { allowed: true, waterHeadM, reason: null };
}

/**
 * Metres of known ground ahead of the machine: how far the forecast can walk. The planner's
 * horizon is cut there, as no stop place or wear rate is known beyond.
 */
export function knownGroundAheadM(geology: DriveGeology, currentChainageM: number): number {
  return Math.max(
    0,
    ...geology.sections.map((s) =>
      Math.max(aheadM(currentChainageM, s.chainageFromM, geology.direction), aheadM(currentChainageM, s.chainageToM, geology.direction)),
    ),
  );
}

/**
 * The forecast's walk of one position over the whole known ground, its limit lifted (so the walk
 * does not stop at the limit point): wear growth and advance days per ground section ahead.
 */
function walkWithoutLimit(position: PlannerForecast['positions'][number], forecast: PlannerForecast, geology: DriveGeology) {
  return forecastChangeOut({
    position: { ...position.position, allowableWearMm: Infinity },
    wearNow: position.explanation.wearNow,
    currentChainageM: forecast.currentChainageM!,
    currentRingNumber: forecast.currentRingNumber!,
    ringLengthM: geology.ringLengthM,
    driveDirection: geology.direction,
    geology: geology.sections.map((s) => ({ fromChainageM: s.chainageFromM, toChainageM: s.chainageToM, groundTypeId: s.groundTypeId })),
    rates: forecast.rates,
    penetrationMmPerRevByGround: forecast.driveRates.penetrationMmPerRevByGround,
    advanceMPerDayByGround: forecast.driveRates.advanceMPerDayByGround,
    overcutMarginMm: 0,
    now: forecast.now,
  });
}

/**
 * Cautious (P90) wear growth per metre ahead of one position over the whole known ground. The
 * forecast's own explanation stops at the position's limit point; a ring fitted later wears on
 * through the ground beyond, so the same forecast walk is repeated with the limit lifted.
 */
export function p90WearStretches(
  position: PlannerForecast['positions'][number],
  forecast: PlannerForecast,
  geology: DriveGeology,
): WearStretch[] {
  const walk = walkWithoutLimit(position, forecast, geology);
  let fromAheadM = 0;
  return walk.explanation.sections.map((s) => {
    const stretch = { fromAheadM, wearMmPerM: s.wearMmPerM.p90 };
    fromAheadM += s.lengthM;
    return stretch;
  });
}

/**
 * The stop planner's input from a project's forecast (P90 wear now, limits, P90 wear growth per
 * metre ahead), its long section (a candidate place at every ring boundary ahead, within the
 * horizon and the known ground, where a stop is allowed; compressed air above the site's water
 * head) and the cost settings. Needs a forecast with a known machine position.
 */
export function buildStopPlanInput(forecast: PlannerForecast, geology: DriveGeology, settings: PlanInputSettings): StopPlanInput {
  const currentChainageM = forecast.currentChainageM;
  if (currentChainageM == null || forecast.currentRingNumber == null)
    throw new RangeError('the machine position is not known: no advance log');
  const horizonM = Math.min(settings.horizonM, knownGroundAheadM(geology, currentChainageM));
  const stopPlaces: StopPlanInput['stopPlaces'] = [];
  for (let k = 0; k * geology.ringLengthM <= horizonM + PLACE_EPS_M; k++) {
    const chainageM = chainageAhead(currentChainageM, k * geology.ringLengthM, geology.direction);
    const place = stopPlaceAt(geology.sections, chainageM);
    if (place.allowed)
      stopPlaces.push({
        chainageM,
        compressedAir: needsCompressedAir(place.waterHeadM ?? 0, { headAboveAxisM: settings.compressedAirAboveHeadM }),
      });
  }
  return {
    currentChainageM,
    direction: geology.direction,
    horizonM,
    positions: forecast.positions.map((p) => ({
      positionId: p.position.positionId,
      positionClass: p.position.positionClass,
      wearNowMm: p.explanation.wearNowMm.p90,
      limitMm: p.position.allowableWearMm,
      wearStretches: p90WearStretches(p, forecast, geology),
    })),
    stopPlaces,
    freeAirStopH: settings.freeAirStopH,
    compressedAirStopH: settings.compressedAirStopH,
    changeHByClass: settings.changeHByClass,
    wastedRingLifeHPerMm: settings.wastedRingLifeHPerMm,
  };
}

/**
 * The expected moment the machine reaches `aheadByM` metres ahead, walking the known ground at the
 * forecast's advance rate per ground (m/day) from `now`; null past the known ground.
 */
export function expectedAtAhead(forecast: PlannerForecast, geology: DriveGeology, aheadByM: number): Date | null {
  const position = forecast.positions[0];
  if (!position || forecast.currentChainageM == null) return null;
  const walk = walkWithoutLimit(position, forecast, geology);
  let fromM = 0;
  let days = 0;
  for (const s of walk.explanation.sections) {
    if (aheadByM <= fromM + s.lengthM)
      return new Date(forecast.now.getTime() + (days + (aheadByM - fromM) / s.advanceMPerDay) * 86_400_000);
    fromM += s.lengthM;
    days += s.days;
  }
  return null;
}
