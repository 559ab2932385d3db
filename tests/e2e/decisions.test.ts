// Where decisions are made, end to end in Chromium on the seeded demo: a mechanic follows an act finding
// from the home page to its sample, reads the wear chart, overrides the interval call with a note, and a
// rider of the crew sees the new call. Then each demo story is checked on the screen.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot, useBrowser } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

const account = (key: string) => {
  const a = DEMO_ACCOUNTS.find((x) => x.key === key);
  if (!a) throw new Error(`no demo account ${key}`);
  return a;
};

async function signedIn(
  browser: Browser,
  key: string,
  viewport: { width: number; height: number },
): Promise<{ context: BrowserContext; page: Page; errors: string[] }> {
  const context = await newContext(browser, viewport);
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  const a = account(key);
  await signInAs(page, a.email, a.password);
  return { context, page, errors };
}

/** The id of a machine by its name, from the crew overview. */
async function machineHref(page: Page, name: string): Promise<string> {
  await page.goto('/overview');
  const href = await page.locator(`tr[data-machine="${name}"] th a`).getAttribute('href');
  expect(href).toMatch(/^\/machines\/[0-9a-f-]{36}$/);
  return href!;
}

/** Levels of the rows of one element's table under the wear chart, oldest first. */
async function chartLevels(page: Page, href: string, code: string): Promise<string[]> {
  await page.goto(`${href}?chart=${code}`);
  // The island loads when it scrolls into view (client:visible).
  await page.locator('#wear-chart').scrollIntoViewIfNeeded();
  const table = page.locator(`[data-testid="wear-chart-table"] table[data-measurand="${code}"]`);
  // The tables sit folded under the chart: present, not shown.
  await table.waitFor({ state: 'attached', timeout: 15_000 });
  return table.locator('tbody tr').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-level') ?? ''));
}

describe('decisions: a mechanic overrides a call and a rider sees it', () => {
  const browser = useBrowser();

  test.each([
    ['phone', PHONE, 'hold'],
    ['desktop', DESKTOP, 'shorten'],
  ] as const)('at %s size', async (name, viewport, newCall) => {
    const mech = await signedIn(browser(), 'mechanic', viewport);
    const { page } = mech;

    // 1. Home: one card per machine with open findings, the act ones linking to their sample.
    await page.goto('/');
    const act = page.locator('[data-testid="home-machine-card"][data-level="act"]').first();
    await expect(act.isVisible()).resolves.toBe(true);
    await screenshot(page, `decisions-home-${name}`);
    const machineName = (await act.getAttribute('data-machine'))!.trim();
    expect(machineName.length).toBeGreaterThan(0);
    const firstFinding = act.locator('a[href^="/samples/"]').first();
    await Promise.all([page.waitForURL(/\/samples\/[0-9a-f-]{36}/), firstFinding.click()]);
    const sampleUrl = new URL(page.url()).pathname;

    // 2. The sample: the findings with their rule and numbers, the act level in words.
    const details = page.getByTestId('finding-details');
    await expect(details.locator('[data-level="act"]').count()).resolves.toBeGreaterThan(0);
    await expect(details.getByText('How this rule works').first().isVisible()).resolves.toBe(true);
    await screenshot(page, `decisions-sample-${name}`);

    // 3. The wear chart of its machine: canvas drawn, and the table twin carries an act point.
    const mHref = await page.locator(`a[href^="/machines/"]`).first().getAttribute('href');
    expect(mHref).toMatch(/^\/machines\/[0-9a-f-]{36}$/);
    await page.goto(mHref!);
    const chart = page.getByTestId('wear-chart');
    await chart.scrollIntoViewIfNeeded();
    await page.locator('[data-testid="wear-chart"] canvas').waitFor({ state: 'visible', timeout: 15_000 });
    await page.getByTestId('wear-chart-table').waitFor({ state: 'visible' });
    await expect(
      page
        .locator(
          '[data-testid="wear-chart-table"] tr[data-level="act"], [data-testid="wear-chart-table"] tr[data-level="watch"]',
        )
        .count(),
    ).resolves.toBeGreaterThan(0);
    await expect(page.getByTestId('machine-summary').isVisible()).resolves.toBe(true);
    await chart.screenshot({
      path: `${(await import('./helpers/browser')).SCREENSHOT_DIR}/decisions-chart-${name}.png`,
    });
    await screenshot(page, `decisions-machine-${name}`);

    // 4. Back on the sample: override the call with a note (a note is required).
    await page.goto(sampleUrl);
    // The override form is folded under its heading until asked for.
    await page.locator('[data-testid="override-details"] summary').click();
    const form = page.getByTestId('override-form');
    await form.locator(`input[name="call"][value="${newCall}"]`).check();
    const note = `Checked the air filter on ${machineName} (${name}); resample in 500 km.`;
    await form.getByLabel('Why (required)').fill(note);
    await Promise.all([
      page.waitForURL(/review_saved=override/),
      form.getByRole('button', { name: 'Override the call' }).click(),
    ]);
    const current = page.getByTestId('current-call');
    await expect(current.getAttribute('data-source')).resolves.toBe('override');
    await expect(current.getAttribute('data-call')).resolves.toBe(newCall);
    await expect(current.textContent()).resolves.toContain(note);
    await expect(
      page.locator('[data-testid="call-history"] li[data-source="override"]').count(),
    ).resolves.toBeGreaterThan(0);
    await screenshot(page, `decisions-overridden-${name}`);
    expect(mech.errors).toEqual([]);
    await mech.context.close();

    // 5. A rider of the crew sees the new call, with the note, and no review forms.
    const rider = await signedIn(browser(), 'riderA', viewport);
    await rider.page.goto(sampleUrl);
    const seen = rider.page.getByTestId('current-call');
    await expect(seen.getAttribute('data-call')).resolves.toBe(newCall);
    await expect(seen.textContent()).resolves.toContain(note);
    await expect(rider.page.getByTestId('override-form').count()).resolves.toBe(0);
    await rider.page.goto(mHref!);
    await expect(rider.page.getByTestId('summary-call').getAttribute('data-call')).resolves.toBe(newCall);
    await screenshot(rider.page, `decisions-rider-${name}`);
    const overflow = await rider.page.evaluate(
      () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
    );
    expect(overflow).toBeLessThanOrEqual(0);
    expect(rider.errors).toEqual([]);
    await rider.context.close();
  });

  test('an override without a note is refused and writes nothing', async () => {
    const mech = await signedIn(browser(), 'mechanic', DESKTOP);
    await mech.page.goto('/overview');
    const sampleHref = await mech.page
      .locator('tr[data-machine="Heron"] td a[href^="/samples/"]')
      .first()
      .getAttribute('href');
    const before = await mech.page.request.get(`${sampleHref}`);
    expect(before.status()).toBe(200);
    const res = await mech.page.request.post(`/api/reviews/${sampleHref!.split('/').pop()}/call`, {
      data: { action: 'override', call: 'stretch', note: '' },
      headers: { 'content-type': 'application/json' },
    });
    expect(res.status()).toBe(400);
    const body = (await res.json()) as { error: { fields: Record<string, string> } };
    expect(body.error.fields['note']).toMatch(/note/);
    await mech.context.close();
  });
});

describe('the demo tells its stories', () => {
  let browser: Browser;
  let mech: { context: BrowserContext; page: Page; errors: string[] };
  beforeAll(async () => {
    browser = await launchBrowser();
    mech = await signedIn(browser, 'lead', DESKTOP);
  });
  afterAll(async () => {
    await mech?.context.close();
    await browser?.close();
  });

  test('aluminium climbing on the 450 single', async () => {
    const href = await machineHref(mech.page, 'Marten');
    await expect(mech.page.locator('tr[data-machine="Marten"]').textContent()).resolves.toContain('Al');
    const levels = await chartLevels(mech.page, href, 'Al');
    expect(levels.at(-1)).not.toBe('steady');
    expect(levels.slice(0, 3).every((l) => l === 'steady')).toBe(true);
    await expect(mech.page.getByTestId('summary-climbing').textContent()).resolves.toContain('Al');
  });

  test('the silicon spike on the 690 and its recovery', async () => {
    const href = await machineHref(mech.page, 'Heron');
    const levels = await chartLevels(mech.page, href, 'Si');
    const spike = levels.indexOf('act');
    expect(spike).toBeGreaterThan(0);
    expect(levels.at(-1)).toBe('steady');
    await screenshot(mech.page, 'decisions-story-silicon');
  });

  test('coolant markers on the liquid-cooled twin', async () => {
    const href = await machineHref(mech.page, 'Old Bruin');
    await mech.page.goto(`${href}/history`);
    await expect(
      mech.page.locator('[data-testid="history-findings"] [data-rule="coolant-markers"]').count(),
    ).resolves.toBeGreaterThan(0);
    await screenshot(mech.page, 'decisions-story-coolant-history');
  });

  test('fuel dilution on the air-cooled 650', async () => {
    const href = await machineHref(mech.page, 'Sorrel');
    await mech.page.goto(`${href}/history`);
    await expect(
      mech.page.locator('[data-testid="history-findings"] [data-rule="fuel-dilution"]').count(),
    ).resolves.toBeGreaterThan(0);
    const levels = await chartLevels(mech.page, href, 'FUEL');
    expect(levels.some((l) => l !== 'steady')).toBe(true);
  });

  test('the stable solo bike is called stretch', async () => {
    const solo = await signedIn(browser, 'solo', DESKTOP);
    await solo.page.goto('/overview');
    await expect(solo.page.locator('tr[data-machine="Wren"]').getAttribute('data-call')).resolves.toBe('stretch');
    await expect(solo.page.locator('tr[data-machine="Wren"]').getAttribute('data-level')).resolves.toBe('steady');
    await screenshot(solo.page, 'decisions-story-solo-overview');
    await solo.context.close();
  });

  test('the CSV export neutralises formula cells and covers the crew', async () => {
    const res = await mech.page.request.get('/api/exports/readings.csv');
    expect(res.status()).toBe(200);
    expect(res.headers()['content-type']).toContain('text/csv');
    const text = await res.text();
    expect(text.split('\r\n')[0]).toContain('machine,bottle_code,drawn_on');
    for (const name of ['Marten', 'Heron', 'Old Bruin', 'Sorrel']) expect(text).toContain(name);
    expect(text).not.toContain('Wren');
    expect(text.split('\r\n').some((line) => /(^|,)[=+@]/.test(line))).toBe(false);
  });

  test('oil tools work as plain GET forms with clear range errors', async () => {
    await mech.page.goto('/tools?tool=vi&kv40=73.3&kv100=8.86');
    await expect(mech.page.getByTestId('vi-result').textContent()).resolves.toContain('92');
    await mech.page.goto('/tools?tool=vi&kv40=10&kv100=1.5');
    await expect(mech.page.locator('#vi-100-e').textContent()).resolves.toMatch(/below 2\.0 mm²\/s/);
  });

  test('pages without an interactive view ship no framework JavaScript', async () => {
    for (const path of ['/overview', '/tools', '/rules']) {
      await mech.page.goto(path);
      const islands = await mech.page.locator('astro-island').count();
      expect(islands, path).toBe(0);
    }
  });
});
