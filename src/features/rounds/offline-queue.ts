/**
 * The outbox of the round screen. Every position entry and photo is written to IndexedDB before it
 * is sent, so a dropped connection, a closed tab or a reload loses nothing. A sender works through
 * the queue in order; the server stores each clientKey once, so sending again is always safe.
 */
import { createStore, del, entries, set, type UseStore } from 'idb-keyval';
import { useEffect, useRef, useSyncExternalStore } from 'react';
import type { EntryInput } from '../../../shared/schemas/inspection';
import { DATABASE_DOWN_MESSAGE } from '../../lib/api-client';

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
  positionId: string;
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
export type QueuedItem = QueuedEntry | QueuedPhoto;

/** What became of one send: stored (2xx, a replay included), try later, or refused. */
export type SendOutcome = 'done' | 'retry' | 'attention';

/** Status 0 = no answer at all (offline, timeout). 408 and 429 mean "later"; other 4xx are the fitter's to fix. */
export function outcomeOf(status: number): SendOutcome {
  if (status >= 200 && status < 300) return 'done';
  if (status >= 400 && status < 500 && status !== 408 && status !== 429) return 'attention';
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
export async function drainQueue(storage: QueueStorage, send: (item: QueuedItem) => Promise<SendError | null>): Promise<number> {
  const items = (await storage.list()).sort(byQueueOrder);
  const unsentEntries = new Set(items.filter((i) => i.kind === 'entry').map((i) => i.key));
  let stored = 0;
  for (const item of items) {
    if (item.state !== 'pending') continue;
    if (item.kind === 'photo' && unsentEntries.has(item.entryClientKey)) continue;
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
  const url =
    item.kind === 'entry' ? `/api/projects/${item.projectId}/rounds/${item.roundId}/entries` : `/api/projects/${item.projectId}/photos`;
  let body: BodyInit;
  const headers: Record<string, string> = {};
  if (item.kind === 'entry') {
    body = JSON.stringify(item.body);
    headers['Content-Type'] = 'application/json';
  } else {
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
  // 503: the server is up but its database is not; the item stays queued and is sent again.
  if (res.status === 503) return { error: { status: 503, message: `${DATABASE_DOWN_MESSAGE} They are sent when it is back.`, issues: [] } };
  return {
    error: { status: res.status, message: data?.error?.message ?? `The server answered ${res.status}.`, issues: data?.error?.issues ?? [] },
  };
}

export interface OutboxSnapshot {
  items: QueuedItem[];
  sending: boolean;
  /** Why items still wait, when the server said so (503: its database is unreachable). */
  waitingReason?: string;
}

/** Told about each item the server stored, with its answer, so screens can show it at once. */
export type StoredListener = (item: QueuedItem, answer: unknown) => void;

let snapshot: OutboxSnapshot = { items: [], sending: false };
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
        await drainQueue(idbStorage, async (item) => {
          const result = await sendItem(item);
          if ('error' in result) {
            if (result.error.status === 503) waitingReason = result.error.message;
            return result.error;
          }
          storedListeners.forEach((l) => l(item, result.data));
          return null;
        });
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
    : { kind: 'entry', key: body.clientKey, seq: nextSeq(), ...where, body, state: 'pending' };
  await idbStorage.put(entry);
  for (const photo of photos) {
    await idbStorage.put({
      kind: 'photo',
      key: crypto.randomUUID(),
      seq: nextSeq(),
      ...where,
      entryClientKey: entry.key,
      blob: photo,
      fileName: photo.name || 'photo',
      state: 'pending',
    });
  }
  await reload();
  await flushOutbox();
  return entry;
}

/** Puts a refused item back in line unchanged (after the fitter fixed the cause elsewhere, e.g. signed in again). */
export async function retryItem(item: QueuedItem) {
  await idbStorage.put({ ...item, state: 'pending', error: undefined });
  await reload();
  await flushOutbox();
}

/** Removes an item on the fitter's explicit word; an entry takes its waiting photos with it. */
export async function discardItem(item: QueuedItem) {
  const dependants = item.kind === 'entry' ? snapshot.items.filter((i) => i.kind === 'photo' && i.entryClientKey === item.key) : [];
  for (const i of [item, ...dependants]) await idbStorage.remove(i.key);
  await reload();
}

const RETRY_EVERY_MS = 10_000;
let started = false;

/** Loads the queue once per page and keeps sending: on `online` events and every 10 s while items wait. */
function start() {
  if (started) return;
  started = true;
  void reload().then(flushOutbox);
  window.addEventListener('online', () => void flushOutbox());
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

/** The outbox as React sees it; mounting it anywhere starts the sender for the page. */
export function useOutbox(onStored?: StoredListener): OutboxSnapshot {
  useEffect(start, []);
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
