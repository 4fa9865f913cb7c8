/**
 * Production entry: serves the built client and the API against the PostgreSQL and SMTP servers
 * named in the environment. Apply migrations first with `npm run db:migrate`.
 */
import { loadDotEnv } from './env';

loadDotEnv();
const { env } = await import('./env');
const { createApp } = await import('./app');
const { startJobs } = await import('../jobs/index');
const { logger } = await import('./lib/logger');
const { installProcessGuards } = await import('./lib/process-guards');

installProcessGuards();

const port = env().PORT;
createApp({ clientDir: 'dist' }).listen(port, () => logger.info(`Kerfwise listening on port ${port}`));
startJobs();
