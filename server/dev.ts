/**
 * `npm run dev`: the same local services as `npm start`, the API on PORT (3000), and Vite's dev
 * server with hot reload on 5173, which proxies /api to the API.
 */
import { spawn } from 'node:child_process';
import { bringUpLocalStack, localSessionSecret } from './devenv/local-stack';
import { loadDotEnv } from './env';

const log = (line: string) => console.log(`[kerfwise] ${line}`);
loadDotEnv();
const stack = await bringUpLocalStack({ dataDir: '.data/pg', pgPort: 54329, database: 'kerfwise', smtpPort: 2525, log });
process.env.DATABASE_URL = stack.databaseUrl;
process.env.SMTP_URL = stack.smtpUrl;
process.env.SESSION_SECRET = localSessionSecret();
// People open Vite's dev server; links in mail point there (decision 29).
process.env.APP_URL ??= 'http://127.0.0.1:5173';

const { env } = await import('./env');
const { db } = await import('./db/client');
const { seedDemo } = await import('./db/seed-demo');
const { createApp } = await import('./app');
const { jobs, startJobs } = await import('../jobs/index');
await seedDemo(db);
const server = createApp({ jobs }).listen(env().PORT, '127.0.0.1');
const stopJobs = startJobs();
const vite = spawn(process.execPath, ['node_modules/vite/bin/vite.js'], { stdio: 'inherit' });

async function shutdown() {
  vite.kill('SIGTERM');
  stopJobs();
  server.close();
  await stack.stop();
  process.exit(0);
}
process.on('SIGINT', () => void shutdown());
process.on('SIGTERM', () => void shutdown());
