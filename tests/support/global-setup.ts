/**
 * Runs once before the suite: a throw-away PostgreSQL cluster (`.data/pg-test`, port 54330) with a
 * fresh, migrated test database, and the local mail catcher. TEST_DATABASE_URL may name another
 * server; DATABASE_URL and SMTP_URL are ignored here so a run never touches real data or mail.
 */
import type { TestProject } from 'vitest/node';
import { bringUpLocalStack } from '../../server/devenv/local-stack';

declare module 'vitest' {
  export interface ProvidedContext {
    databaseUrl: string;
    smtpUrl: string;
  }
}

export default async function setup(project: TestProject) {
  delete process.env.SMTP_URL;
  if (process.env.TEST_DATABASE_URL) process.env.DATABASE_URL = process.env.TEST_DATABASE_URL;
  else delete process.env.DATABASE_URL;
  const stack = await bringUpLocalStack({
    dataDir: '.data/pg-test',
    pgPort: 54330,
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
