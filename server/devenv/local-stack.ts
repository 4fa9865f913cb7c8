/**
 * Brings up what `npm start`, `npm run dev` and `npm test` need on a bare machine: a PostgreSQL
 * cluster inside the project (installing Debian's postgresql package first when it is missing and
 * we are root) and a fake SMTP server — each only when DATABASE_URL / SMTP_URL do not name a real
 * one — then applies the migrations.
 */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { runMigrations } from '../db/migrate';
import { ensureDebianPackages } from './debian-packages';
import { startFakeSmtp } from './fake-smtp';
import { startLocalPostgres } from './postgres';

export interface LocalStack {
  databaseUrl: string;
  smtpUrl: string;
  /** True when the mail goes to the local catcher (administrators read it in the app). */
  catchingMail: boolean;
  stop: () => Promise<void>;
}

export interface LocalStackOptions {
  /** `.data/pg` for the product, `.data/pg-test` for the test suite. */
  dataDir: string;
  pgPort: number;
  database: string;
  smtpPort?: number;
  fast?: boolean;
  freshDatabase?: boolean;
  log?: (line: string) => void;
}

export async function bringUpLocalStack(opts: LocalStackOptions): Promise<LocalStack> {
  const log = opts.log ?? (() => {});
  const stops: (() => Promise<void> | void)[] = [];
  const stop = async () => {
    for (const s of stops.reverse()) await s();
  };
  try {
    let databaseUrl = process.env.DATABASE_URL;
    if (databaseUrl) {
      log('Using the PostgreSQL server named by DATABASE_URL.');
    } else {
      // A bare Debian machine: install the server package when root, else stop with the command.
      // Without a log of its own (the test set-up) the installer still prints why it waits.
      ensureDebianPackages(['postgresql'], {
        host: opts.log ? { log: opts.log } : {},
        alternative: 'Or set DATABASE_URL to an existing PostgreSQL server.',
      });
      const pg = await startLocalPostgres({
        dataDir: opts.dataDir,
        port: opts.pgPort,
        database: opts.database,
        fast: opts.fast,
        freshDatabase: opts.freshDatabase,
        log,
      });
      stops.push(pg.stop);
      databaseUrl = pg.url;
    }
    log('Applying database migrations …');
    await runMigrations(databaseUrl);

    let smtpUrl = process.env.SMTP_URL;
    const catchingMail = !smtpUrl;
    if (!smtpUrl) {
      const smtp = await startFakeSmtp({ databaseUrl, port: opts.smtpPort });
      stops.push(smtp.stop);
      smtpUrl = smtp.url;
      log(`Local mail catcher listening on ${smtp.url} (read caught mail under Administration → Mail).`);
    }
    return { databaseUrl, smtpUrl, catchingMail, stop };
  } catch (err) {
    await stop();
    throw err;
  }
}

/** A session secret for a local install: SESSION_SECRET if set, else one made once and kept in `.data/`. */
export function localSessionSecret(dataRoot = '.data'): string {
  if (process.env.SESSION_SECRET) return process.env.SESSION_SECRET;
  const file = path.join(dataRoot, 'session-secret');
  if (!existsSync(file)) {
    mkdirSync(dataRoot, { recursive: true });
    writeFileSync(file, randomBytes(48).toString('base64url'), { mode: 0o600 });
  }
  return readFileSync(file, 'utf8').trim();
}
