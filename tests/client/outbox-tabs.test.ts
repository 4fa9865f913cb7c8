/** Two tabs work through one device queue: an entry one of them had stored never comes back as refused. */
import { describe, expect, it } from 'vitest';
import { drainQueue, type QueuedEntry, type QueuedItem, type QueueStorage, type SendError } from '../../src/lib/outbox';

const entry = (key: string, seq: number): QueuedEntry => ({
  kind: 'entry',
  key,
  seq,
  projectId: 'p',
  roundId: 'r',
  positionId: `pos-${key}`,
  state: 'pending',
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

describe('one queue, two tabs', () => {
  it('does not mark an item refused after the other tab stored and removed it', async () => {
    const map = new Map<string, QueuedItem>([['a', entry('a', 1)]]);
    const storage: QueueStorage = {
      list: async () => [...map.values()],
      put: async (i) => void map.set(i.key, i),
      remove: async (k) => void map.delete(k),
    };
    // Tab 2's send of 'a' is refused (e.g. its session ran out) while tab 1's copy was stored and removed.
    const send = async (): Promise<SendError | null> => {
      map.delete('a'); // tab 1 meanwhile: stored (2xx) → removed from the queue
      return { status: 401, message: 'Sign in again.', issues: [] };
    };
    await drainQueue(storage, send);
    expect([...map.keys()]).toEqual([]);
  });

  it('still keeps a refusal while the item is queued', async () => {
    const map = new Map<string, QueuedItem>([['b', entry('b', 1)]]);
    const storage: QueueStorage = {
      list: async () => [...map.values()],
      put: async (i) => void map.set(i.key, i),
      remove: async (k) => void map.delete(k),
    };
    await drainQueue(storage, async () => ({ status: 409, message: 'This round is closed.', issues: [] }));
    expect(map.get('b')?.state).toBe('attention');
  });
});
