/**
 * axe-core on every screen of every role (issue 13): each demo user signs in and visits every route
 * of src/config/paths.ts their role reaches; no serious or critical violation is allowed. The rules
 * are axe's WCAG 2.x A/AA set (Deque axe-core rule descriptions).
 */
import { AxeBuilder } from '@axe-core/playwright';
import { eq } from 'drizzle-orm';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { roleCan } from '../../shared/roles';
import { paths } from '../../src/config/paths';
import { db } from '../../server/db/client';
import { cutters, inspectionRounds, positions, stops } from '../../server/db/schema';
import { DEMO_PASSWORD, demoUsers, seedDemo } from '../../server/db/seed-demo';
import { launchBrowser, serveApp } from '../support/browser';

let browser: Browser;
let app: Awaited<ReturnType<typeof serveApp>>;
let projectId = '';
const ids = { position: '', cutter: '', round: '', stop: '' };

beforeAll(async () => {
  app = await serveApp();
  browser = await launchBrowser();
  ({ projectId } = await seedDemo(db));
  const first = async <T extends { id: string }>(rows: Promise<T[]>) => (await rows)[0]?.id ?? '';
  ids.position = await first(db.select({ id: positions.id }).from(positions).where(eq(positions.projectId, projectId)).limit(1));
  ids.cutter = await first(db.select({ id: cutters.id }).from(cutters).where(eq(cutters.projectId, projectId)).limit(1));
  ids.round = await first(
    db.select({ id: inspectionRounds.id }).from(inspectionRounds).where(eq(inspectionRounds.projectId, projectId)).limit(1),
  );
  ids.stop = await first(db.select({ id: stops.id }).from(stops).where(eq(stops.projectId, projectId)).limit(1));
}, 300_000);

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

type Role = (typeof demoUsers)[number]['role'];
/** The project screens and the permission each needs (as the AppShell's navigation shows them). */
const projectScreens = (): [string, Parameters<typeof roleCan>[1] | null][] => [
  [paths.project(projectId), null],
  [paths.cutterhead(projectId), null],
  [paths.layout(projectId), null],
  [paths.position(projectId, ids.position), null],
  [paths.cutters(projectId), null],
  [paths.cutter(projectId, ids.cutter), null],
  [paths.rounds(projectId), 'rounds.read'],
  [paths.round(projectId, ids.round), 'rounds.read'],
  [paths.forecast(projectId), 'forecast.read'],
  [paths.wearFits(projectId), 'forecast.read'],
  [paths.advanceLog(projectId), 'drive.read'],
  [paths.geology(projectId), 'drive.read'],
  [paths.parts(projectId), 'parts.read'],
  [paths.downtime(projectId), 'downtime.read'],
  [paths.downtimeReport(projectId), 'downtime.read'],
  [paths.cutterCost(projectId), 'downtime.read'],
  [paths.stops(projectId), 'stops.read'],
  [paths.stopPlan(projectId), 'stops.read'],
  [paths.stop(projectId, ids.stop), 'stops.read'],
];

function screensFor(role: Role, isAdmin: boolean): string[] {
  const list: string[] = [paths.home, paths.account];
  if (role)
    list.push(
      ...projectScreens()
        .filter(([p, perm]) => !p.includes('//') && !p.endsWith('/') && (!perm || roleCan(role, perm)))
        .map(([p]) => p),
    );
  if (isAdmin) list.push(...Object.values(paths.admin));
  return list;
}

/** The serious and critical violations on the page once it has settled, as "rule: target" lines. */
async function violations(page: Page): Promise<string[]> {
  await page.waitForLoadState('networkidle').catch(() => undefined);
  await expect.poll(() => page.locator('main [aria-busy=true], main .animate-pulse').count(), { timeout: 15_000 }).toBe(0);
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa']).analyze();
  return result.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .flatMap((v) => v.nodes.map((n) => `${v.id} (${v.impact}): ${n.target.join(' ')} — ${v.help}`));
}

it('the signed-out screens have no serious or critical violations', { timeout: 120_000 }, async () => {
  const context = await browser.newContext({ viewport: { width: 768, height: 1024 }, serviceWorkers: 'block' });
  const page = await context.newPage();
  const found: string[] = [];
  for (const path of [paths.signIn, paths.requestReset, paths.setPassword]) {
    await page.goto(`${app.url}${path}`);
    found.push(...(await violations(page)).map((v) => `${path}: ${v}`));
  }
  await context.close();
  expect(found).toEqual([]);
});

describe.each(demoUsers.map((u) => [u.role ?? 'administrator', u] as const))('as the demo %s', (_label, user) => {
  it('every screen the role reaches has no serious or critical violations', { timeout: 600_000 }, async () => {
    const context = await browser.newContext({ viewport: { width: 768, height: 1024 }, serviceWorkers: 'block' });
    const page = await context.newPage();
    await page.goto(`${app.url}${paths.signIn}`);
    await page.getByLabel('E-mail').fill(user.email);
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
    const found: string[] = [];
    for (const path of screensFor(user.role, user.isAdmin)) {
      await page.goto(`${app.url}${path}`);
      found.push(...(await violations(page)).map((v) => `${path}: ${v}`));
    }
    await context.close();
    expect(found).toEqual([]);
  });
});
