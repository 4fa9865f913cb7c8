import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { ForecastSettingsInput, ForecastSettingsView } from '../../../shared/schemas/forecast';
import { api, apiGet } from '../../lib/api-client';
import type { Forecast, WearFitReport } from '../../../shared/schemas/forecast';
export type { Geology, GroundType } from '../../../shared/schemas/geology';
export type { Explanation, PositionForecast, Forecast, WearFitGround, WearFitReport } from '../../../shared/schemas/forecast';

const base = (projectId: string) => `/api/projects/${projectId}`;

export const getWearFit = (projectId: string) => apiGet<WearFitReport>(`${base(projectId)}/wear-fit`);
export const getForecast = (projectId: string, positionId?: string) =>
  apiGet<Forecast>(`${base(projectId)}/forecast${positionId ? `?positionId=${encodeURIComponent(positionId)}` : ''}`);
export const getForecastSettings = (projectId: string) => apiGet<ForecastSettingsView>(`${base(projectId)}/forecast/settings`);
export const saveForecastSettings = (projectId: string, input: ForecastSettingsInput) =>
  api<ForecastSettingsView>('PUT', `${base(projectId)}/forecast/settings`, input);

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
  wearFit: (projectId: string) =>
    queryOptions({ queryKey: [...forecastQueries.all(projectId), 'wear-fit'], queryFn: () => getWearFit(projectId), staleTime }),
  settings: (projectId: string) =>
    queryOptions({ queryKey: [...forecastQueries.all(projectId), 'settings'], queryFn: () => getForecastSettings(projectId), staleTime }),
};

/** Saves the forecast settings; the wear fit and the forecast are read again after it. */
export function useSaveForecastSettings(projectId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ForecastSettingsInput) => saveForecastSettings(projectId, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: forecastQueries.all(projectId) }),
  });
}
