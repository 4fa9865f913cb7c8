import { and, eq } from 'drizzle-orm';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { auditLog, cutters, fittings, inspectionEntries, inspectionRounds, photos } from '../../server/db/schema';
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

// A valid 1×1 PNG (one grey pixel): signature, IHDR, IDAT, IEND — a commonly used minimal PNG, no source.
const PNG_1X1 = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==', 'base64');

const keypad = (page: Page) => page.getByRole('group', { name: 'Wear keypad' });
const wearField = (page: Page) => page.getByLabel('Radial wear (mm)');
const status = (page: Page) => page.locator('[role=status]').filter({ hasText: /Saved|Waiting|Sending/ });
const tile = (page: Page, n: number) =>
  page.getByRole('list', { name: 'Positions' }).getByRole('button', { name: new RegExp(`^Position ${n}:`) });

async function atPosition(page: Page, n: number) {
  await expect.poll(() => page.getByRole('heading', { level: 2, name: `Position ${n}` }).isVisible(), { timeout: 10_000 }).toBe(true);
}

async function savePosition(page: Page) {
  await page.getByRole('button', { name: 'Save position' }).click();
}

it(
  'a fitter records a round with a change, a photo and a correction, loses the network and a reload, and nothing is lost',
  { timeout: 120_000 },
  async () => {
    const project = await makeProject();
    const fitter = await makeUser();
    await addMember(project.id, fitter.id, 'fitter');
    const setup = await makeRoundSetup(project.id, fitter.id, { count: 6, inStore: 2, earlierWearMm: 8 });
    const [p1, p2, p3, p4, p5, p6] = setup.positions;

    const context = await browser.newContext({ viewport: { width: 768, height: 1024 }, serviceWorkers: 'block' });
    const page = await context.newPage();
    await signInAt(page, app.url, `/projects/${project.id}/rounds`, fitter.email, PASSWORD);

    // Start a round: the date defaults to now; chainage, ring and crew are typed.
    expect(await page.getByLabel(/Date and time/).inputValue()).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/);
    await page.getByLabel('Chainage (m)').fill('1234.5');
    await page.getByLabel('Ring').fill('812');
    await page.getByLabel('Crew').fill('Night shift, crew B');
    await page.getByRole('button', { name: 'Start the round' }).click();
    await page.waitForURL(new RegExp(`/projects/${project.id}/rounds/[0-9a-f-]{36}`));
    const roundId = /rounds\/([0-9a-f-]{36})/.exec(page.url())![1];
    await atPosition(page, 1);
    await expect.poll(() => status(page).textContent()).toContain('Saved');

    // The main controls are large enough for gloves.
    for (const name of ['Save position', /^Next\b/]) {
      expect((await page.getByRole('button', { name }).boundingBox())!.height).toBeGreaterThanOrEqual(56);
    }

    // Position 1 with the keypad: a second decimal and a second point are refused; backspace works.
    for (const key of ['1', '2', 'Decimal point', '5', '7', 'Decimal point'])
      await keypad(page).getByRole('button', { name: key, exact: true }).click();
    expect(await wearField(page).inputValue()).toBe('12.5');
    await keypad(page).getByRole('button', { name: 'Delete last digit' }).click();
    await keypad(page).getByRole('button', { name: '6', exact: true }).click();
    expect(await wearField(page).inputValue()).toBe('12.6');
    await page.getByRole('button', { name: 'Even wear' }).click();
    await page.getByLabel('Add a photo').setInputFiles({ name: 'disc-1.png', mimeType: 'image/png', buffer: PNG_1X1 });
    await expect.poll(() => page.getByRole('img', { name: 'New photo disc-1.png' }).isVisible()).toBe(true);
    await savePosition(page);
    await atPosition(page, 2);
    await expect.poll(() => tile(page, 1).getAttribute('aria-label')).toBe('Position 1: saved');

    // Position 2: typed wear and a change — removed serial prefilled, the fitted one picked from the store.
    await wearField(page).fill('9,5');
    expect(await wearField(page).inputValue()).toBe('9.5');
    await page.getByRole('button', { name: 'Chipped ring' }).click();
    await page.getByRole('button', { name: 'Cutter changed' }).click();
    expect(await page.getByLabel('Serial removed').inputValue()).toBe(setup.fitted[1].serial);
    await page.getByLabel(/Serial fitted — search the store/).fill(setup.spares[1].serial.slice(-2));
    await page
      .getByRole('list', { name: 'Cutters in store' })
      .getByRole('button', { name: new RegExp(setup.spares[1].serial) })
      .click();
    await page.getByRole('button', { name: 'Ring damaged' }).click();
    await savePosition(page);
    await atPosition(page, 3);

    // Position 3: less wear than the 8.0 mm of the earlier round — refused until confirmed as re-measured.
    await wearField(page).fill('7.5');
    await savePosition(page);
    await expect.poll(() => page.getByRole('alert').filter({ hasText: 'did not store' }).textContent()).toContain('less than the 8 mm');
    await expect.poll(() => tile(page, 3).getAttribute('aria-label')).toContain('refused');
    await page.getByRole('button', { name: 'Confirm as re-measured' }).click();
    await atPosition(page, 4);
    await expect.poll(() => status(page).textContent()).toContain('Saved');

    // The network goes: two more positions are kept on the device and shown as waiting.
    await context.setOffline(true);
    await wearField(page).fill('10.2');
    await savePosition(page);
    await atPosition(page, 5);
    await page.getByRole('button', { name: 'Not measured' }).click();
    await page.getByRole('button', { name: /Seal leaking/ }).click();
    await savePosition(page);
    await atPosition(page, 6);
    await expect.poll(() => status(page).textContent()).toContain('Waiting for network (2)');
    expect(await tile(page, 4).getAttribute('aria-label')).toBe('Position 4: waiting to be sent');
    expect(await tile(page, 5).getAttribute('aria-label')).toBe('Position 5: waiting to be sent, needs a change');
    expect(await db.select().from(inspectionEntries).where(eq(inspectionEntries.roundId, roundId))).toHaveLength(3);

    // The network returns: the queue empties by itself.
    await context.setOffline(false);
    await expect.poll(() => status(page).textContent(), { timeout: 15_000 }).toContain('Saved');
    await expect.poll(() => tile(page, 5).getAttribute('aria-label')).toBe('Position 5: saved, needs a change');

    // The last position is queued while the server cannot be reached, and the page is reloaded:
    // the entry is still on the device and goes out on the 10 s retry.
    await page.route('**/rounds/*/entries', (route) => route.abort('internetdisconnected'));
    await wearField(page).fill('11');
    await savePosition(page);
    await expect.poll(() => status(page).textContent()).toContain('Waiting for network (1)');
    await page.reload();
    await atPosition(page, 6);
    await expect.poll(() => tile(page, 6).getAttribute('aria-label')).toBe('Position 6: waiting to be sent');
    await page.unroute('**/rounds/*/entries');
    await expect.poll(() => status(page).textContent(), { timeout: 25_000 }).toContain('Saved');
    await context.close();

    // Every entry and the photo are stored exactly once.
    const stored = await db.select().from(inspectionEntries).where(eq(inspectionEntries.roundId, roundId));
    expect(stored).toHaveLength(6);
    const byPosition = new Map(stored.map((e) => [e.positionId, e]));
    expect(byPosition.get(p1.id)).toMatchObject({ wearMm: 12.6, conditions: ['even_wear'], action: 'none' });
    expect(byPosition.get(p2.id)).toMatchObject({
      wearMm: 9.5,
      conditions: ['chipped_ring'],
      action: 'changed',
      changeReason: 'Ring damaged',
      removedCutterId: setup.fitted[1].id,
      fittedCutterId: setup.spares[1].id,
    });
    expect(byPosition.get(p3.id)).toMatchObject({ wearMm: 7.5, remeasured: true });
    expect(byPosition.get(p4.id)).toMatchObject({ wearMm: 10.2 });
    expect(byPosition.get(p5.id)).toMatchObject({ wearMm: null, conditions: ['seal_leaking'] });
    expect(byPosition.get(p6.id)).toMatchObject({ wearMm: 11 });
    const created = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'inspection_entry'), eq(auditLog.action, 'create'), eq(auditLog.projectId, project.id)));
    expect(created.filter((a) => stored.some((e) => e.id === a.entityId))).toHaveLength(6);
    const corrections = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'remeasured_correction'), eq(auditLog.projectId, project.id)));
    expect(corrections).toHaveLength(1);

    const photoRows = await db.select().from(photos).where(eq(photos.projectId, project.id));
    expect(photoRows).toHaveLength(1);
    expect(photoRows[0]).toMatchObject({ entryId: byPosition.get(p1.id)!.id, mimeType: 'image/png', sizeBytes: PNG_1X1.length });

    // The change closed the old serial's fitted period at the round's place and opened the new one's.
    const [round] = await db.select().from(inspectionRounds).where(eq(inspectionRounds.id, roundId));
    expect(round).toMatchObject({ chainageM: 1234.5, ringNumber: 812, crew: 'Night shift, crew B' });
    const periods = await db.select().from(fittings).where(eq(fittings.positionId, p2.id));
    expect(periods).toHaveLength(2);
    const old = periods.find((f) => f.cutterId === setup.fitted[1].id)!;
    const fresh = periods.find((f) => f.cutterId === setup.spares[1].id)!;
    expect(old).toMatchObject({ removedChainageM: 1234.5, removedRing: 812, removalReason: 'Ring damaged' });
    expect(old.removedAt?.getTime()).toBe(round.startedAt.getTime());
    expect(fresh).toMatchObject({ removedAt: null, fittedChainageM: 1234.5, fittedRing: 812 });
    const states = new Map((await db.select().from(cutters).where(eq(cutters.projectId, project.id))).map((c) => [c.id, c.status]));
    expect(states.get(setup.fitted[1].id)).toBe('workshop');
    expect(states.get(setup.spares[1].id)).toBe('fitted');
    expect(states.get(setup.spares[0].id)).toBe('in_store');
  },
);
