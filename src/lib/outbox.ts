/**
 * The one outbox of the app (decision 42). Every round started offline, position entry, photo and
 * round close is written to IndexedDB before it is sent, so a dropped connection, a closed tab, a
 * reload or a cold start loses nothing. One sender per page, started with the app (not by a
 * screen), works through the queue in order — at start, on reconnect, every 10 s while items wait,
 * and when Background Sync wakes the page; the server stores each key once, so sending again is
 * always safe. Each item belongs to the user who made it and is sent only while that user is
 * signed in (a 401 keeps it waiting on the device).
 */
import type { QueryClient } from '@tanstack/react-query';
import { createStore, del, entries, set, type UseStore } from 'idb-keyval';
import { useEffect, useRef, useSyncExternalStore } from 'react';
import type { EntryInput, StartRoundInput } from '../../shared/schemas/inspection';
import { DATABASE_DOWN_MESSAGE } from './api-client';

export interface SendError {
  status: number;
  message: string;
  issues: { path: string; message: string }[];
}

interface QueuedBase {
  /** The clientKey: the server's idempotency key and the IndexedDB key. */
  key: string;
  /** Order of sending (time queued, with a tie-breaker). */
  seq: number;
  projectId: string;
  roundId: string;
  /** Empty for items of the whole round (start, close). */
  positionId: string;
  /** Who made it: sent only while this user is signed in, never as someone else. */
  userId?: string;
  /** `attention`: the server refused it; it waits for the fitter to fix and resend (or discard). */
  state: 'pending' | 'attention';
  error?: SendError;
}
export interface QueuedEntry extends QueuedBase {
  kind: 'entry';
  body: EntryInput;
}
export interface QueuedPhoto extends QueuedBase {
  kind: 'photo';
  entryClientKey: string;
  blob: Blob;
  fileName: string;
}
/** A round started with no network: its key is the round's id, made on the device. */
export interface QueuedRound extends QueuedBase {
  kind: 'round';
  body: StartRoundInput & { id: string };
}
export interface QueuedClose extends QueuedBase {
  kind: 'close';
}
export type QueuedItem = QueuedEntry | QueuedPhoto | QueuedRound | QueuedClose;

/** The items that must be stored before this one: a photo's entry; a round started offline for its entries and close. */
const dependsOn = (item: QueuedItem): string[] =>
  item.kind === 'photo' ? [item.entryClientKey, item.roundId] : item.kind === 'round' ? [] : [item.roundId];

/** What became of one send: stored (2xx, a replay included), try later, or refused. */
export type SendOutcome = 'done' | 'retry' | 'attention';

/**
 * Status 0 = no answer at all (offline, timeout). 408 and 429 mean "later"; 401 (the session ended)
 * means "after the same user signs in again"; other 4xx are the fitter's to fix.
 */
export function outcomeOf(status: number): SendOutcome {
  if (status >= 200 && status < 300) return 'done';
  if (status >= 400 && status < 500 && status !== 401 && status !== 408 && status !== 429) return 'attention';
  return 'retry';
}

export interface QueueStorage {
  list(): Promise<QueuedItem[]>;
  put(item: QueuedItem): Promise<void>;
  remove(key: string): Promise<void>;
}

const byQueueOrder = (a: QueuedItem, b: QueuedItem) => a.seq - b.seq || a.key.localeCompare(b.key);

/**
 * One pass over the queue, in order. A photo waits until its entry has been stored. The pass stops
 * at the first item that got no usable answer, so nothing overtakes it; refused items are kept
 * with the server's message. Returns how many items were stored.
 */
export async function drainQueue(
  storage: QueueStorage,
  send: (item: QueuedItem) => Promise<SendError | null>,
  /** Only this user's items are sent (the browser always names the signed-in user; unit tests may leave it out). */
  asUser?: string,
): Promise<number> {
  const items = (await storage.list()).sort(byQueueOrder);
  const unsentEntries = new Set(items.map((i) => i.key));
  let stored = 0;
  for (const item of items) {
    if (item.state !== 'pending') continue;
    if (asUser !== undefined && item.userId !== asUser) continue;
    if (dependsOn(item).some((k) => unsentEntries.has(k))) continue;
    const error = await send(item);
    const outcome = error ? outcomeOf(error.status) : 'done';
    if (outcome === 'retry') break;
    if (outcome === 'done') {
      await storage.remove(item.key);
      unsentEntries.delete(item.key);
      stored++;
    } else if ((await storage.list()).some((i) => i.key === item.key)) {
      // Only while it is still queued: another tab may have had it stored and removed meanwhile,
      // and a stored entry must never come back as refused.
      await storage.put({ ...item, state: 'attention', error: error! });
    }
  }
  return stored;
}

// ---- The browser side: IndexedDB, fetch, and the sender loop. ----

let idbStore: UseStore | undefined;
// Opened on first use: the module is also loaded where there is no IndexedDB (unit tests).
const idb = () => (idbStore ??= createStore('kerfwise-outbox', 'queue'));

const idbStorage: QueueStorage = {
  list: async () => (await entries<string, QueuedItem>(idb())).map(([, v]) => v),
  put: (item) => set(item.key, item, idb()),
  remove: (key) => del(key, idb()),
};

const SEND_TIMEOUT_MS = 20_000;

/** Sends one item: the server's answer on 2xx, else the error. Never throws. */
async function sendItem(item: QueuedItem): Promise<{ data: unknown } | { error: SendError }> {
  const rounds = `/api/projects/${item.projectId}/rounds`;
  const url = {
    entry: `${rounds}/${item.roundId}/entries`,
    photo: `/api/projects/${item.projectId}/photos`,
    round: rounds,
    close: `${rounds}/${item.roundId}/close`,
  }[item.kind];
  let body: BodyInit | undefined;
  const headers: Record<string, string> = {};
  if (item.kind === 'entry' || item.kind === 'round') {
    body = JSON.stringify(item.body);
    headers['Content-Type'] = 'application/json';
  } else if (item.kind === 'photo') {
    const form = new FormData();
    form.append('entryClientKey', item.entryClientKey);
    form.append('clientKey', item.key);
    form.append('photo', item.blob, item.fileName);
    body = form;
  }
  let res: Response;
  try {
    res = await fetch(url, { method: 'POST', credentials: 'same-origin', headers, body, signal: AbortSignal.timeout(SEND_TIMEOUT_MS) });
  } catch {
    return { error: { status: 0, message: 'No connection to the Kerfwise server.', issues: [] } };
  }
  const data = await res.json().catch(() => null);
  if (res.ok) return { data };
  // Closed already (by this tablet before a reload, or another one): nothing left to do.
  if (item.kind === 'close' && res.status === 409) return { data };
  if (res.status === 401)
    return {
      error: { status: 401, message: 'Your session has ended. Sign in again; what waits on this device is sent then.', issues: [] },
    };
  // 503: the server is up but its database is not; the item stays queued and is sent again.
  if (res.status === 503) return { error: { status: 503, message: `${DATABASE_DOWN_MESSAGE} They are sent when it is back.`, issues: [] } };
  return {
    error: { status: res.status, message: data?.error?.message ?? `The server answered ${res.status}.`, issues: data?.error?.issues ?? [] },
  };
}

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
    .then((reg) =>
      (reg as ServiceWorkerRegistration & { sync?: { register(tag: string): Promise<void> } }).sync?.register('kerfwise-outbox'),
    )
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
