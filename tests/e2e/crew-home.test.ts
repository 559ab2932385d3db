// The crew page opens on the current crew, the desktop header keeps to one row, and the home and the overview each
// offer one filled button, in Chromium on the seeded demo at phone and desktop size.
import { describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { DESKTOP, PHONE, newContext, screenshot, SCREENSHOT_DIR, useBrowser } from './helpers/browser';
import { signInAs } from './helpers/sign-in';
import { seriousViolations } from './helpers/axe';
import path from 'node:path';

const account = (key: (typeof DEMO_ACCOUNTS)[number]['key']) => DEMO_ACCOUNTS.find((a) => a.key === key)!;
const run = Date.now().toString(36);

/** The filled buttons a visitor can see in the page's main part, by their words. */
function visiblePrimaries(page: Page): Promise<string[]> {
  return page
    .locator('main .btn-primary')
    .evaluateAll((els) =>
      els.filter((e) => (e as HTMLElement).checkVisibility()).map((e) => (e.textContent ?? '').trim()),
    );
}

async function signedIn(
  browser: Browser,
  key: Parameters<typeof account>[0],
  viewport: { width: number; height: number },
) {
  const context = await newContext(browser, viewport);
  const page = await context.newPage();
  const a = account(key);
  await signInAs(page, a.email, a.password);
  return { context, page };
}

/** Signs up through the form at `from` and waits until it lands where `lands` says. */
async function signUp(page: Page, from: string, email: string, lands: RegExp, name = ''): Promise<void> {
  await page.goto(from);
  await page.getByLabel('E-mail address').fill(email);
  if (name) await page.getByLabel('Your name').fill(name);
  await page.getByLabel('Password').fill('two crews one gearbox');
  await Promise.all([page.waitForURL(lands), page.getByRole('button', { name: 'Create account' }).click()]);
}

describe('crew page, header and one primary button', () => {
  const browser = useBrowser();

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ] as const)(
    '%s: a lead’s crew page opens on the crew, with one Invite button to the invitation form',
    async (name, size) => {
      const { context, page } = await signedIn(browser(), 'lead', size);
      const crewName = await page.locator('body').getAttribute('data-crew-name');
      await page.goto('/crews');
      await expect(page.locator('h1').textContent()).resolves.toBe(crewName);
      const roles = await page
        .getByTestId('crew-members')
        .locator('tbody tr')
        .evaluateAll((rows) => rows.map((r) => [r.getAttribute('data-member'), r.lastElementChild?.textContent]));
      expect(roles).toContainEqual([account('lead').email, 'Lead']);
      expect(roles).toContainEqual([account('mechanic').email, 'Mechanic']);
      expect(roles).toContainEqual([account('riderA').email, 'Rider']);
      expect(await visiblePrimaries(page)).toEqual(['Invite']);
      // Starting another crew is a small folded link, not the page's content.
      await expect(page.getByLabel('Crew name').isVisible()).resolves.toBe(false);
      await expect(page.locator('[data-testid=new-crew] > summary').textContent()).resolves.toBe('Start another crew');
      expect(await seriousViolations(page)).toEqual([]);
      await screenshot(page, `crew-home-lead-${name}`);
      await Promise.all([
        page.waitForURL(/\/crews\/[0-9a-f-]{36}#invite-h$/),
        page.getByTestId('invite-button').click(),
      ]);
      await expect(page.getByRole('button', { name: 'Send invitation' }).isVisible()).resolves.toBe(true);
      await context.close();
    },
  );

  test.each([
    ['mechanic', 'Mechanic'],
    ['riderA', 'Rider'],
  ] as const)('a %s sees the members read-only, with no Invite button and no invitations', async (key, word) => {
    const { context, page } = await signedIn(browser(), key, PHONE);
    await page.goto('/crews');
    await expect(page.getByTestId('crew-members').textContent()).resolves.toContain(account('lead').email);
    await expect(page.locator('main').textContent()).resolves.toContain(`You are ${word.toLowerCase()} here`);
    expect(await page.getByTestId('invite-button').count()).toBe(0);
    expect(await page.getByTestId('pending-invitations').count()).toBe(0);
    // Read-only: no role choices; the crew's page (to leave it) is a link.
    expect(await page.locator('main select').count()).toBe(0);
    await expect(page.getByTestId('crew-page-link').textContent()).resolves.toContain('to leave the crew');
    await screenshot(page, `crew-home-${key}-phone`);
    await context.close();
  });

  test('a rider on their own: the crew page says only they are in it, and offers the Invite button', async () => {
    const { context, page } = await signedIn(browser(), 'solo', DESKTOP);
    await page.goto('/crews');
    await expect(page.getByTestId('empty-state').textContent()).resolves.toContain('Only you so far');
    expect(await page.getByTestId('crew-members').count()).toBe(0);
    expect(await visiblePrimaries(page)).toEqual(['Invite']);
    await screenshot(page, 'crew-home-solo-desktop');
    await context.close();
  });

  test.each([
    ['1280', DESKTOP, 72],
    ['1024', { width: 1024, height: 768 }, 72],
    ['390', PHONE, 64],
  ] as const)('the demo lead’s header at %s px is one row', async (label, size, most) => {
    const { context, page } = await signedIn(browser(), 'lead', size);
    await page.goto('/overview');
    const header = (await page.getByTestId('app-header').boundingBox())!;
    expect(header.height).toBeLessThanOrEqual(most);
    if (size.width >= 1024) {
      // Brand, crew, links and sign-out side by side: every one of them within the header's one row.
      const tops = await page
        .locator(
          'header a[aria-label="Sumpwise home"], header [data-testid=current-crew], header nav.lg\\:block a, header [data-testid=sign-out]',
        )
        .evaluateAll((els) => els.map((e) => [e.textContent?.trim(), Math.round(e.getBoundingClientRect().top)]));
      expect(tops.length).toBeGreaterThanOrEqual(9);
      expect(new Set(tops.map(([, top]) => top)).size, JSON.stringify(tops)).toBe(1);
      await expect(page.getByTestId('current-crew').textContent()).resolves.toContain('lead');
    } else {
      await expect(page.getByTestId('sign-out').isVisible()).resolves.toBe(false);
    }
    await page.screenshot({
      path: path.join(SCREENSHOT_DIR, `header-${label}.png`),
      clip: { x: 0, y: 0, width: size.width, height: Math.ceil(header.height) + 40 },
    });
    await context.close();
  });

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ] as const)('%s: the demo lead’s home and overview each show exactly one filled button', async (name, size) => {
    const { context, page } = await signedIn(browser(), 'lead', size);
    await page.goto('/');
    const home = await visiblePrimaries(page);
    expect(home, JSON.stringify(home)).toHaveLength(1);
    await screenshot(page, `one-primary-home-${name}`);
    await page.goto('/overview');
    const overview = await visiblePrimaries(page);
    expect(overview, JSON.stringify(overview)).toHaveLength(1);
    // The overview's button is about its worst machine, not the filter.
    expect(overview[0]).toMatch(/^(Review|Findings of) /);
    await expect(page.getByRole('button', { name: 'Apply' }).getAttribute('class')).resolves.toContain('btn-secondary');
    await screenshot(page, `one-primary-overview-${name}`);
    await context.close();
  });

  test('a lead of two crews: the other crew is listed with a switch, and the header’s crew menu switches too', async () => {
    const context = await newContext(browser(), DESKTOP);
    const page = await context.newPage();
    await signUp(page, '/sign-up', `two-${run}@e2e.example`, /\/\?welcome=1$/, 'Rue Two');
    await page.goto('/crews');
    await page.locator('[data-testid=new-crew] > summary').click();
    await page.getByLabel('Crew name').fill(`School ${run}`);
    await Promise.all([
      page.waitForURL(/\/crews\/[0-9a-f-]{36}$/),
      page.getByRole('button', { name: 'Create crew' }).click(),
    ]);
    await page.goto('/crews');
    await expect(page.locator('h1').textContent()).resolves.toBe(`School ${run}`);
    await expect(page.getByTestId('crew-list').textContent()).resolves.toContain('Rue Two’s crew');
    expect(await visiblePrimaries(page)).toEqual(['Invite']);
    await screenshot(page, 'crew-home-two-crews-desktop');
    await Promise.all([page.waitForURL(/\/crews$/), page.getByRole('button', { name: 'Work in this crew' }).click()]);
    await expect(page.locator('h1').textContent()).resolves.toBe('Rue Two’s crew');
    // The header's crew menu: opens, Escape closes it, and its switch goes back to the school.
    const summary = page.locator('header [data-testid=crew-switcher] > summary');
    await summary.click();
    await expect(page.getByLabel('Crew you are working in').first().isVisible()).resolves.toBe(true);
    await page.keyboard.press('Escape');
    await expect(page.getByLabel('Crew you are working in').first().isVisible()).resolves.toBe(false);
    await summary.click();
    await page.locator('#crew-switch').selectOption({ label: `School ${run} · lead` });
    await Promise.all([
      page.waitForURL(/\/crews$/),
      page.locator('header [data-testid=crew-switcher]').getByRole('button', { name: 'Switch' }).click(),
    ]);
    await expect(page.locator('h1').textContent()).resolves.toBe(`School ${run}`);
    const header = (await page.getByTestId('app-header').boundingBox())!;
    expect(header.height).toBeLessThanOrEqual(72);
    await context.close();
  });

  test('sign-up with somewhere to go still goes there', async () => {
    const context = await newContext(browser(), PHONE);
    const page = await context.newPage();
    await signUp(page, '/sign-up?next=%2Ftools', `next-${run}@e2e.example`, /\/tools$/);
    expect(await page.getByTestId('form-info').count()).toBe(0);
    await context.close();
  });
});
