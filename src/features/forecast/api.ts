import { queryOptions } from '@tanstack/react-query';
import type { DiscCondition, PositionClass } from '../../../shared/cutters';
import type { CautiousRate } from '../../../shared/domain/cautious-rates';
import type { CercharClassification } from '../../../shared/domain/cerchar';
import type { ChangeOutForecast, DriveRateEstimate, WearRateSet } from '../../../shared/domain/forecast';
import type { GeologyGapWarning } from '../../../shared/domain/geology';
import type { ClassFactors, GroundWearRate, SuddenFailureRate } from '../../../shared/domain/wear-fit';
import type { ForecastSettingsInput } from '../../../shared/schemas/forecast';
import { api, apiGet } from '../../lib/api-client';

/** A server type as it arrives over JSON: dates become ISO text. */
type Wire<T> = T extends Date ? string : T extends object ? { [K in keyof T]: Wire<T[K]> } : T;

export type Explanation = Wire<ChangeOutForecast['explanation']>;

/** One position of GET /forecast; `explanation` only for the position asked for with ?positionId=. */
export type PositionForecast = Wire<Omit<ChangeOutForecast, 'explanation'>> & {
  serial: string | null;
  /** Postgres timestamp text (e.g. "2026-11-30 08:23:23.601+00"), null when never measured. */
  lastMeasuredAt: string | null;
  explanation?: Explanation;
};

export interface Forecast {
  now: string;
  currentChainageM: number | null;
  currentRingNumber: number | null;
  problems: string[];
  rates: WearRateSet & { byGround: Record<string, CautiousRate>; relativeScatter: number | null };
  driveRates: DriveRateEstimate;
  positions: PositionForecast[];
}

export interface WearFitGround {
  id: string;
  name: string;
  cai: number | null;
  caiClass: CercharClassification | null;
  priorMmPerKm: number | null;
  rate: GroundWearRate | null;
  /** P50 and cautious P90 rates with where the P90 comes from; null when the ground has no rate. */
  cautious: CautiousRate | null;
}

export interface WearFitReport {
  grounds: WearFitGround[];
  residualSdMm: number | null;
  residualDof: number;
  /** Relative scatter of discs about the fit (cv of the cautious rates); null with too few inspections. */
  relativeScatter: number | null;
  classFactors: ClassFactors;
  observationCount: number;
  failures: (SuddenFailureRate & { groundName: string })[];
  abnormalEvents: { entryId: string; at: string; positionNumber: number; conditions: DiscCondition[]; chainageM: number }[];
  /** Inspections whose disc rolled in one ground only: the chart's points. */
  points: { groundTypeId: string; rolledKm: number; wearMm: number; positionClass: PositionClass }[];
  ringDiameterMm: number;
}

export interface GroundType {
  id: string;
  name: string;
  description: string;
  cai: number | null;
  caiClass: CercharClassification | null;
}

export interface GeologySection {
  id: string;
  chainageFromM: number;
  chainageToM: number;
  groundTypeId: string;
  waterHeadM: number | null;
  stopAllowed: boolean;
  stopReason: string;
}

export interface Geology {
  sections: GeologySection[];
  warnings: GeologyGapWarning[];
  currentChainageM: number | null;
}

const base = (projectId: string) => `/api/projects/${projectId}`;

export const getWearFit = (projectId: string) => apiGet<WearFitReport>(`${base(projectId)}/wear-fit`);
export const getForecast = (projectId: string, positionId?: string) =>
  apiGet<Forecast>(`${base(projectId)}/forecast${positionId ? `?positionId=${encodeURIComponent(positionId)}` : ''}`);
export const getForecastSettings = (projectId: string) => apiGet<ForecastSettingsInput>(`${base(projectId)}/forecast/settings`);
export const saveForecastSettings = (projectId: string, input: ForecastSettingsInput) => api<unknown>('PUT', `${base(projectId)}/forecast/settings`, input);
export const getGeology = (projectId: string) => apiGet<Geology>(`${base(projectId)}/geology`);
export const getGroundTypes = (projectId: string) => apiGet<GroundType[]>(`${base(projectId)}/ground-types`);

/**
 * The forecast follows every new inspection, import and geology change, so its queries go stale
 * almost at once and refetch when a page is visited again (1 s is TanStack Query's floor for
 * suspense queries).
 */
const staleTime = 1_000;

export const forecastQueries = {
  all: (projectId: string) => ['projects', projectId, 'forecast'] as const,
  forecast: (projectId: string) =>
    queryOptions({ queryKey: [...forecastQueries.all(projectId), 'positions'], queryFn: () => getForecast(projectId), staleTime }),
  explanation: (projectId: string, positionId: string) =>
    queryOptions({
      queryKey: [...forecastQueries.all(projectId), 'positions', positionId],
      queryFn: async () => {
        const forecast = await getForecast(projectId, positionId);
        return { forecast, position: forecast.positions.find((p) => p.position.positionId === positionId) ?? null };
      },
      staleTime,
    }),
  wearFit: (projectId: string) => queryOptions({ queryKey: [...forecastQueries.all(projectId), 'wear-fit'], queryFn: () => getWearFit(projectId), staleTime }),
  settings: (projectId: string) =>
    queryOptions({ queryKey: [...forecastQueries.all(projectId), 'settings'], queryFn: () => getForecastSettings(projectId), staleTime }),
  geology: (projectId: string) => queryOptions({ queryKey: [...forecastQueries.all(projectId), 'geology'], queryFn: () => getGeology(projectId), staleTime }),
  groundTypes: (projectId: string) =>
    queryOptions({ queryKey: [...forecastQueries.all(projectId), 'ground-types'], queryFn: () => getGroundTypes(projectId), staleTime }),
};
