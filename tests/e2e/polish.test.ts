// Small truths on screens, at phone and desktop size: times in the reader's zone (taken from the browser at
// sign-up, changed on the account page), "Delete machine" off with its reason when a machine has history, and the
// drain card never offering the reading of an old oil change.
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser } from 'playwright-core';
import type { Kysely } from 'kysely';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import { formatMoment } from '~/lib/words/dates';
import { fromStoredMeter, roundTo } from '~/lib/units/units';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

const SIZES = [
  ['phone', PHONE],
  ['desktop', DESKTOP],
] as const;

describe('polish', () => {
  let browser: Browser;
  let db: Kysely<Database>;
  beforeAll(async () => {
    browser = await launchBrowser();
    db = createDb(inject('databaseUrl'), { max: 1 });
  });
  afterAll(async () => {
    await db?.destroy();
    await browser?.close();
  });

  test.each(SIZES)('at %s size the account time zone changes how a time shows', async (name, viewport) => {
    const context = await browser.newContext({
      viewport,
      baseURL: inject('baseUrl'),
      deviceScaleFactor: 1,
      timezoneId: 'America/New_York',
    });
    const page = await context.newPage();
    const email = `zone-${name}-${Date.now()}@example.test`;
    await page.goto('/sign-up');
    await page.getByLabel('E-mail address').fill(email);
    await page.getByLabel('Password', { exact: true }).fill('a long enough password');
    await Promise.all([
      page.waitForURL((u) => u.pathname !== '/sign-up'),
      page.getByRole('button', { name: 'Create account' }).click(),
    ]);
    const user = await db
      .selectFrom('users')
      .select(['id', 'time_zone'])
      .where('email', '=', email)
      .executeTakeFirstOrThrow();
    expect(user.time_zone).toBe('America/New_York');
    // Signing in again (same browser) writes an account event the account page lists with its time.
    await signInAs(page, email, 'a long enough password');
    const event = await db
      .selectFrom('audit_events')
      .select('at')
      .where('subject_user_id', '=', user.id)
      .where('kind', '=', 'sign_in')
      .executeTakeFirstOrThrow();

    await page.goto('/account');
    const activity = page.locator('#events-h + ul');
    await expect(activity.textContent()).resolves.toContain(`${formatMoment(event.at, 'America/New_York')} · `);
    await expect(page.locator('#f-timeZone').inputValue()).resolves.toBe('America/New_York');
    await screenshot(page, `polish-account-zone-${name}`);

    await page.locator('#f-timeZone').selectOption('Asia/Tokyo');
    await Promise.all([
      page.waitForURL(/\/account\?saved=units$/),
      page.getByRole('button', { name: 'Save', exact: true }).click(),
    ]);
    const tokyo = formatMoment(event.at, 'Asia/Tokyo');
    expect(tokyo).not.toBe(formatMoment(event.at, 'America/New_York'));
    await expect(page.locator('#events-h + ul').textContent()).resolves.toContain(`${tokyo} · `);
    await expect(page.locator('#f-timeZone-hint').textContent()).resolves.toContain('Asia/Tokyo');
    await screenshot(page, `polish-account-zone-saved-${name}`);
    await context.close();
  });

  test.each(SIZES)(
    'at %s size delete is off with its reason; the drain card skips an old reading',
    async (name, viewport) => {
      const rider = DEMO_ACCOUNTS.find((a) => a.key === 'riderA')!;
      const machine = await db
        .selectFrom('machines')
        .select(['id', 'meter'])
        .where('owner_user_id', '=', 'demo-ridera')
        .orderBy('name')
        .executeTakeFirstOrThrow();
      const latest = await db
        .selectFrom('oil_changes')
        .select('odometer')
        .where('machine_id', '=', machine.id)
        .orderBy('changed_on', 'desc')
        .orderBy('odometer', 'desc')
        .executeTakeFirstOrThrow();
      const context = await newContext(browser, viewport);
      const page = await context.newPage();
      await signInAs(page, rider.email, rider.password);

      await page.goto(`/machines/${machine.id}/edit`);
      const del = page.getByRole('button', { name: 'Delete machine' });
      await expect(del.isDisabled()).resolves.toBe(true);
      await expect(page.getByTestId('delete-why').textContent()).resolves.toMatch(/archive it instead/);
      await expect(del.getAttribute('aria-describedby')).resolves.toBe('delete-why');
      await expect(page.getByText(`Longest change interval (${machine.meter})`).count()).resolves.toBe(1);
      await page.getByTestId('delete-why').scrollIntoViewIfNeeded();
      await screenshot(page, `polish-machine-edit-${name}`);

      await page.goto(`/machines/${machine.id}/drain-card`);
      const value = await page.locator('#f-odometer').inputValue();
      const changeReading = roundTo(fromStoredMeter(Number(latest.odometer), machine.meter), 1);
      expect(value).not.toBe(String(changeReading));
      // Empty, or an estimate past the oil change (never at or below it, where the sample would join the fill before).
      if (value !== '') expect(Number(value)).toBeGreaterThan(changeReading);
      await expect(page.locator('#f-odometer-hint').textContent()).resolves.toBe(
        value === '' ? 'As the meter reads now.' : 'Estimated from recent riding: check the meter.',
      );
      await screenshot(page, `polish-drain-card-${name}`);
      await context.close();
    },
  );
});
