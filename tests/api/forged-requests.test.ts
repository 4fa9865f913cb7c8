/**
 * Forged cross-site requests (OWASP CSRF Prevention Cheat Sheet: Fetch Metadata and standard
 * origin headers) and body types: a state-changing request from anywhere but Kerfwise's own
 * pages is refused with 403 before any handler runs, and a body of a type the route does not take
 * with 415 — so a plain HTML form cannot publish a stop. Scripts without browser headers still work.
 */
import { and, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { stops } from '../../server/db/schema';
import { addMember, makeProject, makeUser, signedInAgent, uniq } from '../support/fixtures';
import { stopContext, stopIn } from '../support/stops-fixtures';
import { bodyTypesFor } from '../../server/middleware/same-origin';

const app = createApp();

let agent: Awaited<ReturnType<typeof signedInAgent>>;
let projectId: string;
let crewId: string;

beforeAll(async () => {
  const project = await makeProject();
  projectId = project.id;
  const planner = await makeUser({ isAdmin: true }); // crews are the administrator's; stops the planner's
  await addMember(projectId, planner.id, 'planner');
  agent = await signedInAgent(app, planner.email);
  ({ crewId } = await stopContext(projectId));
});

const crewName = () => uniq('Crew');

describe('origin of state-changing requests', () => {
  it.each([
    ['Sec-Fetch-Site: cross-site', { 'Sec-Fetch-Site': 'cross-site' }],
    ['Sec-Fetch-Site: same-site (another port or subdomain)', { 'Sec-Fetch-Site': 'same-site' }],
    ['Origin of another site', { Origin: 'http://attacker.example' }],
    ['Origin of another port of this host', { Origin: 'http://kerfwise.test:8080' }],
    ['Origin "null" (sandboxed or file page)', { Origin: 'null' }],
  ])('refuses %s with 403 and changes nothing', async (_label, headers) => {
    const name = crewName();
    const res = await agent.post(`/api/projects/${projectId}/crews`).set(headers).send({ name, members: [] });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toMatch(/did not come from a Kerfwise page/);
    const list = await agent.get(`/api/projects/${projectId}/crews`);
    expect(JSON.stringify(list.body)).not.toContain(name);
  });

  it.each([
    ['Sec-Fetch-Site: same-origin', { 'Sec-Fetch-Site': 'same-origin' }],
    ['Origin = APP_URL', { Origin: 'http://kerfwise.test' }],
    ['no browser headers (a script)', {}],
  ])('accepts %s', async (_label, headers) => {
    const res = await agent.post(`/api/projects/${projectId}/crews`).set(headers).send({ name: crewName(), members: [] });
    expect(res.status).toBe(201);
  });

  it('a GET from another site is still answered (reads change nothing; CORS keeps the answer from the other page)', async () => {
    const res = await agent.get(`/api/projects/${projectId}/crews`).set('Sec-Fetch-Site', 'cross-site');
    expect(res.status).toBe(200);
  });
});

describe('body types', () => {
  it.each([
    ['application/x-www-form-urlencoded', 'name=Forged'],
    ['text/plain', '{"name":"Forged","members":[]}'],
    ['multipart/form-data; boundary=x', '--x\r\nContent-Disposition: form-data; name="name"\r\n\r\nForged\r\n--x--\r\n'],
  ])('a JSON route refuses %s with 415', async (type, body) => {
    const res = await agent.post(`/api/projects/${projectId}/crews`).set('Content-Type', type).send(body);
    expect(res.status).toBe(415);
    expect(res.body.error.message).toMatch(/takes application\/json/);
  });

  it('a body without a Content-Type is refused; a bodiless action passes on to its route', async () => {
    const noType = await agent.post(`/api/projects/${projectId}/crews`).set('Content-Length', '4').send(Buffer.from('name'));
    expect([415, 400]).toContain(noType.status);
    const stopId = await stopIn(projectId, crewId, 'scheduled');
    const publish = await agent.post(`/api/projects/${projectId}/stops/${stopId}/publish`);
    expect(publish.status).toBe(200);
    const [row] = await db
      .select()
      .from(stops)
      .where(and(eq(stops.id, stopId), eq(stops.projectId, projectId)));
    expect(row.publishedAt).not.toBeNull();
  });

  it('each upload route names the type it takes', () => {
    expect(bodyTypesFor('/projects/x/photos')).toEqual(['multipart/form-data']);
    expect(bodyTypesFor('/projects/x/strokes/import')).toContain('text/csv');
    expect(bodyTypesFor('/projects/x/crews')).toEqual(['application/json']);
  });
});
