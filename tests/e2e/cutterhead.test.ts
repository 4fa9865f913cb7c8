import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { addMember, makeProject, makeUser } from '../support/fixtures';
import { launchBrowser, serveApp } from '../support/browser';
import { makeWornCutterhead, signedInPage } from '../support/cutterhead-fixtures';

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

const header = 'number,track_radius_mm,class,disc_size_in,tilt_deg,wear_limit_mm,twin_disc,angle_deg';
const csvFile = (name: string, lines: string[]) => ({ name, mimeType: 'text/csv', buffer: Buffer.from([header, ...lines].join('\n')) });

it('a planner imports a layout from CSV (a bad file first), sees it on the picture and opens a position', async () => {
  const project = await makeProject(); // 6.2 m bore
  const planner = await makeUser();
  await addMember(project.id, planner.id, 'planner');
  const page = await signedInPage(browser, app.url, planner.email);
  await page.goto(`${app.url}/projects/${project.id}/layout`);
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Cutterhead layout');

  // Row 3 of the file (the second position) has a wear limit of 0: the error names row and column, nothing is saved.
  await page
    .getByLabel('Choose a CSV file')
    .setInputFiles(csvFile('bad-layout.csv', ['1,60,centre,17,,25,yes,', '2,900,face,17,,0,no,', '3,1800,face,17,,25,no,']));
  const problem = page.getByRole('row').filter({ hasText: 'The wear limit must be more than 0 mm.' });
  await expect.poll(() => problem.count()).toBe(1);
  expect(await problem.getByRole('cell').allTextContents()).toEqual(['3', 'wear_limit_mm', 'The wear limit must be more than 0 mm.']);
  expect(await page.getByText('nothing was imported').count()).toBe(1);
  const saved = await page.request.get(`${app.url}/api/projects/${project.id}/positions`);
  expect(await saved.json()).toEqual([]);

  const good = [
    '1,60,centre,17,,25,yes,',
    '2,900,face,17,,25,no,',
    '3,1800,face,17,,25,no,',
    '4,2700,face,17,,25,no,',
    '5,3050,gauge,17,45,12,no,',
  ];
  await page.getByLabel('Choose a CSV file').setInputFiles(csvFile('layout.csv', good));
  await expect.poll(() => page.getByText('layout.csv imported: 5 new, 0 changed, 0 unchanged.').count()).toBe(1);
  // The editor now holds the five rows; saved numbers are read-only.
  await expect.poll(() => page.getByLabel(/^Position number, row \d+$/).count()).toBe(5);
  expect(await page.getByLabel('Position number, row 5').getAttribute('readonly')).not.toBeNull();

  // A new row that breaks two layout rules: the server's answer lands on that row's fields, and nothing is saved.
  await page.getByRole('button', { name: 'Add a position' }).click();
  await page.getByLabel('Position number, row 6').fill('3');
  await page.getByLabel('Track radius in mm, row 6').fill('5000');
  await page.getByRole('button', { name: 'Save layout' }).click();
  // Each message sits under its row, named by field, and again in the summary by row.
  await expect.poll(() => page.getByText('Position number: Position 3 appears twice (also positions.2).', { exact: true }).count()).toBe(1);
  expect(
    await page.getByText('Track radius in mm: Track radius 5000 mm is beyond the excavated radius (3100 mm).', { exact: true }).count(),
  ).toBe(1);
  expect(await page.getByLabel('Track radius in mm, row 6').getAttribute('aria-invalid')).toBe('true');
  expect(await page.getByText(/^Row 6 \(position 3\): Track radius 5000 mm/).count()).toBe(1);
  expect((await (await page.request.get(`${app.url}/api/projects/${project.id}/positions`)).json()).length).toBe(5);
  await page.getByRole('button', { name: 'Remove row 6' }).click();

  // No angles in the file: lay them out evenly (innermost first at 0°, the next track opposite at 180°) and save.
  await page.getByRole('button', { name: 'Lay out angles evenly' }).click();
  const angles = await Promise.all([1, 2, 3, 4, 5].map((row) => page.getByLabel(`Angle in degrees, row ${row}`).inputValue()));
  expect(angles.slice(0, 2)).toEqual(['0', '180']);
  expect(angles.every((a) => /^\d+$/.test(a))).toBe(true);
  await page.getByRole('button', { name: 'Save layout' }).click();
  await expect.poll(() => page.getByText('Layout saved: 0 new, 5 changed, 0 unchanged.', { exact: false }).count()).toBe(1);

  await page.goto(`${app.url}/projects/${project.id}/cutterhead`);
  const picture = page.getByRole('group', { name: /^Cutterhead seen from the face/ });
  await expect.poll(() => picture.getByRole('link').count()).toBe(good.length);
  // No cutter fitted yet: every disc says so in words, not only by its hatching.
  expect(await picture.getByRole('link', { name: /^Position 5: Gauge, no cutter fitted/ }).count()).toBe(1);

  // Keyboard first: focus position 2 and press Enter; then back, and click position 3.
  await picture.getByRole('link', { name: /^Position 2:/ }).focus();
  await page.keyboard.press('Enter');
  await page.waitForURL(/\/positions\/[0-9a-f-]{36}$/);
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Position 2');
  await page.goBack();
  await picture.getByRole('link', { name: /^Position 3:/ }).click();
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Position 3');
  expect(await page.getByText('1800 mm').count()).toBe(1);
  await page.context().close();
});

it('a fitter sees the layout read-only and the worn cutterhead with its over-limit marks', async () => {
  const project = await makeProject();
  const fitter = await makeUser();
  await addMember(project.id, fitter.id, 'fitter');
  const rows = await makeWornCutterhead(project.id, fitter.id, project.excavatedDiameterM);
  const page = await signedInPage(browser, app.url, fitter.email);

  await page.goto(`${app.url}/projects/${project.id}/layout`);
  await expect.poll(() => page.getByText('Only the maintenance planner can change the layout.').count(), { timeout: 15_000 }).toBe(1);
  // A table to read, sort and export; no inputs, no save, no import.
  expect(await page.getByRole('row').count()).toBe(rows.length + 1);
  expect(await page.getByRole('textbox', { name: /row/ }).count()).toBe(0);
  expect(await page.getByRole('button', { name: 'Save layout' }).count()).toBe(0);
  expect(await page.getByLabel('Choose a CSV file').count()).toBe(0);

  await page.goto(`${app.url}/projects/${project.id}/cutterhead`);
  const picture = page.getByRole('group', { name: /^Cutterhead seen from the face/ });
  await expect.poll(() => picture.getByRole('link').count()).toBe(rows.length);
  // The fixture wears the five gauge discs past 12 mm, changes position 6 and leaves the last position empty.
  expect(await picture.getByRole('link', { name: /over the limit/ }).count()).toBe(4);
  expect(await picture.getByRole('link', { name: /^Position 6: Face, not measured since fitted/ }).count()).toBe(1);
  expect(await picture.getByRole('link', { name: new RegExp(`^Position ${rows.length}: Gauge, no cutter fitted`) }).count()).toBe(1);

  // Position 6's first serial went to the workshop; the fitter follows it there and records the rebuild.
  await picture.getByRole('link', { name: /^Position 6:/ }).click();
  await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Position 6');
  // Only the Changes table links serials; its row for the removed disc gives the removal reason.
  await page.getByRole('row').filter({ hasText: 'Chipped ring' }).getByRole('link').click();
  await expect.poll(() => page.getByText('In the workshop').count()).toBe(1);
  await page.getByLabel('New bearings').check();
  await page.getByRole('button', { name: 'Record the rebuild' }).click();
  await expect.poll(() => page.getByText('Rebuilt: new ring, new bearings, back in the store').count()).toBe(1);
  expect(await page.getByText('In store', { exact: true }).count()).toBe(1);
  expect(await page.getByRole('button', { name: 'Record the rebuild' }).count()).toBe(0);
  await page.context().close();
});
