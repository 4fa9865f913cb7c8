import { readFile } from 'node:fs/promises';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { addMember, makeProject, makeUser, PASSWORD } from '../support/fixtures';
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
  await makeSmallCatalogue(project.id);
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
  // The flag reads in words; the 2 rings the stop draws come from the stop, named by chainage and ring.
  expect(await ringRow.textContent()).toContain('Order now: 10');
  expect(await ringRow.textContent()).toMatch(/Stop at 0\+612\.3 \(ring 408\), scheduled on \d{4}-\d{2}-\d{2}: 2/);

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
