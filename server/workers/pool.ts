/**
 * Heavy computations (stop plans, forecasts) run in a pool of worker threads, so one planner's
 * 2 km plan does not stall everyone else's requests (DEVELOPERS.md, decision 43). piscina keeps
 * the threads and the queue; `server/workers/bootstrap.mjs` loads the TypeScript in each thread.
 * One thread is kept (started by the entries with `startWorkerPool()`, its TypeScript loaded), so the
 * first forecast after a change does not pay a thread's start (decision 45); others start on demand
 * and end after a minute idle; `closeWorkerPool()` ends them at shutdown. Each thread lowers its own
 * CPU priority at its start (priority.ts), so the request thread comes first (decision 49).
 */
import os from 'node:os';
import { Piscina } from 'piscina';
import type { PlanStopsOptions, StopPlanInput, StopPlanResult } from '../../shared/domain/stop-planner';
import type { ForecastData, ProjectForecast } from '../services/forecast';
import { logger } from '../lib/logger';
import type { ThreadPriority } from './priority';

/** One thread fewer than the machine's cores (the request thread keeps one), at least one, at most four. */
export const WORKER_THREADS = Math.max(1, Math.min(4, os.availableParallelism() - 1));

let pool: Piscina | undefined;
function thePool(): Piscina {
  pool ??= new Piscina({
    filename: new URL('./bootstrap.mjs', import.meta.url).href,
    minThreads: 1,
    maxThreads: WORKER_THREADS,
    idleTimeout: 60_000,
  });
  return pool;
}

/** Starts the pool's kept thread now (server entries, at start), not at the first forecast. */
export function startWorkerPool(): void {
  // A thread that could not lower its priority still computes, at the request thread's priority: said once, at start.
  void computeThreadPriority().then(
    (p) => p.problem && logger.warn(p.problem),
    (error: Error) => logger.warn(`the computation threads did not start: ${error.message}`),
  );
}

export function planStopsInWorker(input: StopPlanInput, options: PlanStopsOptions): Promise<StopPlanResult> {
  return thePool().run({ input, options }, { name: 'planStops' }) as Promise<StopPlanResult>;
}

export function buildForecastInWorker(data: ForecastData, now: Date): Promise<ProjectForecast> {
  return thePool().run({ data, now }, { name: 'buildForecast' }) as Promise<ProjectForecast>;
}

/**
 * A computation thread's id and nice value, as it set them at its start (priority.ts, decision 49).
 * `problem` says why the priority could not be lowered (not Linux, or refused).
 */
export function computeThreadPriority(): Promise<ThreadPriority> {
  return thePool().run(undefined, { name: 'threadPriority' }) as Promise<ThreadPriority>;
}

/** Tasks the pool has finished since start (0 before the first): lets a test see work left the request thread. */
export function workerTasksCompleted(): number {
  return pool?.completed ?? 0;
}

export async function closeWorkerPool(): Promise<void> {
  const p = pool;
  pool = undefined;
  await p?.destroy();
}
