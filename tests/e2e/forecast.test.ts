import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { DEMO_PASSWORD, seedDemo } from '../../server/db/seed-demo';
import { formatChainage } from '../../shared/domain/chainage';
import { launchBrowser, serveApp, signInThroughForm } from '../support/browser';

let browser: Browser;
let app: Awaited<ReturnType<typeof serveApp>>;
let projectId: string;

beforeAll(async () => {
  // The demo drive: six months of simulated strokes and inspections (idempotent; other files may load it too).
  ({ projectId } = await seedDemo(db));
  app = await serveApp();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

it('the planner reads the change-out forecast of the demo drive, how one was made, and the wear rates behind it', async () => {
  const page = await signInThroughForm(browser, app.url, 'planner@kerfwise.test', DEMO_PASSWORD);

  await page.goto(`${app.url}/projects/${projectId}/forecast`);
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 20_000 }).toBe('Change-out forecast');
  const table = page.getByRole('table', { name: 'Change-out forecast by position' });
  const rows = table.locator('tbody > tr').filter({ has: page.getByRole('button', { name: /How was the forecast of position/ }) });
  const api = await (await page.request.get(`${app.url}/api/projects/${projectId}/forecast`)).json();
  await expect.poll(() => rows.count()).toBe(api.positions.length);
  expect(api.positions.length).toBeGreaterThan(10);

  // The remaining-metres cell reads "P90 51 / P50 54" (or "≥ 51" beyond known ground): read the P90 figure.
  const headers = await table.getByRole('columnheader').allTextContents();
  const remainingColumn = headers.findIndex((h) => h.startsWith('Remaining (m)'));
  expect(remainingColumn).toBeGreaterThan(0);
  const p90Remaining = (await rows.locator(`td:nth-child(${remainingColumn + 1})`).allTextContents()).map((text) =>
    Number(/P90\s*(?:≥\s*)?([\d.]+)/.exec(text)?.[1]),
  );
  expect(p90Remaining.every(Number.isFinite)).toBe(true);
  expect(p90Remaining).toEqual([...p90Remaining].sort((a, b) => a - b));
  // Demo drive (server/db/demo): the most worn discs are due within a few hundred metres.
  expect(p90Remaining[0]).toBeLessThan(300);

  // How was the first one made: the walk starts where the machine is now.
  const first = rows.first();
  const number = (await first.locator('td').first().textContent())?.trim();
  await first.getByRole('button', { name: /How was the forecast of position/ }).click();
  const explanation = table.locator('tr[id^="explain-"]');
  await expect.poll(() => explanation.getByRole('region', { name: 'Sections walked' }).count(), { timeout: 15_000 }).toBe(1);
  expect(await explanation.getByRole('heading', { level: 3 }).textContent()).toBe(`How the forecast of position ${number} was made`);
  const walked = explanation.getByRole('region', { name: 'Sections walked' }).locator('tbody > tr');
  expect(await walked.count()).toBeGreaterThan(0);
  expect(await walked.first().locator('td').first().textContent()).toBe(formatChainage(api.currentChainageM));
  expect(await explanation.getByRole('region', { name: 'Rates used' }).locator('tbody > tr').count()).toBeGreaterThan(0);

  // The wear rates: one row per ground type, and the ground the machine has not cut yet stands on its prior.
  await page.goto(`${app.url}/projects/${projectId}/wear-fits`);
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 20_000 }).toBe('Wear rates by ground');
  const grounds: { name: string }[] = await (await page.request.get(`${app.url}/api/projects/${projectId}/ground-types`)).json();
  const rateTable = page.getByRole('table').first();
  const rateRows = rateTable.locator('tbody > tr');
  await expect.poll(() => rateRows.count()).toBe(grounds.length);
  expect((await rateRows.locator('td:first-child').allTextContents()).sort()).toEqual(grounds.map((g) => g.name).sort());
  expect(await rateRows.filter({ hasText: 'Prior only' }).count()).toBeGreaterThanOrEqual(1);
  expect(await rateRows.filter({ hasText: /Blended, [\d.]+ % site/ }).count()).toBeGreaterThanOrEqual(1);

  // The cutterhead picture coloured by metres left: the most urgent position reads "under 100 m left".
  await page.goto(`${app.url}/projects/${projectId}/cutterhead`);
  await page.getByRole('button', { name: 'Metres left (P90)' }).click();
  const urgent = page.getByRole('link', { name: new RegExp(`^Position ${number}: .*under 100 m left`) });
  await expect.poll(() => urgent.count(), { timeout: 20_000 }).toBe(1);
  await page.close();
}, 120_000);
