/**
 * Forecasts and stop plans are computed in worker threads (DEVELOPERS.md, decision 43): the answer
 * from the pool equals the same pure function run on the request thread, and the work is counted
 * by the pool, not done in place. Invented drive (makeStopsDrive).
 */
import os from 'node:os';
import { describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { buildForecast, computeForecast, loadForecastData } from '../../server/services/forecast';
import { planForProject } from '../../server/services/stops';
import { computeThreadPriority, workerTasksCompleted } from '../../server/workers/pool';
import { COMPUTE_THREAD_NICE, currentThreadId } from '../../server/workers/priority';
import { makeStopsDrive } from '../support/stops-fixtures';

describe('worker pool', () => {
  it('computes the forecast off the request thread, equal to the in-place computation', async () => {
    const drive = await makeStopsDrive();
    const now = new Date();
    const before = workerTasksCompleted();
    const fromPool = await db.transaction((tx) => computeForecast(tx, drive.project.id, now));
    expect(workerTasksCompleted()).toBe(before + 1);
    const inPlace = buildForecast(await db.transaction((tx) => loadForecastData(tx, drive.project.id)), now);
    expect(fromPool.positions.length).toBe(3);
    // Dates survive the thread boundary as Dates (structured clone), so the two are deep-equal.
    expect(fromPool).toEqual(inPlace);
  });

  it('plans stops in the pool', async () => {
    const drive = await makeStopsDrive();
    const before = workerTasksCompleted();
    const plan = await db.transaction((tx) => planForProject(tx, drive.project.id, new Date()));
    // derived: one forecast, then at least one planner run (two when the horizon cannot be covered).
    expect(workerTasksCompleted()).toBeGreaterThanOrEqual(before + 2);
    expect(plan.optimised).not.toBeNull();
  });

  // Linux only: elsewhere a thread cannot be named, and the pool says so at start (decision 49).
  it.runIf(process.platform === 'linux')(
    'computes at a lower CPU priority than the request thread, read back from the kernel',
    async () => {
      const requestThread = os.getPriority(); // this (the calling) thread's nice value
      const thread = await computeThreadPriority();
      expect(thread.problem).toBeNull();
      // A thread of this process, not the process itself: its own id, and the main thread's nice value unchanged.
      expect(thread.tid).not.toBeNull();
      expect(thread.tid).not.toBe(currentThreadId());
      expect(os.getPriority()).toBe(requestThread);
      // Read back by the main thread from the kernel (getpriority on the thread id), not the worker's own report.
      const nice = os.getPriority(thread.tid!);
      expect(nice).toBe(Math.max(requestThread, COMPUTE_THREAD_NICE));
      // The thread that answered is the one that computes: a forecast after it leaves its priority as it was.
      const drive = await makeStopsDrive();
      await db.transaction((tx) => computeForecast(tx, drive.project.id, new Date()));
      expect(os.getPriority(thread.tid!)).toBe(nice);
    },
  );
});
