/**
 * The route × role × project matrix, generated from tests/api/route-table.ts: for each route and
 * each kind of caller, the exact status expected. Members of another project get 404, never data.
 */
import request from 'supertest';
import type { Express } from 'express';
import { beforeAll, describe, expect, it } from 'vitest';
import { projectRoles, type ProjectRole } from '../../shared/roles';
import { createApp } from '../../server/app';
import { jobs } from '../../jobs/index';
import { randomUUID } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { db } from '../../server/db/client';
import { entrySubmissions, inspectionEntries, inspectionRounds, photos } from '../../server/db/schema';
import { storeFile } from '../../server/lib/storage';
import { addMember, makeProject, makeUser, signedInAgent } from '../support/fixtures';
import { makeCutterhead } from '../support/drive-fixtures';
import { stopContext } from '../support/stops-fixtures';
import { routeTable, type RouteCase, type RouteContext } from './route-table';

const app: Express = createApp({ jobs });

type Caller = 'anonymous' | 'admin' | 'outsider' | `member:${ProjectRole}`;
const callers: Caller[] = ['anonymous', 'admin', 'outsider', ...projectRoles.map((r) => `member:${r}` as const)];

function expectedStatus(route: RouteCase, caller: Caller): number {
  const ok = route.okStatus ?? 200;
  if (caller === 'anonymous') return 401;
  if (route.signedIn) return ok;
  if (route.admin) return caller === 'admin' ? ok : 403;
  // Project route: the admin and the outsider are not members → 404, as for a project that does not exist.
  if (!caller.startsWith('member:')) return 404;
  return route.roles?.includes(caller.slice(7) as ProjectRole) ? ok : 403;
}

const agents = new Map<Caller, ReturnType<typeof request.agent>>();
let ctx: RouteContext;
let foreignProjectId: string;

beforeAll(async () => {
  const project = await makeProject();
  const foreign = await makeProject();
  foreignProjectId = foreign.id;
  const other = await makeUser();
  const drive = await makeCutterhead(project.id, 3);
  const [round] = await db
    .insert(inspectionRounds)
    .values({ projectId: project.id, startedAt: new Date('2026-11-19T06:00:00Z'), chainageM: 650 })
    .returning();
  const [entry] = await db
    .insert(inspectionEntries)
    .values({ projectId: project.id, roundId: round.id, positionId: drive.positions[1].id, clientKey: randomUUID(), wearMm: 3 })
    .returning();
  await db.insert(entrySubmissions).values({ projectId: project.id, clientKey: entry.clientKey, entryId: entry.id });
  const storedName = await storeFile('photos', 'png', Buffer.from('89504e470d0a1a0a', 'hex'));
  const [photo] = await db
    .insert(photos)
    .values({ projectId: project.id, entryId: entry.id, clientKey: randomUUID(), storedName, mimeType: 'image/png', sizeBytes: 8 })
    .returning();
  ctx = {
    projectId: project.id,
    otherUserId: other.id,
    positionId: drive.positions[0].id,
    cutterId: drive.store[0].id,
    roundId: round.id,
    photoId: photo.id,
    entryClientKey: entry.clientKey,
    ...(await stopContext(project.id)),
    // Made fresh by the rows that use them (route-table.ts, `prepare`); these name nothing.
    memberUserId: nothing,
    groundTypeId: nothing,
    causeId: nothing,
    eventId: nothing,
    partId: nothing,
    orderId: nothing,
    lineId: nothing,
    outboxId: '999999999',
    jobName: 'deliver-mail',
  };
  agents.set('anonymous', request.agent(app));
  agents.set('admin', await signedInAgent(app, (await makeUser({ isAdmin: true })).email));
  const outsider = await makeUser();
  await addMember(foreign.id, outsider.id, 'planner'); // a member of another drive
  agents.set('outsider', await signedInAgent(app, outsider.email));
  for (const role of projectRoles) {
    const u = await makeUser();
    await addMember(project.id, u.id, role);
    agents.set(`member:${role}`, await signedInAgent(app, u.email));
  }
});

const nothing = '00000000-0000-4000-8000-000000000000';

/** Fills every `:name` of the path from the context; a name the context lacks fails the row. */
const fill = (path: string, c: RouteContext) =>
  path.replace(/:([A-Za-z]+)/g, (_, k: string) => {
    if (!(k in c)) throw new Error(`route-table: no context value for :${k} in ${path}`);
    return c[k as keyof RouteContext];
  });

/** A 1×1 PNG (the PNG signature, IHDR, one IDAT, IEND; ISO/IEC 15948), small enough to read in a test. */
const onePixelPng = Buffer.from(
  'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==',
  'base64',
);

/** Sends the row's request the way its route takes input: JSON, a raw CSV, or a multipart photo. */
function send(agent: ReturnType<typeof request.agent>, route: RouteCase, c: RouteContext) {
  const req = agent[route.method](fill(route.path, c));
  if (route.csv) return req.set('Content-Type', 'text/csv').send(route.csv(c));
  if (route.photo)
    return req
      .field('entryClientKey', c.entryClientKey)
      .field('clientKey', randomUUID())
      .attach('photo', onePixelPng, { filename: 'matrix.png', contentType: 'image/png' });
  return req.send(route.body?.(c) as object);
}

it('every row’s permitted callers expect a success (2xx), never a refusal', () => {
  const notSuccess = routeTable.filter((r) => !((r.okStatus ?? 200) >= 200 && (r.okStatus ?? 200) < 300));
  expect(notSuccess.map((r) => `${r.method} ${r.path}`)).toEqual([]);
});

describe.each(routeTable)('$method $path', (route) => {
  it.each(callers)('%s', async (caller) => {
    const agent = agents.get(caller)!;
    const c = { ...ctx, ...(await route.prepare?.(ctx)) };
    const res = await send(agent, route, c);
    expect(res.status, JSON.stringify(res.body)).toBe(expectedStatus(route, caller));
  });

  if (route.roles) {
    it('every member of the project is refused on another project with 404', async () => {
      for (const role of projectRoles) {
        const res = await send(agents.get(`member:${role}`)!, route, { ...ctx, projectId: foreignProjectId });
        expect(res.status).toBe(404);
        expect(res.body.error.message).toMatch(/not found/);
      }
    });
  }
});

it('a project id that is not a UUID is 404 too', async () => {
  const res = await agents.get('member:planner')!.get('/api/projects/not-a-uuid');
  expect(res.status).toBe(404);
});

it('the project list shows only the caller’s drives', async () => {
  const res = await agents.get('outsider')!.get('/api/projects');
  expect(res.status).toBe(200);
  expect(res.body.map((p: { id: string }) => p.id)).toEqual([foreignProjectId]);
});

/** Routes anyone may call (signing in, resetting a password, health); tests/api/auth.test.ts covers them. */
const publicRoutes = [
  'post /api/auth/sign-in',
  'post /api/auth/sign-out',
  'post /api/auth/password-reset',
  'post /api/auth/set-password',
  'get /api/health',
];

it('the route table names every route the server registers, and only those', () => {
  // Read from the source (Express 5 keeps no path strings): the mounts in server/app.ts and each
  // router's `xRouter.get('/path', …)` lines in server/routes/*.ts.
  const norm = (p: string) =>
    p
      .replace(/\?.*$/, '')
      .replace(/:[A-Za-z]+/g, ':id')
      .replace(/(.)\/$/, '$1');
  const app = readFileSync('server/app.ts', 'utf8');
  const mounts = new Map<string, string>();
  // A router is mounted by name (`api.use('/x', xRouter)`) or made by a factory (`createXRouter(…)` makes `xRouter`).
  for (const [, prefix, made, named] of app.matchAll(/api\.use\('([^']+)',\s*(?:create(\w+Router)\(|(\w+Router)\))/g)) {
    const router = named ?? `${made[0].toLowerCase()}${made.slice(1)}`;
    mounts.set(router, `/api${prefix}`);
  }
  const registered = new Set<string>();
  for (const file of readdirSync('server/routes').filter((f) => f.endsWith('.ts'))) {
    const source = readFileSync(path.join('server/routes', file), 'utf8');
    for (const [, router, method, sub] of source.matchAll(/^\s*(\w+Router)\.(get|post|put|patch|delete)\('([^']*)'/gm)) {
      const prefix = mounts.get(router);
      if (prefix === undefined) throw new Error(`${router} in ${file} is not mounted in server/app.ts`);
      registered.add(`${method} ${norm(prefix + sub)}`);
    }
  }
  expect(registered.size).toBeGreaterThan(90); // a parse that finds nothing must not pass
  const inTable = new Set(routeTable.map((r) => `${r.method} ${norm(r.path)}`));
  const missing = [...registered].filter((r) => !inTable.has(r) && !publicRoutes.includes(r));
  const unknown = [...inTable].filter((r) => !registered.has(r));
  expect({ missing, unknown }).toEqual({ missing: [], unknown: [] });
});
