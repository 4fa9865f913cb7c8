/**
 * The limit the load benchmark measures Kerfwise against, in the same run: a bare Express app and
 * one pg pool, no sessions, no validation, no logging. `/json` answers a constant object (the
 * floor of any Express JSON route); `/positions` runs the very SQL text of GET …/positions and
 * sends its rows; `/forecast` reads the cached forecast's JSON text in one query and sends it.
 * Run as its own process by tests/bench/load.bench.ts (env: DATABASE_URL, PORT, PROJECT_ID).
 */
import { PgDialect } from 'drizzle-orm/pg-core';
import express from 'express';
import pg from 'pg';
import { positionsListSql } from '../../server/services/positions';

const projectId = process.env.PROJECT_ID!;
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 10 });
// The cluster stops at the bench's end: an idle connection it closes is no crash.
pool.on('error', () => undefined);
const positions = new PgDialect({ casing: 'snake_case' }).sqlToQuery(positionsListSql(projectId));

const app = express();
app.get('/json', (_req, res) => {
  res.json({ user: { id: projectId, email: 'bench@kerfwise.test', name: 'Bench', isAdmin: false }, memberships: [] });
});
app.get('/positions', async (_req, res) => {
  const { rows } = await pool.query(positions.sql, positions.params);
  res.json(rows);
});
app.get('/forecast', async (_req, res) => {
  const { rows } = await pool.query<{ body: string }>('select body from forecast_cache where project_id = $1', [projectId]);
  res.type('application/json').send(rows[0]?.body ?? '{}');
});
const server = app.listen(Number(process.env.PORT), '127.0.0.1', () => process.send?.('ready'));
process.on('SIGTERM', () => {
  server.close();
  void pool.end();
});
