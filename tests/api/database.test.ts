import { count } from 'drizzle-orm';
import { drizzle } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { runMigrations } from '../../server/db/migrate';
import * as schema from '../../server/db/schema';
import { seedDemo } from '../../server/db/seed-demo';
import { uniq } from '../support/fixtures';

/** A separate, empty database on the test server, so the demo load can be counted exactly. */
const dbName = uniq('kw_empty').replace('-', '_');
const baseUrl = new URL(process.env.DATABASE_URL!);
const adminClient = new pg.Client({ connectionString: process.env.DATABASE_URL });
const emptyUrl = Object.assign(new URL(baseUrl), { pathname: `/${dbName}` }).toString();
let pool: pg.Pool | undefined;

afterAll(async () => {
  await pool?.end();
  await adminClient.query(`drop database if exists ${dbName} with (force)`);
  await adminClient.end();
});

describe('database', () => {
  it('migrations apply to an empty database, and again without change', async () => {
    await adminClient.connect();
    await adminClient.query(`create database ${dbName}`);
    await runMigrations(emptyUrl);
    await runMigrations(emptyUrl);
    pool = new pg.Pool({ connectionString: emptyUrl });
    // The database is dropped (with force) after the file; a connection cut then is expected.
    pool.on('error', () => {});
    const tables = await pool.query(`select table_name from information_schema.tables where table_schema = 'public' order by 1`);
    const names = tables.rows.map((r) => r.table_name);
    for (const t of ['users', 'projects', 'memberships', 'sessions', 'audit_log', 'outbox']) expect(names).toContain(t);
  });

  it('the demo load is idempotent: a second load neither duplicates nor wipes', { timeout: 180_000 }, async () => {
    const db = drizzle(pool!, { schema, casing: 'snake_case' });
    const counts = async () => ({
      users: (await db.select({ n: count() }).from(schema.users))[0].n,
      projects: (await db.select({ n: count() }).from(schema.projects))[0].n,
      memberships: (await db.select({ n: count() }).from(schema.memberships))[0].n,
      positions: (await db.select({ n: count() }).from(schema.positions))[0].n,
      cutters: (await db.select({ n: count() }).from(schema.cutters))[0].n,
      strokes: (await db.select({ n: count() }).from(schema.strokes))[0].n,
      entries: (await db.select({ n: count() }).from(schema.inspectionEntries))[0].n,
      rolled: (await db.select({ n: count() }).from(schema.fittingRolledKm))[0].n,
    });
    const first = await seedDemo(db);
    expect(first.created).toBe(true);
    const afterFirst = await counts();
    expect(afterFirst).toMatchObject({ users: 5, projects: 1, memberships: 4, positions: 46 });
    // Months of history: a few hundred serials, thousands of strokes and measurements.
    expect(afterFirst.cutters).toBeGreaterThan(200);
    expect(afterFirst.strokes).toBeGreaterThan(2000);
    expect(afterFirst.entries).toBeGreaterThan(2500);
    expect(afterFirst.rolled).toBeGreaterThan(500);
    const second = await seedDemo(db);
    expect(second).toEqual({ projectId: first.projectId, created: false });
    expect(await counts()).toEqual(afterFirst);
  });
});
