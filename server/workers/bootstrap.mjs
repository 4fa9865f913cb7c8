// Entry of the computation workers (server/workers/pool.ts). Workers start without the main
// thread's TypeScript loader, so this registers tsx (as `npm start` runs the server) and then
// exposes the computations of tasks.ts as named exports, which piscina calls by name.
import { register } from 'tsx/esm/api';

register();
const tasks = await import('./tasks.ts');

export const planStops = (arg) => tasks.planStops(arg);
export const buildForecast = (arg) => tasks.buildForecast(arg);
