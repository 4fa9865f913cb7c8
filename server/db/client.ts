import { drizzle } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import { env } from '../env';
import * as schema from './schema';

// Timestamps come back as JS Dates; bigint counts (type 20) as numbers — they stay well below 2^53.
pg.types.setTypeParser(20, (v) => Number(v));

export const pool = new pg.Pool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: 5000 });

export const db = drizzle(pool, { schema, casing: 'snake_case' });

export type Db = typeof db;
/** A transaction or the database itself: code that writes takes either. */
export type DbOrTx = Db | Parameters<Parameters<Db['transaction']>[0]>[0];
