import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { LayoutInput } from '../../../shared/schemas/cutterhead';
import type { Forecast, PositionForecast } from '../../../shared/schemas/forecast';
import { api, apiGet } from '../../lib/api-client';
import type { LayoutPosition, PositionDetail, LayoutSaved } from '../../../shared/schemas/cutterhead';
export type { LayoutPosition, FittedPeriod, Measurement, PositionDetail, LayoutSaved } from '../../../shared/schemas/cutterhead';

const base = (projectId: string) => `/api/projects/${projectId}/positions`;

export const getLayout = (projectId: string) => apiGet<LayoutPosition[]>(base(projectId));
export const getPosition = (projectId: string, positionId: string) => apiGet<PositionDetail>(`${base(projectId)}/${positionId}`);
export const saveLayout = (projectId: string, input: LayoutInput) => api<LayoutSaved>('PUT', base(projectId), input);
export const importLayoutCsv = (projectId: string, csv: string) => api<LayoutSaved>('POST', `${base(projectId)}/import`, { csv });
export const photoUrl = (projectId: string, photoId: string) => `/api/projects/${projectId}/photos/${photoId}`;

/** What the picture's forecast view needs of GET /forecast: metres left per position (cautious P90). */
export type RemainingMetres = Pick<PositionForecast['p90'], 'remainingM' | 'status'> & { positionId: string };

export async function getRemainingMetres(projectId: string): Promise<RemainingMetres[]> {
  const f = await apiGet<Forecast>(`/api/projects/${projectId}/forecast`);
  return f.positions.map((p) => ({ positionId: p.position.positionId, remainingM: p.p90.remainingM, status: p.p90.status }));
}

export const layoutQueries = {
  all: (projectId: string) => ['projects', projectId, 'positions'] as const,
  list: (projectId: string) => queryOptions({ queryKey: layoutQueries.all(projectId), queryFn: () => getLayout(projectId) }),
  remaining: (projectId: string) =>
    queryOptions({
      queryKey: [...layoutQueries.all(projectId), 'remaining'],
      queryFn: () => getRemainingMetres(projectId),
      staleTime: 5_000,
    }),
  detail: (projectId: string, positionId: string) =>
    queryOptions({ queryKey: [...layoutQueries.all(projectId), positionId], queryFn: () => getPosition(projectId, positionId) }),
};

/** A saved or imported layout invalidates `layoutQueries.all`: the list, the remaining metres and each position. */
function useLayoutMutation<TInput, TResult>(projectId: string, mutationFn: (input: TInput) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn, onSuccess: () => queryClient.invalidateQueries({ queryKey: layoutQueries.all(projectId) }) });
}

export const useSaveLayout = (projectId: string) => useLayoutMutation(projectId, (input: LayoutInput) => saveLayout(projectId, input));
export const useImportLayoutCsv = (projectId: string) => useLayoutMutation(projectId, (csv: string) => importLayoutCsv(projectId, csv));
