/**
 * The outbox's queue and sender, without React (decision 42): used by the page's outbox
 * (src/lib/outbox.ts) and by the service worker (src/sw.ts), which drains the same IndexedDB queue
 * when Background Sync fires with no Kerfwise window open. Runs in a window and in a worker: only
 * fetch, FormData, IndexedDB and timers.
 */
import { createStore, del, entries, set, type UseStore } from 'idb-keyval';
import type { EntryInput, StartRoundInput } from '../../shared/schemas/inspection';
import { DATABASE_DOWN_MESSAGE } from './api-client';

/** The Background Sync tag the page registers while items wait; the service worker drains on it. */
export const OUTBOX_SYNC_TAG = 'kerfwise-outbox';

export interface SendError {
  status: number;
  message: string;
  issues: { path: string; message: string }[];
}

export interface QueuedBase {
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

export const byQueueOrder = (a: QueuedItem, b: QueuedItem) => a.seq - b.seq || a.key.localeCompare(b.key);

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

// ---- IndexedDB and fetch: the same in the page and in the service worker. ----

let idbStore: UseStore | undefined;
// Opened on first use: the module is also loaded where there is no IndexedDB (unit tests).
const idb = () => (idbStore ??= createStore('kerfwise-outbox', 'queue'));

export const idbStorage: QueueStorage = {
  list: async () => (await entries<string, QueuedItem>(idb())).map(([, v]) => v),
  put: (item) => set(item.key, item, idb()),
  remove: (key) => del(key, idb()),
};

const SEND_TIMEOUT_MS = 20_000;

/** Sends one item: the server's answer on 2xx, else the error. Never throws. */
export async function sendItem(item: QueuedItem): Promise<{ data: unknown } | { error: SendError }> {
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
