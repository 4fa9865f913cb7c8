/**
 * The computations that run in worker threads (server/workers/pool.ts): pure functions of plain
 * data, so their arguments and answers cross the thread boundary by structured clone (Dates
 * included). Nothing here reads the database.
 */
import { planStops as planStopsPure, type PlanStopsOptions, type StopPlanInput } from '../../shared/domain/stop-planner';
import { buildForecast as buildForecastPure, type ForecastData } from '../services/forecast';

export function planStops({ input, options }: { input: StopPlanInput; options: PlanStopsOptions }) {
  return planStopsPure(input, options);
}

export function buildForecast({ data, now }: { data: ForecastData; now: Date }) {
  return buildForecastPure(data, now);
}
