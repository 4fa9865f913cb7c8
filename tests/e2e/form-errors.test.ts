/**
 * The one form pattern in the browser (DEVELOPERS.md, decision 31). When the server refuses a form
 * with issues (a 400 naming fields), each issue shows beside its own field and the server's message
 * above the form: the first three checks make a refusal only the server can give (the client checks
 * with the same schema, so the data changes behind the open form, or the rule needs the stored data).
 * The others check that the converted forms name a value the shared schema refuses beside its field
 * before anything is sent, and that a good value is saved.
 */
import { eq } from 'drizzle-orm';
import type { Browser, Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { crews, parts } from '../../server/db/schema';
import { workshopConditions } from '../../shared/schemas/parts';
import { launchBrowser, serveApp, signInThroughForm } from '../support/browser';
import { makeSpringDowntimeDrive } from '../support/downtime-fixtures';
import { addMember, makeProject, makeUser, PASSWORD } from '../support/fixtures';
import { makeSmallCatalogue } from '../support/parts-fixtures';
import { stopContext } from '../support/stops-fixtures';

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

const heading = (page: Page) => page.getByRole('heading', { level: 1 }).textContent();

/** The text the control points to with aria-describedby (its error line), or null when it has none. */
async function describedBy(page: Page, control: Locator): Promise<string | null> {
  const id = await control.getAttribute('aria-describedby');
  return id ? page.locator(`[id="${id}"]`).textContent() : null;
}

async function signedIn(projectId: string, role: Parameters<typeof addMember>[2]): Promise<Page> {
  const user = await makeUser();
  await addMember(projectId, user.id, role);
  return signInThroughForm(browser, app.url, user.email, PASSWORD);
}

it('downtime: an event overlapping a stored one is refused, and the overlap shows beside the start', async () => {
  const project = await makeSpringDowntimeDrive();
  const page = await signedIn(project.id, 'site_manager');
  await page.goto(`${app.url}/projects/${project.id}/downtime`);
  await expect.poll(() => heading(page), { timeout: 20_000 }).toBe('Downtime');

  await page.getByRole('button', { name: 'Add a downtime event' }).click();
  const form = page.getByRole('form', { name: 'New downtime event' });
  // The fixture's cutter change runs Sun 2026-03-22 16:00 → Mon 04:00 (site time): 18:00–20:00 lies inside it.
  await form.getByLabel('Start (site time)').fill('2026-03-22T18:00');
  await form.getByLabel('End (site time)').fill('2026-03-22T20:00');
  await form.getByRole('button', { name: 'Add event' }).click();

  const start = form.getByLabel('Start (site time)');
  await expect.poll(() => start.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
  expect(await describedBy(page, start)).toMatch(/^Overlaps /);
  // The end is not the field in question.
  expect(await form.getByLabel('End (site time)').getAttribute('aria-invalid')).toBeNull();
  expect(await form.getByRole('alert').count()).toBeGreaterThan(0);
});

it('parts: a bill-of-materials line naming a part removed meanwhile is refused beside that line', async () => {
  const project = await makeProject();
  await makeSmallCatalogue(project.id);
  const [seal] = await db
    .insert(parts)
    .values({ projectId: project.id, code: 'SEAL17', name: 'Seal kit', kind: 'seal-kit', unitCost: '90.00', leadTimeMeanDays: 10 })
    .returning();
  const page = await signedIn(project.id, 'buyer');
  await page.goto(`${app.url}/projects/${project.id}/parts?tab=workshop`);
  await expect.poll(() => page.getByRole('button', { name: 'Save the workshop settings' }).count(), { timeout: 20_000 }).toBe(1);

  const condition = workshopConditions[1].label;
  await page.getByLabel(`Outcome for ${condition}`).selectOption('rebuild');
  const row = page.locator('tr', { has: page.getByLabel(`Outcome for ${condition}`) });
  await row.getByRole('button', { name: 'Add a part' }).click();
  const partSelect = page.getByLabel(`Part 1 for ${condition}`, { exact: true });
  await partSelect.selectOption(seal.id);
  // Another buyer removes the seal kit while this form is open.
  await db.delete(parts).where(eq(parts.id, seal.id));
  await page.getByRole('button', { name: 'Save the workshop settings' }).click();

  await expect.poll(() => partSelect.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
  expect(await describedBy(page, partSelect)).toBe('Unknown part.');
  expect(await page.getByText('names a part that is not in this drive’s catalogue').count()).toBe(1);
});

it('stops: scheduling with a crew removed meanwhile is refused beside the crew', async () => {
  const project = await makeProject();
  const { stopId, crewId } = await stopContext(project.id);
  const page = await signedIn(project.id, 'planner');
  await page.goto(`${app.url}/projects/${project.id}/stops/${stopId}`);
  await expect.poll(() => page.getByRole('button', { name: 'Schedule the stop' }).count(), { timeout: 20_000 }).toBe(1);

  await page.getByLabel(/^Planned start/).fill('2030-06-03T07:00');
  await page.getByLabel('Expected duration (h)').fill('12');
  await page.getByLabel('Crew', { exact: true }).selectOption(crewId);
  // The crew is disbanded while the planner fills in the form.
  await db.delete(crews).where(eq(crews.id, crewId));
  await page.getByRole('button', { name: 'Schedule the stop' }).click();

  const crew = page.getByLabel('Crew', { exact: true });
  await expect.poll(() => crew.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
  // The select's error line sits in the same field block, under the select.
  expect(await crew.locator('xpath=..').textContent()).toContain('Not a crew of this drive.');
  expect(await page.getByLabel('Expected duration (h)').getAttribute('aria-invalid')).toBeNull();
});

it('advance log: the filters are checked with the list query schema as typed; a bad ring is named beside its field', async () => {
  // derived (fixture): the spring drive logs rings 1 and 2 (tests/support/downtime-fixtures.ts).
  const project = await makeSpringDowntimeDrive();
  const page = await signedIn(project.id, 'site_manager');
  await page.goto(`${app.url}/projects/${project.id}/advance-log`);
  await expect.poll(() => heading(page), { timeout: 20_000 }).toBe('Advance log');
  const count = page.getByRole('status').filter({ hasText: /strokes?\b/ });
  await expect.poll(() => count.textContent(), { timeout: 20_000 }).toMatch(/^2 strokes/);

  await page.getByLabel('Ring from').fill('2');
  await expect.poll(() => count.textContent(), { timeout: 20_000 }).toMatch(/^1 stroke match the filters/);

  const ringTo = page.getByLabel('Ring to');
  await ringTo.fill('1.5');
  await expect.poll(() => ringTo.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
  expect(await describedBy(page, ringTo)).toBe('ringTo must be a whole number.');
  // A value the list cannot use does not reach it: the last valid filters stay.
  expect(await count.textContent()).toMatch(/^1 stroke match the filters/);

  await page.getByRole('button', { name: 'Clear filters' }).click();
  await expect.poll(() => count.textContent(), { timeout: 20_000 }).toMatch(/^2 strokes/);
  expect(await page.getByLabel('Ring from').inputValue()).toBe('');
});

it('downtime site settings and the parts catalogue: the shared schema names a bad value beside its field before anything is sent', async () => {
  const project = await makeSpringDowntimeDrive();
  const page = await signedIn(project.id, 'site_manager');
  await page.goto(`${app.url}/projects/${project.id}/downtime`);
  await expect.poll(() => heading(page), { timeout: 20_000 }).toBe('Downtime');
  const settings = page.getByRole('form', { name: 'Site settings' });
  await settings.getByRole('button', { name: 'Add a shift' }).click();
  await settings.getByLabel('Shift 3 name').fill('Day');
  await settings.getByLabel('Shift 3 starts').fill('12:00');
  const gap = settings.getByLabel('Standstill after (minutes between strokes)');
  await gap.fill('2');
  await settings.getByRole('button', { name: 'Save site settings' }).click();
  await expect.poll(() => gap.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
  expect(await describedBy(page, gap)).toBe('At least 5 minutes.');
  expect(await settings.getByText('Two shifts have the same name.').count()).toBe(1);

  const buyer = await signedIn(project.id, 'buyer');
  await buyer.goto(`${app.url}/projects/${project.id}/parts?tab=catalogue`);
  await expect.poll(() => buyer.getByRole('button', { name: 'Add the part' }).count(), { timeout: 20_000 }).toBe(1);
  await buyer.getByLabel('Code').fill('RING19');
  await buyer.getByLabel('Name').fill('19″ ring');
  await buyer.getByLabel('Disc size (in)').fill('');
  await buyer.getByLabel('Unit cost').fill('410,50');
  await buyer.getByLabel('Lead time, mean (days)').fill('21');
  await buyer.getByRole('button', { name: 'Add the part' }).click();
  const disc = buyer.getByLabel('Disc size (in)');
  await expect.poll(() => disc.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
  expect(await describedBy(buyer, disc)).toBe('Give the disc size of a ring or a cutter assembly.');
  expect(await buyer.getByLabel('Unit cost').getAttribute('aria-invalid')).toBeNull();
  // With the size given the part is saved (the decimal comma read as a point).
  await disc.fill('19');
  await buyer.getByRole('button', { name: 'Add the part' }).click();
  await expect.poll(() => buyer.getByText('RING19 added to the catalogue.').count(), { timeout: 20_000 }).toBe(1);
  const [saved] = await db.select().from(parts).where(eq(parts.code, 'RING19'));
  expect(saved).toMatchObject({ projectId: project.id, discSizeIn: 19, unitCost: '410.50', leadTimeMeanDays: 21 });
});

it('downtime causes: a blank new name is named beside the rename field; a good one is saved', async () => {
  const project = await makeSpringDowntimeDrive();
  const page = await signedIn(project.id, 'site_manager');
  await page.goto(`${app.url}/projects/${project.id}/downtime`);
  await expect.poll(() => heading(page), { timeout: 20_000 }).toBe('Downtime');
  await page.getByRole('button', { name: 'Rename Cutter change' }).click();
  const name = page.getByLabel('New name for Cutter change');
  await name.fill('   ');
  await page.getByRole('button', { name: 'Save name' }).click();
  await expect.poll(() => name.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
  expect(await describedBy(page, name)).toBe('Name the cause.');
  await name.fill('Disc change');
  await page.getByRole('button', { name: 'Save name' }).click();
  await expect.poll(() => page.getByText('Cutter change is now Disc change.').count(), { timeout: 20_000 }).toBe(1);
  expect(await page.getByLabel('New name for Cutter change').count()).toBe(0);
});
