/**
 * Kerfwise's service worker (decision 42): the app opens with no network. It precaches the app
 * shell, every route chunk, the styles and the fonts (the list is injected at build time), answers
 * every page address with the cached shell, and sends the app's outbox when Background Sync fires.
 * It never caches API answers: the data a round needs lives in the persisted query cache.
 */
/// <reference lib="webworker" />
import { clientsClaim } from 'workbox-core';
import { cleanupOutdatedCaches, createHandlerBoundToURL, precacheAndRoute } from 'workbox-precaching';
import { NavigationRoute, registerRoute } from 'workbox-routing';
import { drainQueue, idbStorage, OUTBOX_SYNC_TAG, outcomeOf, sendItem } from './lib/outbox-core';

declare const self: ServiceWorkerGlobalScope & { __WB_MANIFEST: (string | { url: string; revision: string | null })[] };

precacheAndRoute(self.__WB_MANIFEST);
// Once active, it serves the open pages too (the first install would otherwise wait for a reload).
clientsClaim();
cleanupOutdatedCaches();
registerRoute(new NavigationRoute(createHandlerBoundToURL('index.html'), { denylist: [/^\/api\//] }));

// A new version waits until the page says so ("Reload to update"), never in the middle of a round.
self.addEventListener('message', (event) => {
  if (event.data?.type === 'SKIP_WAITING') void self.skipWaiting();
});

interface SyncEvent extends ExtendableEvent {
  tag: string;
}

/** The signed-in user as the server knows them (the session cookie); null when nobody is. Throws with no network. */
async function signedInUser(): Promise<string | null> {
  const res = await fetch('/api/auth/me', { credentials: 'same-origin' });
  if (!res.ok) return null;
  const me = (await res.json().catch(() => null)) as { user?: { id?: string } } | null;
  return me?.user?.id ?? null;
}

/**
 * Sends the outbox from the worker, in order and as the page would (src/lib/outbox-core.ts), only
 * the items of the user signed in now. Throws while something could not be sent for want of a
 * network or server, so the browser fires the sync again later.
 */
async function drainFromWorker(): Promise<void> {
  const user = await signedInUser();
  if (!user) return; // nobody signed in (or the session ended): the items wait for that user's next sign-in
  let retryLater = false;
  await drainQueue(
    idbStorage,
    async (item) => {
      const result = await sendItem(item);
      if (!('error' in result)) return null;
      if (outcomeOf(result.error.status) === 'retry') retryLater = true;
      return result.error;
    },
    user,
  );
  if (retryLater) throw new Error('Kerfwise outbox: items still wait for the server.');
}

// Background Sync (where the browser has it): the network is back while the app is in the
// background or closed. A visible Kerfwise window sends itself (it shows the result at once);
// otherwise the worker sends the IndexedDB outbox itself, then tells any open window to look again.
self.addEventListener('sync' as keyof ServiceWorkerGlobalScopeEventMap, (event) => {
  const sync = event as unknown as SyncEvent;
  if (sync.tag !== OUTBOX_SYNC_TAG) return;
  sync.waitUntil(
    (async () => {
      const windows = await self.clients.matchAll({ type: 'window', includeUncontrolled: true });
      if (!windows.some((w) => w.visibilityState === 'visible')) await drainFromWorker();
      for (const w of windows) w.postMessage({ type: 'FLUSH_OUTBOX' });
    })(),
  );
});
