/**
 * The main navigation in headless Chromium, for each role of the demo drive: the groups sit on one
 * row at 1366×768 and at 768×1024 (measured from the element boxes), every target is at least
 * 44 px high, the current place is marked by aria-current and a visible bar (not colour alone),
 * and the Overview's links lead to the screens named beside them.
 */
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { DEMO_PASSWORD, seedDemo } from '../../server/db/seed-demo';
import { launchBrowser, serveApp, signInThroughForm } from '../support/browser';

let browser: Browser;
let app: Awaited<ReturnType<typeof serveApp>>;
let projectId: string;

beforeAll(async () => {
  ({ projectId } = await seedDemo(db));
  app = await serveApp();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

const roles = [
  { email: 'fitter@kerfwise.test', groups: ['Overview', 'Cutterhead & rounds', 'Forecast & stops', 'Drive data', 'Admin'] },
  {
    email: 'planner@kerfwise.test',
    groups: ['Overview', 'Cutterhead & rounds', 'Forecast & stops', 'Drive data', 'Parts & downtime', 'Admin'],
  },
  {
    email: 'buyer@kerfwise.test',
    groups: ['Overview', 'Cutterhead & rounds', 'Forecast & stops', 'Drive data', 'Parts & downtime', 'Admin'],
  },
  {
    email: 'manager@kerfwise.test',
    groups: ['Overview', 'Cutterhead & rounds', 'Forecast & stops', 'Drive data', 'Parts & downtime', 'Admin'],
  },
] as const;

const viewports = [
  { width: 1366, height: 768 },
  { width: 768, height: 1024 },
];

const heading = (page: Page) => page.getByRole('heading', { level: 1 }).textContent();

/** The boxes of the main navigation's entries. */
async function navBoxes(page: Page) {
  const items = page.getByRole('navigation', { name: 'Main' }).getByRole('link');
  await expect.poll(() => items.count(), { timeout: 20_000 }).toBeGreaterThan(0);
  const out: { name: string; x: number; y: number; width: number; height: number }[] = [];
  for (const link of await items.all()) out.push({ name: (await link.textContent())!.trim(), ...(await link.boundingBox())! });
  return out;
}

/** Width of the bottom border (the bar) of an element, in px. */
const barWidth = (page: Page, name: string, nav = 'Main') =>
  page
    .getByRole('navigation', { name: nav, exact: true })
    .getByRole('link', { name, exact: true })
    .evaluate(
      (el) => parseFloat(getComputedStyle(el).borderBottomWidth) * (getComputedStyle(el).borderBottomColor === 'rgba(0, 0, 0, 0)' ? 0 : 1),
    );

describe.each(roles)('$email', ({ email, groups }) => {
  it.each(viewports)('the groups sit on one row at $width×$height, each at least 44 px high', async (viewport) => {
    const page = await signInThroughForm(browser, app.url, email, DEMO_PASSWORD, viewport);
    await page.goto(`${app.url}/projects/${projectId}`);
    const boxes = await navBoxes(page);
    expect(boxes.map((b) => b.name)).toEqual(groups);
    // One row: every entry starts at the same height (within a pixel) and ends inside the window.
    const top = boxes[0].y;
    for (const b of boxes) {
      expect(Math.abs(b.y - top), `${b.name} at y=${b.y}, first at ${top}`).toBeLessThanOrEqual(1);
      expect(b.x + b.width, b.name).toBeLessThanOrEqual(viewport.width);
      expect(b.height, b.name).toBeGreaterThanOrEqual(44); // common practice: 44 px targets (DEVELOPERS.md, "Look")
    }
    await page.close();
  });
});

it('marks the current group and page with aria-current and a bar', async () => {
  const page = await signInThroughForm(browser, app.url, 'planner@kerfwise.test', DEMO_PASSWORD, { width: 1366, height: 768 });
  await page.goto(`${app.url}/projects/${projectId}`);
  const main = page.getByRole('navigation', { name: 'Main' });
  await expect.poll(() => main.getByRole('link', { name: 'Overview' }).getAttribute('aria-current'), { timeout: 20_000 }).toBe('page');
  expect(await barWidth(page, 'Overview')).toBe(4);
  expect(await barWidth(page, 'Drive data')).toBe(0);

  await main.getByRole('link', { name: 'Drive data' }).click();
  await expect.poll(() => heading(page), { timeout: 20_000 }).toBe('Advance log');
  expect(await main.getByRole('link', { name: 'Drive data' }).getAttribute('aria-current')).toBe('location');
  expect(await main.getByRole('link', { name: 'Overview' }).getAttribute('aria-current')).toBeNull();
  expect(await barWidth(page, 'Drive data')).toBe(4);
  const pagesNav = page.getByRole('navigation', { name: 'Pages of this group' });
  expect(await pagesNav.getByRole('link', { name: 'Advance log' }).getAttribute('aria-current')).toBe('page');
  expect(await barWidth(page, 'Advance log', 'Pages of this group')).toBe(4);
  expect(await barWidth(page, 'Geology', 'Pages of this group')).toBe(0);

  await pagesNav.getByRole('link', { name: 'Geology' }).click();
  await expect.poll(() => heading(page), { timeout: 20_000 }).toBe('Geology');
  expect(await pagesNav.getByRole('link', { name: 'Geology' }).getAttribute('aria-current')).toBe('page');
  expect(await pagesNav.getByRole('link', { name: 'Advance log' }).getAttribute('aria-current')).toBeNull();
  await page.close();
});

/** Each role's Overview links, by their words, to the screen where the item is dealt with. */
const overviewLinks = [
  {
    email: 'fitter@kerfwise.test',
    screens: [
      { name: /^(Start a|Continue the) round$/, path: /\/rounds(\/[0-9a-f-]+)?$/ },
      { name: /^Position \d+$/, path: /\/positions\/[0-9a-f-]+$/ },
      { name: /^Open the work pack$/, path: /\/stops\/[0-9a-f-]+$/ },
    ],
    click: { name: /^Position \d+$/, heading: /^Position \d+$/ },
  },
  {
    email: 'planner@kerfwise.test',
    screens: [
      { name: /^Position \d+$/, path: /\/stops\/plan$/ },
      { name: /^How the forecast was made$/, path: /\/forecast$/ },
      { name: /^Stop at /, path: /\/stops\/[0-9a-f-]+$/ },
      { name: /^Import strokes$/, path: /\/advance-log$/ },
      { name: /^Plan a round$/, path: /\/rounds$/ },
    ],
    click: { name: /^How the forecast was made$/, heading: /forecast/i },
  },
  {
    email: 'buyer@kerfwise.test',
    screens: [{ name: /^Order /, path: /\/parts$/ }],
    click: { name: /^Order /, heading: /^Parts$/ },
  },
  {
    email: 'manager@kerfwise.test',
    screens: [
      { name: /^Open the downtime report$/, path: /\/downtime\/report$/ },
      { name: /^Give a cause$/, path: /\/downtime$/ },
    ],
    click: { name: /^Give a cause$/, heading: /^Downtime$/ },
  },
];

it.each(overviewLinks)('the Overview of $email links each item to the screen where it is dealt with', async ({ email, screens, click }) => {
  const page = await signInThroughForm(browser, app.url, email, DEMO_PASSWORD, { width: 1366, height: 768 });
  await page.goto(`${app.url}/projects/${projectId}`);
  const overview = page.getByRole('region', { name: 'Start of the day' });
  await expect.poll(() => overview.getByRole('heading', { level: 2 }).count(), { timeout: 60_000 }).toBeGreaterThan(0);
  const links = await overview
    .getByRole('link')
    .evaluateAll((els) => els.map((e) => ({ name: (e.textContent ?? '').trim(), href: e.getAttribute('href') ?? '' })));
  expect(links.length).toBeGreaterThan(0);
  for (const link of links) {
    expect(link.href.startsWith(`/projects/${projectId}/`), link.href).toBe(true);
    const screen = screens.find((s) => s.name.test(link.name));
    expect(screen, `no screen expected for the link “${link.name}”`).toBeDefined();
    expect(link.href, link.name).toMatch(screen!.path);
  }
  await overview.getByRole('link', { name: click.name }).first().click();
  await expect.poll(() => heading(page), { timeout: 60_000 }).toMatch(click.heading);
  await page.close();
});
