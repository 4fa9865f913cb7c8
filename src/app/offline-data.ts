/**
 * What a round needs, kept on the device (decision 42): while online and signed in, for every drive
 * where the user records rounds, the drive, its layout (positions, serials on them, last wear),
 * every position's recent history, the rounds with the open ones and the newest one in detail, the
 * cutters in store and the crews are read into the query cache, which is persisted to IndexedDB.
 * So the cutterhead picture and any position's history open offline although the fitter never
 * opened them online. Read at start, when the signed-in user changes, on `online`, and every five
 * minutes. Photos are not kept (they stay on the server).
 */
import type { FetchQueryOptions, QueryClient } from '@tanstack/react-query';
import { roleCan } from '../../shared/roles';
import { authQueries } from '../features/auth/api';
import { layoutQueries } from '../features/layout/api';
import { projectQueries } from '../features/projects/api';
import { roundQueries } from '../features/rounds/api';
import { stopQueries } from '../features/stops/api';

/** How often the data is read again while the app is open and online. */
export const OFFLINE_REFRESH_MS = 5 * 60_000;

/** A position's id (its detail query's last key); the layout's other keys are words ('history', 'remaining'). */
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

let running: Promise<void> | null = null;

/** Reads what a round needs for every drive where the signed-in user records rounds (never throws). */
export function refreshOfflineData(queryClient: QueryClient): Promise<void> {
  if (running) return running;
  // Cleared when the read settles — not inside it: a read that ends before its first await would
  // clear the slot before it is filled and leave every later read waiting on a finished one.
  running = readRoundData(queryClient).finally(() => {
    running = null;
  });
  return running;
}

async function readRoundData(queryClient: QueryClient): Promise<void> {
  try {
    if (!navigator.onLine) return;
    const me = queryClient.getQueryData(authQueries.me().queryKey);
    if (!me) return;
    const projects = await queryClient.fetchQuery(projectQueries.list());
    for (const project of projects.filter((p) => roleCan(p.role, 'rounds.record'))) {
      const id = project.id;
      const prefetch = (q: { queryKey: readonly unknown[] }) => queryClient.prefetchQuery(q as FetchQueryOptions);
      await Promise.all([
        prefetch(projectQueries.detail(id)),
        prefetch(layoutQueries.list(id)),
        prefetch(layoutQueries.history(id)),
        prefetch(roundQueries.inStore(id)),
        prefetch(stopQueries.crews(id)),
        // Positions opened on this device before keep their whole history, read again too (the rest start from `history`).
        ...queryClient
          .getQueryCache()
          .findAll({ queryKey: layoutQueries.all(id) })
          .map((q) => q.queryKey[3])
          .filter((positionId): positionId is string => typeof positionId === 'string' && UUID.test(positionId))
          .map((positionId) => prefetch(layoutQueries.detail(id, positionId))),
        queryClient
          .fetchQuery(roundQueries.list(id))
          .then((rounds) =>
            Promise.all(
              // The open rounds, and the newest one (a round started offline takes its positions and last wear).
              rounds.filter((r, i) => r.closedAt == null || i === 0).map((r) => prefetch(roundQueries.detail(id, r.id))),
            ),
          )
          .catch(() => undefined), // this drive's rounds stay as last synced; the other drives go on
      ]);
    }
  } catch {
    // No network or the server refused: what the device holds stays as last synced; the next turn tries again.
  }
}

let started = false;

/** Starts keeping the data on the device (from src/main.tsx, once). */
export function keepRoundDataOnDevice(queryClient: QueryClient) {
  if (started) return;
  started = true;
  const meKey = JSON.stringify(authQueries.me().queryKey);
  let lastUser: string | null = null;
  const userNow = () => queryClient.getQueryData(authQueries.me().queryKey)?.user.id ?? null;
  queryClient.getQueryCache().subscribe((event) => {
    if (event.type !== 'updated' || JSON.stringify(event.query.queryKey) !== meKey) return;
    const user = userNow();
    if (user && user !== lastUser) void refreshOfflineData(queryClient);
    lastUser = user;
  });
  lastUser = userNow();
  void refreshOfflineData(queryClient);
  window.addEventListener('online', () => void refreshOfflineData(queryClient));
  window.setInterval(() => void refreshOfflineData(queryClient), OFFLINE_REFRESH_MS);
}
