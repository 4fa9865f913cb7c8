/**
 * `npm run bench`: speed figures of Kerfwise on this machine, printed (never asserted in tests).
 * Starts its own PostgreSQL cluster (.data/pg-bench, port 54500) with a fresh database.
 */
import { randomUUID } from 'node:crypto';
import { bringUpLocalStack } from '../../server/devenv/local-stack';

const stack = await bringUpLocalStack({
  dataDir: '.data/pg-bench',
  pgPort: 54500,
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
  for (const l of await benchImport()) print(l);
  for (const l of await benchDrive()) print(l);
  const { benchLoad } = await import('./load.bench');
  for (const l of await benchLoad(stack.databaseUrl, stack.smtpUrl)) print(l);
  const { benchStopPlanner, benchDemoStopPlan } = await import('./stop-planner.bench');
  for (const l of await benchStopPlanner()) print(l);
  for (const l of await benchDemoStopPlan()) print(l);
} finally {
  const { pool } = await import('../../server/db/client');
  await pool.end();
  await stack.stop();
}
