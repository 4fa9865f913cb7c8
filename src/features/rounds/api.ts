import { queryOptions, useMutation } from '@tanstack/react-query';
import type { EntryInput, StartRoundInput } from '../../../shared/schemas/inspection';
import { api, ApiError, apiGet } from '../../lib/api-client';
import { getOutboxItem, queueEntry, type QueuedEntry } from '../../lib/outbox';
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

/** How long saving a position waits for the server's answer before the outbox carries on alone. */
const ANSWER_WAIT_MS = 4000;

export interface RecordEntryVariables {
  positionId: string;
  body: EntryInput;
  photos: File[];
  /** The refused entry being fixed: replaced under its own key (the server never stored it). */
  replacing?: QueuedEntry;
}

/**
 * Saves one position of a round through the app's outbox (decision 42): the entry and its photos are
 * kept on the device first, then sent. Resolves with `waiting: true` when no answer came within a
 * moment (offline, slow network: the outbox sends it later); rejects with the server's ApiError
 * when it refused the entry (the entry stays queued for the fitter to fix or discard), or with the
 * device's error when it could not keep the entry at all. The round's data is refreshed by the
 * outbox when the entry is stored, which may be long after this returns (`startOutbox`, round.tsx).
 */
export function useRecordEntry(projectId: string, roundId: string) {
  return useMutation({
    // The outbox is for no network: the save must run offline too (TanStack pauses mutations offline by default).
    networkMode: 'always',
    mutationFn: async ({ positionId, body, photos, replacing }: RecordEntryVariables) => {
      await Promise.race([
        queueEntry({ projectId, roundId, positionId }, body, photos, replacing),
        new Promise((r) => setTimeout(r, ANSWER_WAIT_MS)),
      ]);
      const item = getOutboxItem(body.clientKey);
      if (item?.state === 'attention' && item.error) throw new ApiError(item.error.status, item.error.message, item.error.issues);
      return { waiting: item !== undefined };
    },
  });
}
