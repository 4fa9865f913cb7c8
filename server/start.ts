/**
 * `npm start`: the whole product on one port, on a bare machine. Starts (or reuses) a PostgreSQL
 * cluster in `.data/pg` (installing Debian's postgresql package first when it is missing and we
 * are root, else stopping with the apt-get command to run) and a local mail catcher unless DATABASE_URL / SMTP_URL name real ones,
 * migrates, loads the demo drive once, builds the client when stale, serves client and API, and
 * runs the scheduled jobs. Ctrl-C stops everything it started.
 */
import type { Server } from 'node:http';
import { bringUpLocalStack, localSessionSecret } from './devenv/local-stack';
import { ensureClientBuilt } from './devenv/client-build';
import { loadDotEnv } from './env';

const log = (line: string) => console.log(`[kerfwise] ${line}`);

loadDotEnv();
const stack = await bringUpLocalStack({ dataDir: '.data/pg', pgPort: 54329, database: 'kerfwise', smtpPort: 2525, log }).catch(
  (err: unknown) => {
    console.error(`[kerfwise] Could not start: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  },
);
process.env.DATABASE_URL = stack.databaseUrl;
process.env.SMTP_URL = stack.smtpUrl;
process.env.SESSION_SECRET = localSessionSecret();
process.env.STORAGE_DIR ??= '.data/storage';
// Links in mail point at the address this serves, never at a request's Host header (decision 29).
process.env.APP_URL ??= `http://127.0.0.1:${process.env.PORT ?? 3000}`;

let server: Server | undefined;
let stopJobs: (() => void) | undefined;
let stopping = false;
async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  log('Stopping …');
  stopJobs?.();
  await new Promise<void>((resolve) => (server ? server.close(() => resolve()) : resolve()));
  const { closeWorkerPool } = await import('./workers/pool');
  await closeWorkerPool().catch(() => {});
  const { pool } = await import('./db/client');
  await pool.end().catch(() => {});
  await stack.stop();
  log('Stopped.');
  process.exit(code);
}
process.on('SIGINT', () => void shutdown());
process.on('SIGTERM', () => void shutdown());

try {
  // Import after the environment is complete: these modules read it once.
  const { env } = await import('./env');
  const { db } = await import('./db/client');
  const { seedDemo, demoUsers, DEMO_PASSWORD } = await import('./db/seed-demo');
  const { createApp } = await import('./app');
  const { jobs, startJobs } = await import('../jobs/index');
  (await import('./lib/process-guards')).installProcessGuards();

  const demo = await seedDemo(db);
  log(demo.created ? 'Demo drive loaded.' : 'Demo drive already present; left as it is.');
  ensureClientBuilt('.', log);

  const port = env().PORT;
  server = createApp({ clientDir: 'dist', jobs }).listen(port, '127.0.0.1');
  await new Promise<void>((resolve, reject) => {
    server!.once('listening', resolve);
    server!.once('error', reject);
  });
  stopJobs = startJobs();
  (await import('./workers/pool')).startWorkerPool();

  const width = Math.max(...demoUsers.map((u) => u.email.length));
  console.log(`
  Kerfwise is running at http://127.0.0.1:${port}

  Demo sign-ins (password for all: ${DEMO_PASSWORD})
${demoUsers.map((u) => `    ${u.email.padEnd(width)}  ${u.isAdmin ? 'administrator' : u.role}`).join('\n')}
${stack.catchingMail ? '\n  E-mail is caught locally: Administration → Mail.\n' : ''}
  Press Ctrl-C to stop.
`);
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  await shutdown(1);
}
