/**
 * Tables at 1366 × 768 on the demo drive: an exported CSV's numbers are the numbers the screen
 * shows (same decimals), the header row and the first column stay in view while the table scrolls
 * inside its panel, cells are compact, and the forecast's last column is not cut off.
 */
import { readFile } from 'node:fs/promises';
import type { Browser, Locator, Page } from 'playwright-core';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { DEMO_PASSWORD, seedDemo } from '../../server/db/seed-demo';
import { launchBrowser, serveApp, signInThroughForm } from '../support/browser';

let browser: Browser;
let app: Awaited<ReturnType<typeof serveApp>>;
let projectId: string;
const viewport = { width: 1366, height: 768 };

beforeAll(async () => {
  ({ projectId } = await seedDemo(db));
  app = await serveApp();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

/** The CSV the panel's Export CSV button downloads, as header → field maps. */
async function exportCsv(page: Page, scope: Locator): Promise<Record<string, string>[]> {
  const [download] = await Promise.all([page.waitForEvent('download'), scope.getByRole('button', { name: 'Export CSV' }).click()]);
  const text = await readFile((await download.path())!, 'utf8');
  expect(text.startsWith('\uFEFF')).toBe(true);
  // Read by csv-parse (RFC 4180), not by our own reader.
  return parse(text.slice(1), { columns: true, skip_empty_lines: true }) as Record<string, string>[];
}

/** The cells of a table's body rows as header → text maps (headers without the sort arrow). */
async function screenRows(table: Locator): Promise<Record<string, string>[]> {
  const headers = (await table.locator('thead th').allTextContents()).map((h) => h.replace(/[▲▼]/g, '').trim());
  const rows = table.locator('tbody > tr').filter({ has: table.page().locator('td:nth-child(2)') });
  const out: Record<string, string>[] = [];
  for (const row of await rows.all()) {
    const cells = await row.locator('td').allTextContents();
    out.push(Object.fromEntries(headers.map((h, i) => [h, cells[i]?.trim() ?? ''])));
  }
  return out;
}

/** "P90 12.3P50 11.8" → the P90 figure as written ("12.3"); "≥ 51" keeps only the number. */
const p90 = (cell: string) => /P90\s*(?:≥\s*)?(-?[\d.,]+)/.exec(cell)?.[1].replaceAll(',', '') ?? '';

it('the forecast table exports what it shows, fits 1366 px and scrolls inside its panel', async () => {
  const page = await signInThroughForm(browser, app.url, 'planner@kerfwise.test', DEMO_PASSWORD, viewport);
  await page.goto(`${app.url}/projects/${projectId}/forecast`);
  const table = page.getByRole('table', { name: 'Change-out forecast by position' });
  await expect.poll(() => table.locator('tbody > tr').count(), { timeout: 30_000 }).toBeGreaterThan(10);

  const shown = await screenRows(table);
  const csv = await exportCsv(page, page.locator('main'));
  expect(csv).toHaveLength(shown.length);
  for (const row of shown) {
    const line = csv.find((c) => c.Position === row.Position);
    expect(line, `position ${row.Position} in the CSV`).toBeDefined();
    // The same text, decimals and all (derived: the CSV writes each number as its cell shows it).
    expect(line!['Wear now P90 (mm)']).toBe(p90(row['Wear now (mm)']));
    expect(line!['Limit (mm)']).toBe(row['Limit (mm)']);
    expect(line!['P90 ring']).toBe(p90(row.Ring));
    expect(line!['P90 remaining (m)']).toBe(p90(row['Remaining (m)']));
    // Chainage 5+011.7 is 5011.7 m (kilometres + metres; the demo drive's chainages are positive).
    const place = /P90\s*(\d+)\+([\d.]+)/.exec(row['Change-out at']);
    expect(line!['P90 chainage (m)']).toBe(place ? (Number(place[1]) * 1000 + Number(place[2])).toFixed(1) : '');
  }

  // Not cut off: the last column's header ends inside the panel that scrolls the table.
  const scroller = page.locator('[data-table-scroll]').first();
  const box = (await scroller.boundingBox())!;
  const last = (await table.locator('thead th').last().boundingBox())!;
  expect(last.x + last.width).toBeLessThanOrEqual(box.x + box.width + 0.5);
  expect(await scroller.evaluate((el) => el.scrollWidth <= el.clientWidth + 1)).toBe(true);
  // Compact cells: about 8 px either side (0.5 rem of the 17 px body type; common practice for dense data tables, no source).
  const padding = parseFloat(
    await table
      .locator('tbody td')
      .nth(1)
      .evaluate((td) => getComputedStyle(td).paddingLeft),
  );
  expect(padding).toBeGreaterThanOrEqual(7);
  expect(padding).toBeLessThanOrEqual(9);

  // Scrolling down inside the panel keeps the header row at the panel's top.
  expect(await scroller.evaluate((el) => el.scrollHeight > el.clientHeight)).toBe(true);
  await scroller.evaluate((el) => el.scrollBy(0, 400));
  const head = (await table.locator('thead th').first().boundingBox())!;
  expect(Math.abs(head.y - box.y)).toBeLessThanOrEqual(2);
  await page.close();
}, 180_000);

it('the order suggestions export what they show, and their first column stays while the table scrolls sideways', async () => {
  const page = await signInThroughForm(browser, app.url, 'buyer@kerfwise.test', DEMO_PASSWORD, viewport);
  await page.goto(`${app.url}/projects/${projectId}/parts`);
  const panel = page.getByRole('heading', { name: 'Order suggestions' }).locator('..');
  const table = panel.getByRole('table');
  await expect.poll(() => table.locator('tbody > tr').count(), { timeout: 30_000 }).toBeGreaterThan(0);

  const shown = await screenRows(table);
  const csv = await exportCsv(page, panel);
  expect(csv).toHaveLength(shown.length);
  for (const row of shown) {
    // The Part cell is "CODE name": the code is its first word.
    const code = row.Part.split(/\s+/)[0];
    const line = csv.find((c) => c.Code === code)!;
    expect(line, `part ${code} in the CSV`).toBeDefined();
    // "Order now: 12" or "Covered" on screen; the file has the flag and the quantity.
    const order = /Order now:\s*(\d+)/.exec(row.Order);
    expect(line['Order now'], `${code}: order now`).toBe(order ? 'Order now' : 'No');
    if (order) expect(line['Order quantity'], `${code}: order quantity`).toBe(order[1]);
    // "3 + 10" on screen: on hand and on order, whole units in the file.
    const [onHand, onOrder] = row['On hand + on order'].split('+').map((x) => x.trim().replaceAll(',', ''));
    expect(line['On hand'], `${code}: on hand`).toBe(onHand);
    expect(line['On order'], `${code}: on order`).toBe(onOrder);
    // "3,800.00 EUR" on screen, 3800.00 in the file.
    expect(line['Order value']).toBe(/[\d,]+\.\d\d/.exec(row['Order value'])![0].replaceAll(',', ''));
  }

  // Sideways: narrowed to 500 px, the table scrolls inside its panel and its first column stays at the left edge.
  const scroller = panel.locator('[data-table-scroll]');
  await scroller.evaluate((el) => (el.style.maxWidth = '500px'));
  expect(await scroller.evaluate((el) => el.scrollWidth > el.clientWidth)).toBe(true);
  const edge = (await scroller.boundingBox())!.x;
  await scroller.evaluate((el) => el.scrollBy(300, 0));
  const first = (await table.locator('tbody td').first().boundingBox())!;
  expect(Math.abs(first.x - edge)).toBeLessThanOrEqual(2);
  // The second column has moved left under it (derived: it scrolled 300 px).
  expect((await table.locator('tbody td').nth(1).boundingBox())!.x).toBeLessThan(first.x + first.width - 100);
  await page.close();
}, 180_000);
