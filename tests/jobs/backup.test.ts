/**
 * Backups that are proven to restore: the nightly job backs up a database with a drive's inspections,
 * strokes and photos; the backup is restored into a fresh database and compared with the original
 * by PostgreSQL's own counts and md5 of the rows (not by the backup's manifest, which is the code's
 * own account), and every photo byte by byte. Retention on a test clock; a failing backup is
 * recorded and mailed.
 *
 * This file works on a database of its own (made and migrated here, dropped at the end), so the
 * other test files writing to the shared test database at the same time cannot change what is
 * compared. Server modules are imported after DATABASE_URL points at it (they read it once).
 */
import { randomBytes, randomUUID } from 'node:crypto';
import { existsSync } from 'node:fs';
import { cp, mkdir, mkdtemp, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { runMigrations } from '../../server/db/migrate';
import { backupName, restoreBackup, RestoreRefused, type BackupManifest } from '../../server/services/backup';

const tag = randomUUID().slice(0, 8);
const baseUrl = inject('databaseUrl');
const urlFor = (name: string) => {
  const u = new URL(baseUrl);
  u.pathname = `/${name}`;
  return u.toString();
};
const sourceDb = `kerfwise_backup_src_${tag}`;
const restoredDbs: string[] = [];
let tmp = '';
let storageDir = '';
let backupDir = '';

async function onBase<T>(fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const c = new pg.Client({ connectionString: baseUrl });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}
async function onDb<T>(name: string, fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const c = new pg.Client({ connectionString: urlFor(name) });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}
async function freshDatabase(): Promise<string> {
  const name = `kerfwise_backup_dst_${tag}_${restoredDbs.length}`;
  await onBase((c) => c.query(`create database ${name}`));
  restoredDbs.push(name);
  return name;
}

beforeAll(async () => {
  await onBase((c) => c.query(`create database ${sourceDb}`));
  await runMigrations(urlFor(sourceDb));
  tmp = await mkdtemp(path.join(os.tmpdir(), 'kerfwise-backup-test-'));
  storageDir = path.join(tmp, 'storage');
  backupDir = path.join(tmp, 'backups');
  process.env.DATABASE_URL = urlFor(sourceDb);
  process.env.STORAGE_DIR = storageDir;
  process.env.BACKUP_DIR = backupDir;
  process.env.BACKUP_KEEP_DAILY = '3';
  process.env.BACKUP_KEEP_WEEKLY = '3';
});

afterAll(async () => {
  const { pool } = await import('../../server/db/client');
  await pool.end();
  // Plain DROP: our connections are closed, and PostgreSQL stops an autovacuum worker by itself,
  // whereas WITH (FORCE) from a non-superuser fails when one is working on the database.
  await onBase(async (c) => {
    for (const name of [sourceDb, ...restoredDbs]) await c.query(`drop database if exists ${name}`).catch(() => {});
  });
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

/** Every ordinary table of the application and of the migrator, by the catalogue. */
const tablesOf = (c: pg.Client) =>
  c
    .query<{ t: string }>(`select schemaname || '.' || tablename as t from pg_tables where schemaname in ('public', 'drizzle') order by 1`)
    .then((r) => r.rows.map((x) => x.t));
const countsOf = async (c: pg.Client) => {
  const out: Record<string, number> = {};
  for (const t of await tablesOf(c)) out[t] = Number((await c.query(`select count(*) as n from ${t}`)).rows[0].n);
  return out;
};
/** md5 over every row's text form, in a fixed order: equal only when every value is. */
const checksumOf = async (c: pg.Client, table: string) =>
  (await c.query<{ md5: string }>(`select md5(coalesce(string_agg(t::text, E'\\n' order by t::text), '')) as md5 from ${table} t`)).rows[0]
    .md5;

async function backupJob() {
  const { jobs } = await import('../../jobs/index');
  const job = jobs.find((j) => j.name === 'nightly-backup');
  if (!job) throw new Error('the nightly-backup job is not registered');
  return job;
}

// Making a drive, dumping and restoring take tens of seconds on a busy two-core machine.
describe('nightly backup and restore', { timeout: 180_000 }, () => {
  const photoNames: string[] = [];
  let backupPath = '';
  let adminEmail = '';

  it('shows a missing backup to the administrator before the first one', async () => {
    const { createApp } = await import('../../server/app');
    const { makeUser, signedInAgent } = await import('../support/fixtures');
    const admin = await makeUser({ isAdmin: true });
    adminEmail = admin.email;
    const agent = await signedInAgent(createApp(), admin.email);
    const res = await agent.get('/api/admin/backups/status');
    expect(res.status).toBe(200);
    expect(res.body.missing).toBe(true);
    expect(res.body.lastGood).toBeNull();
  });

  it('backs up a drive with inspections, strokes and photos, and restores it exactly into a fresh database', async () => {
    const { db } = await import('../../server/db/client');
    const { photos, inspectionEntries } = await import('../../server/db/schema');
    const { runJob } = await import('../../server/services/job-runner');
    const { makeStopsDrive } = await import('../support/stops-fixtures');
    const { makeWornCutterhead } = await import('../support/cutterhead-fixtures');
    const { makeProject, makeUser } = await import('../support/fixtures');

    // Strokes from the stops drive, inspections from the worn cutterhead of a second drive.
    await makeStopsDrive();
    const fitter = await makeUser();
    await makeWornCutterhead((await makeProject()).id, fitter.id, 6.2);
    const entries = await db.select().from(inspectionEntries).limit(3);
    expect(entries.length).toBe(3);
    await mkdir(path.join(storageDir, 'photos'), { recursive: true });
    for (const [i, entry] of entries.entries()) {
      const storedName = `${randomUUID()}.jpg`;
      const bytes = randomBytes(20_000 + i * 777);
      await writeFile(path.join(storageDir, 'photos', storedName), bytes);
      await db.insert(photos).values({
        projectId: entry.projectId,
        entryId: entry.id,
        clientKey: randomUUID(),
        storedName,
        mimeType: 'image/jpeg',
        sizeBytes: bytes.length,
        originalName: `disc-${i}.jpg`,
        uploadedBy: fitter.id,
      });
      photoNames.push(storedName);
    }

    const run = await runJob(await backupJob(), 'admin');
    expect(run.error).toBeNull();
    expect(run.outcome).toBe('ok');
    // The run records size and duration.
    expect(run.summary).toMatch(/^kerfwise-\S+: [\d.]+ (kB|MB) \(database and 3 stored files\) in [\d.]+ s; 1 backup kept, 0 removed\.$/);

    const names = (await readdir(backupDir)).filter((n) => !n.startsWith('.'));
    expect(names).toHaveLength(1);
    backupPath = path.join(backupDir, names[0]);
    const manifest = JSON.parse(await readFile(path.join(backupPath, 'manifest.json'), 'utf8')) as BackupManifest;
    expect(manifest.database.name).toBe(sourceDb);
    expect(manifest.database.serverVersion).toMatch(/^\d+/);
    expect(manifest.database.migrationLevel.lastTag).toMatch(/^\d{4}_/);
    expect(manifest.files.map((f) => f.path).sort()).toEqual(['database.dump', ...photoNames.map((n) => `storage/photos/${n}`)].sort());

    const target = await freshDatabase();
    const restoredStorage = path.join(tmp, 'restored-storage');
    const result = await restoreBackup({ backupDir: backupPath, databaseUrl: urlFor(target), storageDir: restoredStorage });
    expect(result.files).toBe(3);

    // The source has not changed since the backup except the job's own run record, which was
    // 'running' in the snapshot: compare everything else against the live source.
    const [before, after] = [await onDb(sourceDb, countsOf), await onDb(target, countsOf)];
    expect(Object.keys(after)).toEqual(Object.keys(before));
    expect(after).toEqual(before);
    expect(before['public.inspection_entries']).toBeGreaterThan(40);
    expect(before['public.strokes']).toBe(13);
    for (const table of ['inspection_entries', 'inspection_rounds', 'strokes', 'photos', 'fittings', 'cutters']) {
      expect(await onDb(target, (c) => checksumOf(c, table)), table).toBe(await onDb(sourceDb, (c) => checksumOf(c, table)));
    }
    // Every photo a restored row names is there, byte for byte.
    const restoredPhotos = await onDb(target, (c) =>
      c.query<{ stored_name: string }>('select stored_name from photos').then((r) => r.rows.map((x) => x.stored_name)),
    );
    expect(restoredPhotos.sort()).toEqual([...photoNames].sort());
    for (const name of restoredPhotos) {
      const original = await readFile(path.join(storageDir, 'photos', name));
      const restored = await readFile(path.join(restoredStorage, 'photos', name));
      expect(restored.equals(original), name).toBe(true);
    }
  });

  it('refuses to restore over a database that has tables unless forced', async () => {
    const target = await freshDatabase();
    await runMigrations(urlFor(target));
    const storage = path.join(tmp, 'forced-storage');
    await expect(restoreBackup({ backupDir: backupPath, databaseUrl: urlFor(target), storageDir: storage })).rejects.toThrow(
      RestoreRefused,
    );
    await expect(restoreBackup({ backupDir: backupPath, databaseUrl: urlFor(target), storageDir: storage })).rejects.toThrow(
      /not empty.*--force/s,
    );
    expect(await onDb(target, (c) => c.query('select count(*)::int as n from inspection_entries')).then((r) => r.rows[0].n)).toBe(0);

    await restoreBackup({ backupDir: backupPath, databaseUrl: urlFor(target), storageDir: storage, force: true });
    expect(await onDb(target, (c) => checksumOf(c, 'strokes'))).toBe(await onDb(sourceDb, (c) => checksumOf(c, 'strokes')));
  });

  it('refuses a damaged backup and leaves the target untouched', async () => {
    const damaged = path.join(tmp, 'damaged');
    await rm(damaged, { recursive: true, force: true });
    await cp(backupPath, damaged, { recursive: true });
    const photo = path.join(damaged, 'storage', 'photos', photoNames[0]);
    const bytes = await readFile(photo);
    bytes[100] ^= 0xff;
    await writeFile(photo, bytes);
    const target = await freshDatabase();
    await expect(
      restoreBackup({ backupDir: damaged, databaseUrl: urlFor(target), storageDir: path.join(tmp, 'damaged-storage') }),
    ).rejects.toThrow(/damaged.*storage\/photos/s);
    expect(await onDb(target, tablesOf)).toEqual([]);
    expect(existsSync(path.join(tmp, 'damaged-storage'))).toBe(false);
  });

  it('keeps exactly the configured daily and weekly backups on a test clock (3 daily, 3 weekly)', async () => {
    // The calendar of tests/domain/backup-retention.test.ts, as folders; the job runs at Fri 20 Mar 2026 12:00 UTC.
    await rm(backupDir, { recursive: true, force: true });
    const at = (iso: string) => backupName(new Date(iso));
    const existing = [
      '2026-02-20T02:15:00Z',
      '2026-02-27T02:15:00Z',
      '2026-03-01T02:15:00Z',
      '2026-03-03T02:15:00Z',
      '2026-03-08T02:15:00Z',
      '2026-03-16T02:15:00Z',
      '2026-03-18T02:15:00Z',
      '2026-03-19T02:15:00Z',
      '2026-03-19T14:00:00Z',
      '2026-03-20T02:15:00Z',
      '2026-03-21T02:15:00Z',
    ];
    for (const iso of existing) {
      await mkdir(path.join(backupDir, at(iso)), { recursive: true });
      await writeFile(path.join(backupDir, at(iso), 'manifest.json'), '{}');
    }
    // A crashed run two days ago (removed) and one that may still be writing (kept); a folder that is not a backup (kept).
    await mkdir(path.join(backupDir, `.partial-${at('2026-03-18T02:15:00Z')}`));
    await mkdir(path.join(backupDir, `.partial-${at('2026-03-20T11:30:00Z')}`));
    await mkdir(path.join(backupDir, 'copied-by-hand'));

    const { runJob } = await import('../../server/services/job-runner');
    const run = await runJob(await backupJob(), 'schedule', { now: new Date('2026-03-20T12:00:00Z') });
    expect(run.outcome).toBe('ok');
    expect(run.summary).toMatch(/6 backups kept, 6 removed\.$/);
    expect((await readdir(backupDir)).sort()).toEqual(
      [
        `.partial-${at('2026-03-20T11:30:00Z')}`,
        'copied-by-hand',
        at('2026-03-01T02:15:00Z'), // weekly W09
        at('2026-03-08T02:15:00Z'), // weekly W10
        at('2026-03-18T02:15:00Z'), // daily
        at('2026-03-19T14:00:00Z'), // daily
        at('2026-03-20T12:00:00Z'), // daily and weekly W12: the backup just made
        at('2026-03-21T02:15:00Z'), // after the clock: never deleted
      ].sort(),
    );
  });

  it('records a failed backup (folder not writable) and mails every active administrator', async () => {
    const { db } = await import('../../server/db/client');
    const { outbox } = await import('../../server/db/schema');
    const { deliverPendingMail } = await import('../../server/lib/mail');
    const { createApp } = await import('../../server/app');
    const { makeUser, signedInAgent } = await import('../support/fixtures');
    const { eq } = await import('drizzle-orm');
    const inactiveAdmin = await makeUser({ isAdmin: true, active: false });
    const planner = await makeUser();

    // BACKUP_DIR is a file now: nobody, root included, can make a folder in it.
    await rm(backupDir, { recursive: true, force: true });
    await writeFile(backupDir, 'not a folder');
    const { runJob } = await import('../../server/services/job-runner');
    const run = await runJob(await backupJob(), 'schedule');
    expect(run.outcome).toBe('failed');
    expect(run.error).toMatch(/backup folder .* cannot be written to/);

    const mails = await db.select().from(outbox).where(eq(outbox.kind, 'backup_alert'));
    expect(mails).toHaveLength(1);
    expect(mails[0].subject).toMatch(/backup FAILED/);
    expect(mails[0].textBody).toContain('cannot be written to');
    expect(mails[0].toAddresses).toContain(adminEmail);
    expect(mails[0].toAddresses).not.toContain(inactiveAdmin.email);
    expect(mails[0].toAddresses).not.toContain(planner.email);

    // It reaches the mail server (the local catcher records it in the shared test database).
    await deliverPendingMail({ kind: 'backup_alert' });
    const deadline = Date.now() + 10_000;
    let caught = 0;
    while (caught === 0 && Date.now() < deadline) {
      caught = await onBase((c) =>
        c.query(`select count(*)::int as n from caught_mail where $1 = any(to_addresses) and subject like '%backup FAILED%'`, [adminEmail]),
      ).then((r) => r.rows[0].n);
      if (caught === 0) await new Promise((r) => setTimeout(r, 100));
    }
    expect(caught).toBe(1);

    // And the administrator's Jobs screen shows it.
    const agent = await signedInAgent(createApp(), adminEmail);
    const status = await agent.get('/api/admin/backups/status');
    expect(status.body.failedSince?.error).toMatch(/cannot be written to/);
    expect(status.body.missing).toBe(false); // the good backup of the first test is minutes old
    expect(status.body.lastGood).not.toBeNull();
  });
});
