/**
 * A forged cross-origin request in a real browser: a page on another origin of the same site
 * (127.0.0.1 on another port — the session cookie's SameSite=Lax does not stop it) tries to publish
 * a stop, and so mail its crew, with a plain auto-submitting HTML form and with fetch(). Kerfwise
 * must refuse both and the stop must stay unpublished (OWASP CSRF Prevention Cheat Sheet).
 */
import { eq } from 'drizzle-orm';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { db } from '../../server/db/client';
import { stops } from '../../server/db/schema';
import { launchBrowser, serveApp } from '../support/browser';
import { signedInPage } from '../support/cutterhead-fixtures';
import { addMember, makeProject, makeUser } from '../support/fixtures';
import { stopContext, stopIn } from '../support/stops-fixtures';

let browser: Browser;
let app: Awaited<ReturnType<typeof serveApp>>;
let attacker: Server;
let attackerUrl: string;
let html = '';

beforeAll(async () => {
  app = await serveApp();
  browser = await launchBrowser();
  attacker = createServer((_req, res) => res.writeHead(200, { 'Content-Type': 'text/html' }).end(html)).listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => attacker.once('listening', resolve));
  attackerUrl = `http://127.0.0.1:${(attacker.address() as AddressInfo).port}`;
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
  await new Promise((resolve) => attacker?.close(resolve));
});

it('a form and a fetch from another origin of the same site cannot publish a stop', async () => {
  const project = await makeProject();
  const planner = await makeUser();
  await addMember(project.id, planner.id, 'planner');
  const { crewId } = await stopContext(project.id);
  const stopId = await stopIn(project.id, crewId, 'scheduled');
  const page = await signedInPage(browser, app.url, planner.email);
  const target = `${app.url}/api/projects/${project.id}/stops/${stopId}/publish`;

  // 1. A plain HTML form (no body, text/plain) that submits itself.
  html = `<form method="POST" action="${target}" enctype="text/plain"></form><script>document.forms[0].submit()</script>`;
  const formAnswer = page.waitForResponse((r) => r.url() === target);
  await page.goto(attackerUrl);
  expect((await formAnswer).status()).toBe(403);

  // 2. fetch() with the user's cookies, no-cors (the attacker does not need to read the answer).
  html = `<script>fetch(${JSON.stringify(target)}, { method: 'POST', mode: 'no-cors', credentials: 'include' }).then(() => document.title = 'sent', () => document.title = 'failed')</script>`;
  // The browser hides the answer from the other page (and helmet's Cross-Origin-Resource-Policy
  // blocks it), so wait until the request has ended either way and look at the stop itself.
  const fetchEnded = Promise.race([
    page.waitForEvent('requestfinished', (r) => r.url() === target),
    page.waitForEvent('requestfailed', (r) => r.url() === target),
  ]);
  await page.goto(`${attackerUrl}/again`);
  await fetchEnded;

  const [row] = await db.select().from(stops).where(eq(stops.id, stopId));
  expect(row.publishedAt).toBeNull();

  // The same publish from Kerfwise's own page goes through (the cookie was there all along).
  await page.goto(`${app.url}/`);
  const own = await page.evaluate(async (url) => (await fetch(url, { method: 'POST', credentials: 'same-origin' })).status, target);
  expect(own).toBe(200);
  const [after] = await db.select().from(stops).where(eq(stops.id, stopId));
  expect(after.publishedAt).not.toBeNull();
});
