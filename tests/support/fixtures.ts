/** Test data made through the real database; every name is unique so test files can run side by side. */
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import type { Express } from 'express';
import { desc, sql } from 'drizzle-orm';
import type { ProjectRole } from '../../shared/roles';
import { db } from '../../server/db/client';
import { caughtMail, memberships, projects, users } from '../../server/db/schema';
import { hashPassword } from '../../server/lib/password';

export const PASSWORD = 'correct horse battery staple';
let passwordHash: Promise<string> | undefined;

export const uniq = (prefix: string) => `${prefix}-${randomUUID().slice(0, 8)}`;

export async function makeUser(opts: { isAdmin?: boolean; active?: boolean } = {}) {
  passwordHash ??= hashPassword(PASSWORD);
  const email = `${uniq('user')}@kerfwise.test`;
  const [u] = await db
    .insert(users)
    .values({
      email,
      name: email.split('@')[0],
      isAdmin: opts.isAdmin ?? false,
      active: opts.active ?? true,
      passwordHash: await passwordHash,
    })
    .returning();
  return u;
}

export async function makeProject() {
  const [p] = await db
    .insert(projects)
    .values({
      name: uniq('Test drive'),
      excavatedDiameterM: 6.2,
      startChainageM: 0,
      driveDirection: 'increasing',
      siteTimeZone: 'Europe/Zurich',
    })
    .returning();
  return p;
}

export async function addMember(projectId: string, userId: string, role: ProjectRole) {
  await db.insert(memberships).values({ projectId, userId, role });
}

/** A supertest agent signed in as the user (it keeps the session cookie). */
export async function signedInAgent(app: Express, email: string, password = PASSWORD) {
  const agent = request.agent(app);
  const res = await agent.post('/api/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}

/** Waits for the local mail catcher to hold a message to `to` (delivery runs in the background). */
export async function waitForMail(to: string, subjectIncludes = '', timeoutMs = 10_000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const [m] = await db
      .select()
      .from(caughtMail)
      .where(sql`${to} = any(${caughtMail.toAddresses}) and ${caughtMail.subject} ilike ${`%${subjectIncludes}%`}`)
      .orderBy(desc(caughtMail.id))
      .limit(1);
    if (m) return m;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
}

export const tokenFromLink = (text: string) => /token=([A-Za-z0-9_-]+)/.exec(text)?.[1] ?? '';
