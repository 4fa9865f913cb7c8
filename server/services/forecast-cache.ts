/**
 * A drive's forecast, computed once per change of its data and kept in PostgreSQL so every server
 * instance answers from the same copy (DEVELOPERS.md, decision 38, which supersedes decision 12).
 *
 * - The data version (`drive_data_versions`) is raised by triggers in the same transaction as any
 *   write to a forecast input, so a cached answer is valid exactly while the version is unchanged.
 * - The forecast also depends on the clock (dates ahead) and on the code: an answer older than
 *   `FORECAST_MAX_AGE_MS`, or made by other code (`codeVersion`, a hash of the sources that
 *   compute it), is computed again.
 * - Computing takes a transaction-level advisory lock per drive, so two instances asked at the
 *   same moment compute once; the second finds the first one's answer when the lock is released.
 */
import { createHash } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { sql } from 'drizzle-orm';
import { db, pool } from '../db/client';
import { forecastCache } from '../db/schema';
import { computeForecast, type ProjectForecast } from './forecast';

/** A forecast is recomputed at least this often even without new data: its dates move with the clock (common practice, no source). */
export const FORECAST_MAX_AGE_MS = 60 * 60 * 1000;

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '../..');

/** Files whose code makes the forecast's answer; a change in any of them makes cached answers stale. */
function forecastSources(): string[] {
  const domain = path.join(root, 'shared/domain');
  const files = readdirSync(domain, { recursive: true, encoding: 'utf8' })
    .filter((f) => f.endsWith('.ts'))
    .map((f) => path.join(domain, f));
  return [
    ...files.sort(),
    path.join(root, 'shared/schemas/forecast.ts'),
    path.join(root, 'server/services/forecast.ts'),
    path.join(root, 'server/services/rolled-distance.ts'),
    fileURLToPath(import.meta.url),
  ];
}

let codeVersionMemo: string | undefined;
/** sha-256 of the forecast's sources, 16 hex digits; the same on every instance running the same code. */
export function forecastCodeVersion(): string {
  if (!codeVersionMemo) {
    const hash = createHash('sha256');
    for (const file of forecastSources()) hash.update(path.relative(root, file)).update('\0').update(readFileSync(file));
    codeVersionMemo = hash.digest('hex').slice(0, 16);
  }
  return codeVersionMemo;
}

/** The answer of GET …/forecast without explanations, as the client receives it. */
export function forecastAnswer(result: ProjectForecast) {
  return {
    now: result.now,
    currentChainageM: result.currentChainageM,
    currentRingNumber: result.currentRingNumber,
    problems: result.problems,
    rates: result.rates,
    driveRates: result.driveRates,
    positions: result.positions.map(({ explanation: _explanation, ...p }) => p),
  };
}

export interface CachedForecast {
  /** JSON text of the answer without explanations. */
  body: string;
  /** The same text as UTF-8, made once per answer (sent as it is). */
  bytes: Buffer;
  dataVersion: number;
  computedAt: Date;
  /** Strong validator of this answer: same drive data, same code, same computation. */
  etag: string;
  /** True when this call computed it (false: served from the cache). */
  computed: boolean;
}

type CacheRow = {
  version: number;
  data_version: number | null;
  code_version: string | null;
  computed_ms: number | null;
  /** The cached answer, only when it was computed from the current version and is not the instance's own copy. */
  body: string | null;
};

function etagOf(projectId: string, dataVersion: number, computedAt: Date): string {
  return `"f-${projectId.slice(0, 8)}-${dataVersion}-${computedAt.getTime().toString(36)}-${forecastCodeVersion().slice(0, 8)}"`;
}

function fresh(row: CacheRow | undefined, now: Date): boolean {
  return (
    row != null &&
    row.data_version === row.version &&
    row.code_version === forecastCodeVersion() &&
    row.computed_ms != null &&
    now.getTime() - row.computed_ms < FORECAST_MAX_AGE_MS &&
    row.computed_ms <= now.getTime() + 60_000
  );
}

/**
 * This instance's copy of a drive's cached answer, named by the stored row it came from (data
 * version, code version, computed at). A request still asks PostgreSQL for the row's state every
 * time, so a copy is served only while the stored row is that very row (decision 49); the body
 * itself crosses from PostgreSQL only when the row has changed.
 */
interface Copy extends CachedForecast {
  codeVersion: string;
  computedMs: number;
}
const copies = new Map<string, Copy>();
/** One copy per drive; beyond this many drives the oldest copy is dropped (common practice, no source). */
const MAX_COPIES = 1000;

function keep(projectId: string, row: { dataVersion: number; codeVersion: string; computedMs: number; body: string }): Copy {
  const computedAt = new Date(row.computedMs);
  const copy: Copy = {
    ...row,
    bytes: Buffer.from(row.body),
    computedAt,
    etag: etagOf(projectId, row.dataVersion, computedAt),
    computed: false,
  };
  copies.delete(projectId);
  if (copies.size >= MAX_COPIES) copies.delete(copies.keys().next().value!);
  copies.set(projectId, copy);
  return copy;
}

/** Drops this instance's copies (tests: the next request reads the stored body again). */
export function forgetForecastCopies(): void {
  copies.clear();
}

const computedMsSql = '(extract(epoch from c.computed_at) * 1000)::float8';
// $1 the drive; $2–$4 name the instance's copy (data version, code version, computed at), or null.
const stateText = `
  select coalesce(v.version, 0) as version, c.data_version, c.code_version, ${computedMsSql} as computed_ms,
         case when c.data_version = coalesce(v.version, 0)
                   and (c.data_version, c.code_version, ${computedMsSql}) is distinct from ($2::int, $3::text, $4::float8)
              then c.body end as body
  from (select $1::uuid as project_id) p
  left join drive_data_versions v on v.project_id = p.project_id
  left join forecast_cache c on c.project_id = p.project_id`;
/** The same text for a transaction (Drizzle), the project id bound as a parameter and no copy named: the body comes when current. */
const stateQuery = (projectId: string) => {
  const values: Record<string, string | null> = { $1: projectId, $2: null, $3: null, $4: null };
  // split with a capture group: text at even places, the placeholder's name at odd ones.
  const parts = stateText.split(/(\$\d)/);
  return sql.join(
    parts.map((part, i) => (i % 2 === 0 ? sql.raw(part) : sql`${values[part]}`)),
    sql.raw(''),
  );
};

function fromState(projectId: string, state: CacheRow): Copy {
  return keep(projectId, {
    dataVersion: state.version,
    codeVersion: state.code_version!,
    computedMs: state.computed_ms!,
    body: state.body!,
  });
}

/**
 * The drive's current forecast: the cached one while the data version, code and age allow,
 * otherwise computed now (once across instances) and stored. `explanationOf` adds one position's
 * explanation, read from the same cached row.
 */
export async function cachedForecast(projectId: string, now = new Date()): Promise<CachedForecast> {
  // One query: the version, the cache's state and, when current and not the copy this instance
  // already holds, its answer. A named statement: each pooled connection parses and plans it once,
  // not per request (decision 45).
  const copy = copies.get(projectId);
  const [state] = (
    await pool.query<CacheRow>({
      name: 'forecast-cache-state',
      text: stateText,
      values: [projectId, copy?.dataVersion ?? null, copy?.codeVersion ?? null, copy?.computedMs ?? null],
    })
  ).rows;
  if (fresh(state, now)) {
    if (state.body != null) return fromState(projectId, state);
    if (
      copy != null &&
      copy.dataVersion === state.data_version &&
      copy.codeVersion === state.code_version &&
      copy.computedMs === state.computed_ms
    )
      return copy;
  }
  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${'forecast:' + projectId}, 0))`);
    // Another instance may have computed it while this one waited for the lock.
    const [again] = (await tx.execute<CacheRow>(stateQuery(projectId))).rows;
    if (fresh(again, now) && again.body != null) return fromState(projectId, again);
    // Read the version before the data: a write committed in between leaves the stored answer
    // one version behind, so the next request computes again (never the other way round).
    const dataVersion = again.version;
    const result = await computeForecast(tx, projectId, now);
    // Refreshing rolled distances above writes only derived tables, which raise no version.
    const body = JSON.stringify(forecastAnswer(result));
    const explanations = Object.fromEntries(result.positions.map((p) => [p.position.positionId, p.explanation]));
    const values = { projectId, dataVersion, codeVersion: forecastCodeVersion(), computedAt: now, body, explanations };
    await tx.insert(forecastCache).values(values).onConflictDoUpdate({ target: forecastCache.projectId, set: values });
    // The copy is kept only once the row is committed (a rolled-back computation leaves none).
    return { body, bytes: Buffer.from(body), dataVersion, computedAt: now, etag: etagOf(projectId, dataVersion, now), computed: true };
  });
}

/** One position's explanation from the cached forecast (null when the position has no forecast). */
export async function cachedExplanation(projectId: string, positionId: string, dataVersion: number): Promise<unknown> {
  const { rows } = await db.execute<{ explanation: unknown }>(
    sql`select explanations -> ${positionId} as explanation from forecast_cache where project_id = ${projectId} and data_version = ${dataVersion}`,
  );
  return rows[0]?.explanation ?? null;
}
