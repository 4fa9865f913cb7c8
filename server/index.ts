/**
 * Production entry: serves the built client and the API against the PostgreSQL and SMTP servers
 * named in the environment. Apply migrations first with `npm run db:migrate`.
 */
import { loadDotEnv } from './env';

loadDotEnv();
const { env } = await import('./env');
const { createApp } = await import('./app');
const { jobs, startJobs } = await import('../jobs/index');
const { logger } = await import('./lib/logger');
const { installProcessGuards } = await import('./lib/process-guards');
const { startWorkerPool } = await import('./workers/pool');

installProcessGuards();

if (!env().APP_URL) {
  // E-mailed links (password resets, invitations, stops) are built from APP_URL only, never from a
  // request's Host header, which a caller controls (decision 29).
  logger.fatal('APP_URL is not set: set it to the address people open (e.g. https://kerfwise.example.org) and start again.');
  process.exit(1);
}
const port = env().PORT;
createApp({ clientDir: 'dist', jobs }).listen(port, () => logger.info(`Kerfwise listening on port ${port}`));
startJobs();
startWorkerPool();
