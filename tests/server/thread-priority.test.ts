/**
 * server/workers/priority.ts (DEVELOPERS.md, decision 49): a thread lowers its own priority and no
 * other thread's, and never raises it. Each case runs in a thread of its own
 * (tests/fixtures/workers/priority-worker.mjs); the nice values are read back from the kernel.
 */
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import { describe, expect, it } from 'vitest';
import { currentThreadId } from '../../server/workers/priority';

interface Reported {
  tid: number | null;
  nice: number;
  problem: string | null;
  kernel: number;
}

function inThread(start: number, nice: number): Promise<Reported> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(new URL('../fixtures/workers/priority-worker.mjs', import.meta.url), { workerData: { start, nice } });
    worker.once('message', (m: Reported) => {
      resolve(m);
      void worker.terminate();
    });
    worker.once('error', reject);
  });
}

describe.runIf(process.platform === 'linux')('thread priority', () => {
  it('lowers the calling thread to the nice value asked, and only that thread', async () => {
    const mine = os.getPriority();
    const before = currentThreadId();
    // Linux man page setpriority(2): under NPTL the nice value is a per-thread attribute, so
    // the test's thread keeps its own value.
    const reported = await inThread(0, Math.max(mine, 12));
    expect(reported.problem).toBeNull();
    expect(reported.tid).not.toBe(before);
    expect(reported.kernel).toBe(Math.max(mine, 12));
    expect(reported.nice).toBe(reported.kernel);
    expect(os.getPriority()).toBe(mine);
  });

  it('never raises a thread that is already lower', async () => {
    const reported = await inThread(17, 12);
    expect(reported.problem).toBeNull();
    expect(reported.kernel).toBe(17);
  });
});
