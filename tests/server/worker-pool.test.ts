/**
 * Forecasts and stop plans are computed in worker threads (DEVELOPERS.md, decision 43): the answer
 * from the pool equals the same pure function run on the request thread, and the work is counted
 * by the pool, not done in place. Invented drive (makeStopsDrive).
 */
import { describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { buildForecast, computeForecast, loadForecastData } from '../../server/services/forecast';
import { planForProject } from '../../server/services/stops';
import { workerTasksCompleted } from '../../server/workers/pool';
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
});
