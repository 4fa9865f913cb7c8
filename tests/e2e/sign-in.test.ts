import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { addMember, makeProject, makeUser, PASSWORD } from '../support/fixtures';
import { launchBrowser, serveApp } from '../support/browser';

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

it('a user signs in at tablet size, sees their drive, and signs out', async () => {
  const project = await makeProject();
  const user = await makeUser();
  await addMember(project.id, user.id, 'fitter');

  const page = await browser.newPage({ viewport: { width: 768, height: 1024 } });
  await page.goto(`${app.url}/`);
  await page.waitForURL(/\/sign-in/);

  // A wrong password first: the message is shown and nothing else happens.
  await page.getByLabel('E-mail').fill(user.email);
  await page.getByLabel('Password').fill('not my password');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect.poll(() => page.getByRole('alert').textContent()).toMatch(/do not match/);

  await page.getByLabel('Password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  // One drive only: the picker is skipped and the drive opens.
  await page.waitForURL(new RegExp(`/projects/${project.id}$`));
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe(project.name);
  expect(await page.getByText('Fitter', { exact: false }).first().isVisible()).toBe(true);

  // At 768 px the navigation sits behind the menu button; every target is at least 44 px high.
  const menu = page.getByRole('button', { name: 'Menu' });
  if (await menu.isVisible()) await menu.click();
  const signOut = page.getByRole('button', { name: 'Sign out' });
  const box = await signOut.boundingBox();
  expect(box!.height).toBeGreaterThanOrEqual(44);
  await signOut.click();
  await page.waitForURL(/\/sign-in/);

  // The session is gone: going back to the drive asks for sign-in again.
  await page.goto(`${app.url}/projects/${project.id}`);
  await page.waitForURL(/\/sign-in/);
  await page.close();
});
