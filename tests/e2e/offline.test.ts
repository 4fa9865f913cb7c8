/**
 * The fitter's tablet with no network, from a cold start (issue 13, decision 42): the app opens
 * from its service worker and the data kept on the device; entries wait in the app's outbox
 * through reloads and are stored exactly once when the network returns, on any screen.
 */
import { and, eq } from 'drizzle-orm';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { auditLog, inspectionEntries } from '../../server/db/schema';
import { startRound } from '../../server/services/inspections';
import { startRoundInputSchema } from '../../shared/schemas/inspection';
import { launchBrowser, serveApp, signInAt } from '../support/browser';
import { addMember, makeProject, makeUser, PASSWORD, signedInAgent } from '../support/fixtures';
import { makeRoundSetup } from '../support/rounds-fixtures';

let browser: Browser;
let app: Awaited<ReturnType<typeof serveApp>>;
const api = createApp();

beforeAll(async () => {
  app = await serveApp();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

// A valid 1×1 PNG (one grey pixel) — a commonly used minimal PNG, no source.
const PNG_1X1 = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==', 'base64');

const wearField = (page: Page) => page.getByLabel('Radial wear (mm)');
const tile = (page: Page, n: number) =>
  page.getByRole('list', { name: 'Positions' }).getByRole('button', { name: new RegExp(`^Position ${n}:`) });
const outboxCount = (page: Page) => page.getByTestId('outbox-count');

async function atPosition(page: Page, n: number) {
  await expect.poll(() => page.getByRole('heading', { level: 2, name: `Position ${n}` }).isVisible(), { timeout: 15_000 }).toBe(true);
}

const signIn = (page: Page, appUrl: string, next: string, email: string) => signInAt(page, appUrl, next, email, PASSWORD);

async function driveWithOpenRound(count: number) {
  const project = await makeProject();
  const fitter = await makeUser();
  await addMember(project.id, fitter.id, 'fitter');
  const setup = await makeRoundSetup(project.id, fitter.id, { count, inStore: 1, earlierWearMm: 8 });
  const round = await db.transaction((tx) =>
    startRound(
      tx,
      project.id,
      fitter.id,
      startRoundInputSchema.parse({ startedAt: new Date().toISOString(), chainageM: 1480, crew: 'Day crew' }),
    ),
  );
  return { project, fitter, setup, round };
}

/** Waits until the service worker controls the page (so the shell is precached) and the query cache has been saved. */
async function installed(page: Page) {
  await expect
    .poll(() => page.evaluate(() => navigator.serviceWorker.ready.then(() => !!navigator.serviceWorker.controller)), { timeout: 20_000 })
    .toBe(true);
  await page.waitForTimeout(1500);
}

/** Whether the query cache saved on the device (IndexedDB kerfwise-cache) holds every one of these texts. */
async function keptOnDevice(page: Page, texts: string[]): Promise<boolean> {
  const saved = await page.evaluate(
    () =>
      new Promise<string>((resolve) => {
        const open = indexedDB.open('kerfwise-cache');
        open.onerror = () => resolve('');
        open.onsuccess = () => {
          try {
            const get = open.result.transaction('queries').objectStore('queries').get('kerfwise-query-cache');
            get.onsuccess = () => resolve(String(get.result ?? ''));
            get.onerror = () => resolve('');
          } catch {
            resolve('');
          }
        };
      }),
  );
  return texts.every((t) => saved.includes(t));
}

/**
 * The "as last synced at <site time>" note, its time within the online visit (to the minute).
 * Reference: the browser's Intl in the site's zone (sv-SE formats as YYYY-MM-DD HH:mm) — not
 * shared/site-time.ts, which the screen uses.
 */
async function expectLastSynced(page: Page, timeZone: string, from: number, until: number) {
  const note = page.getByTestId('last-synced');
  await expect.poll(() => note.count(), { timeout: 15_000 }).toBe(1);
  const text = (await note.textContent()) ?? '';
  const m = text.match(/as last synced at (\d{4}-\d{2}-\d{2} \d{2}:\d{2}) (\S+)\./);
  expect(m, text).not.toBeNull();
  expect(m![2]).toBe(timeZone);
  const fmt = new Intl.DateTimeFormat('sv-SE', {
    timeZone,
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
  });
  expect(m![1] >= fmt.format(from)).toBe(true);
  expect(m![1] <= fmt.format(until)).toBe(true);
}

it(
  'cold start offline: the shell, the drive, the open round, the cutterhead picture and a position never opened online load; 10 positions and a photo survive two reloads and arrive exactly once',
  { timeout: 180_000 },
  async () => {
    const { project, fitter, round, setup } = await driveWithOpenRound(10);
    const roundUrl = `/projects/${project.id}/rounds/${round.id}`;
    const onlineFrom = Date.now();

    // In the office, online: sign in, look at the drive and the open round.
    const context: BrowserContext = await browser.newContext({ viewport: { width: 768, height: 1024 } });
    const first = await context.newPage();
    await signIn(first, app.url, `/projects/${project.id}`, fitter.email);
    // The group's tab opens a fitter's rounds (nav-groups.ts).
    await first.getByRole('link', { name: 'Cutterhead & rounds', exact: true }).first().click();
    await first.waitForURL(/\/rounds$/);
    await first.goto(`${app.url}${roundUrl}`);
    await atPosition(first, 1);
    await first.reload(); // the second load is controlled by the service worker
    await atPosition(first, 1);
    await installed(first);
    // Kept on the device without opening them: every position's history with the layout (src/app/offline-data.ts).
    await expect.poll(() => keptOnDevice(first, [`"positions","history"`, setup.fitted[2].serial]), { timeout: 20_000 }).toBe(true);
    await first.waitForTimeout(1000); // the persister writes at most every 0.5 s
    const onlineUntil = Date.now();
    await first.close();

    // At the face: no network, the app opened from scratch.
    await context.setOffline(true);
    const page = await context.newPage();
    await page.goto(`${app.url}/projects/${project.id}`);
    const group = page.getByRole('link', { name: 'Cutterhead & rounds', exact: true }).first();
    await expect.poll(() => group.isVisible(), { timeout: 20_000 }).toBe(true);
    await group.click();
    await page.waitForURL(/\/rounds$/);
    // The rounds list says it is the device's copy, as the cutterhead and a position do.
    await expectLastSynced(page, project.siteTimeZone, onlineFrom, onlineUntil);

    // The cutterhead picture and a position's history, never opened online, show what was last synced.
    await page.goto(`${app.url}/projects/${project.id}/cutterhead`);
    const picture = page.getByRole('group', { name: /^Cutterhead seen from the face/ });
    await expect.poll(() => picture.getByRole('link').count(), { timeout: 20_000 }).toBe(10);
    await expectLastSynced(page, project.siteTimeZone, onlineFrom, onlineUntil);
    await picture.getByRole('link', { name: /^Position 3:/ }).click();
    await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), { timeout: 15_000 }).toBe('Position 3');
    await expectLastSynced(page, project.siteTimeZone, onlineFrom, onlineUntil);
    // The fixture's serial on position 3 and its one earlier measurement, 8 mm (tests/support/rounds-fixtures.ts).
    expect(await page.getByRole('link', { name: setup.fitted[2].serial, exact: true }).count()).toBeGreaterThan(0);
    expect(await page.getByRole('cell', { name: '8.0', exact: true }).count()).toBe(1);

    await page.goto(`${app.url}${roundUrl}`);
    await atPosition(page, 1);

    for (let n = 1; n <= 10; n++) {
      await atPosition(page, n);
      // derived: above the 8 mm of the earlier round, so no re-measure confirmation is asked.
      await wearField(page).fill(`${8 + n / 2}`);
      if (n === 1) {
        await page.getByLabel('Add a photo').setInputFiles({ name: 'disc-1.png', mimeType: 'image/png', buffer: PNG_1X1 });
        await expect.poll(() => page.getByRole('img', { name: 'New photo disc-1.png' }).isVisible()).toBe(true);
      }
      await page.getByRole('button', { name: 'Save position' }).click();
      if (n < 10) await atPosition(page, n + 1);
    }
    // 10 entries + 1 photo wait on the device, counted in the top bar.
    await expect.poll(() => outboxCount(page).textContent()).toContain('11 waiting');

    for (let i = 0; i < 2; i++) {
      await page.reload();
      await expect.poll(() => outboxCount(page).textContent(), { timeout: 20_000 }).toContain('11 waiting');
    }
    expect(await db.select().from(inspectionEntries).where(eq(inspectionEntries.roundId, round.id))).toHaveLength(0);

    // Back on the Overview screen, then the network returns: everything goes out from there.
    await page.getByRole('link', { name: 'Overview' }).click();
    await page.waitForURL((u) => u.pathname === `/projects/${project.id}`);
    await context.setOffline(false);
    await expect.poll(() => outboxCount(page).textContent(), { timeout: 30_000 }).toContain('All sent');

    const agent = await signedInAgent(api, fitter.email);
    const detail = await agent.get(`/api/projects/${project.id}/rounds/${round.id}`);
    expect(detail.status).toBe(200);
    expect(detail.body.entries).toHaveLength(10);
    expect(detail.body.entries.flatMap((e: { photoIds: string[] }) => e.photoIds)).toHaveLength(1);
    await context.close();
  },
);

it(
  'two tablets record the same position offline: both are in the audit trail, the later one stands, the overtaken fitter sees it in both arrival orders',
  { timeout: 120_000 },
  async () => {
    const { project, fitter, round, setup } = await driveWithOpenRound(3);
    const other = await makeUser();
    await addMember(project.id, other.id, 'fitter');
    const roundUrl = `/projects/${project.id}/rounds/${round.id}`;

    const tablets = [];
    for (const who of [fitter, other]) {
      const context = await browser.newContext({ viewport: { width: 768, height: 1024 }, serviceWorkers: 'block' });
      const page = await context.newPage();
      await signIn(page, app.url, roundUrl, who.email);
      await atPosition(page, 1);
      tablets.push({ context, page });
    }
    const [a, b] = tablets;
    // derived: A records first (earlier), B a moment later; B's 12 mm must stand.
    await a.context.setOffline(true);
    await wearField(a.page).fill('10.5');
    await a.page.getByRole('button', { name: 'Save position' }).click();
    await expect.poll(() => outboxCount(a.page).textContent()).toContain('1 waiting');
    await a.page.waitForTimeout(1100);
    await b.context.setOffline(true);
    await wearField(b.page).fill('12');
    await b.page.getByRole('button', { name: 'Save position' }).click();
    await expect.poll(() => outboxCount(b.page).textContent()).toContain('1 waiting');

    // B's tablet finds the network first, then A's.
    await b.context.setOffline(false);
    await expect.poll(() => outboxCount(b.page).textContent(), { timeout: 30_000 }).toContain('All sent');
    await a.context.setOffline(false);
    await expect.poll(() => outboxCount(a.page).textContent(), { timeout: 30_000 }).toContain('1 of your entries overtaken');

    const [stored] = await db
      .select()
      .from(inspectionEntries)
      .where(and(eq(inspectionEntries.roundId, round.id), eq(inspectionEntries.positionId, setup.positions[0].id)));
    expect(stored).toMatchObject({ wearMm: 12, recordedBy: other.id });
    const trail = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'inspection_entry'), eq(auditLog.entityId, stored.id)));
    expect(trail.map((t) => t.action).sort()).toEqual(['create', 'overtaken']);
    expect((trail.find((t) => t.action === 'overtaken')!.before as { wearMm: number }).wearMm).toBe(10.5);
    // Beside the position on A's round screen, naming B.
    await a.page.goto(`${app.url}${roundUrl}?p=1`);
    await atPosition(a.page, 1);
    await expect
      .poll(() => a.page.getByText(`Your entry for position 1 was overtaken by ${other.name}`).count(), { timeout: 30_000 })
      .toBe(1);
    // The position strip marks it too: a shape (not a colour) and words naming who overtook it.
    expect(await tile(a.page, 1).getAttribute('aria-label')).toContain(`your entry overtaken by ${other.name}`);
    expect(await tile(a.page, 1).locator('[data-mark="overtaken"] svg rect').count()).toBe(2);
    expect(await tile(a.page, 2).getAttribute('aria-label')).not.toContain('overtaken');
    expect(await tile(a.page, 2).locator('[data-mark="overtaken"]').count()).toBe(0);
    // B's entry stands: B's tablet marks nothing.
    await expect.poll(() => tile(b.page, 1).getAttribute('aria-label'), { timeout: 30_000 }).toBe('Position 1: saved');
    expect(await b.page.locator('[data-mark="overtaken"]').count()).toBe(0);

    // A dismisses the top-bar notice; it stays dismissed after a reload (kept on the device).
    await a.page.getByRole('button', { name: 'Dismiss overtaken notice' }).click();
    await expect.poll(() => outboxCount(a.page).textContent()).not.toContain('overtaken');
    await a.page.reload();
    await expect.poll(() => outboxCount(a.page).textContent(), { timeout: 30_000 }).toContain('All sent');
    await a.page.waitForTimeout(1000);
    expect(await outboxCount(a.page).textContent()).not.toContain('overtaken');

    // The other arrival order: A's earlier entry for position 2 arrives first, B's later one
    // overwrites it. A's fitter learns of it without sending anything more.
    await a.page.goto(`${app.url}${roundUrl}?p=2`);
    await atPosition(a.page, 2);
    await wearField(a.page).fill('9');
    await a.page.getByRole('button', { name: 'Save position' }).click();
    await expect.poll(() => outboxCount(a.page).textContent(), { timeout: 30_000 }).toContain('All sent');
    await b.page.waitForTimeout(1100);
    await b.page.goto(`${app.url}${roundUrl}?p=2`);
    await atPosition(b.page, 2);
    await b.context.setOffline(true);
    await wearField(b.page).fill('9.5');
    await b.page.getByRole('button', { name: 'Save position' }).click();
    await b.context.setOffline(false);
    await expect.poll(() => outboxCount(b.page).textContent(), { timeout: 30_000 }).toContain('All sent');
    await expect.poll(() => outboxCount(a.page).textContent(), { timeout: 30_000 }).toContain('1 of your entries overtaken');
    await a.page.goto(`${app.url}${roundUrl}?p=2`);
    await atPosition(a.page, 2);
    await expect
      .poll(() => a.page.getByText(`Your entry for position 2 was overtaken by ${other.name}`).count(), { timeout: 30_000 })
      .toBe(1);
    expect(await tile(a.page, 2).getAttribute('aria-label')).toContain(`your entry overtaken by ${other.name}`);
    expect(await tile(a.page, 2).locator('[data-mark="overtaken"] svg rect').count()).toBe(2);
    const [second] = await db
      .select()
      .from(inspectionEntries)
      .where(and(eq(inspectionEntries.roundId, round.id), eq(inspectionEntries.positionId, setup.positions[1].id)));
    expect(second).toMatchObject({ wearMm: 9.5, recordedBy: other.id });
    for (const t of tablets) await t.context.close();
  },
);
