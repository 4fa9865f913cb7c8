import { queryOptions } from '@tanstack/react-query';
import type { DiscCondition } from '../../../shared/cutters';
import type { StartRoundInput } from '../../../shared/schemas/inspection';
import { api, apiGet } from '../../lib/api-client';

export interface Round {
  id: string;
  projectId: string;
  startedAt: string;
  chainageM: number;
  ringNumber: number | null;
  crew: string;
  notes: string;
  closedAt: string | null;
}

export interface RoundListItem extends Round {
  entryCount: number;
  changeCount: number;
}

/** A cutterhead position as the round screen gets it: the serial on it now and its last wear. */
export interface RoundPosition {
  id: string;
  number: number;
  trackRadiusMm: number;
  positionClass: 'centre' | 'face' | 'gauge';
  discSizeIn: number;
  tiltDeg: number | null;
  wearLimitMm: number;
  twinDisc: boolean;
  current: { fittingId: string; cutterId: string; serial: string; fittedAt: string; fittedChainageM: number } | null;
  lastWearMm: number | null;
  lastMeasuredAt: string | null;
  lastConditions: DiscCondition[];
}

/** What the server stored for one position in this round, with the flags the fitter sees. */
export interface RoundEntry {
  id: string;
  positionId: string;
  clientKey: string;
  wearMm: number | null;
  conditions: DiscCondition[];
  action: 'none' | 'changed';
  removedCutterId: string | null;
  fittedCutterId: string | null;
  changeReason: string | null;
  note: string;
  remeasured: boolean;
  recordedAt: string;
  overLimit: boolean;
  needsChange: boolean;
  photoIds: string[];
}

export interface RoundDetail {
  round: Round;
  positions: RoundPosition[];
  entries: RoundEntry[];
  /** Position ids in the order they were recorded in the previous round. */
  lastRoundOrder: string[];
}

export interface StoreCutter {
  id: string;
  serial: string;
  discSizeIn: number;
  rebuildCount: number;
}

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
