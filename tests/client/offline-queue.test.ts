import { describe, expect, it } from 'vitest';
import {
  drainQueue,
  outcomeOf,
  type QueuedEntry,
  type QueuedItem,
  type QueuedPhoto,
  type QueueStorage,
  type SendError,
} from '../../src/features/rounds/offline-queue';

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
    [401, 'attention'],
    [404, 'attention'],
    [409, 'attention'],
    [413, 'attention'],
    [415, 'attention'],
    [408, 'retry'],
    [429, 'retry'],
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
});
