/**
 * The server as its own process for the outage test (tests/api/database-outage.test.ts): like
 * server/index.ts — the app, the process guards — pointed at the database in DATABASE_URL, on a
 * free port. Instead of cron it takes ticks over IPC, with the test's clock: `{ tick, at }`.
 */
import { findJob, scheduledTick } from '../../jobs/index';
import { createApp } from '../../server/app';
import { installProcessGuards } from '../../server/lib/process-guards';

installProcessGuards();

const server = createApp().listen(0, '127.0.0.1', () => {
  const addr = server.address();
  process.send?.({ port: typeof addr === 'object' && addr ? addr.port : 0 });
});

process.on('message', (m: { tick?: string; at?: string }) => {
  const job = m.tick ? findJob(m.tick) : undefined;
  if (!job || !m.at) return;
  void scheduledTick(job, new Date(m.at)).then(() => process.send?.({ ticked: m.tick }));
});
process.on('SIGTERM', () => server.close(() => process.exit(0)));
