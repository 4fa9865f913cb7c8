import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { LayoutInput } from '../../../shared/schemas/cutterhead';
import type { Forecast, PositionForecast } from '../../../shared/schemas/forecast';
import { api, apiGet } from '../../lib/api-client';
import type { LayoutPosition, PositionDetail, LayoutSaved, PositionHistories, PositionHistory } from '../../../shared/schemas/cutterhead';
import { queryClient } from '../../lib/query-client';
export type {
  LayoutPosition,
  FittedPeriod,
  Measurement,
  PositionDetail,
  PositionHistory,
  LayoutSaved,
} from '../../../shared/schemas/cutterhead';

const base = (projectId: string) => `/api/projects/${projectId}/positions`;

export const getLayout = (projectId: string) => apiGet<LayoutPosition[]>(base(projectId));
export const getPosition = (projectId: string, positionId: string) => apiGet<PositionDetail>(`${base(projectId)}/${positionId}`);
/** How many of each position's newest measurements the tablet keeps for offline use (decision 42). */
export const OFFLINE_HISTORY_LAST = 50;
export const getPositionHistories = (projectId: string) =>
  apiGet<PositionHistories>(`${base(projectId)}/history?last=${OFFLINE_HISTORY_LAST}`);
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
  /** Every position's recent history in one read, prefetched while online so it is on the device (src/app/offline-data.ts). */
  history: (projectId: string) =>
    queryOptions({ queryKey: [...layoutQueries.all(projectId), 'history'], queryFn: () => getPositionHistories(projectId) }),
  /**
   * One position's whole history. With no network, a position never opened on this device starts
   * from the recent history kept for every position (as last synced; refetched once online).
   */
  detail: (projectId: string, positionId: string) =>
    queryOptions<PositionDetail | PositionHistory>({
      queryKey: [...layoutQueries.all(projectId), positionId],
      queryFn: () => getPosition(projectId, positionId),
      initialData: () => (navigator.onLine ? undefined : keptHistoryOf(projectId, positionId)),
      initialDataUpdatedAt: () => queryClient.getQueryState(layoutQueries.history(projectId).queryKey)?.dataUpdatedAt,
    }),
};

/** A position's recent history as last synced to this device, if it was. */
function keptHistoryOf(projectId: string, positionId: string): PositionHistory | undefined {
  return queryClient.getQueryData(layoutQueries.history(projectId).queryKey)?.positions.find((p) => p.position.id === positionId);
}

/** A saved or imported layout invalidates `layoutQueries.all`: the list, the remaining metres and each position. */
function useLayoutMutation<TInput, TResult>(projectId: string, mutationFn: (input: TInput) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn, onSuccess: () => queryClient.invalidateQueries({ queryKey: layoutQueries.all(projectId) }) });
}

export const useSaveLayout = (projectId: string) => useLayoutMutation(projectId, (input: LayoutInput) => saveLayout(projectId, input));
export const useImportLayoutCsv = (projectId: string) => useLayoutMutation(projectId, (csv: string) => importLayoutCsv(projectId, csv));
