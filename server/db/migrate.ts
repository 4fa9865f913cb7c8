import { drizzle } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';

export const migrationsFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../drizzle');

/** Applies the drizzle-kit migrations in `drizzle/` to the database at `url`. */
export async function runMigrations(url: string): Promise<void> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    // Quiet the NOTICEs PostgreSQL prints for "already exists" on the migrations schema.
    await client.query('set client_min_messages = warning');
    await migrate(drizzle(client), { migrationsFolder });
  } finally {
    await client.end();
  }
}
