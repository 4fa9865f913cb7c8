/**
 * `npm run backup` and `npm run restore -- <backup>` (README, "Backups"). Against DATABASE_URL when
 * it is set, else against the project's own cluster in `.data/pg` (started for the command when it
 * is not running, and stopped again). The server's full configuration is not needed.
 *
 *   npm run backup                               one backup now, into BACKUP_DIR
 *   npm run backup -- --verify <backup|latest>   check a backup's files against its manifest
 *   npm run restore -- <backup|latest> [--force] [--database <name>] [--storage-dir <folder>]
 */
import { existsSync } from 'node:fs';
import path from 'node:path';
import { z } from 'zod';
import { startLocalPostgres } from './devenv/postgres';
import { backupEnvSchema, loadDotEnv } from './env';
import {
  createBackup,
  formatBytes,
  knownMigrationCount,
  listBackups,
  readManifest,
  restoreBackup,
  RestoreRefused,
  verifyBackup,
} from './services/backup';

/** The local cluster of `npm start` (server/start.ts). */
const LOCAL = { dataDir: '.data/pg', port: 54329, database: 'kerfwise' };

const usage = `Usage:
  npm run backup
  npm run backup -- --verify <backup folder | name in BACKUP_DIR | latest>
  npm run restore -- <backup folder | name in BACKUP_DIR | latest> [--force] [--database <name>] [--storage-dir <folder>]`;

const log = (line: string) => console.log(`[kerfwise] ${line}`);

function fail(message: string): never {
  console.error(`[kerfwise] ${message}`);
  process.exit(1);
}

const argsSchema = z.object({
  command: z.enum(['backup', 'restore'], { message: `Unknown command.\n${usage}` }),
  target: z.string().optional(),
  force: z.boolean(),
  verify: z.string().optional(),
  database: z
    .string()
    .regex(/^[a-z_][a-z0-9_]{0,62}$/, 'A --database name is lower-case letters, digits and _ (e.g. kerfwise_check).')
    .optional(),
  storageDir: z.string().min(1).optional(),
});

function parseArgs(argv: string[]) {
  const [command, ...rest] = argv;
  const out: Record<string, unknown> = { command, force: false };
  for (let i = 0; i < rest.length; i++) {
    const a = rest[i];
    const value = () => rest[++i] ?? fail(`${a} needs a value.\n${usage}`);
    if (a === '--force') out.force = true;
    else if (a === '--verify') out.verify = value();
    else if (a === '--database') out.database = value();
    else if (a === '--storage-dir') out.storageDir = value();
    else if (a.startsWith('--')) fail(`Unknown option ${a}.\n${usage}`);
    else if (out.target === undefined) out.target = a;
    else fail(`Only one backup at a time.\n${usage}`);
  }
  const parsed = argsSchema.safeParse(out);
  if (!parsed.success) fail(parsed.error.issues.map((i) => i.message).join('\n'));
  return parsed.data;
}

async function resolveBackup(backupDir: string, which: string): Promise<string> {
  if (which === 'latest') {
    const newest = (await listBackups(backupDir)).at(-1);
    if (!newest) fail(`There is no backup in ${path.resolve(backupDir)}.`);
    return newest.dir;
  }
  if (existsSync(which)) return path.resolve(which);
  if (existsSync(path.join(backupDir, which))) return path.resolve(backupDir, which);
  fail(
    `No backup "${which}" (neither a folder nor a name in ${path.resolve(backupDir)}). "npm run backup -- --verify latest" names the newest.`,
  );
}

/** DATABASE_URL, or the local cluster (started for this command when needed). */
async function database(name: string | undefined, mustExist: boolean): Promise<{ url: string; stop: () => void; local: boolean }> {
  if (process.env.DATABASE_URL) {
    if (name) fail('--database works with the local cluster only; with DATABASE_URL, name the database in the URL.');
    log('Using the PostgreSQL server named by DATABASE_URL.');
    return { url: process.env.DATABASE_URL, stop: () => {}, local: false };
  }
  if (mustExist && !existsSync(path.join(LOCAL.dataDir, 'PG_VERSION'))) {
    fail(`There is no local database in ${LOCAL.dataDir} to back up (and DATABASE_URL is not set).`);
  }
  const pg = await startLocalPostgres({ dataDir: LOCAL.dataDir, port: LOCAL.port, database: name ?? LOCAL.database, log });
  return { ...pg, local: true };
}

async function main() {
  loadDotEnv();
  const args = parseArgs(process.argv.slice(2));
  const settings = backupEnvSchema.safeParse(process.env);
  if (!settings.success)
    fail(
      `Configuration is not valid:\n${settings.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n')}\nSee .env.example.`,
    );
  const backupDir = settings.data.BACKUP_DIR;
  const storageDir = args.storageDir ?? process.env.STORAGE_DIR ?? '.data/storage';

  if (args.command === 'backup' && args.verify) {
    const dir = await resolveBackup(backupDir, args.verify);
    const manifest = await readManifest(dir);
    const problems = await verifyBackup(dir);
    if (problems.length > 0) fail(`${manifest.name} is damaged:\n  ${problems.join('\n  ')}`);
    log(`${manifest.name} is sound: ${manifest.files.length} files, ${formatBytes(manifest.sizeBytes)}, checksums match.`);
    return;
  }

  if (args.command === 'backup') {
    if (args.target) fail(`"npm run backup" takes no backup name.\n${usage}`);
    const db = await database(undefined, true);
    try {
      const b = await createBackup({ databaseUrl: db.url, storageDir, backupDir });
      const photos = b.manifest.files.length - 1;
      log(
        `Backup ${b.name} written to ${b.dir}: ${formatBytes(b.sizeBytes)} (database and ${photos} stored files) in ${(b.durationMs / 1000).toFixed(1)} s.`,
      );
      log('Copy the folder off this machine (README, "Backups").');
    } finally {
      db.stop();
    }
    return;
  }

  if (!args.target) fail(`Name the backup to restore.\n${usage}`);
  const dir = await resolveBackup(backupDir, args.target);
  const db = await database(args.database, false);
  try {
    log(`Restoring ${path.basename(dir)} …`);
    const r = await restoreBackup({ backupDir: dir, databaseUrl: db.url, storageDir, force: args.force });
    log(
      `Restored ${r.manifest.name} (taken ${r.manifest.takenAt}, migration level ${r.manifest.database.migrationLevel.lastTag ?? 'none'}):`,
    );
    log(`  ${r.tables} tables, ${r.rows} rows — every table's row count matches the backup's manifest;`);
    log(`  ${r.files} stored files into ${path.resolve(storageDir)} — every file's SHA-256 matches.`);
    if (r.manifest.database.migrationLevel.count > knownMigrationCount()) {
      log(
        `Caution: the backup comes from a newer Kerfwise (${r.manifest.database.migrationLevel.count} migrations, this one knows ${knownMigrationCount()}). Update this checkout before starting it.`,
      );
    } else {
      log('Start Kerfwise as usual; it applies any newer migrations. Then sign in and look at a drive (README, "Check a restore").');
    }
  } catch (err) {
    if (err instanceof RestoreRefused) fail(err.message);
    throw err;
  } finally {
    db.stop();
  }
}

main().catch((err: unknown) => fail(err instanceof Error ? err.message : String(err)));
