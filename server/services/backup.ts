/**
 * Backups that are proven to restore (DEVELOPERS.md, decision 28). A backup is a folder
 * `kerfwise-YYYY-MM-DDTHH-MM-SSZ` (UTC) in BACKUP_DIR holding:
 *
 * - `database.dump` — pg_dump's custom format, taken in one snapshot;
 * - `storage/…` — a copy of STORAGE_DIR (the photos), taken after the dump, so every photo a
 *   dumped row names is in it (a photo file is written before its row commits). A photo uploaded
 *   while the backup runs may or may not be in it; its row is not;
 * - `manifest.json` — every file with its size and SHA-256, the database name, the PostgreSQL
 *   version, the Kerfwise migration level and the row count of every table in the dump's snapshot.
 *
 * It is written into `.partial-<name>` and renamed when complete, so a half-written backup never
 * looks complete. A restore checks every checksum first, refuses a database that already has
 * tables (or a storage folder that already has files) unless forced, and compares the restored
 * row counts and photo bytes with the manifest.
 *
 * These functions take URLs and folders as arguments (not `env()`), so the command line can run
 * them without the server's full configuration.
 */
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { createReadStream, existsSync, readdirSync, readFileSync } from 'node:fs';
import { copyFile, mkdir, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import { backupsToKeep, type BackupRetention } from '../../shared/domain/backup-retention';

/** The scheduled job's name (jobs/backup.ts), read by the administrator's status line. */
export const BACKUP_JOB_NAME = 'nightly-backup';
/** No good backup for this long shows as missing (a night plus a margin; common practice, no source). */
export const BACKUP_MISSING_AFTER_HOURS = 36;
export const MANIFEST_FILE = 'manifest.json';
export const DUMP_FILE = 'database.dump';
export const STORAGE_FOLDER = 'storage';
const NAME_PATTERN = /^kerfwise-(\d{4})-(\d{2})-(\d{2})T(\d{2})-(\d{2})-(\d{2})Z$/;

export interface ManifestFile {
  /** Path inside the backup folder, with forward slashes. */
  path: string;
  sizeBytes: number;
  sha256: string;
}

export interface BackupManifest {
  format: 'kerfwise-backup';
  formatVersion: 1;
  name: string;
  takenAt: string;
  database: {
    name: string;
    serverVersion: string;
    /** The last applied drizzle migration (tag from drizzle/meta/_journal.json) and how many. */
    migrationLevel: { count: number; lastTag: string | null };
    /** Rows per table (`schema.table`) in the dump's snapshot. */
    rowCounts: Record<string, number>;
  };
  files: ManifestFile[];
  sizeBytes: number;
  durationMs: number;
  note: string;
}

export interface BackupResult {
  name: string;
  dir: string;
  sizeBytes: number;
  durationMs: number;
  manifest: BackupManifest;
}

/** The folder name of a backup taken at `at` (UTC, so names sort by time). */
export function backupName(at: Date): string {
  return `kerfwise-${at.toISOString().slice(0, 19).replace(/:/g, '-')}Z`;
}

/** The time in a backup's name, or null when the name is not a backup's. */
export function backupTime(name: string): Date | null {
  const m = NAME_PATTERN.exec(name);
  return m ? new Date(Date.UTC(+m[1], +m[2] - 1, +m[3], +m[4], +m[5], +m[6])) : null;
}

// --- PostgreSQL's own tools -------------------------------------------------------------------

/**
 * The folder of pg_dump/pg_restore for a server of major version `serverMajor`: PG_BIN when set,
 * else Debian's `/usr/lib/postgresql/<major>/bin` for the same major, else the newest one that is
 * newer (pg_dump reads older servers, never newer ones).
 */
export function findPgTools(serverMajor: number): string {
  if (process.env.PG_BIN) return process.env.PG_BIN;
  const root = '/usr/lib/postgresql';
  const versions = existsSync(root)
    ? readdirSync(root)
        .filter((v) => existsSync(path.join(root, v, 'bin', 'pg_dump')))
        .map(Number)
        .filter((v) => v >= serverMajor)
        .sort((a, b) => a - b)
    : [];
  if (versions.length === 0) {
    throw new Error(
      `pg_dump for PostgreSQL ${serverMajor} or newer was not found under ${root}. Install the client tools ` +
        `("apt-get install -y postgresql-client-${serverMajor}") or set PG_BIN to their folder.`,
    );
  }
  return path.join(root, String(versions[0]), 'bin');
}

/** libpq environment for a postgres:// URL; the password goes in PGPASSWORD, never on a command line. */
function libpqEnv(databaseUrl: string): { env: NodeJS.ProcessEnv; dbname: string } {
  const u = new URL(databaseUrl);
  const password = decodeURIComponent(u.password);
  u.password = '';
  return { env: { ...process.env, ...(password ? { PGPASSWORD: password } : {}) }, dbname: u.toString() };
}

function runTool(bin: string, args: string[], env: NodeJS.ProcessEnv): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(bin, args, { env, cwd: '/', stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (d: Buffer) => {
      stderr = (stderr + d.toString()).slice(-20_000);
    });
    child.on('error', reject);
    child.on('close', (code) =>
      code === 0 ? resolve() : reject(new Error(`${path.basename(bin)} failed (exit ${code}): ${stderr.trim() || 'no message'}`)),
    );
  });
}

async function serverFacts(client: pg.Client) {
  const { rows } = await client.query<{ db: string; version: string; num: string }>(
    `select current_database() as db, current_setting('server_version') as version, current_setting('server_version_num') as num`,
  );
  return { database: rows[0].db, version: rows[0].version, major: Math.floor(Number(rows[0].num) / 10000) };
}

/** Every ordinary table of the application (public) and of the migrator (drizzle). */
async function userTables(client: pg.Client): Promise<string[]> {
  const { rows } = await client.query<{ name: string }>(
    `select quote_ident(schemaname) || '.' || quote_ident(tablename) as name from pg_tables
     where schemaname in ('public', 'drizzle') order by 1`,
  );
  return rows.map((r) => r.name);
}

async function rowCounts(client: pg.Client): Promise<Record<string, number>> {
  const counts: Record<string, number> = {};
  for (const table of await userTables(client)) {
    const { rows } = await client.query<{ n: string }>(`select count(*) as n from ${table}`);
    counts[table] = Number(rows[0].n);
  }
  return counts;
}

const journalFile = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../drizzle/meta/_journal.json');

/** How many migrations this checkout of Kerfwise has (a backup from a newer one has more). */
export function knownMigrationCount(): number {
  return (JSON.parse(readFileSync(journalFile, 'utf8')) as { entries: unknown[] }).entries.length;
}

async function migrationLevel(client: pg.Client): Promise<{ count: number; lastTag: string | null }> {
  const exists = await client.query(`select 1 from pg_tables where schemaname = 'drizzle' and tablename = '__drizzle_migrations'`);
  if (exists.rowCount === 0) return { count: 0, lastTag: null };
  const { rows } = await client.query<{ n: string; last: string | null }>(
    'select count(*) as n, max(created_at)::text as last from drizzle.__drizzle_migrations',
  );
  const journal = JSON.parse(readFileSync(journalFile, 'utf8')) as { entries: { when: number; tag: string }[] };
  const last = rows[0].last === null ? null : Number(rows[0].last);
  return {
    count: Number(rows[0].n),
    lastTag: journal.entries.find((e) => e.when === last)?.tag ?? (last === null ? null : `unknown (${last})`),
  };
}

// --- Files ------------------------------------------------------------------------------------

export function sha256File(file: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const hash = createHash('sha256');
    createReadStream(file)
      .on('data', (d) => hash.update(d))
      .on('error', reject)
      .on('end', () => resolve(hash.digest('hex')));
  });
}

/** Every file under `dir`, as paths relative to it with forward slashes, sorted. */
async function listFiles(dir: string, prefix = ''): Promise<string[]> {
  if (!existsSync(dir)) return [];
  const out: string[] = [];
  for (const entry of await readdir(dir, { withFileTypes: true })) {
    const rel = prefix ? `${prefix}/${entry.name}` : entry.name;
    if (entry.isDirectory()) out.push(...(await listFiles(path.join(dir, entry.name), rel)));
    else if (entry.isFile()) out.push(rel);
  }
  return out.sort();
}

async function describe(root: string, rel: string): Promise<ManifestFile> {
  const file = path.join(root, ...rel.split('/'));
  return { path: rel, sizeBytes: (await stat(file)).size, sha256: await sha256File(file) };
}

// --- Backup -----------------------------------------------------------------------------------

export interface BackupOptions {
  databaseUrl: string;
  /** STORAGE_DIR: the uploaded files (photos). */
  storageDir: string;
  /** BACKUP_DIR: where backups go. */
  backupDir: string;
  now?: Date;
}

/** Takes one consistent backup (database + stored files + manifest) into `backupDir`. */
export async function createBackup(options: BackupOptions): Promise<BackupResult> {
  const started = Date.now();
  const now = options.now ?? new Date();
  const name = backupName(now);
  const backupDir = path.resolve(options.backupDir);
  const finalDir = path.join(backupDir, name);
  const partialDir = path.join(backupDir, `.partial-${name}`);
  if (existsSync(finalDir)) throw new Error(`A backup named ${name} already exists in ${backupDir}.`);
  try {
    await mkdir(backupDir, { recursive: true });
    await rm(partialDir, { recursive: true, force: true });
    await mkdir(partialDir);
  } catch (err) {
    throw new Error(
      `The backup folder ${backupDir} cannot be written to (${err instanceof Error ? err.message : String(err)}). Check BACKUP_DIR, its permissions and the free space.`,
    );
  }
  try {
    // One snapshot for the row counts and pg_dump: the transaction exports it, pg_dump uses it.
    const client = new pg.Client({ connectionString: options.databaseUrl });
    await client.connect();
    let facts: Awaited<ReturnType<typeof serverFacts>>;
    let counts: Record<string, number>;
    let level: { count: number; lastTag: string | null };
    try {
      facts = await serverFacts(client);
      await client.query('begin isolation level repeatable read read only');
      const { rows } = await client.query<{ id: string }>('select pg_export_snapshot() as id');
      counts = await rowCounts(client);
      level = await migrationLevel(client);
      const { env, dbname } = libpqEnv(options.databaseUrl);
      await runTool(
        path.join(findPgTools(facts.major), 'pg_dump'),
        ['--format=custom', `--snapshot=${rows[0].id}`, `--file=${path.join(partialDir, DUMP_FILE)}`, `--dbname=${dbname}`],
        env,
      );
      await client.query('commit');
    } finally {
      await client.end().catch(() => {});
    }

    // Stored files after the dump: every photo a dumped row names was written before its row.
    const storageDir = path.resolve(options.storageDir);
    const stored = await listFiles(storageDir);
    for (const rel of stored) {
      const to = path.join(partialDir, STORAGE_FOLDER, ...rel.split('/'));
      await mkdir(path.dirname(to), { recursive: true });
      // A file removed since it was listed (a deleted photo) is simply not in the backup.
      await copyFile(path.join(storageDir, ...rel.split('/')), to).catch((err: NodeJS.ErrnoException) => {
        if (err.code !== 'ENOENT') throw err;
      });
    }
    const files: ManifestFile[] = [];
    for (const rel of [DUMP_FILE, ...(await listFiles(path.join(partialDir, STORAGE_FOLDER))).map((f) => `${STORAGE_FOLDER}/${f}`)]) {
      files.push(await describe(partialDir, rel));
    }
    const sizeBytes = files.reduce((s, f) => s + f.sizeBytes, 0);
    const manifest: BackupManifest = {
      format: 'kerfwise-backup',
      formatVersion: 1,
      name,
      takenAt: now.toISOString(),
      database: { name: facts.database, serverVersion: facts.version, migrationLevel: level, rowCounts: counts },
      files,
      sizeBytes,
      durationMs: Date.now() - started,
      note: 'Files were copied after the database dump; a photo uploaded while the backup ran may be missing (its row is not in the dump either).',
    };
    await writeFile(path.join(partialDir, MANIFEST_FILE), `${JSON.stringify(manifest, null, 2)}\n`);
    await rename(partialDir, finalDir);
    return { name, dir: finalDir, sizeBytes, durationMs: manifest.durationMs, manifest };
  } catch (err) {
    await rm(partialDir, { recursive: true, force: true }).catch(() => {});
    throw err;
  }
}

// --- Listing and retention ----------------------------------------------------------------------

export interface StoredBackup {
  name: string;
  dir: string;
  takenAt: Date;
}

/** The complete backups in `backupDir` (named like one, with a manifest), oldest first. */
export async function listBackups(backupDir: string): Promise<StoredBackup[]> {
  const dir = path.resolve(backupDir);
  if (!existsSync(dir)) return [];
  const out: StoredBackup[] = [];
  for (const entry of await readdir(dir, { withFileTypes: true })) {
    const takenAt = entry.isDirectory() ? backupTime(entry.name) : null;
    if (takenAt && existsSync(path.join(dir, entry.name, MANIFEST_FILE)))
      out.push({ name: entry.name, dir: path.join(dir, entry.name), takenAt });
  }
  return out.sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
}

/** Deletes the backups the retention does not keep, and partial folders older than a day. */
export async function pruneBackups(
  backupDir: string,
  now: Date,
  retention: BackupRetention,
): Promise<{ kept: string[]; removed: string[] }> {
  const all = await listBackups(backupDir);
  const keep = backupsToKeep(all, now, retention);
  const removed: string[] = [];
  for (const b of all) {
    if (keep.has(b.name)) continue;
    await rm(b.dir, { recursive: true, force: true });
    removed.push(b.name);
  }
  // A crash mid-backup leaves `.partial-…`; one older than a day is not being written any more.
  const dir = path.resolve(backupDir);
  for (const entry of existsSync(dir) ? await readdir(dir) : []) {
    if (!entry.startsWith('.partial-')) continue;
    const at = backupTime(entry.slice('.partial-'.length));
    if (at && now.getTime() - at.getTime() > 24 * 3600_000) await rm(path.join(dir, entry), { recursive: true, force: true });
  }
  return { kept: all.filter((b) => keep.has(b.name)).map((b) => b.name), removed };
}

// --- Checking and restoring ---------------------------------------------------------------------

export async function readManifest(backupDir: string): Promise<BackupManifest> {
  const file = path.join(backupDir, MANIFEST_FILE);
  if (!existsSync(file)) throw new Error(`${backupDir} is not a complete Kerfwise backup: it has no ${MANIFEST_FILE}.`);
  const manifest = JSON.parse(await readFile(file, 'utf8')) as BackupManifest;
  if (manifest.format !== 'kerfwise-backup') throw new Error(`${file} is not a Kerfwise backup manifest.`);
  return manifest;
}

/** Checks every file of a backup against its manifest; returns the problems (none = sound). */
export async function verifyBackup(backupDir: string): Promise<string[]> {
  const manifest = await readManifest(backupDir);
  const problems: string[] = [];
  for (const f of manifest.files) {
    const file = path.join(backupDir, ...f.path.split('/'));
    if (!existsSync(file)) {
      problems.push(`${f.path} is missing.`);
      continue;
    }
    const actual = await describe(backupDir, f.path);
    if (actual.sizeBytes !== f.sizeBytes || actual.sha256 !== f.sha256)
      problems.push(`${f.path} has changed since the backup (size or SHA-256 differs).`);
  }
  return problems;
}

export class RestoreRefused extends Error {}

export interface RestoreOptions {
  /** The backup folder. */
  backupDir: string;
  /** The database to restore into; it must exist (the local cluster's start makes it). */
  databaseUrl: string;
  storageDir: string;
  /** Replace a database that has tables and add to a storage folder that has files. */
  force?: boolean;
}

export interface RestoreResult {
  manifest: BackupManifest;
  tables: number;
  rows: number;
  files: number;
}

/**
 * Restores a backup: checksums first, then the database with pg_restore in one transaction, then
 * the stored files; finally the restored row counts and file bytes are compared with the manifest.
 */
export async function restoreBackup(options: RestoreOptions): Promise<RestoreResult> {
  const backupDir = path.resolve(options.backupDir);
  const manifest = await readManifest(backupDir);
  const problems = await verifyBackup(backupDir);
  if (problems.length > 0)
    throw new RestoreRefused(`The backup ${manifest.name} is damaged; nothing was restored.\n  ${problems.join('\n  ')}`);

  const storageDir = path.resolve(options.storageDir);
  const existingFiles = await listFiles(storageDir);
  const client = new pg.Client({ connectionString: options.databaseUrl });
  await client.connect();
  try {
    const facts = await serverFacts(client);
    const tables = await userTables(client);
    if (!options.force) {
      if (tables.length > 0) {
        throw new RestoreRefused(
          `The database ${facts.database} is not empty (${tables.length} tables, e.g. ${tables.slice(0, 3).join(', ')}). ` +
            'Restore into an empty database, or add --force to replace everything in it with the backup.',
        );
      }
      if (existingFiles.length > 0) {
        throw new RestoreRefused(
          `The storage folder ${storageDir} already holds ${existingFiles.length} files. Empty it, or add --force to add the backup's files to it.`,
        );
      }
    }
    if (tables.length > 0) {
      // --force: the database becomes exactly the backup.
      await client.query('begin');
      await client.query('drop schema if exists drizzle cascade');
      await client.query('drop schema if exists public cascade');
      await client.query('create schema public');
      await client.query('commit');
    } else {
      // An empty migrator schema left by an earlier attempt would stop pg_restore.
      await client.query('drop schema if exists drizzle');
    }

    const { env, dbname } = libpqEnv(options.databaseUrl);
    await runTool(
      path.join(findPgTools(facts.major), 'pg_restore'),
      ['--no-owner', '--no-privileges', '--exit-on-error', '--single-transaction', `--dbname=${dbname}`, path.join(backupDir, DUMP_FILE)],
      env,
    );

    const restoredCounts = await rowCounts(client);
    const mismatches = Object.entries(manifest.database.rowCounts)
      .filter(([table, n]) => restoredCounts[table] !== n)
      .map(([table, n]) => `${table}: ${restoredCounts[table] ?? 'missing'} rows, the backup had ${n}`);
    if (mismatches.length > 0) throw new Error(`The restored database does not match the backup:\n  ${mismatches.join('\n  ')}`);

    const stored = manifest.files.filter((f) => f.path.startsWith(`${STORAGE_FOLDER}/`));
    for (const f of stored) {
      const rel = f.path.slice(STORAGE_FOLDER.length + 1);
      const to = path.join(storageDir, ...rel.split('/'));
      await mkdir(path.dirname(to), { recursive: true });
      await copyFile(path.join(backupDir, ...f.path.split('/')), to);
      if ((await sha256File(to)) !== f.sha256) throw new Error(`${to} does not match the backup after copying; check the disk.`);
    }
    return {
      manifest,
      tables: Object.keys(restoredCounts).length,
      rows: Object.values(restoredCounts).reduce((s, n) => s + n, 0),
      files: stored.length,
    };
  } finally {
    await client.end().catch(() => {});
  }
}

/** "12.3 MB" */
export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  const units = ['kB', 'MB', 'GB', 'TB'];
  let v = n / 1024;
  let i = 0;
  while (v >= 1024 && i < units.length - 1) {
    v /= 1024;
    i++;
  }
  return `${v.toFixed(1)} ${units[i]}`;
}
