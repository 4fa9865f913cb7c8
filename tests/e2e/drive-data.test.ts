/**
 * The planner's drive data in a browser at tablet size: a bad advance log is refused with its
 * row and column and nothing stored; a good one fills the server-paged, server-sorted log; the
 * geology import draws the long-section strip with its ground types and the machine's position.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import Papa from 'papaparse';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { projects } from '../../server/db/schema';
import { formatChainage } from '../../shared/domain/chainage';
import { launchBrowser, serveApp, signInThroughForm } from '../support/browser';
import { addMember, makeProject, makeUser, PASSWORD } from '../support/fixtures';

const goodLog = path.resolve('tests/fixtures/good-csv/advance-log-comma-iso.csv');
const badLog = path.resolve('tests/fixtures/bad-csv/duplicate-ring.csv');
const longSection = path.resolve('tests/fixtures/good-csv/geology-long-section.csv');

let browser: Browser;
let app: Awaited<ReturnType<typeof serveApp>>;

beforeAll(async () => {
  app = await serveApp();
  browser = await launchBrowser();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

/** Chooses a file in the import panel and sends it. */
async function importFile(page: Page, file: string) {
  await page.getByLabel(/Choose (a CSV|another) file/).setInputFiles(file);
  await page.getByRole('button', { name: `Import ${path.basename(file)}` }).click();
}

const penetrationColumn = async (page: Page) =>
  page.getByRole('table', { name: 'Advance log' }).locator('tbody > tr > td:nth-child(5)').allTextContents();

it('a planner imports an advance log (a bad file first) and a long section, pages and sorts the log, and sees the strip', async () => {
  // The fixtures' drive: chainage from about 2450 m, increasing, site time zone Europe/Zurich.
  const project = await makeProject();
  await db.update(projects).set({ startChainageM: 2400 }).where(eq(projects.id, project.id));
  const user = await makeUser();
  await addMember(project.id, user.id, 'planner');
  const rows = Papa.parse<Record<string, string>>(readFileSync(goodLog, 'utf8'), { header: true, skipEmptyLines: true }).data;
  expect(rows.length).toBe(12); // the fixture: rings 101–112, one remark spanning two lines

  const page = await signInThroughForm(browser, app.url, user.email, PASSWORD);
  await page.waitForURL(new RegExp(`/projects/${project.id}$`));
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Drive data' }).click();
  await page.getByRole('navigation', { name: 'Pages of this group' }).getByRole('link', { name: 'Advance log' }).click();
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 20_000 }).toBe('Advance log');
  expect(await page.getByText('Up to 50,000 rows / 50 MB per file').isVisible()).toBe(true);

  // A bad file: ring 103 twice. The refusal names row 5, column Ring, and nothing is stored.
  await importFile(page, badLog);
  const problems = page.getByRole('table', { name: 'Problems in the file' });
  await expect.poll(() => problems.locator('tbody > tr').count(), { timeout: 15_000 }).toBeGreaterThan(0);
  expect(await page.getByRole('alert').first().textContent()).toMatch(/nothing was imported/i);
  const duplicate = problems.locator('tbody > tr').filter({ hasText: /103/ });
  expect(await duplicate.locator('td').nth(0).textContent()).toBe('5');
  expect(await duplicate.locator('td').nth(1).textContent()).toBe('Ring');
  expect(
    await page
      .getByRole('status')
      .filter({ hasText: /strokes?\b/ })
      .first()
      .textContent(),
  ).toMatch(/^0 strokes/);

  // The good file: every row lands in the table.
  await importFile(page, goodLog);
  await expect
    .poll(
      () =>
        page
          .getByRole('status')
          .filter({ hasText: /imported:/ })
          .count(),
      { timeout: 15_000 },
    )
    .toBe(1);
  expect(await page.getByText(/imported: 12 new, 0 already stored and unchanged, 0 replaced/).count()).toBe(1);
  const table = page.getByRole('table', { name: 'Advance log' });
  await expect.poll(() => table.locator('tbody > tr').count()).toBe(12);

  // Paging on the server: 10 a page, page 2 holds the last 2 (newest ring first by default).
  await page.getByLabel('Rows per page').selectOption('10');
  await expect.poll(() => table.locator('tbody > tr').count()).toBe(10);
  await page.getByRole('button', { name: 'Next page' }).click();
  await expect.poll(() => page.getByText('Page 2 of 2').count()).toBe(1);
  await expect.poll(() => table.locator('tbody > tr > td:first-child').allTextContents()).toEqual(['102', '101']);

  // Sorting on the server by penetration: the first page holds the 10 smallest, ascending.
  const penetrations = rows.map((r) => Number(r['Penetration (mm/rev)'])).sort((a, b) => a - b);
  await table.getByRole('button', { name: /Penetration/ }).click();
  await expect.poll(() => penetrationColumn(page)).toEqual(penetrations.slice(0, 10).map((v) => v.toFixed(1)));
  expect(await table.getByRole('columnheader', { name: /Penetration/ }).getAttribute('aria-sort')).toBe('ascending');
  expect(await page.getByText('Page 1 of 2').count()).toBe(1);
  await table.getByRole('button', { name: /Penetration/ }).click();
  await expect
    .poll(() => penetrationColumn(page))
    .toEqual(
      penetrations
        .slice(-10)
        .reverse()
        .map((v) => v.toFixed(1)),
    );

  // The long section: imported, drawn as a strip with its four ground types and the machine.
  await page.getByRole('navigation', { name: 'Pages of this group' }).getByRole('link', { name: 'Geology' }).click();
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 20_000 }).toBe('Geology');
  await importFile(page, longSection);
  await expect.poll(() => page.getByText(/imported: 4 sections saved/).count(), { timeout: 15_000 }).toBe(1);
  const strip = page.getByRole('group', { name: 'Long section along chainage' });
  await expect.poll(() => strip.getByRole('img').count()).toBe(5); // four sections and the machine
  const legend = page.getByRole('list', { name: 'Legend' });
  for (const ground of ['Marl', 'Sandstone', 'Fault zone', 'Granite']) {
    // The ground names arrive with the ground types' own refetch, which may come after the sections'.
    await expect.poll(() => strip.getByRole('img', { name: new RegExp(`: ${ground}, water head`) }).count(), { timeout: 10_000 }).toBe(1);
    expect(await legend.getByText(ground, { exact: true }).count()).toBe(1);
  }
  expect(await strip.getByRole('img', { name: /Fault zone.*no stop allowed: fractured ground, no face support/ }).count()).toBe(1);
  expect(await legend.getByText('No stop allowed').count()).toBe(1);
  // The end of ring 112, the last stroke of the log.
  expect(await strip.getByRole('img', { name: `Machine ${formatChainage(2468)}` }).count()).toBe(1);
  // Focus on the no-stop section tells its reason.
  await strip.getByRole('img', { name: /Fault zone/ }).focus();
  expect(
    await page.getByText(/2\+610\.0 to 2\+655\.0: Fault zone, water head 24\.5 m above the axis, no stop allowed/).count(),
  ).toBeGreaterThanOrEqual(1);
  // The ground types came in by name.
  const groundRows = page
    .getByRole('table')
    .filter({ has: page.getByRole('columnheader', { name: 'CERCHAR class' }) })
    .locator('tbody > tr');
  expect((await groundRows.locator('td:first-child').allTextContents()).sort()).toEqual(['Fault zone', 'Granite', 'Marl', 'Sandstone']);
  await page.close();
}, 120_000);
