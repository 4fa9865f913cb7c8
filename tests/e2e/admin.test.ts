/**
 * Admin → Mail, Projects and Jobs in Chromium at 1366 × 768, with a site zone far from the test
 * machine's (UTC): times show in the site's zone with the zone named, not in the browser's.
 */
import { eq } from 'drizzle-orm';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { jobs } from '../../jobs/index';
import { db } from '../../server/db/client';
import { jobRuns, outbox, projects } from '../../server/db/schema';
import { enqueueMail } from '../../server/lib/mail';
import { makeUser, PASSWORD, uniq } from '../support/fixtures';
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

const ZONE = 'Pacific/Auckland';

it('Admin → Mail filters by kind and recipient, newest first, names the stop or person, in the site zone', async () => {
  expect(Intl.DateTimeFormat().resolvedOptions().timeZone, 'the machine runs in UTC, so the site zone differs from it').toBe('UTC');
  // Named to come first, so it is also the installation's zone (decision 30: the first project listed).
  const [project] = await db
    .insert(projects)
    .values({
      name: `000 ${uniq('Auckland drive')}`,
      excavatedDiameterM: 7.1,
      startChainageM: 0,
      driveDirection: 'increasing',
      siteTimeZone: ZONE,
    })
    .returning();
  const stop = await insertStop(project.id, { status: 'scheduled', chainageM: 612.3, ringNumber: 408 });
  const invited = await makeUser();
  const crew = `${uniq('crew')}@kerfwise.test`;
  const tag = uniq('mail');
  await db.transaction(async (tx) => {
    await enqueueMail(tx, {
      kind: 'invitation',
      about: { userId: invited.id },
      to: [invited.email],
      subject: `${tag} invitation`,
      text: 'Hello',
    });
    await enqueueMail(tx, {
      kind: 'stop_published',
      projectId: project.id,
      about: { stopId: stop.id },
      to: [crew],
      subject: `${tag} stop published`,
      text: 'Work pack',
    });
  });
  // Fixed instants, so the expected wall times come from the outside rule, not from our formatter:
  // New Zealand daylight time (UTC+13) runs from the last Sunday of September to the first Sunday
  // of April (New Zealand Daylight Time Order 2007), so 2026-01-15 21:05 UTC is 2026-01-16 10:05.
  await db
    .update(outbox)
    .set({ createdAt: new Date('2026-01-15T20:00:00Z') })
    .where(eq(outbox.subject, `${tag} invitation`));
  await db
    .update(outbox)
    .set({ createdAt: new Date('2026-01-15T21:05:00Z') })
    .where(eq(outbox.subject, `${tag} stop published`));
  // Standard time (UTC+12) in June: 2026-06-01 00:30 UTC is 12:30 in Auckland.
  await db.insert(jobRuns).values({
    job: jobs[0].name,
    trigger: 'admin',
    startedAt: new Date('2026-06-01T00:30:00Z'),
    finishedAt: new Date('2026-06-01T00:31:00Z'),
    outcome: 'ok',
    summary: `${tag} job summary`,
  });

  const admin = await makeUser({ isAdmin: true });
  const page = await signInThroughForm(browser, app.url, admin.email, PASSWORD, { width: 1366, height: 768 });
  await page.goto(`${app.url}/admin/mail`);
  const table = page.getByRole('table', { name: 'Mail, newest first' });
  const mine = table.locator('tbody > tr').filter({ hasText: tag });
  await expect.poll(() => mine.count(), { timeout: 20_000 }).toBe(2);
  // Newest first: the stop mail (21:05 UTC) above the invitation (20:00 UTC).
  expect(await mine.nth(0).textContent()).toContain(`${tag} stop published`);
  expect(await mine.nth(1).textContent()).toContain(`${tag} invitation`);
  // What each was about: the stop by its chainage (0+612.3), the person by name and address.
  expect(await mine.nth(0).textContent()).toContain('Stop at 0+612.3');
  expect(await mine.nth(1).textContent()).toContain(`${invited.name} (${invited.email})`);
  // The drive's mail in its site zone, named; the installation's mail in the installation's zone (here the same).
  expect(await mine.nth(0).textContent()).toContain(`2026-01-16 10:05 ${ZONE}`);
  expect(await mine.nth(1).textContent()).toContain(`2026-01-16 09:00 ${ZONE}`);

  // Filter by kind: only the stop mail stays.
  await page.getByLabel('Kind').selectOption('stop_published');
  await expect.poll(() => mine.count(), { timeout: 15_000 }).toBe(1);
  expect(await mine.first().textContent()).toContain(`${tag} stop published`);
  // Filter by recipient (part of the address): the crew member's mail; another address finds nothing.
  await page.getByLabel('Kind').selectOption('');
  await page.getByLabel('Recipient (part of the address)').fill(crew.split('@')[0]);
  await expect.poll(() => mine.count(), { timeout: 15_000 }).toBe(1);
  expect(await mine.first().textContent()).toContain(crew);
  await page.getByLabel('Recipient (part of the address)').fill(`${crew.split('@')[0]}%`);
  await expect.poll(() => table.getByText('No mail matches these filters.').count(), { timeout: 15_000 }).toBe(1);
  // Opening a message shows its text.
  await page.getByLabel('Recipient (part of the address)').fill('');
  await mine
    .first()
    .getByRole('button', { name: new RegExp(`${tag} stop published to ${crew}`) })
    .click();
  await expect.poll(() => table.locator('tr[id^="mail-"]').textContent(), { timeout: 15_000 }).toContain('Work pack');

  // Admin → Projects: one column headed "Members".
  await page.goto(`${app.url}/admin/projects`);
  const headers = page.getByRole('table').first().getByRole('columnheader');
  await expect.poll(() => headers.count(), { timeout: 20_000 }).toBeGreaterThan(3);
  expect((await headers.allTextContents()).filter((h) => h.trim() === 'Members')).toHaveLength(1);

  // Admin → Jobs: the run in the site zone, named.
  await page.goto(`${app.url}/admin/jobs`);
  const run = page
    .getByRole('table', { name: `Last runs of ${jobs[0].label}` })
    .locator('tbody > tr')
    .filter({ hasText: `${tag} job summary` });
  await expect.poll(() => run.count(), { timeout: 20_000 }).toBe(1);
  expect(await run.textContent()).toContain(`2026-06-01 12:30 ${ZONE}`);
  await page.close();
}, 120_000);

it('Admin → Mail refuses a kind it does not know, naming the kinds', async () => {
  const admin = await makeUser({ isAdmin: true });
  const page = await signInThroughForm(browser, app.url, admin.email, PASSWORD, { width: 1366, height: 768 });
  const res = await page.request.get(`${app.url}/api/admin/mail?kind=nonsense`);
  expect(res.status()).toBe(400);
  expect(JSON.stringify(await res.json())).toContain('stop_published');
  await page.close();
});
