// The machine page and the sample page read at a glance, in Chromium at both sizes: the wear chart of the demo's
// liquid-cooled twin opens on the coolant markers its latest results flagged, the printable history and the CSV
// export are visible links with JavaScript on, nothing is wider than the screen, and the phone sample page of
// its flagged sample stays short with every flagged reading in view and its numbers in words.
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { createDb } from '~/lib/db/db';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

const mechanic = DEMO_ACCOUNTS.find((a) => a.key === 'mechanic')!;
const rider = DEMO_ACCOUNTS.find((a) => a.key === 'riderA')!;

/** Elements whose right edge passes the viewport, outside any scrolling or clipping box. */
async function overflowing(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const vw = document.documentElement.clientWidth;
    const out: string[] = [];
    if (document.documentElement.scrollWidth > vw) out.push(`document ${document.documentElement.scrollWidth} > ${vw}`);
    for (const el of Array.from(document.querySelectorAll('body *'))) {
      const r = el.getBoundingClientRect();
      if (r.width === 0 || r.right <= vw + 1) continue;
      let clipped = false;
      for (let p = el.parentElement; p && p !== document.body; p = p.parentElement) {
        const o = getComputedStyle(p).overflowX;
        if (o === 'auto' || o === 'hidden' || o === 'scroll' || o === 'clip') {
          clipped = true;
          break;
        }
      }
      if (!clipped && !el.closest('.sr-only'))
        out.push(`${el.tagName.toLowerCase()}.${el.className} right ${Math.round(r.right)}`);
    }
    return out.slice(0, 10);
  });
}

describe('screens at a glance: machine page and sample page', () => {
  let browser: Browser;
  let bruinId = '';
  let flaggedSampleId = '';
  let flaggedCodes: string[] = [];

  beforeAll(async () => {
    browser = await launchBrowser();
    const db = createDb(inject('databaseUrl'), { max: 1 });
    try {
      const machine = await db
        .selectFrom('machines')
        .select('id')
        .where('name', '=', 'Old Bruin')
        .executeTakeFirstOrThrow();
      bruinId = machine.id;
      const latest = await db
        .selectFrom('samples')
        .select('id')
        .where('machine_id', '=', bruinId)
        .where('state', 'in', ['results_in', 'reviewed'])
        .orderBy('drawn_on', 'desc')
        .orderBy('odometer', 'desc')
        .limit(1)
        .executeTakeFirstOrThrow();
      flaggedSampleId = latest.id;
      const findings = await db
        .selectFrom('findings')
        .select(['measurand'])
        .where('sample_id', '=', latest.id)
        .execute();
      flaggedCodes = [...new Set(findings.map((f) => f.measurand).filter((m): m is string => m !== null))];
    } finally {
      await db.destroy();
    }
  });
  afterAll(async () => {
    await browser?.close();
  });

  test("the demo story: Old Bruin's latest results flag the coolant markers", () => {
    // The demo seeds a coolant leak on the liquid-cooled twin (sample-data/seed-machines.ts).
    expect(flaggedCodes.some((c) => ['Na', 'K', 'B'].includes(c))).toBe(true);
  });

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ] as const)('machine page, %s: chart first on the flagged elements, links visible', async (label, size) => {
    const context = await newContext(browser, size);
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await signInAs(page, mechanic.email, mechanic.password);
    await page.goto(`/machines/${bruinId}`);
    await page.locator('#wear-chart').scrollIntoViewIfNeeded();
    await page.locator('[data-testid="wear-chart"] canvas').waitFor({ state: 'visible', timeout: 15_000 });
    const drawn = await page
      .locator('[data-testid="wear-chart-settings"] button[data-code]')
      .evaluateAll((bs) => bs.map((b) => b.getAttribute('data-code')));
    expect(drawn.slice(0, 3).sort()).toEqual(['B', 'K', 'Na']);
    expect(drawn).not.toContain('Fe');
    const tables = await page
      .locator('[data-testid="wear-chart-table"] table[data-measurand]')
      .evaluateAll((ts) => ts.map((t) => t.getAttribute('data-measurand')));
    expect(tables.slice(0, 3).sort()).toEqual(['B', 'K', 'Na']);

    // The chart comes before the element picker, and the picker is folded.
    const chartTop = await page
      .locator('[data-testid="wear-chart"] canvas')
      .evaluate((c) => c.getBoundingClientRect().top + window.scrollY);
    const pickerTop = await page
      .getByTestId('element-picker')
      .evaluate((c) => c.getBoundingClientRect().top + window.scrollY);
    expect(chartTop).toBeLessThan(pickerTop);
    await expect(page.getByTestId('element-picker').getAttribute('open')).resolves.toBeNull();
    // The picker opens from the keyboard and its checkboxes draw another element.
    await page.locator('[data-testid="element-picker"] summary').focus();
    await page.keyboard.press('Enter');
    await page.getByRole('checkbox', { name: 'Iron' }).check();
    await page.locator('[data-testid="wear-chart-settings"] button[data-code="Fe"]').waitFor();

    for (const id of ['history-link', 'csv-link']) await expect(page.getByTestId(id).isVisible()).resolves.toBe(true);
    const csv = await page.request.get((await page.getByTestId('csv-link').getAttribute('href'))!);
    expect(csv.status()).toBe(200);
    expect(await csv.text()).toMatch(/Na|Sodium/);
    const history = await page.request.get((await page.getByTestId('history-link').getAttribute('href'))!);
    expect(history.status()).toBe(200);

    expect(await overflowing(page)).toEqual([]);
    await page.locator('#wear-chart').scrollIntoViewIfNeeded();
    await screenshot(page, `glance-machine-${label}`);
    expect(errors).toEqual([]);
    await context.close();
  });

  // The mechanic's page also carries the review forms (folded); a rider's is the shorter one.
  test.each([
    ['phone', PHONE, mechanic],
    ['desktop', DESKTOP, mechanic],
    ['phone-rider', PHONE, rider],
  ] as const)(
    'sample page, %s: grouped readings, flagged ones in view, numbers in words',
    async (label, size, account) => {
      const context = await newContext(browser, size);
      const page = await context.newPage();
      await signInAs(page, account.email, account.password);
      await page.goto(`/samples/${flaggedSampleId}`);
      const flagged = page.locator('[data-testid="readings-table"] tr[data-flagged="yes"]');
      expect(await flagged.count()).toBeGreaterThan(0);
      for (const row of await flagged.all()) await expect(row.isVisible()).resolves.toBe(true);
      // Groups with nothing flagged are folded.
      const groups = await page
        .locator('[data-testid="readings-table"] details')
        .evaluateAll((ds) =>
          ds.map((d) => ({ open: (d as HTMLDetailsElement).open, flagged: Number(d.getAttribute('data-flagged')) })),
        );
      expect(groups.length).toBeGreaterThan(1);
      for (const g of groups) expect(g.open).toBe(g.flagged > 0);
      // The numbers behind each finding are sentences: no parameter name, no raw float.
      const numbers = await page.getByTestId('finding-numbers').allInnerTexts();
      expect(numbers.length).toBeGreaterThan(0);
      // Each text node on its own (adjacent cells would run together in innerText).
      const texts = await page.locator('main').evaluate((main) => {
        const walker = document.createTreeWalker(main, NodeFilter.SHOW_TEXT);
        const out: string[] = [];
        for (let n = walker.nextNode(); n; n = walker.nextNode())
          if (n.textContent?.trim()) out.push(n.textContent.trim());
        return out;
      });
      expect(texts.filter((t) => /\b[a-z]+[A-Z][a-zA-Z]*\b/.test(t))).toEqual([]);
      expect(texts.filter((t) => /\b\d+\.\d{3,}\b/.test(t))).toEqual([]);
      expect(await overflowing(page)).toEqual([]);
      const height = await page.evaluate(() => document.documentElement.scrollHeight);
      await screenshot(page, `glance-sample-${label}`);
      console.info(`sample page ${label}: ${height} px tall`);
      if (size === PHONE) expect(height).toBeLessThan(4000);
      await context.close();
    },
  );
});
