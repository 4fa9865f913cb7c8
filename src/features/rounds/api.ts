import { queryOptions } from '@tanstack/react-query';
import type { StartRoundInput } from '../../../shared/schemas/inspection';
import { api, apiGet } from '../../lib/api-client';
import type { Round, RoundListItem, RoundDetail, StoreCutter } from '../../../shared/schemas/inspection';
export type { Round, RoundListItem, RoundPosition, RoundEntry, RoundDetail, StoreCutter } from '../../../shared/schemas/inspection';

export const roundQueries = {
  all: (projectId: string) => ['projects', projectId, 'rounds'] as const,
  list: (projectId: string) =>
    queryOptions({ queryKey: roundQueries.all(projectId), queryFn: () => apiGet<RoundListItem[]>(`/api/projects/${projectId}/rounds`) }),
  detail: (projectId: string, roundId: string) =>
    queryOptions({
      queryKey: [...roundQueries.all(projectId), roundId],
      queryFn: () => apiGet<RoundDetail>(`/api/projects/${projectId}/rounds/${roundId}`),
    }),
  /** Cutters in store, to pick the one fitted in a change (kept for offline use, so no stale refetch storm). */
  inStore: (projectId: string) =>
    queryOptions({
      queryKey: ['projects', projectId, 'cutters', 'in_store'],
      queryFn: () => apiGet<StoreCutter[]>(`/api/projects/${projectId}/cutters?status=in_store`),
      gcTime: Infinity,
    }),
};

export const startRound = (projectId: string, input: StartRoundInput) => api<Round>('POST', `/api/projects/${projectId}/rounds`, input);
export const closeRound = (projectId: string, roundId: string) => api<Round>('POST', `/api/projects/${projectId}/rounds/${roundId}/close`);
export const photoUrl = (projectId: string, photoId: string) => `/api/projects/${projectId}/photos/${photoId}`;
