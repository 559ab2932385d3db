// Screens a rider reads at a glance: home grouped by machine, the overview's reasons in words, the first steps of a
// new crew, the lead's alert limits; at phone and desktop size, nothing wider than the screen.
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import type { Kysely } from 'kysely';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot } from './helpers/browser';
import { waitForMail } from './helpers/mailbox';
import { signInAs } from './helpers/sign-in';

const run = Date.now().toString(36);
let browser: Browser;
let db: Kysely<Database>;
beforeAll(async () => {
  browser = await launchBrowser();
  db = createDb(inject('databaseUrl'), { max: 2 });
});
afterAll(async () => {
  await browser?.close();
  await db?.destroy();
});

/** Elements reaching past the viewport's edges, outside any scrolling box (a wide table scrolls inside its own box). */
async function tooWide(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const width = document.documentElement.clientWidth;
    const scrolls = (el: Element | null): boolean => {
      for (let p = el?.parentElement ?? null; p; p = p.parentElement) {
        const o = getComputedStyle(p).overflowX;
        if (o === 'auto' || o === 'scroll' || o === 'hidden' || o === 'clip') return true;
      }
      return false;
    };
    return [...document.querySelectorAll('body *')]
      .filter((el) => {
        const r = el.getBoundingClientRect();
        return r.width > 0 && (r.right > width + 1 || r.left < -1) && !scrolls(el);
      })
      .map((el) => `${el.tagName.toLowerCase()}.${String(el.getAttribute('class') ?? '').slice(0, 40)}`)
      .slice(0, 5);
  });
}

const SIZES = [
  ['phone', PHONE],
  ['desktop', DESKTOP],
] as const;

describe.each(SIZES)('the demo crew at %s size', (name, viewport) => {
  test('home shows one card per machine with findings; the overview names reasons in words; pages fit the screen', async () => {
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    await signInAs(page, 'isla.lead@larchwood.example', 'demo-larchwood-lead');
    await page.goto('/');
    const cards = page.getByTestId('home-machine-card');
    const machines = await cards.evaluateAll((els) => els.map((e) => e.getAttribute('data-machine')));
    expect(machines.length).toBeGreaterThan(0);
    expect(new Set(machines).size).toBe(machines.length);
    // Each card: a level with its word, a sentence, the call, links to the finding and the machine.
    for (const card of await cards.all()) {
      expect(await card.locator('[data-level] >> text=/Watch|Act/').count()).toBeGreaterThan(0);
      expect(await card.textContent()).toMatch(/Interval call: (Shorten|Hold|Stretch|Fix first)|No interval call yet/);
      // One link to the findings; the worst card alone also carries the home's one filled button.
      expect(await card.locator('a[href^="/samples/"]:not(.btn-primary)').count()).toBe(1);
      expect(await card.locator('a[href^="/machines/"]').count()).toBeGreaterThan(0);
    }
    expect(await cards.first().locator('.btn-primary').count()).toBe(1);
    // Overdue samples say how late and come first.
    const due = await page
      .getByTestId('home-due')
      .locator('li')
      .evaluateAll((els) => els.map((e) => Boolean(e.querySelector('[data-testid=overdue-tag]'))));
    expect(due.indexOf(false) === -1 || due.slice(due.indexOf(false)).every((x) => !x)).toBe(true);
    for (const tag of await page.getByTestId('overdue-tag').allTextContents())
      expect(tag).toMatch(/Overdue\s*· due (today|\d+ (day|days|week|weeks|month|months) ago)/);
    expect(await tooWide(page)).toEqual([]);
    await screenshot(page, `glance-home-${name}`);

    await page.goto('/overview');
    const reasons = await page.getByTestId('overview-reason').allTextContents();
    expect(reasons.some((r) => r.trim().length > 0)).toBe(true);
    // Words, not a rule title and a code ("Climbing trend · K").
    for (const r of reasons) expect(r).not.toMatch(/·|\b(Fe|Al|Si|K|Na|B|FUEL|KV100)\b/);
    expect(await page.locator('main').textContent()).not.toMatch(/\b1 machines\b|confirmed by a mechanic|\(reviewed\)/);
    expect(await tooWide(page)).toEqual([]);
    await screenshot(page, `glance-overview-${name}`);
    await context.close();
  });

  test('the lead changes an alert limit: defaults and sources beside each field, bad input refused, the crew judged again', async () => {
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    await signInAs(page, 'isla.lead@larchwood.example', 'demo-larchwood-lead');
    await page.goto('/crews');
    const crewHref = await page.locator('a[href^="/crews/"]').first().getAttribute('href');
    await page.goto(crewHref!.replace(/#.*$/, ''));
    await Promise.all([page.waitForURL(/\/limits$/), page.getByTestId('limits-link').click()]);
    await expect(page.locator('h1').textContent()).resolves.toBe('Alert limits');
    const iron = page.locator('[data-limit=Fe]');
    await expect(iron.textContent()).resolves.toContain('Default 100 ppm');
    await expect(
      page.getByTestId('limit-group').filter({ has: iron }).getByTestId('limit-source').textContent(),
    ).resolves.toContain('Petro-Canada Lubricants Handbook (2004)');
    // Every field has a default beside it, and every card a source.
    expect(await page.locator('[data-limit]').count()).toBe(
      await page.locator('[data-limit] >> text=/Default [0-9.]+ (ppm|%)/').count(),
    );
    expect(await page.getByTestId('limit-source').count()).toBe(await page.getByTestId('limit-group').count());
    expect(await page.locator('[data-limit=B]').count()).toBe(0);
    expect(await tooWide(page)).toEqual([]);
    await screenshot(page, `glance-limits-${name}`);

    await page.getByLabel('Iron (ppm)').fill('lots');
    await page.getByRole('button', { name: 'Save the alert limits' }).click();
    await expect(page.getByTestId('form-error').textContent()).resolves.toContain('Nothing was saved');
    await expect(iron.locator('.field-error').textContent()).resolves.toContain('Numbers only');
    await expect(page.getByLabel('Iron (ppm)').inputValue()).resolves.toBe('lots');
    await screenshot(page, `glance-limits-refused-${name}`);

    await page.getByLabel('Iron (ppm)').fill('90');
    await Promise.all([
      page.waitForURL(/changed=1/),
      page.getByRole('button', { name: 'Save the alert limits' }).click(),
    ]);
    await expect(page.getByTestId('form-info').textContent()).resolves.toMatch(
      /Saved: 1 limit changed, \d+ machines? judged again\./,
    );
    await expect(page.getByLabel('Iron (ppm)').inputValue()).resolves.toBe('90');
    // Back to the default, so the demo's findings are as seeded for the other tests.
    await page.getByLabel('Iron (ppm)').fill('');
    await Promise.all([
      page.waitForURL(/changed=1/),
      page.getByRole('button', { name: 'Save the alert limits' }).click(),
    ]);
    await expect(page.getByLabel('Iron (ppm)').inputValue()).resolves.toBe('');
    await context.close();
  });
});

describe.each(SIZES)('a new crew at %s size', (name, viewport) => {
  test('home says nothing waiting and lists the first steps, each ticked when done; the verify page stops offering a link', async () => {
    const email = `first-${name}-${run}@e2e.example`;
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    await page.goto('/sign-up');
    await page.getByLabel('E-mail address').fill(email);
    await page.getByLabel('Your name').fill('Noa First');
    await page.getByLabel('Password').fill('first minutes gearbox');
    await Promise.all([
      page.waitForURL(/\/\?welcome=1$/),
      page.getByRole('button', { name: 'Create account' }).click(),
    ]);
    // Sign-up lands on the first steps under one banner: where the confirmation link went.
    expect(await page.locator('main [role=status], main [role=alert], main .note').count()).toBe(1);
    await expect(page.getByTestId('form-info').textContent()).resolves.toContain(
      `We sent a link to ${email} to confirm the address.`,
    );
    await expect(
      page.locator('main .btn-primary').evaluateAll((els) => els.map((e) => e.textContent)),
    ).resolves.toEqual(['Add a machine']);
    await screenshot(page, `glance-signed-up-${name}`);

    await page.goto('/');
    await expect(page.getByTestId('home-clear').textContent()).resolves.toBe('Nothing waiting.');
    const steps = page.getByTestId('first-steps').locator('li');
    expect(
      await steps.evaluateAll((els) => els.map((e) => [e.getAttribute('data-step'), e.getAttribute('data-done')])),
    ).toEqual([
      ['machine', 'no'],
      ['oil-change', 'no'],
      ['drain-card', 'no'],
      ['import', 'no'],
      ['invite', 'no'],
    ]);
    expect(await page.getByTestId('home-findings').count()).toBe(0);
    expect(await tooWide(page)).toEqual([]);
    await screenshot(page, `glance-first-steps-${name}`);

    // Add a machine through the first step's link: that step is ticked.
    await Promise.all([page.waitForURL(/\/machines\/new$/), page.locator('[data-step=machine] a').click()]);
    await page.getByLabel('Name').fill(`First ${name}`);
    await page.getByLabel('Oil capacity (L)').fill('1.2');
    await page.getByLabel('Grade 1').fill('10W-40');
    await page.getByLabel('Longest change interval (in the unit of the meter chosen above)').fill('3000');
    await Promise.all([
      page.waitForURL(/\/machines\/[0-9a-f-]{36}\?added=1$/),
      page.getByRole('button', { name: 'Add machine' }).click(),
    ]);
    await page.goto('/');
    await expect(page.locator('[data-step=machine]').getAttribute('data-done')).resolves.toBe('yes');
    await expect(page.locator('[data-step=oil-change] a').getAttribute('href')).resolves.toMatch(
      /^\/machines\/[0-9a-f-]{36}\/oil-change$/,
    );
    await screenshot(page, `glance-first-steps-ticked-${name}`);

    // Confirming the address: the page says so and offers no new link.
    const mail = await waitForMail(db, email, /Confirm your e-mail/);
    await page.goto(`/dev/mailbox/${mail.id}`);
    await page.getByTestId('mail-text').locator('a').first().click();
    await expect(page.getByTestId('form-info').textContent()).resolves.toContain('confirmed');
    expect(await page.getByRole('button', { name: 'Send me a new link' }).count()).toBe(0);
    await page.goto('/verify-email');
    expect(await page.getByRole('button', { name: 'Send me a new link' }).count()).toBe(0);
    await context.close();
  });
});
