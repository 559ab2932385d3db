// The garage without signal, in Chromium with the network switched off (context.setOffline): the app is
// installable; after one online visit the drain card and the oil-change form open offline; a drain card
// with a code issued on the device and an oil change with a photo wait on the device through a reload and
// a browser restart and are sent once; a reply lost after the server wrote does not make a second record;
// a refused write stays in the list with the server's sentence and can be edited.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { inject } from 'vitest';
import { PNG } from 'pngjs';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { createDb } from '~/lib/db/db';
import { hasValidCheckSymbol, normaliseBottleCode } from '~/lib/samples/bottle-code';
import { DESKTOP, PHONE, baseUrl, launchBrowser, screenshot } from './helpers/browser';
import { sessionCookieFor, signInAs } from './helpers/sign-in';

const PASSWORD = 'a long enough password';
const stamp = Date.now().toString(36);
const email = `garage-${stamp}@offline.example`;
const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--disable-dev-shm-usage',
];

function tinyPng(): Buffer {
  const png = new PNG({ width: 40, height: 30 });
  for (let i = 0; i < png.data.length; i += 4) png.data.set([200, 120 + (i % 100), 40, 255], i);
  return PNG.sync.write(png);
}

/** A persistent profile (its IndexedDB, caches and service worker survive closing the browser). */
async function openProfile(dir: string, offline = false): Promise<BrowserContext> {
  const ctx = await chromium.launchPersistentContext(dir, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: CHROMIUM_ARGS,
    viewport: PHONE,
    baseURL: baseUrl(),
    deviceScaleFactor: 1,
    offline,
  });
  // Granting only this refuses the rest, Background Sync included: Chromium's sync follows the machine's real
  // network, not the emulated one, and would send the queue behind the test's back. Here the pages send it
  // (on load, when the network returns, or "send now"); the service worker's sync handler runs the same code.
  await ctx.grantPermissions(['clipboard-read'], { origin: baseUrl() });
  return ctx;
}

/** Waits until the form's offline island has taken over its submit (a click before that posts plainly). */
async function formReady(p: Page): Promise<void> {
  await p.locator('form[data-offline-form=ready]').waitFor({ timeout: 15_000 });
}

async function api(
  cookie: string,
  method: string,
  url: string,
  body?: unknown,
): Promise<{ status: number; json: any }> {
  const res = await fetch(`${baseUrl()}${url}`, {
    method,
    headers: { cookie, 'content-type': 'application/json', origin: baseUrl() },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return { status: res.status, json: await res.json().catch(() => null) };
}

describe('the garage without signal', () => {
  const db = createDb(inject('databaseUrl'), { max: 2 });
  const profile = mkdtempSync(path.join(tmpdir(), 'sumpwise-offline-'));
  let cookie = '';
  let machineId = '';
  let context: BrowserContext;
  let page: Page;
  const errors: string[] = [];
  let issuedCode = '';

  beforeAll(async () => {
    const res = await fetch(`${baseUrl()}/api/auth/sign-up`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email, password: PASSWORD, displayName: 'Wren Garage' }),
    });
    if (res.status >= 300) throw new Error(`sign-up ${res.status}`);
    cookie = await sessionCookieFor(baseUrl(), email, PASSWORD);
    const m = await api(cookie, 'POST', '/api/machines', {
      name: 'Shed 690',
      engineLayout: 'single',
      cooling: 'liquid',
      meter: 'km',
    });
    if (m.status !== 201) throw new Error(`machine ${m.status}: ${JSON.stringify(m.json)}`);
    machineId = m.json.machine.id;
    context = await openProfile(profile);
    page = context.pages()[0] ?? (await context.newPage());
    page.on('pageerror', (e) => errors.push(e.message));
    await signInAs(page, email, PASSWORD);
  });
  afterAll(async () => {
    await context?.close();
    await db.destroy();
    rmSync(profile, { recursive: true, force: true });
  });

  test('is installable: a manifest of its own and a service worker in control', async () => {
    await page.goto('/');
    await page.locator('html[data-offline-ready=true]').waitFor({ timeout: 30_000 });
    const href = await page.locator('link[rel=manifest]').getAttribute('href');
    const manifest = await (await page.request.get(href!)).json();
    expect(manifest).toMatchObject({
      name: 'Sumpwise',
      short_name: 'Sumpwise',
      start_url: '/',
      display: 'standalone',
      theme_color: '#1f4560',
    });
    const sizes = (manifest.icons as { sizes: string; type: string; src: string }[])
      .filter((i) => i.type === 'image/png')
      .map((i) => i.sizes);
    expect(sizes).toEqual(expect.arrayContaining(['192x192', '512x512']));
    for (const icon of manifest.icons as { src: string; type: string }[]) {
      const r = await page.request.get(icon.src);
      expect(r.status()).toBe(200);
      expect(r.headers()['content-type']).toContain(icon.type);
    }
    const sw = await page.evaluate(async () => {
      const reg = await navigator.serviceWorker.ready;
      return { state: reg.active?.state, script: reg.active?.scriptURL, scope: reg.scope };
    });
    expect(sw.state).toBe('activated');
    expect(sw.script).toBe(`${baseUrl()}/sw.js`);
    expect(sw.scope).toBe(`${baseUrl()}/`);
  });

  test('after one visit, the drain card and the oil-change form open with no network and say they are saved copies', async () => {
    await context.setOffline(true);
    await page.goto(`/machines/${machineId}/drain-card`);
    await page.getByLabel('Bottle code').waitFor();
    expect(await page.getByTestId('saved-copy').textContent()).toMatch(/offline: showing what was saved at \d/);
    await page.goto(`/machines/${machineId}/oil-change`);
    await page.getByLabel('SAE grade').waitFor();
    expect(await page.getByTestId('saved-copy').textContent()).toMatch(/offline: showing what was saved at/);
    await page.goto('/machines');
    expect(await page.textContent('main')).toContain('Shed 690');
    await screenshot(page, 'offline-01-machines-saved-copy');
  });

  test('a drain card with a code issued on the device and an oil change with a photo wait on the device', async () => {
    await page.goto(`/machines/${machineId}/drain-card`);
    await formReady(page);
    await page.getByRole('button', { name: 'Issue a Sumpwise code' }).click();
    await expect
      .poll(() => page.getByLabel('Bottle code').inputValue(), { timeout: 10_000 })
      .toMatch(/^[2-9A-HJKMNP-TV-Y]{3}-[2-9A-HJKMNP-TV-Y]{4}$/);
    issuedCode = normaliseBottleCode(await page.getByLabel('Bottle code').inputValue());
    expect(hasValidCheckSymbol(issuedCode)).toBe(true);
    // Reserved for this device on the server before the network went away, and for nobody else.
    const reserved = await db
      .selectFrom('bottle_code_reservations')
      .select(['code_norm'])
      .where('code_norm', '=', issuedCode)
      .execute();
    expect(reserved.length).toBe(1);
    await page.getByLabel('Odometer (km)').fill('5,200');
    await page.getByRole('button', { name: 'Show bottle tag' }).click();
    await page.getByTestId('offline-tag').locator('svg').waitFor();
    expect(await page.getByTestId('offline-tag').textContent()).toContain(
      `${issuedCode.slice(0, 3)}-${issuedCode.slice(3)}`,
    );
    // The tag made on the device writes the day as the server's tag does ("Drawn 2 Dec 2026").
    expect(await page.getByTestId('offline-tag').textContent()).toMatch(/Drawn \d{1,2} [A-Z][a-z]{2} \d{4}\b/);
    await screenshot(page, 'offline-02-tag-from-device');
    await page.getByRole('button', { name: 'Register sample' }).click();
    await page.getByTestId('offline-form-status').getByText('Saved on this device').waitFor();

    await page.goto(`/machines/${machineId}/oil-change`);
    await formReady(page);
    await page.getByLabel('Odometer (km)').fill('5,200');
    await page.getByLabel('SAE grade').fill('10W-40');
    await page.getByLabel('Oil product').fill('Valley Shed 4T');
    await page.locator('[data-photo-fallback]').scrollIntoViewIfNeeded(); // the uploader starts when it comes into view
    await page
      .locator('[data-testid=photo-uploader] input[type=file]')
      .first()
      .setInputFiles({ name: 'drain-plug.png', mimeType: 'image/png', buffer: tinyPng() });
    await page.getByRole('button', { name: 'Save oil change' }).click();
    await page.getByTestId('offline-form-status').getByText('Saved on this device').waitFor();

    await page.reload();
    await page.getByTestId('outbox-item').first().waitFor();
    await page.goto('/outbox');
    const items = page.getByTestId('outbox-item');
    await items.nth(1).waitFor();
    expect(await items.count()).toBe(2);
    expect(await page.getByTestId('outbox-list').textContent()).toMatch(
      /Drain card · Shed 690[\s\S]*Bottle [\s\S]*Oil change · Shed 690[\s\S]*5,200 km, 10W-40 · 1 photo/,
    );
    // When each was saved, in the one format ("Saved 2 Dec 2026, 14:05 in …"), with its moment machine-readable.
    const saved = await items
      .first()
      .locator('time')
      .evaluate((t) => [t.textContent, t.getAttribute('datetime')]);
    expect(saved[0]).toMatch(/^\d{1,2} [A-Z][a-z]{2} \d{4}, \d{2}:\d{2}$/);
    expect(Number.isNaN(Date.parse(saved[1] ?? ''))).toBe(false);
    expect(await items.evaluateAll((els) => els.map((e) => e.getAttribute('data-state')))).toEqual([
      'waiting',
      'waiting',
    ]);
    await screenshot(page, 'offline-03-outbox-phone');
    await page.setViewportSize(DESKTOP);
    await screenshot(page, 'offline-04-outbox-desktop');
    await page.setViewportSize(PHONE);
  });

  test('the queue survives a browser restart and is sent once when the network returns', async () => {
    await context.close();
    // Offline from the first moment: otherwise the service worker's Background Sync may send the queue at
    // start-up, before the page could show it (which is what it is for, but not what is checked here).
    context = await openProfile(profile, true);
    page = context.pages()[0] ?? (await context.newPage());
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto('/outbox');
    await page.getByTestId('outbox-item').nth(1).waitFor();
    expect(await page.getByTestId('outbox-item').count()).toBe(2);
    // The page sends on the 'online' event, or on its next try (after 5 s): Chromium 150 keeps navigator.onLine
    // true in a context launched offline, as a garage Wi-Fi with no way out does, and fires no 'online' event.
    await context.setOffline(false);
    await expect.poll(() => page.getByTestId('outbox-item').count(), { timeout: 30_000 }).toBe(0);
    const samples = await db
      .selectFrom('samples')
      .select(['id', 'issued_code', 'client_key'])
      .where('bottle_code_norm', '=', issuedCode)
      .execute();
    expect(samples.length).toBe(1);
    expect(samples[0]!.issued_code).toBe(true);
    const changes = await db
      .selectFrom('oil_changes')
      .select(['id', 'client_key'])
      .where('machine_id', '=', machineId)
      .execute();
    expect(changes.length).toBe(1);
    expect(changes[0]!.client_key).toMatch(/^[0-9a-f-]{36}$/);
    const photos = await db
      .selectFrom('photos')
      .select(['oil_change_id', 'byte_size'])
      .where('oil_change_id', '=', changes[0]!.id)
      .execute();
    expect(photos.length).toBe(1);
    expect(photos[0]!.byte_size).toBe(tinyPng().length);
    // A resend of what already arrived writes nothing new.
    const again = await api(cookie, 'POST', '/api/samples', {
      machineId,
      clientKey: samples[0]!.client_key,
      bottleCode: issuedCode,
      codeSource: 'issued',
      drawnOn: '2025-01-01',
      odometer: 1,
    });
    expect(again.status).toBe(200);
    expect(again.json.repeated).toBe(true);
  });

  test('a reply lost after the server wrote does not make a second sample', async () => {
    const browser = await launchBrowser();
    try {
      // Without a service worker, so the page's own requests can be intercepted.
      const ctx = await browser.newContext({ viewport: PHONE, baseURL: baseUrl(), serviceWorkers: 'block' });
      const p = await ctx.newPage();
      await signInAs(p, email, PASSWORD);
      await p.goto(`/machines/${machineId}/drain-card`);
      await formReady(p);
      const code = `LOST${stamp}`.toUpperCase();
      await p.getByLabel('Bottle code').fill(code);
      await p.getByLabel('Odometer (km)').fill('5,300');
      let cut = 0;
      await p.route('**/api/samples', async (route) => {
        if (cut === 0 && route.request().method() === 'POST') {
          cut++;
          const reply = await route.fetch(); // the server writes the sample…
          expect(reply.status()).toBe(201);
          await route.abort('connectionreset'); // …and the answer never arrives
          return;
        }
        await route.continue();
      });
      await p.getByRole('button', { name: 'Register sample' }).click();
      // The answer was lost: the card waits on the device as if nothing had arrived.
      await p.getByTestId('offline-form-status').getByText('Saved on this device').waitFor({ timeout: 20_000 });
      expect(await p.getByTestId('outbox-item').first().getAttribute('data-state')).toBe('waiting');
      expect(cut).toBe(1);
      expect(await db.selectFrom('samples').select('id').where('bottle_code_norm', '=', code).execute()).toHaveLength(
        1,
      );
      await Promise.all([
        p.getByTestId('outbox-item').first().waitFor({ state: 'detached', timeout: 20_000 }),
        p.getByRole('button', { name: 'Send now' }).click(),
      ]);
      expect(await db.selectFrom('samples').select('id').where('bottle_code_norm', '=', code).execute()).toHaveLength(
        1,
      );
      await ctx.close();
    } finally {
      await browser.close();
    }
  });

  test('a refused write stays with the server’s sentence and can be edited and sent', async () => {
    const taken = `TAKEN${stamp}`.toUpperCase();
    expect(
      (
        await api(cookie, 'POST', '/api/samples', {
          machineId,
          bottleCode: taken,
          drawnOn: '2025-01-02',
          odometer: 5100,
        })
      ).status,
    ).toBe(201);
    await page.goto(`/machines/${machineId}/drain-card`);
    await formReady(page);
    await page.getByLabel('Bottle code').fill(taken);
    await page.getByLabel('Odometer (km)').fill('5,400');
    await context.setOffline(true);
    await page.getByRole('button', { name: 'Register sample' }).click();
    await page.getByTestId('offline-form-status').getByText('Saved on this device').waitFor();
    await context.setOffline(false);
    const item = page.getByTestId('outbox-item').first();
    await expect.poll(() => item.getAttribute('data-state'), { timeout: 20_000 }).toBe('refused');
    expect(await item.getByTestId('outbox-message').textContent()).toMatch(
      new RegExp(`Bottle code ${taken} is already on a sample of Shed 690`),
    );
    expect(await item.textContent()).toContain('Not accepted');
    await page.goto('/outbox');
    await page.getByTestId('outbox-item').first().waitFor();
    await screenshot(page, 'offline-05-refused-phone');
    await page.setViewportSize(DESKTOP);
    await screenshot(page, 'offline-06-refused-desktop');
    await page.setViewportSize(PHONE);
    await page.getByRole('link', { name: 'Edit and send again' }).click();
    await page.getByTestId('outbox-editing').waitFor();
    await formReady(page);
    expect(await page.getByLabel('Bottle code').inputValue()).toBe(taken);
    await page.getByLabel('Bottle code').fill(`FRESH${stamp}`);
    await Promise.all([
      page.waitForURL(/\/samples\/[0-9a-f-]{36}\?registered=1$/),
      page.getByRole('button', { name: 'Register sample' }).click(),
    ]);
    expect(
      await db
        .selectFrom('samples')
        .select('id')
        .where('bottle_code_norm', '=', `FRESH${stamp}`.toUpperCase())
        .execute(),
    ).toHaveLength(1);
    expect(await db.selectFrom('samples').select('id').where('bottle_code_norm', '=', taken).execute()).toHaveLength(1);
    await page.goto('/outbox');
    await page.getByText('Nothing is waiting').waitFor();
    expect(errors).toEqual([]);
  });

  test('a card queued under a session that has since ended is sent after signing in again', async () => {
    const browser = await launchBrowser();
    try {
      const ctx = await browser.newContext({ viewport: PHONE, baseURL: baseUrl() });
      const p = await ctx.newPage();
      await signInAs(p, email, PASSWORD);
      await p.goto(`/machines/${machineId}/drain-card`);
      await formReady(p);
      const code = `EXPIRED${stamp}`.toUpperCase();
      await p.getByLabel('Bottle code').fill(code);
      await p.getByLabel('Odometer (km)').fill('5,500');
      await ctx.setOffline(true);
      await p.getByRole('button', { name: 'Register sample' }).click();
      await p.getByTestId('offline-form-status').getByText('Saved on this device').waitFor();
      await ctx.clearCookies(); // the session ends while the phone is offline
      await ctx.setOffline(false);
      const item = p.getByTestId('outbox-item').first();
      await expect.poll(() => item.getAttribute('data-state'), { timeout: 20_000 }).toBe('sign-in');
      expect(await item.textContent()).toMatch(
        /Sign in to send[\s\S]*Your session has ended\. Sign in again with the same account and it will be sent\./,
      );
      expect(await db.selectFrom('samples').select('id').where('bottle_code_norm', '=', code).execute()).toHaveLength(
        0,
      );
      await signInAs(p, email, PASSWORD);
      await p.goto('/outbox');
      await p.getByText('Nothing is waiting').waitFor({ timeout: 20_000 });
      expect(await db.selectFrom('samples').select('id').where('bottle_code_norm', '=', code).execute()).toHaveLength(
        1,
      );
      await ctx.close();
    } finally {
      await browser.close();
    }
  });

  test('a device refused more bottle codes lets go of the answer, so the page goes quiet', async () => {
    // Fill the rider's allowance from other devices: the next device is answered 409 (too many held).
    for (let i = 0; i < 6; i++)
      await api(cookie, 'POST', '/api/samples/reserved-codes', { deviceKey: `filler-${stamp}-${i}` });
    expect((await api(cookie, 'POST', '/api/samples/reserved-codes', { deviceKey: `probe-${stamp}` })).status).toBe(
      409,
    );
    const browser = await launchBrowser();
    try {
      const ctx = await browser.newContext({ viewport: PHONE, baseURL: baseUrl() });
      const p = await ctx.newPage();
      const answers: number[] = [];
      const open = new Set<unknown>();
      p.on('request', (r) => {
        if (r.url().endsWith('/api/samples/reserved-codes')) open.add(r);
      });
      p.on('requestfinished', (r) => open.delete(r));
      p.on('requestfailed', (r) => open.delete(r));
      p.on('response', (r) => {
        if (r.url().endsWith('/api/samples/reserved-codes')) answers.push(r.status());
      });
      await signInAs(p, email, PASSWORD);
      // An unread refusal kept its request open and the network never went quiet (the browser's connection held).
      await p.goto('/', { waitUntil: 'networkidle', timeout: 20_000 });
      expect(answers).toContain(409);
      expect(open.size).toBe(0);
      await ctx.close();
    } finally {
      await browser.close();
    }
  });
});
