import { readFile } from 'node:fs/promises';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { addMember, makeProject, makeUser, PASSWORD } from '../support/fixtures';
import { db } from '../../server/db/client';
import { stockMovements } from '../../server/db/schema';
import { makeCutterhead } from '../support/drive-fixtures';
import { makeSmallCatalogue } from '../support/parts-fixtures';
import { insertStop } from '../support/stops-fixtures';
import { launchBrowser, serveApp, signInThroughForm } from '../support/browser';

let browser: Browser;
let app: Awaited<ReturnType<typeof serveApp>>;

beforeAll(async () => {
  app = await serveApp();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

it('the buyer sees an order suggestion caused by a scheduled stop and exports it as CSV', async () => {
  // A small invented drive: four 17″ positions, 3 rings on hand (minimum order 10), and a stop in three days changing two positions.
  const project = await makeProject();
  const drive = await makeCutterhead(project.id, 4);
  const catalogue = await makeSmallCatalogue(project.id);
  await insertStop(
    project.id,
    { status: 'scheduled', chainageM: 612.3, ringNumber: 408, plannedStart: new Date(Date.now() + 3 * 86_400_000) },
    [drive.positions[1].id, drive.positions[2].id],
  );
  const buyer = await makeUser();
  await addMember(project.id, buyer.id, 'buyer');

  // Downloads are accepted by default in a new page.
  const page = await signInThroughForm(browser, app.url, buyer.email, PASSWORD);
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));

  await page.goto(`${app.url}/projects/${project.id}`);
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Parts & downtime' }).click();
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 20_000 }).toBe('Parts');

  const panel = page.getByRole('heading', { name: 'Order suggestions' }).locator('..');
  const ringRow = panel.locator('tbody > tr').filter({ hasText: 'RING17' });
  await expect.poll(() => ringRow.count(), { timeout: 20_000 }).toBe(1);
  // The flag reads in words; "Why?" opens the figures: the 2 rings the stop draws come from the stop, named by chainage and ring.
  expect(await ringRow.textContent()).toContain('Order now: 10');
  await ringRow.getByRole('button', { name: /Why\?/ }).click();
  const details = panel.locator(`[id="suggestion-${catalogue.ring.id}"]`);
  await expect
    .poll(() => details.textContent(), { timeout: 10_000 })
    .toMatch(/Stop at 0\+612\.3 \(ring 408\), scheduled on \d{4}-\d{2}-\d{2}: 2/);

  const [download] = await Promise.all([page.waitForEvent('download'), panel.getByRole('button', { name: 'Export CSV' }).click()]);
  expect(download.suggestedFilename()).toMatch(/^kerfwise-order-suggestions-\d{4}-\d{2}-\d{2}\.csv$/);
  const csv = await readFile((await download.path())!, 'utf8');
  expect(csv.startsWith('\uFEFF'), 'the Export CSV button writes the UTF-8 BOM (shared/csv-writer.ts)').toBe(true);
  const [header, ...lines] = csv.trim().split(/\r?\n/);
  expect(header).toContain('Order now');
  expect(header).toContain('Demand from');
  const ring = lines.find((l) => l.startsWith('RING17,'));
  expect(ring).toContain('Order now,10,3800.00'); // the order value as the screen shows it: two decimals
  expect(ring).toMatch(/Stop at 0\+612\.3 \(ring 408\), scheduled on \d{4}-\d{2}-\d{2}: 2/);
  await page.close();
}, 120_000);

it('at 1366 px the suggestions show every column without wrapping a name word by word, and placing the order clears them', async () => {
  // The same invented drive: rings (Invented Forge) and assemblies (Invented Cutter Works) to order now.
  const project = await makeProject();
  const drive = await makeCutterhead(project.id, 4);
  const catalogue = await makeSmallCatalogue(project.id);
  // No assembly in ready stock: the two the stop takes must be ordered too (derived: 0 + 2 rebuilt back < 2 + safety stock).
  await db.insert(stockMovements).values({ projectId: project.id, partId: catalogue.assembly.id, qty: -3, kind: 'count' });
  await insertStop(project.id, { status: 'scheduled', chainageM: 612.3, plannedStart: new Date(Date.now() + 3 * 86_400_000) }, [
    drive.positions[1].id,
    drive.positions[2].id,
  ]);
  const buyer = await makeUser();
  await addMember(project.id, buyer.id, 'buyer');
  const page = await signInThroughForm(browser, app.url, buyer.email, PASSWORD, { width: 1366, height: 900 });
  await page.goto(`${app.url}/projects/${project.id}/parts`);
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 20_000 }).toBe('Parts');

  const panel = page.getByRole('heading', { name: 'Order suggestions' }).locator('..');
  const table = panel.getByRole('table');
  await expect.poll(() => table.locator('tbody > tr').filter({ hasText: 'Order now' }).count(), { timeout: 20_000 }).toBe(2);
  // Every column inside the panel's width at 1366 px (no sideways scrolling needed).
  const fits = await table.evaluate((t) => {
    const box = t.parentElement!;
    return { scroll: box.scrollWidth, client: box.clientWidth };
  });
  expect(fits.scroll, 'the suggestions table fits its panel at 1366 px').toBeLessThanOrEqual(fits.client + 1);
  // "RING17 17″ ring, constant section" (5 words) reads in at most two lines, never one word a line.
  const nameCell = table.locator('tbody > tr').filter({ hasText: 'RING17' }).locator('td').first();
  const lines = await nameCell.evaluate((td) => {
    const span = td.querySelector('span')!;
    return Math.round(span.getBoundingClientRect().height / parseFloat(getComputedStyle(span).lineHeight));
  });
  expect(lines, 'part name lines').toBeLessThanOrEqual(2);

  // Orders tab: fill from the suggestions (two suppliers) and save: one order per supplier.
  await page.getByRole('tab', { name: 'Orders and receiving' }).click();
  // An empty form is refused in the browser, each field saying what it needs; nothing is saved.
  await page.getByRole('button', { name: 'Save the order' }).click();
  await expect.poll(() => page.getByText('The quantity must be a whole number.').count(), { timeout: 10_000 }).toBe(1);
  expect(await page.getByText('Enter the order number.').count()).toBe(1);
  expect(await page.getByLabel('Quantity, line 1').inputValue()).toBe('');
  await page.getByRole('button', { name: /Fill from the suggestions \(2 to order now\)/ }).click();
  await page.getByLabel('Order number').fill('PO-E2E');
  await expect
    .poll(() => page.getByText(/^Saves as /).textContent())
    .toMatch(/order PO-E2E-1 to Invented Cutter Works \(1 line\); order PO-E2E-2 to Invented Forge \(1 line\)/);
  await page.getByRole('button', { name: 'Save the 2 orders' }).click();
  await expect
    .poll(() => page.getByRole('alert').or(page.getByRole('status')).allTextContents(), { timeout: 20_000 })
    .toContainEqual(
      expect.stringMatching(/Saved order PO-E2E-1 \(Invented Cutter Works, 1 line\(s\)\), order PO-E2E-2 \(Invented Forge, 1 line\(s\)\)/),
    );
  await expect.poll(() => page.getByRole('heading', { name: /^Order PO-E2E-/ }).count(), { timeout: 20_000 }).toBe(2);
  expect(await page.getByRole('button', { name: /Fill from the suggestions \(0 to order now\)/ }).isDisabled()).toBe(true);

  // Back on the suggestions: nothing left to order (both orders are on the way).
  await page.getByRole('tab', { name: 'Stock and suggestions' }).click();
  await expect.poll(() => table.locator('tbody > tr').filter({ hasText: 'RING17' }).count(), { timeout: 20_000 }).toBe(1);
  expect(await table.locator('tbody > tr').filter({ hasText: 'Order now' }).count()).toBe(0);
  expect(await table.locator('tbody > tr').filter({ hasText: 'RING17' }).textContent()).toContain('Covered');
  await page.close();
}, 120_000);
