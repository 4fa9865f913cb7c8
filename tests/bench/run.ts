/**
 * `npm run bench`: speed figures of Kerfwise on this machine, printed (never asserted in tests).
 * Starts its own PostgreSQL cluster (.data/pg-bench-<port>, port 54500 or KERFWISE_BENCH_PG_PORT)
 * with a fresh database. KERFWISE_BENCH_ONLY=import,drive,load,planner,relaxation runs only the named parts
 * (comma-separated); unknown names are refused.
 */
import { randomUUID } from 'node:crypto';
import { bringUpLocalStack } from '../../server/devenv/local-stack';

const PARTS = ['import', 'drive', 'load', 'planner', 'relaxation'] as const;
const only = (process.env.KERFWISE_BENCH_ONLY ?? PARTS.join(','))
  .split(',')
  .map((p) => p.trim())
  .filter(Boolean);
const unknown = only.filter((p) => !(PARTS as readonly string[]).includes(p));
if (unknown.length > 0) {
  console.error(`KERFWISE_BENCH_ONLY: unknown part(s) ${unknown.join(', ')}; known: ${PARTS.join(', ')}`);
  process.exit(2);
}
const runs = (part: (typeof PARTS)[number]) => only.includes(part);
const pgPort = Number(process.env.KERFWISE_BENCH_PG_PORT ?? 54500);
if (!Number.isInteger(pgPort) || pgPort < 1024 || pgPort > 65000) {
  console.error(`KERFWISE_BENCH_PG_PORT must be a port number between 1024 and 65000, not "${process.env.KERFWISE_BENCH_PG_PORT}"`);
  process.exit(2);
}
// The load figure's two HTTP servers listen on ports derived from the cluster's, so two benches
// with different KERFWISE_BENCH_PG_PORT values do not clash.
process.env.KERFWISE_BENCH_HTTP_PORT = String(pgPort - 50590);

const stack = await bringUpLocalStack({
  dataDir: pgPort === 54500 ? '.data/pg-bench' : `.data/pg-bench-${pgPort}`,
  pgPort,
  database: 'kerfwise_bench',
  fast: true,
  freshDatabase: true,
});
process.env.DATABASE_URL = stack.databaseUrl;
process.env.SMTP_URL = stack.smtpUrl;
process.env.SESSION_SECRET = randomUUID() + randomUUID();
process.env.LOG_LEVEL = 'warn';

const lines: string[] = [];
const print = (line: string) => {
  lines.push(line);
  console.log(line);
};
try {
  const { benchDrive, benchImport } = await import('./drive.bench');
  if (runs('import')) for (const l of await benchImport()) print(l);
  if (runs('drive')) for (const l of await benchDrive()) print(l);
  if (runs('load')) {
    const { benchLoad } = await import('./load.bench');
    for (const l of await benchLoad(stack.databaseUrl, stack.smtpUrl)) print(l);
  }
  if (runs('planner')) {
    const { benchStopPlanner, benchDemoStopPlan, benchLatticeCase } = await import('./stop-planner.bench');
    for (const l of await benchStopPlanner()) print(l);
    for (const l of await benchLatticeCase()) print(l);
    for (const l of await benchDemoStopPlan()) print(l);
  }
  if (runs('relaxation')) {
    const { benchRelaxation } = await import('./relaxation.bench');
    for (const l of await benchRelaxation()) print(l);
  }
} finally {
  const { pool } = await import('../../server/db/client');
  await pool.end();
  await stack.stop();
}
