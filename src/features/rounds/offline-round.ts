/**
 * A round started or closed with no network (decision 42): the round goes to the app's outbox with
 * an id made on the device, and the cached rounds are updated at once from what the device had last
 * synced, so the fitter records positions straight away. The server creates the round with that id
 * — and the time and chainage the fitter gave — when the network returns.
 */
import type { QueryClient } from '@tanstack/react-query';
import type { StartRoundInput } from '../../../shared/schemas/inspection';
import { queueClose, queueRound } from '../../lib/outbox';
import { roundQueries, type RoundDetail, type RoundListItem } from './api';

/** The newest round detail cached on the device, its positions carrying that round's wear as their last wear. */
export function lastSyncedPositions(queryClient: QueryClient, projectId: string): Pick<RoundDetail, 'positions' | 'lastRoundOrder'> | null {
  const details = queryClient
    .getQueriesData<RoundDetail>({ queryKey: roundQueries.all(projectId) })
    .map(([, d]) => d)
    .filter((d): d is RoundDetail => !!d && !Array.isArray(d) && 'positions' in d && d.positions.length > 0)
    .sort((a, b) => Date.parse(b.round.startedAt) - Date.parse(a.round.startedAt));
  const newest = details[0];
  if (!newest) return null;
  const byPosition = new Map(newest.entries.map((e) => [e.positionId, e]));
  return {
    positions: newest.positions.map((p) => {
      const e = byPosition.get(p.id);
      return e && e.wearMm != null
        ? { ...p, lastWearMm: e.wearMm, lastMeasuredAt: newest.round.startedAt, lastConditions: e.conditions }
        : p;
    }),
    lastRoundOrder: [...newest.entries].sort((a, b) => Date.parse(a.recordedAt) - Date.parse(b.recordedAt)).map((e) => e.positionId),
  };
}

/** Queues the round and puts it in the cached list and detail; null when the device has no positions for the drive. */
export async function startRoundOnDevice(queryClient: QueryClient, projectId: string, input: StartRoundInput): Promise<string | null> {
  const layout = lastSyncedPositions(queryClient, projectId);
  if (!layout) return null;
  const id = input.id ?? crypto.randomUUID();
  const item = await queueRound(projectId, { ...input, id });
  const round = {
    id,
    projectId,
    startedAt: item.body.startedAt,
    chainageM: item.body.chainageM,
    ringNumber: item.body.ringNumber,
    crew: item.body.crew,
    notes: item.body.notes,
    closedAt: null,
  };
  queryClient.setQueryData<RoundDetail>(roundQueries.detail(projectId, id).queryKey, { round, entries: [], ...layout });
  queryClient.setQueryData<RoundListItem[]>(roundQueries.list(projectId).queryKey, (old) => [
    { ...round, entryCount: 0, changeCount: 0 },
    ...(old ?? []),
  ]);
  return id;
}

/** Queues closing the round (sent after everything recorded in it) and shows it closed at once. */
export async function closeRoundOnDevice(queryClient: QueryClient, projectId: string, roundId: string) {
  const closedAt = new Date().toISOString();
  queryClient.setQueryData<RoundDetail>(
    roundQueries.detail(projectId, roundId).queryKey,
    (old) => old && { ...old, round: { ...old.round, closedAt } },
  );
  await queueClose(projectId, roundId);
}
