// Entry of the computation workers (server/workers/pool.ts). Workers start without the main
// thread's TypeScript loader, so this registers tsx (as `npm start` runs the server) and then
// exposes the computations of tasks.ts as named exports, which piscina calls by name.
// First of all the thread lowers its own CPU priority, so its computations give way to the
// request thread (priority.ts, decision 49).
import { register } from 'tsx/esm/api';

register();
const { lowerThisThreadPriority } = await import('./priority.ts');
const priority = lowerThisThreadPriority();
const tasks = await import('./tasks.ts');

export const planStops = (arg) => tasks.planStops(arg);
export const buildForecast = (arg) => tasks.buildForecast(arg);
/** This thread's id and nice value as set at its start (a test reads it back from the main thread). */
export const threadPriority = () => priority;
