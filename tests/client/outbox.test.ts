import { describe, expect, it } from 'vitest';
import {
  drainQueue,
  outcomeOf,
  type QueuedEntry,
  type QueuedItem,
  type QueuedPhoto,
  type QueueStorage,
  type SendError,
} from '../../src/lib/outbox';

const where = { projectId: 'p', roundId: 'r' };

const entry = (key: string, seq: number, state: QueuedItem['state'] = 'pending'): QueuedEntry => ({
  kind: 'entry',
  key,
  seq,
  ...where,
  positionId: `pos-${key}`,
  state,
  body: {
    clientKey: key,
    positionId: `pos-${key}`,
    wearMm: 10,
    conditions: [],
    action: 'none',
    removedSerial: null,
    fitted: null,
    changeReason: null,
    note: '',
    remeasured: false,
  },
});
const photo = (key: string, seq: number, entryClientKey: string): QueuedPhoto => ({
  kind: 'photo',
  key,
  seq,
  ...where,
  positionId: `pos-${entryClientKey}`,
  state: 'pending',
  entryClientKey,
  blob: new Blob(['x']),
  fileName: 'x.png',
});

/** The queue in memory, standing in for IndexedDB. */
function memory(items: QueuedItem[]) {
  const map = new Map(items.map((i) => [i.key, i]));
  const storage: QueueStorage = {
    list: async () => [...map.values()],
    put: async (i) => void map.set(i.key, i),
    remove: async (k) => void map.delete(k),
  };
  return { map, storage };
}

/** A server that answers each key with the given status (2xx when not listed) and records the order of sends. */
function server(statuses: Record<string, number> = {}) {
  const sent: string[] = [];
  const send = async (item: QueuedItem): Promise<SendError | null> => {
    sent.push(item.key);
    const status = statuses[item.key] ?? 201;
    return status >= 200 && status < 300 ? null : { status, message: `answered ${status}`, issues: [] };
  };
  return { sent, send };
}

describe('outcomeOf', () => {
  // derived: the rule of issue 3's client brief — 2xx (a 200 replay included) is stored; 408 (RFC 9110 §15.5.9)
  // and 429 (RFC 6585 §4) mean "try later", as do no answer (0) and 5xx; every other 4xx is for the fitter to fix.
  it.each([
    [200, 'done'],
    [201, 'done'],
    [400, 'attention'],
    [404, 'attention'],
    [409, 'attention'],
    [413, 'attention'],
    [415, 'attention'],
    [408, 'retry'],
    [429, 'retry'],
    // 401 (RFC 9110 §15.5.2, the session ended): kept on the device until the same user signs in again (decision 42).
    [401, 'retry'],
    [0, 'retry'],
    [500, 'retry'],
    [503, 'retry'],
  ] as const)('%i → %s', (status, outcome) => {
    expect(outcomeOf(status)).toBe(outcome);
  });
});

describe('drainQueue', () => {
  it('sends in queue order, a photo after its entry, and empties the queue', async () => {
    // Listed out of order on purpose: IndexedDB returns items by key, not by the time they were queued.
    const { map, storage } = memory([photo('ph1', 3, 'e1'), entry('e2', 4), entry('e1', 1)]);
    const { sent, send } = server({ e2: 200 }); // e2 is a replay: the server had it already
    expect(await drainQueue(storage, send)).toBe(3);
    expect(sent).toEqual(['e1', 'ph1', 'e2']);
    expect(map.size).toBe(0);
  });

  it('stops at the first item without an answer, so nothing overtakes it', async () => {
    const { map, storage } = memory([entry('e1', 1), photo('ph1', 2, 'e1'), entry('e2', 3)]);
    const { sent, send } = server({ e1: 0 });
    expect(await drainQueue(storage, send)).toBe(0);
    expect(sent).toEqual(['e1']);
    expect([...map.values()].map((i) => i.state)).toEqual(['pending', 'pending', 'pending']);
  });

  it('keeps a refused entry with the server message, holds back its photo, and goes on with the others', async () => {
    const { map, storage } = memory([entry('e1', 1), photo('ph1', 2, 'e1'), entry('e2', 3)]);
    const { sent, send } = server({ e1: 409 });
    expect(await drainQueue(storage, send)).toBe(1);
    expect(sent).toEqual(['e1', 'e2']);
    expect(map.get('e1')).toMatchObject({ state: 'attention', error: { status: 409, message: 'answered 409' } });
    expect(map.get('ph1')?.state).toBe('pending');
    expect(map.has('e2')).toBe(false);
  });

  it('leaves items that wait for the fitter alone, and retries on 429', async () => {
    const { map, storage } = memory([entry('e1', 1, 'attention'), entry('e2', 2)]);
    const { sent, send } = server({ e2: 429 });
    expect(await drainQueue(storage, send)).toBe(0);
    expect(sent).toEqual(['e2']);
    expect(map.get('e2')?.state).toBe('pending');
  });

  it("sends only the signed-in user's items; another user's stay on the device (derived: issue 13, never sent as someone else)", async () => {
    const mine = { ...entry('e1', 1), userId: 'u1' };
    const theirs = { ...entry('e2', 2), userId: 'u2' };
    const { map, storage } = memory([mine, theirs]);
    const { sent, send } = server();
    expect(await drainQueue(storage, send, 'u1')).toBe(1);
    expect(sent).toEqual(['e1']);
    expect(map.has('e2')).toBe(true);
    expect(await drainQueue(storage, send, 'u2')).toBe(1);
    expect(sent).toEqual(['e1', 'e2']);
  });

  it('holds a session-ended (401) entry and everything after it, then sends them in order after sign-in', async () => {
    const { map, storage } = memory([entry('e1', 1), entry('e2', 2)]);
    let signedIn = false;
    const sent: string[] = [];
    const send = async (item: QueuedItem): Promise<SendError | null> => {
      sent.push(item.key);
      return signedIn ? null : { status: 401, message: 'session ended', issues: [] };
    };
    expect(await drainQueue(storage, send)).toBe(0);
    expect([...map.values()].map((i) => i.state)).toEqual(['pending', 'pending']);
    signedIn = true;
    expect(await drainQueue(storage, send)).toBe(2);
    expect(sent).toEqual(['e1', 'e1', 'e2']);
  });

  it('sends a round started offline before its entries and its close; its entries wait while it is refused', async () => {
    const round: QueuedItem = {
      kind: 'round',
      key: 'r',
      seq: 0,
      ...where,
      positionId: '',
      state: 'pending',
      body: { id: 'r', startedAt: '2026-09-01T07:00:00Z', chainageM: 120, ringNumber: null, crew: '', notes: '' },
    };
    const close: QueuedItem = { kind: 'close', key: 'c', seq: 9, ...where, positionId: '', state: 'pending' };
    const ok = memory([close, entry('e1', 2), round]);
    const okServer = server();
    expect(await drainQueue(ok.storage, okServer.send)).toBe(3);
    expect(okServer.sent).toEqual(['r', 'e1', 'c']);

    const refused = memory([close, entry('e1', 2), round]);
    const refusing = server({ r: 409 });
    expect(await drainQueue(refused.storage, refusing.send)).toBe(0);
    expect(refusing.sent).toEqual(['r']);
    expect(refused.map.get('e1')?.state).toBe('pending');
  });
});
