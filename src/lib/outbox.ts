/**
 * The one outbox of the app (decision 42). Every round started offline, position entry, photo and
 * round close is written to IndexedDB before it is sent, so a dropped connection, a closed tab, a
 * reload or a cold start loses nothing. One sender per page, started with the app (not by a
 * screen), works through the queue in order — at start, on reconnect, every 10 s while items wait,
 * and when Background Sync fires (with no Kerfwise window visible the service worker sends the
 * same queue itself, src/sw.ts); the server stores each key once, so sending again is
 * always safe. Each item belongs to the user who made it and is sent only while that user is
 * signed in (a 401 keeps it waiting on the device).
 */
import type { QueryClient } from '@tanstack/react-query';
import { useEffect, useRef, useSyncExternalStore } from 'react';
import type { EntryInput, StartRoundInput } from '../../shared/schemas/inspection';
import {
  byQueueOrder,
  drainQueue,
  idbStorage,
  OUTBOX_SYNC_TAG,
  sendItem,
  type QueuedEntry,
  type QueuedItem,
  type QueuedRound,
} from './outbox-core';
export {
  drainQueue,
  outcomeOf,
  type QueuedBase,
  type QueuedClose,
  type QueuedEntry,
  type QueuedItem,
  type QueuedPhoto,
  type QueuedRound,
  type QueueStorage,
  type SendError,
  type SendOutcome,
} from './outbox-core';

export interface OutboxSnapshot {
  items: QueuedItem[];
  sending: boolean;
  /** Why items still wait, when the server said so (503: its database is unreachable; 401: sign in again). */
  waitingReason?: string;
  /** Entries of this fitter that a later-recorded entry for the same position overtook (decision 42). */
  overtaken: QueuedEntry[];
}

/** Told about each item the server stored, with its answer, so screens can show it at once. */
export type StoredListener = (item: QueuedItem, answer: unknown) => void;

let snapshot: OutboxSnapshot = { items: [], sending: false, overtaken: [] };
/** The signed-in user, as the app last knew it (null: nobody, or not known yet). */
let currentUser: () => string | null = () => null;
const listeners = new Set<() => void>();
const storedListeners = new Set<StoredListener>();

function publish(patch: Partial<OutboxSnapshot>) {
  snapshot = { ...snapshot, ...patch };
  listeners.forEach((l) => l());
}

async function reload() {
  publish({ items: (await idbStorage.list()).sort(byQueueOrder) });
}

let running: Promise<void> | null = null;
let again = false;

/** Sends what is queued; resolves when the queue has been worked through (including items added meanwhile). */
export function flushOutbox(): Promise<void> {
  if (running) {
    again = true;
    return running;
  }
  running = (async () => {
    publish({ sending: true });
    try {
      do {
        again = false;
        let waitingReason: string | undefined;
        const user = currentUser();
        if (user)
          await drainQueue(
            idbStorage,
            async (item) => {
              const result = await sendItem(item);
              if ('error' in result) {
                if (result.error.status === 503 || result.error.status === 401) waitingReason = result.error.message;
                return result.error;
              }
              if (item.kind === 'entry' && (result.data as { overtaken?: boolean } | null)?.overtaken)
                publish({ overtaken: [...snapshot.overtaken, item] });
              storedListeners.forEach((l) => l(item, result.data));
              return null;
            },
            user,
          );
        publish({ waitingReason });
        await reload();
      } while (again);
    } finally {
      running = null;
      publish({ sending: false });
    }
  })();
  return running;
}

let seqTieBreak = 0;
const nextSeq = () => Date.now() * 1000 + (seqTieBreak = (seqTieBreak + 1) % 1000);

/** Asks the browser to wake the app when the network is back (Background Sync, where it exists). */
function requestBackgroundSync() {
  if (!('serviceWorker' in navigator)) return;
  void navigator.serviceWorker.ready
    .then((reg) => (reg as ServiceWorkerRegistration & { sync?: { register(tag: string): Promise<void> } }).sync?.register(OUTBOX_SYNC_TAG))
    .catch(() => undefined);
}

/** The fitter acknowledged the overtaken entries shown to them. */
export function dismissOvertaken() {
  publish({ overtaken: [] });
}

/** Queues a round started on the device (its id made here), then starts sending. */
export async function queueRound(projectId: string, body: StartRoundInput): Promise<QueuedRound> {
  const id = body.id ?? crypto.randomUUID();
  const item: QueuedRound = {
    kind: 'round',
    key: id,
    seq: nextSeq(),
    projectId,
    roundId: id,
    positionId: '',
    userId: currentUser() ?? undefined,
    body: { ...body, id },
    state: 'pending',
  };
  await idbStorage.put(item);
  await reload();
  requestBackgroundSync();
  void flushOutbox();
  return item;
}

/** Queues closing a round (sent after every entry and photo queued before it). */
export async function queueClose(projectId: string, roundId: string): Promise<void> {
  await idbStorage.put({
    kind: 'close',
    key: crypto.randomUUID(),
    seq: nextSeq(),
    projectId,
    roundId,
    positionId: '',
    userId: currentUser() ?? undefined,
    state: 'pending',
  });
  await reload();
  requestBackgroundSync();
  await flushOutbox();
}

/** Queues a position entry (and its photos) in IndexedDB, then starts sending. Resolves once sending has been tried. */
export async function queueEntry(
  where: { projectId: string; roundId: string; positionId: string },
  body: EntryInput,
  photos: File[],
  /** An entry the server refused, fixed by the fitter: replaced under the same clientKey (the server never stored it). */
  replacing?: QueuedEntry,
): Promise<QueuedEntry> {
  const entry: QueuedEntry = replacing
    ? { ...replacing, body: { ...body, clientKey: replacing.key }, state: 'pending', error: undefined }
    : {
        kind: 'entry',
        key: body.clientKey,
        seq: nextSeq(),
        ...where,
        userId: currentUser() ?? undefined,
        body: { ...body, recordedAt: body.recordedAt ?? new Date().toISOString() },
        state: 'pending',
      };
  await idbStorage.put(entry);
  for (const photo of photos) {
    await idbStorage.put({
      kind: 'photo',
      key: crypto.randomUUID(),
      seq: nextSeq(),
      ...where,
      userId: entry.userId,
      entryClientKey: entry.key,
      blob: photo,
      fileName: photo.name || 'photo',
      state: 'pending',
    });
  }
  await reload();
  requestBackgroundSync();
  await flushOutbox();
  return entry;
}

/** Puts a refused item back in line unchanged (after the fitter fixed the cause elsewhere, e.g. signed in again). */
export async function retryItem(item: QueuedItem) {
  await idbStorage.put({ ...item, state: 'pending', error: undefined });
  await reload();
  await flushOutbox();
}

/** Removes an item on the fitter's explicit word; an entry takes its waiting photos with it, a round everything queued in it. */
export async function discardItem(item: QueuedItem) {
  const dependants = snapshot.items.filter(
    (i) =>
      i.key !== item.key &&
      ((item.kind === 'entry' && i.kind === 'photo' && i.entryClientKey === item.key) || (item.kind === 'round' && i.roundId === item.key)),
  );
  for (const i of [item, ...dependants]) await idbStorage.remove(i.key);
  await reload();
}

const RETRY_EVERY_MS = 10_000;
let started = false;

/**
 * Starts the app's one sender (from src/main.tsx, before any screen): loads the queue and sends at
 * start, on `online`, when the signed-in user changes (a sign-in after a session ended), when the
 * service worker relays Background Sync, and every 10 s while items wait. Whatever is stored
 * refreshes the cached rounds, whichever screen is open.
 */
export function startOutbox(queryClient: QueryClient) {
  if (started) return;
  started = true;
  const meKey = ['auth', 'me'];
  currentUser = () => queryClient.getQueryData<{ user: { id: string } } | null>(meKey)?.user.id ?? null;
  let lastUser = currentUser();
  queryClient.getQueryCache().subscribe((event) => {
    if (event.type !== 'updated' || event.query.queryKey[0] !== 'auth' || event.query.queryKey[1] !== 'me') return;
    const user = currentUser();
    if (user && user !== lastUser) void flushOutbox();
    lastUser = user;
  });
  storedListeners.add((item) => {
    void queryClient.invalidateQueries({ queryKey: ['projects', item.projectId, 'rounds'] });
  });
  void reload().then(flushOutbox);
  window.addEventListener('online', () => void flushOutbox());
  navigator.serviceWorker?.addEventListener('message', (event) => {
    if ((event.data as { type?: string } | null)?.type === 'FLUSH_OUTBOX') void flushOutbox();
  });
  window.setInterval(() => {
    if (snapshot.items.some((i) => i.state === 'pending')) void flushOutbox();
  }, RETRY_EVERY_MS);
}

/** The queued item with this clientKey, as last read from IndexedDB. */
export const getOutboxItem = (key: string) => snapshot.items.find((i) => i.key === key);

const subscribe = (listener: () => void) => {
  listeners.add(listener);
  return () => listeners.delete(listener);
};

/** The outbox as React sees it (the sender is started once by the app, see `startOutbox`). */
export function useOutbox(onStored?: StoredListener): OutboxSnapshot {
  const latest = useRef(onStored);
  useEffect(() => {
    latest.current = onStored;
  });
  useEffect(() => {
    const listener: StoredListener = (item, answer) => latest.current?.(item, answer);
    storedListeners.add(listener);
    return () => void storedListeners.delete(listener);
  }, []);
  return useSyncExternalStore(subscribe, () => snapshot);
}
