/**
 * The site manager at tablet size opens Downtime, then the report, and reads the weekly downtime
 * table: the cutter change split at the local Monday (tests/support/downtime-fixtures.ts).
 */
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { launchBrowser, serveApp, signInThroughForm } from '../support/browser';
import { makeSpringDowntimeDrive } from '../support/downtime-fixtures';
import { addMember, makeUser, PASSWORD } from '../support/fixtures';
import { insertStop } from '../support/stops-fixtures';
import { db } from '../../server/db/client';
import { downtimeEvents } from '../../server/db/schema';

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

/** The table inside the panel headed `title` (the innermost block holding that heading). */
const panelTable = (page: Page, title: string) =>
  page
    .locator('div', { has: page.getByRole('heading', { name: title, exact: true }) })
    .last()
    .getByRole('table');

/** The cells of the row whose first cell is `first`, by column header. */
async function rowByHeader(page: Page, title: string, first: string): Promise<Record<string, string>> {
  const table = panelTable(page, title);
  const headers = (await table.locator('thead th').allTextContents()).map((h) => h.replace(/[▲▼]/g, '').trim());
  const cells = await table
    .locator('tbody tr')
    .filter({ has: page.locator('td:first-child', { hasText: first }) })
    .first()
    .locator('td')
    .allTextContents();
  return Object.fromEntries(headers.map((h, i) => [h, cells[i]]));
}

it('the site manager opens the weekly downtime table (a planned stop’s event ahead does not move the default period)', async () => {
  const project = await makeSpringDowntimeDrive();
  // A planned stop's downtime ahead (the only future event the API accepts): it must not move the default period.
  const aheadMs = Date.now() + 30 * 86_400_000;
  const stop = await insertStop(project.id, { status: 'scheduled', plannedStart: new Date(aheadMs), expectedHours: 12 });
  await db
    .insert(downtimeEvents)
    .values({ projectId: project.id, startAt: new Date(aheadMs), endAt: new Date(aheadMs + 12 * 3_600_000), stopId: stop.id });
  const manager = await makeUser();
  await addMember(project.id, manager.id, 'site_manager');

  const page = await signInThroughForm(browser, app.url, manager.email, PASSWORD);
  await page.waitForURL(new RegExp(`/projects/${project.id}$`));

  const menu = page.getByRole('button', { name: 'Menu' });
  if (await menu.isVisible()) await menu.click();
  // The site manager's 'Parts & downtime' group opens on Downtime (src/components/layout/nav-groups.ts).
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Parts & downtime' }).click();
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 20_000 }).toBe('Downtime');
  // The two events of the fixture, in site time; the planned stop's event ahead lies after the default period.
  expect(
    await page
      .getByRole('status')
      .filter({ hasText: /event\(s\)/ })
      .textContent(),
  ).toBe('2 event(s), 23.0 h, from 2026-02-02 to 2026-03-29. Times in site time (Europe/Zurich).');

  await page.getByRole('navigation', { name: 'Downtime' }).getByRole('link', { name: 'Report' }).click();
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 20_000 }).toBe('Downtime report');
  // Without a period the report shows the eight ISO weeks up to the last day with data up to today (Sun 2026-03-29),
  // even with the planned stop's event ahead.
  expect(await page.getByLabel('From').inputValue()).toBe('2026-02-02');
  expect(await page.getByLabel('To (included)').inputValue()).toBe('2026-03-29');

  // derived (fixture): the cutter change runs Sun 16:00 → Mon 04:00 CET: 8 h in 2026-W12, 4 h in 2026-W13.
  const change = await rowByHeader(page, 'Hours by cause and week', 'Cutter change');
  expect(change).toMatchObject({ 'Cutter work': 'yes', '2026-W11': '0', '2026-W12': '8.0', '2026-W13': '4.0', 'Total (h)': '12.0' });
  const all = await rowByHeader(page, 'Hours by cause and week', 'All causes');
  expect(all).toMatchObject({ '2026-W12': '8.0', '2026-W13': '15.0', 'Total (h)': '23.0' });
  // The spring night of the breakdown is 11 real hours on the night shift.
  expect(await rowByHeader(page, 'Hours by cause and shift', 'Machine breakdown')).toMatchObject({ Day: '0', Night: '11.0' });
  expect(await page.getByRole('img', { name: /Pareto chart of downtime causes/ }).count()).toBe(1);
});
