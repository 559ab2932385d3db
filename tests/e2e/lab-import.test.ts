// Lab import end to end in Chromium: a report from sample-data/labs/ through the Uppy dashboard, the
// preview checked, one column's mapping fixed and saved as a lab profile, the confirm, and the sample page
// showing its readings and findings. Also the plain form without JavaScript and the "already imported" answer.
import os from 'node:os';
import path from 'node:path';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { createDb } from '~/lib/db/db';
import { normaliseBottleCode } from '~/lib/samples/bottle-code';
import { DESKTOP, PHONE, baseUrl, launchBrowser, newContext, screenshot } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

const LABS = path.resolve(new URL('../..', import.meta.url).pathname, 'sample-data/labs');
const PASSWORD = 'a long enough password';
const email = `lab-lead-${Date.now().toString(36)}@import.example`;

/** A fresh lead (their own crew of one) with a machine and the three drain-card samples the Hollow Creek report names. */
async function prepareCrew(): Promise<void> {
  const res = await fetch(`${baseUrl()}/api/auth/sign-up`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password: PASSWORD, displayName: 'Wren Importer' }),
  });
  if (res.status >= 300) throw new Error(`sign-up ${res.status}: ${await res.text()}`);
  const db = createDb(inject('databaseUrl'), { max: 1 });
  try {
    const member = await db
      .selectFrom('crew_members')
      .innerJoin('users', 'users.id', 'crew_members.user_id')
      .select(['crew_members.crew_id', 'users.id'])
      .where('users.email', '=', email)
      .executeTakeFirstOrThrow();
    const machine = await db
      .insertInto('machines')
      .values({
        crew_id: member.crew_id,
        owner_user_id: member.id,
        name: 'Wren 450',
        engine_layout: 'single',
        displacement_cc: 449,
        cooling: 'liquid',
        meter: 'km',
        recommended_grades: JSON.stringify([{ grade: '10W-40', minC: -10, maxC: 40 }]),
        max_interval_distance: 3000,
      } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    for (const [i, code] of ['SW-1041', 'SW-1042', 'SW-1043'].entries()) {
      await db
        .insertInto('samples')
        .values({
          crew_id: member.crew_id,
          machine_id: machine.id,
          bottle_code: code,
          bottle_code_norm: normaliseBottleCode(code),
          drawn_on: `2026-03-0${2 + i * 3}`,
          odometer: 4000 + i * 1500,
          distance_on_oil: 1500,
          sae_grade: '10W-40',
          client_key: null,
          created_by: member.id,
          state: 'shipped',
        })
        .execute();
    }
  } finally {
    await db.destroy();
  }
}

describe('lab import in Chromium', () => {
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  const errors: string[] = [];
  let previewUrl = '';

  beforeAll(async () => {
    await prepareCrew();
    browser = await launchBrowser();
    context = await newContext(browser, DESKTOP);
    page = await context.newPage();
    page.on('pageerror', (e) => errors.push(e.message));
    await signInAs(page, email, PASSWORD);
  });
  afterAll(async () => {
    await browser?.close();
  });

  test('uploads a lab report through the Uppy dashboard and lands on its preview', async () => {
    await page.goto('/imports');
    await page.getByTestId('lab-upload-dashboard').locator('.uppy-Dashboard').waitFor();
    // The island hides the plain form it replaces.
    expect(await page.locator('#plain-upload').isHidden()).toBe(true);
    await screenshot(page, 'lab-import-01-upload-desktop');
    await page.locator('.uppy-Dashboard-input').first().setInputFiles(path.join(LABS, 'hollow-creek-oil-lab.csv'));
    await page.locator('.uppy-StatusBar-actionBtn--upload').click();
    await page.waitForURL(/\/imports\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    previewUrl = new URL(page.url()).pathname;
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toContain('hollow-creek-oil-lab.csv');
    await expect(page.getByTestId('preview-counts').textContent()).resolves.toMatch(
      /3 ready \(\d+ readings\) · 0 skipped · 0 need attention/,
    );
    for (const code of ['SW-1041', 'SW-1042', 'SW-1043'])
      expect(await page.locator('tr', { hasText: code }).first().textContent()).toContain('Wren 450');
    await screenshot(page, 'lab-import-02-preview-desktop');
  });

  test('fixes the mapping of one column, saved as a lab profile and applied at once', async () => {
    const before = await page.getByTestId('preview-counts').textContent();
    const readingsBefore = Number(/\((\d+) readings\)/.exec(before ?? '')?.[1]);
    // Insolubles are not wanted from this lab: map the column to "ignore".
    await page.locator('summary', { hasText: 'Columns and lab profile' }).click();
    await page.getByLabel('Map column Insol % to').selectOption('ignore');
    await page.getByLabel('Lab profile name').fill('Hollow Creek standard');
    await Promise.all([
      page.waitForURL(/profile=saved/),
      page.getByRole('button', { name: 'Save lab profile and read again' }).click(),
    ]);
    await expect(page.locator('main').textContent()).resolves.toContain('lab profile Hollow Creek standard');
    const after = await page.getByTestId('preview-counts').textContent();
    // SW-1041 is the only row with an insolubles figure (0.3 %).
    expect(Number(/\((\d+) readings\)/.exec(after ?? '')?.[1])).toBe(readingsBefore - 1);
    expect(await page.locator('tr', { hasText: 'Insol %' }).textContent()).toContain('ignored by the lab profile');
  });

  test('confirms, and the sample page shows its readings and findings', async () => {
    await Promise.all([page.waitForURL(/done=1/), page.getByTestId('confirm-import').click()]);
    await expect(page.getByTestId('import-done').textContent()).resolves.toContain('Imported.');
    await screenshot(page, 'lab-import-03-done-desktop');
    await Promise.all([
      page.waitForURL(/\/samples\/[0-9a-f-]{36}$/),
      page.getByRole('link', { name: /Bottle SW-1041/ }).click(),
    ]);
    const readings = page.getByTestId('readings-table');
    // A sample with no finding keeps its full table folded.
    await readings.waitFor({ state: 'attached' });
    // Iron of SW-1041 in the Hollow Creek file: 38 ppm.
    expect(await readings.locator('tr', { hasText: 'Iron' }).first().textContent()).toContain('38');
    expect(await readings.locator('tr', { hasText: 'Insolubles' }).count()).toBe(0);
    await expect(page.locator('main').textContent()).resolves.toMatch(/Results in/i);
    await screenshot(page, 'lab-import-04-sample-desktop');
    await page.setViewportSize(PHONE);
    await screenshot(page, 'lab-import-05-sample-phone');
    await page.goto(previewUrl);
    await screenshot(page, 'lab-import-06-preview-phone');
    const overflow = await page.evaluate(
      () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
    );
    expect(overflow).toBeLessThanOrEqual(0);
    expect(errors).toEqual([]);
  });

  test('with JavaScript the confirm stays off with its reason until every marked row has a choice', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-confirm-'));
    const file = path.join(dir, `unknown-bottle-${Date.now().toString(36)}.csv`);
    writeFileSync(file, `Bottle,Sampled,Fe,Al,Si\nZZ-${Date.now().toString(36).toUpperCase()},2026-11-01,22,4,9\n`);
    await page.setViewportSize(DESKTOP);
    await page.goto('/imports');
    await page.getByTestId('lab-upload-dashboard').locator('.uppy-Dashboard').waitFor();
    await page.locator('.uppy-Dashboard-input').first().setInputFiles(file);
    await page.locator('.uppy-StatusBar-actionBtn--upload').click();
    await page.waitForURL(/\/imports\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    const confirm = page.getByTestId('confirm-import');
    expect(await confirm.isDisabled()).toBe(true);
    expect(await confirm.textContent()).toBe('Confirm import');
    await expect(page.getByTestId('confirm-why').textContent()).resolves.toContain(
      'choose what to do with the 1 row marked above',
    );
    await page.getByLabel('What to do with line 2').selectOption({ label: 'Create the sample on Wren 450' });
    await expect(confirm.isEnabled()).resolves.toBe(true);
    expect(await confirm.textContent()).toBe('Confirm import with these choices');
    expect(await page.getByTestId('confirm-why').isHidden()).toBe(true);
    await screenshot(page, 'lab-import-09-confirm-after-choice-desktop');
  });

  test('without JavaScript the plain form uploads, and the same file again is "already imported"', async () => {
    const plain = await browser.newContext({ viewport: PHONE, baseURL: baseUrl(), javaScriptEnabled: false });
    const p = await plain.newPage();
    await signInAs(p, email, PASSWORD);
    await p.goto('/imports');
    expect(await p.locator('#plain-upload').isVisible()).toBe(true);
    await p.getByLabel('Lab file', { exact: true }).setInputFiles(path.join(LABS, 'hollow-creek-oil-lab.csv'));
    await Promise.all([
      p.waitForURL(/error=already_imported/),
      p.getByRole('button', { name: 'Upload and preview' }).click(),
    ]);
    await expect(p.getByTestId('upload-error').textContent()).resolves.toContain('already imported');
    await screenshot(p, 'lab-import-07-already-imported-phone');
    await p.getByLabel('Lab file', { exact: true }).setInputFiles(path.join(LABS, 'thistlefen-tribology-bench.csv'));
    await Promise.all([
      p.waitForURL(/\/imports\/[0-9a-f-]{36}$/),
      p.getByRole('button', { name: 'Upload and preview' }).click(),
    ]);
    // Bottles this crew never registered: listed as unknown, with the choice to create or skip.
    expect(await p.getByTestId('preview-counts').textContent()).toMatch(/0 ready .* 2 need attention/);
    expect(await p.locator('tr[data-line="2"]').textContent()).toContain('Unknown bottle');
    expect(await p.locator('#row-2-msg').textContent()).toContain('no sample of this crew has bottle code "SW-2107"');
    await p.getByLabel('What to do with line 2').selectOption('skip');
    await p.getByLabel('What to do with line 3').selectOption({ label: 'Create the sample on Wren 450' });
    // Without JavaScript the confirm stays off, with its reason, until the choices are checked.
    expect(await p.getByTestId('confirm-import').isDisabled()).toBe(true);
    await expect(p.getByTestId('confirm-why').textContent()).resolves.toContain('Nothing can be written yet');
    await p.getByRole('button', { name: 'Check my choices' }).click();
    await p.waitForLoadState();
    await expect(p.getByTestId('confirm-import').textContent()).resolves.toMatch(
      /Confirm import: 1 sample, \d+ readings?/,
    );
    await Promise.all([p.waitForURL(/done=1/), p.getByTestId('confirm-import').click()]);
    await screenshot(p, 'lab-import-08-plain-done-phone');
    await plain.close();
  });
});
