/**
 * Kerfwise's service worker (decision 42): the app opens with no network. It precaches the app
 * shell, every route chunk, the styles and the fonts (the list is injected at build time), answers
 * every page address with the cached shell, and wakes the page's outbox through Background Sync.
 * It never caches API answers: the data a round needs lives in the persisted query cache.
 */
/// <reference lib="webworker" />
import { clientsClaim } from 'workbox-core';
import { cleanupOutdatedCaches, createHandlerBoundToURL, precacheAndRoute } from 'workbox-precaching';
import { NavigationRoute, registerRoute } from 'workbox-routing';

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

/** The tag the page registers when items wait in its outbox. */
const OUTBOX_SYNC_TAG = 'kerfwise-outbox';

interface SyncEvent extends ExtendableEvent {
  tag: string;
}

// Background Sync (where the browser has it): the network is back while the app is in the
// background. The outbox and its sender live in the page (IndexedDB + the signed-in session), so
// the worker tells every open Kerfwise window to send; with none open, the next start sends.
self.addEventListener('sync' as keyof ServiceWorkerGlobalScopeEventMap, (event) => {
  const sync = event as unknown as SyncEvent;
  if (sync.tag !== OUTBOX_SYNC_TAG) return;
  sync.waitUntil(
    self.clients.matchAll({ type: 'window', includeUncontrolled: true }).then((windows) => {
      for (const w of windows) w.postMessage({ type: 'FLUSH_OUTBOX' });
    }),
  );
});
