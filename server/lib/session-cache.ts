/**
 * Resolved sessions kept in this process's memory, so a signed-in request costs no query for its
 * session and roles (DEVELOPERS.md, decision 45). Safe across instances:
 *
 * - PostgreSQL tells every instance, at commit, when something a resolved session depends on
 *   changes (triggers in drizzle/0015_session-invalidation.sql notify 'kerfwise_auth': sessions
 *   revoked or removed, users changed or disabled, memberships and roles, projects renamed or
 *   removed). Each notification empties this instance's cache; such writes are rare.
 * - The cache is used only while this instance is LISTENing. When the listener connection drops,
 *   the cache is emptied and bypassed (every request queries, as without a cache) until the
 *   listener is back; a notification missed meanwhile therefore changes nothing.
 * - A query that started before a notification arrived is not stored (an epoch counter), so an
 *   answer read before a revocation's commit cannot outlive it.
 * - Entries live at most ENTRY_TTL_MS and never past the session's own expiry; at most MAX_ENTRIES.
 * - A route that changes sessions or roles calls `authChangesDelivered()` after its commit: it
 *   returns once this instance's own listener has received the change, and PostgreSQL signals
 *   every listening instance at the same commit, so a sign-out answered by instance A is refused
 *   by instance B in the next request.
 */
import { randomUUID } from 'node:crypto';
import pg from 'pg';
import type { Me } from '../../shared/schemas/auth';
import type { ProjectRole } from '../../shared/roles';
import { pool } from '../db/client';
import { env } from '../env';
import { logger } from './logger';
import type { JsonText } from './reply';

export const AUTH_CHANNEL = 'kerfwise_auth';
/** The listener's application_name in pg_stat_activity (the scale-out test cuts it on purpose). */
export const AUTH_LISTENER_NAME = 'kerfwise-auth-listener';
/** An entry is read again from PostgreSQL at least this often (common practice, no source). */
export const ENTRY_TTL_MS = 60_000;
const MAX_ENTRIES = 10_000;
/** Wait before reconnecting a lost listener (common practice, no source). */
const RECONNECT_MS = 1_000;

export interface AuthUser {
  id: string;
  email: string;
  name: string;
  isAdmin: boolean;
}

/** A valid session as read from PostgreSQL: who, until when, and their roles per project. */
export interface ResolvedSession {
  user: AuthUser;
  sessionId: string;
  /** The session's expiry (ms since the epoch); a cached entry is never used past it. */
  expiresMs: number;
  /** GET /api/auth/me's list: every membership with its project's name, by project name. */
  memberships: Me['memberships'];
  roles: ReadonlyMap<string, ProjectRole>;
  /** GET /api/auth/me's JSON text, made once per entry (server/routes/auth.ts). */
  meJson?: JsonText<Me>;
}

interface Entry {
  value: ResolvedSession;
  until: number;
}

const entries = new Map<string, Entry>();
const syncWaiters = new Map<string, () => void>();
let listener: pg.Client | null = null;
let listening = false;
let started = false;
let epoch = 0;

function forgetAll() {
  entries.clear();
  epoch++;
}

function connect() {
  const client = new pg.Client({ connectionString: env().DATABASE_URL, application_name: AUTH_LISTENER_NAME, keepAlive: true });
  listener = client;
  const lost = (why: string) => {
    if (listener !== client) return;
    listener = null;
    listening = false;
    forgetAll();
    logger.warn({ why }, 'session cache: listener lost; sessions are read from the database until it is back');
    client.end().catch(() => undefined);
    setTimeout(connect, RECONNECT_MS).unref();
  };
  client.on('error', (err) => lost(err.message));
  client.on('end', () => lost('connection closed'));
  client.on('notification', (n) => {
    const waiter = n.payload ? syncWaiters.get(n.payload) : undefined;
    if (waiter) waiter();
    else forgetAll();
  });
  client
    .connect()
    .then(() => client.query(`LISTEN ${AUTH_CHANNEL}`))
    .then(() => {
      if (listener !== client) return;
      // Whatever changed while no listener was connected is unknown: start empty.
      forgetAll();
      listening = true;
    })
    .catch((err: Error) => lost(err.message));
}

function enabled(): boolean {
  if (env().SESSION_CACHE !== 'on') return false;
  if (!started) {
    started = true;
    connect();
  }
  return true;
}

/** True while cached sessions may be used (the listener is connected and LISTENing). */
export function sessionCacheLive(): boolean {
  return enabled() && listening;
}

/** The cached session for a cookie value, if any and still valid. */
export function cachedSession(token: string, now = Date.now()): ResolvedSession | undefined {
  if (!listening) return undefined;
  const entry = entries.get(token);
  if (!entry) return undefined;
  if (entry.until <= now || entry.value.expiresMs <= now) {
    entries.delete(token);
    return undefined;
  }
  return entry.value;
}

/** Taken before reading a session from PostgreSQL; null when the cache is not in use. */
export function sessionCacheTicket(): number | null {
  return sessionCacheLive() ? epoch : null;
}

/** Keeps a session read with `ticket`, unless anything changed (or the listener dropped) since. */
export function storeSession(token: string, value: ResolvedSession, ticket: number | null, now = Date.now()): void {
  if (ticket === null || !listening || ticket !== epoch) return;
  if (entries.size >= MAX_ENTRIES) entries.delete(entries.keys().next().value!);
  entries.set(token, { value, until: Math.min(now + ENTRY_TTL_MS, value.expiresMs) });
}

/**
 * After a committed change to sessions, users, memberships or projects: waits (at most
 * `timeoutMs`) until this instance's listener has received it, so every instance has been told
 * before the caller answers. Without a live listener there is nothing cached to wait for.
 */
export async function authChangesDelivered(timeoutMs = 2_000): Promise<void> {
  if (!sessionCacheLive()) return;
  const marker = `sync:${randomUUID()}`;
  let timer: NodeJS.Timeout | undefined;
  const arrived = new Promise<void>((resolve) => {
    syncWaiters.set(marker, resolve);
    timer = setTimeout(resolve, timeoutMs);
  });
  try {
    await pool.query('select pg_notify($1, $2)', [AUTH_CHANNEL, marker]);
    await arrived;
  } catch (err) {
    // The change itself is committed; the listener, if it is cut too, empties the cache anyway.
    logger.warn({ err: (err as Error).message }, 'session cache: could not confirm delivery of a change');
  } finally {
    clearTimeout(timer);
    syncWaiters.delete(marker);
  }
}
