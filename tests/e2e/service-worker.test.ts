/**
 * The service worker's two jobs besides opening offline (issue 13, decision 42): a new version
 * waits and offers "Reload to update" — never on a round screen — and pressing it runs the new
 * version; and Background Sync sends the outbox with no Kerfwise window open.
 *
 * The built client is copied to a folder of this file's own, so the test can change the served
 * sw.js (a new version) without touching dist/.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { jobs } from '../../jobs/index';
import { createApp } from '../../server/app';
import { db } from '../../server/db/client';
import { inspectionEntries } from '../../server/db/schema';
import { ensureClientBuilt } from '../../server/devenv/client-build';
import { startRound } from '../../server/services/inspections';
import { startRoundInputSchema } from '../../shared/schemas/inspection';
import { launchBrowser, signInAt } from '../support/browser';
import { addMember, makeProject, makeUser, PASSWORD } from '../support/fixtures';
import { makeRoundSetup } from '../support/rounds-fixtures';

let browser: Browser;
let server: Server;
let appUrl: string;
let clientDir: string;

beforeAll(async () => {
  ensureClientBuilt('.');
  clientDir = mkdtempSync(path.join(tmpdir(), 'kerfwise-sw-'));
  cpSync('dist', clientDir, { recursive: true });
  server = createApp({ clientDir, jobs }).listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  appUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await new Promise((resolve) => (server ? server.close(resolve) : resolve(undefined)));
  if (clientDir) rmSync(clientDir, { recursive: true, force: true });
});

const banner = (page: Page) => page.getByRole('button', { name: 'Reload to update' });

async function driveWithOpenRound() {
  const project = await makeProject();
  const fitter = await makeUser();
  await addMember(project.id, fitter.id, 'fitter');
  const setup = await makeRoundSetup(project.id, fitter.id, { count: 3, earlierWearMm: 8 });
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

/** Signs in through the form and waits until the service worker controls the page. */
async function signedInPage(context: BrowserContext, next: string, email: string): Promise<Page> {
  const page = await context.newPage();
  await signInAt(page, appUrl, next, email, PASSWORD);
  await expect
    .poll(() => page.evaluate(() => navigator.serviceWorker.ready.then(() => !!navigator.serviceWorker.controller)), { timeout: 20_000 })
    .toBe(true);
  return page;
}

it(
  'a new version waits and offers "Reload to update", not on round screens; pressing it runs the new version',
  { timeout: 120_000 },
  async () => {
    const { project, fitter, round } = await driveWithOpenRound();
    const overview = `/projects/${project.id}`;
    const context = await browser.newContext({ viewport: { width: 768, height: 1024 } });
    const page = await signedInPage(context, overview, fitter.email);
    await page.waitForTimeout(1000);
    expect(await banner(page).count()).toBe(0); // nothing new yet

    // A new version on the server: the same worker plus an answer that names it (derived: any
    // byte change makes the browser install the new worker).
    const swPath = path.join(clientDir, 'sw.js');
    const original = readFileSync(swPath, 'utf8');
    const version = `test-${Date.now()}`;
    writeFileSync(
      swPath,
      `${original}\nself.addEventListener('message', (e) => { if (e.data && e.data.type === 'VERSION') e.source.postMessage({ version: '${version}' }); });\n`,
    );
    try {
      // A fitter on the round screen when the new version arrives: it waits, the offer is not shown.
      await page.getByRole('link', { name: 'Cutterhead & rounds', exact: true }).first().click();
      await page.waitForURL(/\/rounds$/);
      await page.locator(`a[href="/projects/${project.id}/rounds/${round.id}"]`).first().click();
      await page.waitForURL((u) => u.pathname === `/projects/${project.id}/rounds/${round.id}`);
      await page.evaluate(() => navigator.serviceWorker.getRegistration().then((r) => r?.update()));
      await expect
        .poll(() => page.evaluate(() => navigator.serviceWorker.getRegistration().then((r) => !!r?.waiting)), { timeout: 20_000 })
        .toBe(true);
      await page.waitForTimeout(1500);
      expect(await banner(page).count()).toBe(0);
      // The list of rounds is a round screen too.
      await page.getByRole('link', { name: 'Cutterhead & rounds', exact: true }).first().click();
      await page.waitForURL(/\/rounds$/);
      await page.waitForTimeout(500);
      expect(await banner(page).count()).toBe(0);

      // Off the round screens, the offer shows; pressing it reloads into the new version.
      await page.getByRole('link', { name: 'Overview' }).click();
      await page.waitForURL((u) => u.pathname === overview);
      await expect.poll(() => banner(page).count(), { timeout: 10_000 }).toBe(1);
      await page.evaluate(() => ((window as unknown as { beforeUpdate: boolean }).beforeUpdate = true));
      await banner(page).click();
      await expect
        .poll(() => page.evaluate(() => (window as unknown as { beforeUpdate?: boolean }).beforeUpdate === undefined).catch(() => false), {
          timeout: 20_000,
        })
        .toBe(true); // the page was reloaded
      await expect.poll(() => page.getByRole('link', { name: 'Overview' }).isVisible(), { timeout: 20_000 }).toBe(true);
      const answered = await page.evaluate(
        () =>
          new Promise<string>((resolve) => {
            navigator.serviceWorker.addEventListener('message', (e) => resolve((e.data as { version: string }).version));
            navigator.serviceWorker.controller?.postMessage({ type: 'VERSION' });
            setTimeout(() => resolve('no answer'), 5000);
          }),
      );
      expect(answered).toBe(version);
      expect(await page.evaluate(() => navigator.serviceWorker.getRegistration().then((r) => !!r?.waiting))).toBe(false);
      expect(await banner(page).count()).toBe(0);
    } finally {
      writeFileSync(swPath, original);
      await context.close();
    }
  },
);

/** The Background Sync tags the page's service worker registration holds. */
const syncTags = (page: Page) =>
  page.evaluate(() =>
    navigator.serviceWorker.ready.then((r) => (r as unknown as { sync: { getTags(): Promise<string[]> } }).sync.getTags()),
  );

it(
  'Background Sync: an entry queued offline is sent by the service worker once the network is back, with no Kerfwise window open',
  { timeout: 120_000 },
  async () => {
    const { project, fitter, round, setup } = await driveWithOpenRound();
    const roundUrl = `/projects/${project.id}/rounds/${round.id}`;
    const context = await browser.newContext({ viewport: { width: 768, height: 1024 } });
    const page = await signedInPage(context, roundUrl, fitter.email);
    await expect.poll(() => page.getByRole('heading', { level: 2, name: 'Position 1' }).isVisible(), { timeout: 15_000 }).toBe(true);

    await context.setOffline(true);
    // derived: above the fixture's earlier 8 mm, so no re-measure confirmation is asked.
    await page.getByLabel('Radial wear (mm)').fill('9.5');
    await page.getByRole('button', { name: 'Save position' }).click();
    await expect.poll(() => page.getByTestId('outbox-count').textContent()).toContain('1 waiting');
    // The outbox asked the browser for a sync; with no network Chromium keeps it pending.
    expect(await syncTags(page)).toEqual(['kerfwise-outbox']);

    // The app is closed (a blank tab keeps the browser context); then the network returns.
    const blank = await context.newPage();
    await page.close();
    await context.setOffline(false);
    await expect
      .poll(async () => (await db.select().from(inspectionEntries).where(eq(inspectionEntries.roundId, round.id))).length, {
        timeout: 30_000,
      })
      .toBe(1);
    const [stored] = await db.select().from(inspectionEntries).where(eq(inspectionEntries.roundId, round.id));
    expect(stored).toMatchObject({ positionId: setup.positions[0].id, wearMm: 9.5, recordedBy: fitter.id });

    // Opened again: nothing waits on the device, the sync is done, and the entry is not sent twice.
    await blank.goto(`${appUrl}${roundUrl}`);
    await expect.poll(() => blank.getByTestId('outbox-count').textContent(), { timeout: 20_000 }).toContain('All sent');
    expect(await syncTags(blank)).toEqual([]);
    await blank.waitForTimeout(1500);
    expect(await db.select().from(inspectionEntries).where(eq(inspectionEntries.roundId, round.id))).toHaveLength(1);
    await context.close();
  },
);
