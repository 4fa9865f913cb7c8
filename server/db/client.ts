import { drizzle } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import { env } from '../env';
import { logger } from '../lib/logger';
import * as schema from './schema';

// Timestamps come back as JS Dates; bigint counts (type 20) as numbers — they stay well below 2^53.
pg.types.setTypeParser(20, (v) => Number(v));

/**
 * A pool that survives a database restart, fail-over or outage (DEVELOPERS.md, decision 33): a
 * connection the server closes — idle in the pool or checked out between two queries — is logged
 * and dropped instead of being an uncaught 'error' event; the next query opens a fresh one.
 */
export function resilientPool(config: pg.PoolConfig, name: string): pg.Pool {
  const created = new pg.Pool(config);
  created.on('error', (err) => logger.warn({ pool: name, err: err.message }, 'database connection lost; dropped from the pool'));
  // A checked-out client has no pool listener: without its own, a server-side close is fatal.
  created.on('connect', (client) =>
    client.on('error', (err) => logger.warn({ pool: name, err: err.message }, 'database connection lost while in use')),
  );
  return created;
}

export const pool = resilientPool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: 5000 }, 'app');

export const db = drizzle(pool, { schema, casing: 'snake_case' });

export type Db = typeof db;
/** A transaction or the database itself: code that writes takes either. */
export type DbOrTx = Db | Parameters<Parameters<Db['transaction']>[0]>[0];

// SQLSTATE classes 08 (connection exception) and 57P01–57P03 (shut down, crashed, starting up).
const unavailableCodes = new Set([
  '08000',
  '08001',
  '08003',
  '08004',
  '08006',
  '57P01',
  '57P02',
  '57P03',
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
]);
const unavailableMessages =
  /Connection terminated|connection timeout|timeout exceeded when trying to connect|not queryable|Client was closed|the database system is (starting up|shutting down|in recovery mode)/i;

/**
 * True when `err` (or an error it wraps, as Drizzle does) says the database cannot be reached
 * right now — refused, cut, restarting — rather than that the request itself was wrong.
 */
export function isDatabaseUnavailable(err: unknown): boolean {
  for (let e = err, depth = 0; e && typeof e === 'object' && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const { code, message, errors } = e as { code?: unknown; message?: unknown; errors?: unknown };
    if (typeof code === 'string' && unavailableCodes.has(code)) return true;
    if (typeof message === 'string' && unavailableMessages.test(message)) return true;
    // Node's AggregateError when every address of the host refused (IPv4 and IPv6).
    if (Array.isArray(errors) && errors.some((x) => isDatabaseUnavailable(x))) return true;
  }
  return false;
}
