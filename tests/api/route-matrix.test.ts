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
  const [round] = await db.insert(inspectionRounds).values({ projectId: project.id, startedAt: new Date('2026-11-19T06:00:00Z'), chainageM: 650 }).returning();
  const [entry] = await db.insert(inspectionEntries).values({ projectId: project.id, roundId: round.id, positionId: drive.positions[1].id, clientKey: randomUUID(), wearMm: 3 }).returning();
  await db.insert(entrySubmissions).values({ projectId: project.id, clientKey: entry.clientKey, entryId: entry.id });
  const storedName = await storeFile('photos', 'png', Buffer.from('89504e470d0a1a0a', 'hex'));
  const [photo] = await db.insert(photos).values({ projectId: project.id, entryId: entry.id, clientKey: randomUUID(), storedName, mimeType: 'image/png', sizeBytes: 8 }).returning();
  ctx = {
    projectId: project.id, otherUserId: other.id, positionId: drive.positions[0].id, cutterId: drive.store[0].id, roundId: round.id, photoId: photo.id,
    ...(await stopContext(project.id)),
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

const fill = (path: string, c: RouteContext) =>
  path.replace(/:(projectId|otherUserId|positionId|cutterId|roundId|photoId|stopId)/g, (_, k: keyof RouteContext) => c[k]);

describe.each(routeTable)('$method $path', (route) => {
  it.each(callers)('%s', async (caller) => {
    const agent = agents.get(caller)!;
    const c = { ...ctx, ...(await route.prepare?.(ctx)) };
    const res = await agent[route.method](fill(route.path, c)).send(route.body?.(c) as object);
    expect(res.status, JSON.stringify(res.body)).toBe(expectedStatus(route, caller));
  });

  if (route.roles) {
    it('every member of the project is refused on another project with 404', async () => {
      for (const role of projectRoles) {
        const res = await agents.get(`member:${role}`)![route.method](fill(route.path, { ...ctx, projectId: foreignProjectId })).send(route.body?.(ctx) as object);
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
