/**
 * The query cache kept on the device (decision 42): what the screens last read from the server —
 * the drive, the layout, cutters and serials, rounds with their last wear, crews — is written to
 * IndexedDB and restored before the first screen renders, so the app opens with no network and
 * shows the data as last synced. Dropped for a new build, at sign-out (the AppShell clears the
 * cache, which is then saved empty) and when another user signs in on the device.
 */
import { createAsyncStoragePersister } from '@tanstack/query-async-storage-persister';
import { persistQueryClientRestore, persistQueryClientSubscribe } from '@tanstack/react-query-persist-client';
import type { Query, QueryClient } from '@tanstack/react-query';
import { createStore, del, get, set } from 'idb-keyval';

declare const __KERFWISE_BUILD__: string;

/** How long data last synced stays usable offline: a drive's stop can last a week. */
export const PERSIST_MAX_AGE_MS = 7 * 24 * 60 * 60 * 1000;
const KEY = 'kerfwise-query-cache';

const store = () => createStore('kerfwise-cache', 'queries');
const persister = createAsyncStoragePersister({
  key: KEY,
  storage: {
    getItem: (key) => get<string>(key, store()),
    setItem: (key, value: string) => set(key, value, store()),
    removeItem: (key) => del(key, store()),
  },
  throttleTime: 500,
});

const meKey = JSON.stringify(['auth', 'me']);

/** Whose data the cache holds; when someone else signs in, everything but the sign-in answers goes. */
function keepToOneUser(queryClient: QueryClient) {
  let owner: string | null = null;
  const userOf = () => (queryClient.getQueryData<{ user: { id: string } } | null>(['auth', 'me']) ?? null)?.user.id ?? null;
  owner = userOf();
  queryClient.getQueryCache().subscribe((event) => {
    if (event.type !== 'updated' || JSON.stringify(event.query.queryKey) !== meKey) return;
    const now = userOf();
    if (!now) return;
    if (owner && now !== owner) queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== 'auth' });
    owner = now;
  });
}

/**
 * Forgets the cache kept on the device now (at sign-out, after the query cache is cleared). The
 * cleared cache would also be saved, but only up to half a second later: a reload or a closed tab
 * in between brought the signed-out person's screens back from the device.
 */
export async function forgetPersistedCache(): Promise<void> {
  try {
    await persister.removeClient();
  } catch {
    // A broken store holds nothing to forget.
  }
}

/** Restores the cache kept on the device (never throws: a broken store only means an empty cache), then keeps it saved. */
export async function restoreAndPersist(queryClient: QueryClient): Promise<void> {
  const options = {
    queryClient,
    persister,
    maxAge: PERSIST_MAX_AGE_MS,
    buster: __KERFWISE_BUILD__,
    dehydrateOptions: {
      // Every answer the device holds, including one whose refetch failed with no network (its last synced
      // data must survive the next cold start); "nobody signed in" is never kept (the next start asks the server).
      shouldDehydrateQuery: (q: Query) => q.state.data !== undefined && !(JSON.stringify(q.queryKey) === meKey && q.state.data == null),
    },
  };
  await Promise.race([persistQueryClientRestore(options), new Promise((r) => setTimeout(r, 3000))]).catch(() => undefined);
  keepToOneUser(queryClient);
  persistQueryClientSubscribe(options);
}
