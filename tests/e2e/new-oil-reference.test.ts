// A mechanic records the new oil of an oil product from its data sheet (on a phone, from the machine page),
// then imports the lab's file: the sample of that oil gets a viscosity finding against the recorded
// figure, which the grade's SAE window alone would not have raised. Also the list page on a desktop.
import { mkdtempSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { createDb } from '~/lib/db/db';
import { hashPassword } from '~/lib/auth/password';
import { normaliseBottleCode } from '~/lib/samples/bottle-code';
import { DESKTOP, PHONE, baseUrl, launchBrowser, newContext, screenshot } from './helpers/browser';
import { sessionCookieFor, signInAs } from './helpers/sign-in';

const stamp = Date.now().toString(36);
const PASSWORD = 'a long enough password';
const mechanicEmail = `oil-mechanic-${stamp}@fenwater.example`;
// Invented product. A 10W-40 at 12.6 mm²/s is inside the SAE J300 window of 40 (12.5 to <16.3) but
// 21 % below the 16.0 mm²/s typed from the data sheet: past the KV100 ±15 % fixed limit.
const PRODUCT = `Fenwater Trail 10W-40 ${stamp}`;
const BOTTLE = `FW-${stamp}`.toUpperCase();
let machineId = '';
let sampleId = '';

async function prepareCrew(): Promise<void> {
  const db = createDb(inject('databaseUrl'), { max: 1 });
  try {
    const hash = await hashPassword(PASSWORD);
    const crew = await db
      .insertInto('crews')
      .values({ name: `Fenwater crew ${stamp}` })
      .returning('id')
      .executeTakeFirstOrThrow();
    const users = { lead: `oil-lead-${stamp}`, mechanic: `oil-mechanic-${stamp}` };
    await db
      .insertInto('users')
      .values([
        {
          id: users.lead,
          email: `oil-lead-${stamp}@fenwater.example`,
          display_name: 'Ada Fen',
          password_hash: hash,
          email_verified_at: new Date(),
        },
        {
          id: users.mechanic,
          email: mechanicEmail,
          display_name: 'Bram Fen',
          password_hash: hash,
          email_verified_at: new Date(),
        },
      ])
      .execute();
    await db
      .insertInto('crew_members')
      .values([
        { crew_id: crew.id, user_id: users.lead, role: 'lead' },
        { crew_id: crew.id, user_id: users.mechanic, role: 'mechanic' },
      ])
      .execute();
    const machine = await db
      .insertInto('machines')
      .values({
        crew_id: crew.id,
        owner_user_id: users.lead,
        name: 'Fen 690',
        engine_layout: 'single',
        displacement_cc: 690,
        cooling: 'liquid',
        meter: 'km',
        recommended_grades: JSON.stringify([{ grade: '10W-40', minC: -10, maxC: 40 }]),
        max_interval_distance: 6000,
      } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    machineId = machine.id;
    const change = await db
      .insertInto('oil_changes')
      .values({
        crew_id: crew.id,
        machine_id: machine.id,
        changed_on: '2026-09-01',
        odometer: 10_000,
        oil_product: PRODUCT,
        sae_grade: '10W-40',
        volume_l: 1.6,
        created_by: users.lead,
      } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    const sample = await db
      .insertInto('samples')
      .values({
        crew_id: crew.id,
        machine_id: machine.id,
        oil_change_id: change.id,
        bottle_code: BOTTLE,
        bottle_code_norm: normaliseBottleCode(BOTTLE),
        drawn_on: '2026-11-01',
        odometer: 13_000,
        distance_on_oil: 3000,
        sae_grade: '10W-40',
        oil_product: PRODUCT,
        client_key: null,
        created_by: users.lead,
        state: 'shipped',
      } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    sampleId = sample.id;
  } finally {
    await db.destroy();
  }
}

describe('new-oil reference in Chromium', () => {
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  const errors: string[] = [];

  beforeAll(async () => {
    await prepareCrew();
    browser = await launchBrowser();
    context = await newContext(browser, PHONE);
    page = await context.newPage();
    page.on('pageerror', (e) => errors.push(e.message));
    await signInAs(page, mechanicEmail, PASSWORD);
  });
  afterAll(async () => {
    await browser?.close();
  });

  test('the machine page says the first samples serve, and leads to the form prefilled with the product', async () => {
    await page.goto(`/machines/${machineId}`);
    const note = page.getByTestId('machine-new-oil');
    await expect(note.textContent()).resolves.toContain('first samples of this oil serve as its reference');
    await screenshot(page, 'new-oil-01-machine-phone');
    await Promise.all([
      page.waitForURL(/\/oil-references\/new\?/),
      note.getByRole('link', { name: /Record the new oil of/ }).click(),
    ]);
    expect(await page.getByLabel('Oil product').inputValue()).toBe(PRODUCT);
    expect(await page.getByLabel('SAE grade').inputValue()).toBe('10W-40');
  });

  test('swapped viscosities are refused with a sentence beside the field; the corrected figures are saved', async () => {
    await page.getByLabel('KV at 100 °C (mm²/s)').fill('110');
    await page.getByLabel('KV at 40 °C (mm²/s)').fill('16');
    await page.getByRole('button', { name: 'Save the reference' }).click();
    await page.locator('#f-KV40-error').waitFor();
    expect(await page.locator('#f-KV40-error').textContent()).toMatch(/must be higher than the one at 100 °C/);
    await screenshot(page, 'new-oil-02-refused-phone');
    await page.getByLabel('KV at 100 °C (mm²/s)').fill('16,0');
    await page.getByLabel('KV at 40 °C (mm²/s)').fill('110');
    await page.getByLabel('Zn · Zinc').fill('1100');
    await Promise.all([
      page.waitForURL(/\/oil-references\/[0-9a-f-]{36}\?saved=1$/),
      page.getByRole('button', { name: 'Save the reference' }).click(),
    ]);
    const figures = await page.getByTestId('new-oil-figures').textContent();
    expect(figures).toContain('KV100 16 mm²/s');
    expect(figures).toContain('Zn 1,100 ppm');
    expect(figures).toMatch(/VI \d+/);
    await screenshot(page, 'new-oil-03-saved-phone');
    const overflow = await page.evaluate(
      () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
    );
    expect(overflow).toBeLessThanOrEqual(0);
  });

  test('the next import’s findings use the recorded new oil', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-new-oil-'));
    const file = path.join(dir, `fen-lab-${stamp}.csv`);
    writeFileSync(file, `Bottle,Sampled,Fe,Al,Si,KV100\n${BOTTLE},2026-11-01,22,4,9,12.6\n`);
    await page.goto('/imports');
    await page.getByTestId('lab-upload-dashboard').locator('.uppy-Dashboard').waitFor();
    await page.locator('.uppy-Dashboard-input').first().setInputFiles(file);
    await page.locator('.uppy-StatusBar-actionBtn--upload').click();
    await page.waitForURL(/\/imports\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    await Promise.all([page.waitForURL(/done=1/), page.getByTestId('confirm-import').click()]);
    await page.goto(`/samples/${sampleId}`);
    const findings = page.getByTestId('finding-details');
    await findings.waitFor();
    const text = (await findings.textContent()) ?? '';
    // |12.6 − 16.0| / 16.0 = 21.25 %: the finding names the figure of the oil as poured.
    expect(text).toMatch(/oil as poured \(16 mm²\/s, from the new-oil reference\)/);
    await screenshot(page, 'new-oil-04-finding-phone');
    await page.setViewportSize(DESKTOP);
    await screenshot(page, 'new-oil-05-finding-desktop');
  });

  test('the endpoints stand up to forged origins and crews, huge strings, 5 MB and chunked bodies', async () => {
    const cookie = await sessionCookieFor(baseUrl(), mechanicEmail, PASSWORD);
    const post = (body: BodyInit, headers: Record<string, string> = {}, extra: RequestInit = {}) =>
      fetch(`${baseUrl()}/api/oil-references`, {
        method: 'POST',
        headers: { cookie, origin: baseUrl(), 'content-type': 'application/json', ...headers },
        body,
        ...extra,
      });
    const before = (await (await fetch(`${baseUrl()}/api/oil-references`, { headers: { cookie } })).json()) as {
      references: unknown[];
    };
    const ok = { source: 'data-sheet', productName: `Forged ${stamp}`, KV100: 14 };
    // Another site's origin: refused before anything is read (origin check).
    expect((await post(JSON.stringify(ok), { origin: 'https://evil.example' })).status).toBe(403);
    // A forged crew id is not accepted: the reference lands in the session's crew or nowhere.
    const forged = await post(JSON.stringify({ ...ok, crewId: '00000000-0000-4000-8000-000000000000' }));
    expect(forged.status).toBe(201);
    const after = (await (await fetch(`${baseUrl()}/api/oil-references`, { headers: { cookie } })).json()) as {
      references: { productName: string }[];
    };
    expect(after.references.length).toBe(before.references.length + 1);
    expect(after.references.some((r) => r.productName === `Forged ${stamp}`)).toBe(true);
    // Oversized bodies last: a refused upload may leave its connection closed under the client's pool.
    // A 100 KB product name: refused with 413 (the JSON cap is 16 KB).
    expect((await post(JSON.stringify({ ...ok, productName: 'x'.repeat(100_000) }))).status).toBe(413);
    // A chunked body of the same 100 KB: no length header to trust, still 413.
    const chunks = new ReadableStream({
      start(c) {
        for (let i = 0; i < 10; i++) c.enqueue(new TextEncoder().encode('z'.repeat(10_000)));
        c.close();
      },
    });
    expect((await post(chunks as unknown as BodyInit, {}, { duplex: 'half' } as RequestInit)).status).toBe(413);
    // 5 MB is refused by its declared length before it is read; the server may answer 413 and close the
    // connection while the client is still sending, which the client sees as a reset. Either way nothing is kept.
    const huge = await post('{"a":"' + 'y'.repeat(5 * 1024 * 1024) + '"}').then(
      (r) => r.status,
      () => 'closed while sending',
    );
    expect([413, 'closed while sending']).toContain(huge);
  });

  test('the list shows the reference with its figures on a desktop', async () => {
    await page.goto('/oil-references');
    const list = page.getByTestId('new-oil-list');
    await list.waitFor();
    const item = list.locator(`li[data-product="${PRODUCT.toLowerCase()}"]`);
    expect(await item.textContent()).toContain('KV100 16 mm²/s');
    expect(await item.getByTestId('first-samples-serve').count()).toBe(0);
    await screenshot(page, 'new-oil-06-list-desktop');
  });

  test('a lab bottle of new oil is registered, shown apart in the import preview, and its results fill the reference', async () => {
    const product = `Fenwater Road 15W-50 ${stamp}`;
    const bottle = `NEW-${stamp}`.toUpperCase();
    await page.goto(`/oil-references/new?source=lab&product=${encodeURIComponent(product)}`);
    await page.getByLabel('Bottle code of the new-oil sample').fill(bottle);
    await Promise.all([
      page.waitForURL(/\/oil-references\/[0-9a-f-]{36}\?saved=1$/),
      page.getByRole('button', { name: 'Register the bottle' }).click(),
    ]);
    const referenceUrl = new URL(page.url()).pathname;
    expect(await page.getByTestId('new-oil-figures').textContent()).toContain(`Bottle ${bottle} is at the lab`);
    const dir = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-new-oil-'));
    const file = path.join(dir, `fen-new-oil-${stamp}.csv`);
    writeFileSync(file, `Bottle,Sampled,Fe,Zn,Ca,B,KV100\n${bottle.toLowerCase()},2026-11-20,1,1180,2300,140,18.4\n`);
    await page.goto('/imports');
    await page.getByTestId('lab-upload-dashboard').locator('.uppy-Dashboard').waitFor();
    await page.locator('.uppy-Dashboard-input').first().setInputFiles(file);
    await page.locator('.uppy-StatusBar-actionBtn--upload').click();
    await page.waitForURL(/\/imports\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    const rows = page.getByTestId('new-oil-rows');
    expect(await rows.textContent()).toContain(product);
    await screenshot(page, 'new-oil-07-preview-desktop');
    await Promise.all([page.waitForURL(/done=1/), page.getByTestId('confirm-import').click()]);
    expect(await page.getByTestId('new-oil-rows').textContent()).toContain('Written to the reference');
    await page.goto(referenceUrl);
    const figures = await page.getByTestId('new-oil-figures').textContent();
    expect(figures).toContain(`Bottle ${bottle}, results of 20 Nov 2026`);
    expect(figures).toContain('KV100 18.4 mm²/s');
    await page.setViewportSize(PHONE);
    await screenshot(page, 'new-oil-08-lab-reference-phone');
    expect(errors).toEqual([]);
  });
});
