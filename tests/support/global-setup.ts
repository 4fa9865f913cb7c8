/**
 * Runs once before the suite: a throw-away PostgreSQL cluster (`.data/pg-test`, port 54330) with a
 * fresh, migrated test database, and the local mail catcher. TEST_DATABASE_URL may name another
 * server; DATABASE_URL and SMTP_URL are ignored here so a run never touches real data or mail.
 * On a bare Debian machine, run as root, it first installs PostgreSQL's server package and — when
 * the run includes browser tests — Chromium (server/devenv/debian-packages.ts); as another user
 * the run stops (PostgreSQL) or every browser test fails (Chromium) with the apt-get command to run.
 */
import type { TestProject } from 'vitest/node';
import { ensureDebianPackages } from '../../server/devenv/debian-packages';
import { bringUpLocalStack } from '../../server/devenv/local-stack';
import { runIncludesBrowserTests } from './totals-reporter';

declare module 'vitest' {
  export interface ProvidedContext {
    databaseUrl: string;
    smtpUrl: string;
  }
}

export default async function setup(project: TestProject) {
  // Chromium only for runs with browser tests: a domain test must not wait for (or fail on) it.
  // Not installable here (not root), the browser tests themselves fail with the command to run.
  if (runIncludesBrowserTests()) {
    try {
      ensureDebianPackages(['chromium']);
    } catch (err) {
      console.error(`\n${err instanceof Error ? err.message : String(err)}\nEvery browser test will fail until Chromium is installed.\n`);
    }
  }
  delete process.env.SMTP_URL;
  if (process.env.TEST_DATABASE_URL) process.env.DATABASE_URL = process.env.TEST_DATABASE_URL;
  else delete process.env.DATABASE_URL;
  // KERFWISE_TEST_PG_PORT gives a run its own cluster, so two runs on one machine do not collide.
  const port = Number(process.env.KERFWISE_TEST_PG_PORT ?? 54330);
  const stack = await bringUpLocalStack({
    dataDir: port === 54330 ? '.data/pg-test' : `.data/pg-test-${port}`,
    pgPort: port,
    database: 'kerfwise_test',
    fast: true,
    freshDatabase: true,
  });
  project.provide('databaseUrl', stack.databaseUrl);
  project.provide('smtpUrl', stack.smtpUrl);
  return async () => {
    await stack.stop();
  };
}
