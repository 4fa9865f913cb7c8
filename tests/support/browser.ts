/** Headless Chromium from Debian's package, driven by playwright-core; and the app served from dist/. */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { chromium, type Browser, type Page } from 'playwright-core';
import { vi } from 'vitest';
import { createApp } from '../../server/app';
import { jobs } from '../../jobs/index';
import { ensureClientBuilt } from '../../server/devenv/client-build';
import { chromiumPath, ensureDebianPackages } from '../../server/devenv/debian-packages';

export const CHROMIUM = chromiumPath();

// A browser test walks a whole flow (sign-in hashes a password, pages load chunks): on a loaded
// 2-core machine that takes longer than a unit test's 30 s. Every file that drives the browser
// imports this module, so its tests get two minutes unless they name their own limit (the bench
// imports it too, outside vitest).
if (process.env.VITEST) vi.setConfig({ testTimeout: 120_000 });

/**
 * Launches Debian's Chromium. Missing, it fails the file's set-up loudly with the apt-get command
 * (the global set-up installs it when run as root; a worker never installs anything itself).
 */
export function launchBrowser(): Promise<Browser> {
  ensureDebianPackages(['chromium'], { host: { isRoot: () => false } });
  return chromium.launch({
    executablePath: CHROMIUM,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

/** Builds the client if stale and serves it with the API on a free port. */
export async function serveApp(): Promise<{ url: string; close: () => Promise<void> }> {
  ensureClientBuilt('.');
  const server: Server = createApp({ clientDir: 'dist', jobs }).listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  const { port } = server.address() as AddressInfo;
  return { url: `http://127.0.0.1:${port}`, close: () => new Promise((resolve) => server.close(() => resolve())) };
}

/** A new page at tablet size, signed in through the sign-in form (as a person would). */
export async function signInThroughForm(
  browser: Browser,
  appUrl: string,
  email: string,
  password: string,
  viewport = { width: 768, height: 1024 },
) {
  const page = await browser.newPage({ viewport });
  await page.goto(`${appUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
  return page;
}

/**
 * Opens `next` on a page nobody is signed in on, is sent to the sign-in form, signs in there and
 * waits until the app has brought the person back to `next` (the path a link or a bookmark named).
 */
export async function signInAt(page: Page, appUrl: string, next: string, email: string, password: string): Promise<void> {
  await page.goto(`${appUrl}${next}`);
  await page.waitForURL(/\/sign-in/);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => u.pathname === next);
}
