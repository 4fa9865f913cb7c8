/** The round entry and the cutterhead screen at the face: a 768 px tablet and a 390 px phone, with gloves (issue 13). */
import { eq } from 'drizzle-orm';
import type { Browser, Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { inspectionEntries } from '../../server/db/schema';
import { recordEntry, startRound } from '../../server/services/inspections';
import { CUTTERHEAD_ENTRY_CAUTION } from '../../shared/cautions';
import { entryInputSchema, startRoundInputSchema } from '../../shared/schemas/inspection';
import { launchBrowser, serveApp, signInAt } from '../support/browser';
import { addMember, makeProject, makeUser, PASSWORD } from '../support/fixtures';
import { makeRoundSetup } from '../support/rounds-fixtures';

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

/** The fixed bar at the bottom that holds "Save position". */
const saveBarTop = (page: Page) =>
  page.getByRole('button', { name: 'Save position' }).evaluate((el) => (el.closest('.fixed') as HTMLElement).getBoundingClientRect().top);

// WCAG 2.2 SC 2.5.8 asks 24 px; 44 px is the product's rule for gloved hands (common practice, no source).
const TOUCH_PX = 44;

/** Every visible control of the round screen smaller than a gloved finger, as "TAG text w×h". */
function smallControls(page: Page): Promise<string[]> {
  return page.evaluate((min) => {
    const out: string[] = [];
    for (const el of document.querySelectorAll<HTMLElement>(
      'main button, main a[href], main input:not([type=hidden]), main select, main textarea, main summary',
    )) {
      const r = el.getBoundingClientRect();
      if (r.width === 0 && r.height === 0) continue; // not shown
      // A visually hidden file input: its label (checked below as the visible control) is what is pressed.
      if (el.matches('input.sr-only')) {
        const label = el.id ? document.querySelector<HTMLElement>(`label[for="${el.id}"]`) : el.closest('label');
        if (label) {
          const lr = label.getBoundingClientRect();
          if (lr.height < min - 0.5 || lr.width < min - 0.5)
            out.push(`LABEL "${label.textContent?.trim()}" ${Math.round(lr.width)}×${Math.round(lr.height)}`);
        } else out.push('INPUT without a label');
        continue;
      }
      if (r.height < min - 0.5 || r.width < min - 0.5)
        out.push(
          `${el.tagName} "${(el.textContent || el.getAttribute('aria-label') || '').trim().slice(0, 40)}" ${Math.round(r.width)}×${Math.round(r.height)}`,
        );
    }
    return out;
  }, TOUCH_PX);
}

/** The text the control points to with aria-describedby (its error line), or null when it has none. */
async function describedBy(page: Page, control: Locator): Promise<string | null> {
  const id = await control.getAttribute('aria-describedby');
  return id ? page.locator(`[id="${id}"]`).textContent() : null;
}

/** Brought into view as the browser does it, the element ends above the fixed Save bar. */
async function clearOfSaveBar(page: Page, target: Locator) {
  await target.evaluate((el) => el.scrollIntoView({ block: 'nearest' }));
  const box = (await target.boundingBox())!;
  expect(box.y).toBeGreaterThanOrEqual(-1); // sub-pixel rounding
  expect(box.y + box.height).toBeLessThanOrEqual(await saveBarTop(page));
}

describe.each([
  ['tablet', { width: 768, height: 1024 }],
  ['phone', { width: 390, height: 844 }],
])('on a %s', (_name, viewport) => {
  it(
    'keeps the keypad and the wear field clear of the Save bar, every control at least 44 px, and shows the cutterhead caution',
    { timeout: 90_000 },
    async () => {
      const project = await makeProject();
      const fitter = await makeUser();
      await addMember(project.id, fitter.id, 'fitter');
      await makeRoundSetup(project.id, fitter.id, { count: 4, inStore: 1 });
      const round = await db.transaction((tx) =>
        startRound(tx, project.id, fitter.id, startRoundInputSchema.parse({ startedAt: new Date().toISOString(), chainageM: 900 })),
      );
      const context = await browser.newContext({ viewport, serviceWorkers: 'block' });
      const page = await context.newPage();
      const roundUrl = `/projects/${project.id}/rounds/${round.id}`;
      await signInAt(page, app.url, roundUrl, fitter.email, PASSWORD);
      await expect.poll(() => page.getByRole('heading', { level: 2, name: 'Position 1' }).isVisible(), { timeout: 15_000 }).toBe(true);

      // Brought into view as the browser does it (focus, or scrolling to it), each stays above the bar.
      const targets = [page.getByLabel('Radial wear (mm)'), page.getByRole('group', { name: 'Wear keypad' })];
      for (const target of targets) {
        await target.evaluate((el) => el.scrollIntoView({ block: 'nearest' }));
        const box = (await target.boundingBox())!;
        expect(box.y + box.height).toBeLessThanOrEqual(await saveBarTop(page));
        await page.evaluate(() => window.scrollTo(0, document.body.scrollHeight));
        await target.evaluate((el) => el.scrollIntoView({ block: 'nearest' }));
        const again = (await target.boundingBox())!;
        expect(again.y).toBeGreaterThanOrEqual(-1); // sub-pixel rounding
        expect(again.y + again.height).toBeLessThanOrEqual(await saveBarTop(page));
      }
      await page.evaluate(() => window.scrollTo(0, document.body.scrollHeight));
      await page.getByLabel('Radial wear (mm)').focus();
      const focused = (await page.getByLabel('Radial wear (mm)').boundingBox())!;
      expect(focused.y + focused.height).toBeLessThanOrEqual(await saveBarTop(page));

      // Every visible control of the round screen is large enough for a gloved finger.
      expect(await smallControls(page)).toEqual([]);

      // The next-position button's accessible name holds its visible text.
      const nextButton = page.getByRole('button', { name: /^Next\b/ });
      const visible = (await nextButton.innerText()).replace(/\s+/g, ' ').trim();
      expect(await nextButton.evaluate((el) => el.getAttribute('aria-label'))).toBeNull();
      expect((await nextButton.textContent())!.replace(/\s+/g, ' ')).toContain(visible);

      // The cutterhead caution on the round screen, the rounds list and the cutterhead picture.
      for (const path of [roundUrl, `/projects/${project.id}/rounds`, `/projects/${project.id}/cutterhead`]) {
        if (!page.url().endsWith(path)) await page.goto(`${app.url}${path}`);
        await expect
          .poll(() => page.getByRole('complementary', { name: 'Safety caution' }).textContent(), { timeout: 15_000 })
          .toContain(CUTTERHEAD_ENTRY_CAUTION);
      }
      await context.close();
    },
  );

  it(
    'shows a refusal only the server can give beside its field, clear of the Save bar, and keeps what was entered through a reload',
    { timeout: 150_000 },
    async () => {
      const project = await makeProject();
      const fitter = await makeUser();
      await addMember(project.id, fitter.id, 'fitter');
      const setup = await makeRoundSetup(project.id, fitter.id, { count: 4, inStore: 1 });
      const round = await db.transaction((tx) =>
        startRound(tx, project.id, fitter.id, startRoundInputSchema.parse({ startedAt: new Date().toISOString(), chainageM: 900 })),
      );
      const context = await browser.newContext({ viewport, serviceWorkers: 'block' });
      const page = await context.newPage();
      const roundUrl = `/projects/${project.id}/rounds/${round.id}`;
      await signInAt(page, app.url, roundUrl, fitter.email, PASSWORD);
      const heading = page.getByRole('heading', { level: 2, name: 'Position 1' });
      await expect.poll(() => heading.isVisible(), { timeout: 15_000 }).toBe(true);

      const wear = page.getByLabel('Radial wear (mm)');
      const keypad = page.getByRole('group', { name: 'Wear keypad' });
      const removed = page.getByLabel('Serial removed');
      const search = page.getByLabel(/Serial fitted — search the store/);
      const spare = setup.spares[0].serial;
      const onHub = setup.fitted[0].serial;
      const stored = () => db.select().from(inspectionEntries).where(eq(inspectionEntries.roundId, round.id));

      // Nothing entered: the form's own check names the wear field, nothing is sent; "Not measured" answers it.
      await page.getByRole('button', { name: 'Save position' }).click();
      await expect.poll(() => wear.getAttribute('aria-invalid')).toBe('true');
      expect(await describedBy(page, wear)).toBe('Enter the wear, or choose “Not measured”.');
      await page.getByRole('button', { name: 'Not measured' }).click();
      await expect.poll(() => wear.getAttribute('aria-invalid')).toBeNull();

      // 12 mm on the keypad and a change, with a removed serial that is not the one on the hub: only the server knows.
      for (const key of ['1', '2']) await keypad.getByRole('button', { name: key, exact: true }).click();
      await page.getByRole('button', { name: 'Cutter changed' }).click();
      await removed.fill('NOT-ON-HUB');
      await page
        .getByRole('list', { name: 'Cutters in store' })
        .getByRole('button', { name: new RegExp(spare) })
        .click();
      await page.getByRole('button', { name: 'Ring damaged' }).click();
      await page.getByRole('button', { name: 'Save position' }).click();

      // Beside the field (its error line, named by aria-describedby), above the Save bar; the whole message at the top.
      await expect.poll(() => removed.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
      expect(await describedBy(page, removed)).toBe(`Kerfwise has ${onHub} here, not NOT-ON-HUB. Check the serial on the hub.`);
      await clearOfSaveBar(page, page.locator(`[id="${await removed.getAttribute('aria-describedby')}"]`));
      expect(await wear.getAttribute('aria-invalid')).toBeNull();
      expect(await search.getAttribute('aria-invalid')).toBeNull();
      expect(await page.getByRole('alert').filter({ hasText: 'did not store' }).textContent()).toContain(`not NOT-ON-HUB`);
      // Nothing was lost, nothing was stored, and the fitter is still on the position.
      expect(await heading.isVisible()).toBe(true);
      expect(await wear.inputValue()).toBe('12');
      expect(await removed.inputValue()).toBe('NOT-ON-HUB');
      expect(await page.getByLabel('Reason for the change').inputValue()).toBe('Ring damaged');
      // The picked spare is held by the queued entry (so the store list leaves it out) and still named as picked.
      expect(await page.getByText(`Picked: ${spare}`).isVisible()).toBe(true);
      expect(await stored()).toHaveLength(0);
      // With the refusal and the change open, the wear stays clear of the bar and every control is large enough.
      await clearOfSaveBar(page, wear);
      await clearOfSaveBar(page, keypad);
      expect(await smallControls(page)).toEqual([]);

      // Fixed; but meanwhile another tablet fitted the picked spare at position 2: refused beside the picker.
      await db.transaction((tx) =>
        recordEntry(
          tx,
          project.id,
          round.id,
          fitter.id,
          entryInputSchema.parse({
            clientKey: crypto.randomUUID(),
            positionId: setup.positions[1].id,
            wearMm: null,
            action: 'changed',
            fitted: { serial: spare },
            changeReason: 'Planned change',
          }),
        ),
      );
      await removed.fill(onHub);
      await expect.poll(() => removed.getAttribute('aria-invalid')).toBeNull();
      await page.getByRole('button', { name: 'Save position' }).click();
      await expect.poll(() => search.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
      expect(await describedBy(page, search)).toBe(`${spare} is already fitted at position 2. Pick another cutter.`);
      await clearOfSaveBar(page, page.locator(`[id="${await search.getAttribute('aria-describedby')}"]`));
      expect(await removed.getAttribute('aria-invalid')).toBeNull();
      expect(await wear.inputValue()).toBe('12');

      // The refused entry is kept on the device: after a reload it is back with its values and the refusal beside the picker.
      await page.reload();
      await expect.poll(() => heading.isVisible(), { timeout: 15_000 }).toBe(true);
      await expect.poll(() => search.getAttribute('aria-invalid'), { timeout: 15_000 }).toBe('true');
      expect(await describedBy(page, search)).toBe(`${spare} is already fitted at position 2. Pick another cutter.`);
      expect(await wear.inputValue()).toBe('12');
      expect(await removed.inputValue()).toBe(onHub);
      expect((await stored()).map((e) => e.positionId)).toEqual([setup.positions[1].id]);
      await context.close();
    },
  );
});
