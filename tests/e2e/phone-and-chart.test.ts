// The phone-first shell and a chart band you can read, in Chromium at 390×844 and 1280×800 on the demo crew: the
// header is one short row with sign-out inside its menu (keyboard: open, Escape, focus back), tables become
// cards on a phone without breaking a date, bottle code or SAE grade across lines, the wear chart keeps its box
// while it loads and folds its tables, its key's band swatches carry the bands' colours, and an act point is an
// octagon at least 10 px across.
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { createDb } from '~/lib/db/db';
import path from 'node:path';
import { DESKTOP, PHONE, SCREENSHOT_DIR, baseUrl, launchBrowser, newContext, screenshot } from './helpers/browser';
import { seriousViolations } from './helpers/axe';
import { signInAs } from './helpers/sign-in';

const lead = DEMO_ACCOUNTS.find((a) => a.key === 'lead')!;

/**
 * Dates (2 Mar 2026, 2 Mar 2026, 14:05, or an ISO 2026-03-02 in a file name), bottle codes (SW-1041) and SAE
 * grades (10W-40) in data-table cells that the browser laid out on more than one line: each match's text range
 * must sit on one line box.
 */
async function brokenTokens(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const TOKEN =
      /\b(\d{1,2} [A-Z][a-z]{2} \d{4}(, \d{2}:\d{2})?|\d{4}-\d{2}-\d{2}|[A-Z]{2,}-\d{2,}|\d{1,2}W-\d{2})\b/g;
    const out: string[] = [];
    for (const cell of Array.from(document.querySelectorAll('table.data-table :is(td, th)'))) {
      if ((cell as HTMLElement).offsetParent === null) continue;
      const walker = document.createTreeWalker(cell, NodeFilter.SHOW_TEXT);
      for (let node = walker.nextNode(); node; node = walker.nextNode()) {
        const text = node.textContent ?? '';
        for (const m of text.matchAll(TOKEN)) {
          const range = document.createRange();
          range.setStart(node, m.index!);
          range.setEnd(node, m.index! + m[0].length);
          const tops = new Set(
            Array.from(range.getClientRects())
              .filter((r) => r.width > 0)
              .map((r) => Math.round(r.top)),
          );
          if (tops.size > 1)
            out.push(
              `${m[0]} on ${tops.size} lines in “${cell.getAttribute('data-label') ?? ''}”: ${text.slice(0, 60)}`,
            );
        }
      }
    }
    return out;
  });
}

/**
 * Dates a person reads in data-table cells that are not in the one format: an ISO day outside a file name, or a
 * <time> without a machine-readable datetime.
 */
async function datesOutOfFormat(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const out: string[] = [];
    for (const cell of Array.from(document.querySelectorAll('table.data-table :is(td, th)'))) {
      if ((cell as HTMLElement).offsetParent === null) continue;
      const walker = document.createTreeWalker(cell, NodeFilter.SHOW_TEXT);
      for (let node = walker.nextNode(); node; node = walker.nextNode()) {
        // A lab file keeps the name it was uploaded with, ISO days and all.
        if (node.parentElement?.closest('a[href^="/imports/"]')) continue;
        if (/(?<![\w-])\d{4}-\d{2}-\d{2}(?![\w-])/.test(node.textContent ?? ''))
          out.push(`ISO text: ${node.textContent}`);
      }
      for (const t of Array.from(cell.querySelectorAll('time'))) {
        const dt = t.getAttribute('datetime') ?? '';
        if (!/^\d{4}-\d{2}-\d{2}/.test(dt) || !/^\d{1,2} [A-Z][a-z]{2} \d{4}/.test(t.textContent ?? ''))
          out.push(`time "${t.textContent}" datetime="${dt}"`);
      }
    }
    return out;
  });
}

/** The largest blob of act-coloured pixels on the chart's canvas, as its bounding box in CSS pixels. */
async function largestActMark(page: Page): Promise<{ width: number; height: number }> {
  return page.locator('[data-testid="wear-chart"] canvas').evaluate((el) => {
    const canvas = el as HTMLCanvasElement;
    const ctx = canvas.getContext('2d')!;
    const { width, height } = canvas;
    const px = ctx.getImageData(0, 0, width, height).data;
    // tailwind.config.cjs level.act #a12a1c; the tolerance absorbs anti-aliasing at the edges only.
    const isAct = (i: number) =>
      px[i * 4 + 3]! > 200 &&
      Math.abs(px[i * 4]! - 0xa1) < 24 &&
      Math.abs(px[i * 4 + 1]! - 0x2a) < 24 &&
      Math.abs(px[i * 4 + 2]! - 0x1c) < 24;
    const seen = new Uint8Array(width * height);
    let best = { width: 0, height: 0 };
    for (let start = 0; start < width * height; start++) {
      if (seen[start] || !isAct(start)) continue;
      let [x0, x1, y0, y1] = [width, 0, height, 0];
      const stack = [start];
      seen[start] = 1;
      while (stack.length) {
        const i = stack.pop()!;
        const x = i % width;
        const y = (i - x) / width;
        x0 = Math.min(x0, x);
        x1 = Math.max(x1, x);
        y0 = Math.min(y0, y);
        y1 = Math.max(y1, y);
        for (const j of [x > 0 ? i - 1 : -1, x < width - 1 ? i + 1 : -1, i - width, i + width])
          if (j >= 0 && j < width * height && !seen[j] && isAct(j)) {
            seen[j] = 1;
            stack.push(j);
          }
      }
      const ratio = canvas.width / canvas.getBoundingClientRect().width;
      const box = { width: (x1 - x0 + 1) / ratio, height: (y1 - y0 + 1) / ratio };
      if (box.width * box.height > best.width * best.height) best = box;
    }
    return best;
  });
}

/** "rgb(31, 69, 96)" → "#1f4560". */
function hexOf(rgb: string): string {
  const [r, g, b] = rgb.match(/\d+/g)!.map(Number);
  return `#${[r, g, b].map((n) => n!.toString(16).padStart(2, '0')).join('')}`;
}

describe('phone-first shell and a readable chart band', () => {
  let browser: Browser;
  let actMachineId = '';
  let actCode = '';
  let historyMachineId = '';

  beforeAll(async () => {
    browser = await launchBrowser();
    const db = createDb(inject('databaseUrl'), { max: 1 });
    try {
      // A demo machine whose results hold an act reading of one element (sample-data/seed-machines.ts).
      const act = await db
        .selectFrom('findings')
        .innerJoin('samples', 'samples.id', 'findings.sample_id')
        .select(['samples.machine_id', 'findings.measurand'])
        .where('findings.level', '=', 'act')
        .where('findings.measurand', 'is not', null)
        .orderBy('samples.drawn_on', 'desc')
        .limit(1)
        .executeTakeFirstOrThrow();
      actMachineId = act.machine_id;
      actCode = act.measurand!;
      historyMachineId = actMachineId;
    } finally {
      await db.destroy();
    }
  });
  afterAll(async () => {
    await browser?.close();
  });

  test('phone header: one row of at most 64 px, sign-out inside the menu, Escape closes it and focus returns', async () => {
    const context = await newContext(browser, PHONE);
    const page = await context.newPage();
    await signInAs(page, lead.email, lead.password);
    await page.goto('/samples');
    const header = await page.getByTestId('app-header').boundingBox();
    expect(header!.height).toBeLessThanOrEqual(64);
    expect(header!.height).toBeGreaterThanOrEqual(48);
    // Sign-out is not in the bar; it is in the folded menu.
    await expect(page.getByTestId('sign-out').isVisible()).resolves.toBe(false);
    await expect(page.getByTestId('sign-out-phone').isVisible()).resolves.toBe(false);
    const summary = page.locator('header details[data-menu] > summary');
    await summary.focus();
    await page.keyboard.press('Enter');
    await expect(page.getByTestId('sign-out-phone').isVisible()).resolves.toBe(true);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'phone-menu-open.png') });
    await page.keyboard.press('Escape');
    await expect(
      page.locator('header details[data-menu]').evaluate((d) => (d as HTMLDetailsElement).open),
    ).resolves.toBe(false);
    await expect(page.evaluate(() => document.activeElement?.tagName)).resolves.toBe('SUMMARY');
    // The menu's sign-out works.
    await summary.click();
    await Promise.all([
      page.waitForURL((u) => u.pathname === '/sign-in' || u.pathname === '/'),
      page.getByTestId('sign-out-phone').click(),
    ]);
    await page.goto('/samples');
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    await context.close();
  });

  test('desktop header keeps sign-out in the bar', async () => {
    const context = await newContext(browser, DESKTOP);
    const page = await context.newPage();
    await signInAs(page, lead.email, lead.password);
    await expect(page.getByTestId('sign-out').isVisible()).resolves.toBe(true);
    await expect(page.getByTestId('sign-out-phone').isVisible()).resolves.toBe(false);
    await context.close();
  });

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ] as const)(
    'tables, %s: no date, bottle code or grade breaks across lines; phone rows are labelled cards',
    async (label, size) => {
      const context = await newContext(browser, size);
      const page = await context.newPage();
      await signInAs(page, lead.email, lead.password);
      const pages = [
        '/samples',
        `/machines/${actMachineId}`,
        `/machines/${historyMachineId}/history`,
        '/overview',
        '/imports',
      ];
      for (const path of pages) {
        await page.goto(path);
        const cells = await page.locator('table.data-table td').count();
        expect(cells, path).toBeGreaterThan(0);
        expect(await brokenTokens(page), path).toEqual([]);
        expect(await datesOutOfFormat(page), path).toEqual([]);
        expect(await page.locator('table.data-table time[datetime]').count(), path).toBeGreaterThan(0);
        if (label === 'phone') {
          // Every visible body cell of a card table names its column, and no card is wider than the screen.
          const unlabelled = await page.evaluate(
            () =>
              Array.from(document.querySelectorAll('table.data-table:not(.table-keep) > tbody > tr > td'))
                .filter((td) => (td as HTMLElement).offsetParent !== null && (td as HTMLTableCellElement).colSpan === 1)
                .filter((td) => !td.hasAttribute('data-label')).length,
          );
          expect(unlabelled, path).toBe(0);
          const widest = await page.evaluate(() =>
            Math.max(
              ...Array.from(document.querySelectorAll('table.data-table')).map((t) => t.getBoundingClientRect().right),
            ),
          );
          expect(widest, path).toBeLessThanOrEqual(390);
        }
      }
      // What the first screen shows (viewport only), for looking at by eye.
      for (const [name, at] of [
        ['history', `/machines/${historyMachineId}/history`],
        ['samples', '/samples'],
        ['imports', '/imports'],
        ['machines', '/machines'],
      ] as const) {
        await page.goto(at);
        if (name === 'imports') await page.locator('.uppy-Dashboard').waitFor({ state: 'visible', timeout: 15_000 });
        await page.screenshot({ path: path.join(SCREENSHOT_DIR, `phone-and-chart-${name}-${label}.png`) });
      }
      await context.close();
    },
  );

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ] as const)(
    'wear chart, %s: box kept while loading, tables folded, key matches bands, act octagon ≥ 10 px',
    async (label, size) => {
      const context = await newContext(browser, size);
      const page = await context.newPage();
      await signInAs(page, lead.email, lead.password);
      // Hold the readings back until the loading box has been measured.
      let release: () => void = () => {};
      const held = new Promise<void>((r) => (release = r));
      await page.route('**/api/trends/**', async (route) => {
        await held;
        await route.continue();
      });
      await page.goto(`/machines/${actMachineId}?chart=${actCode}`);
      await page.locator('#wear-chart').scrollIntoViewIfNeeded();
      const loading = page.getByTestId('wear-chart-loading');
      await loading.waitFor({ state: 'visible', timeout: 15_000 });
      const reserved = (await loading.boundingBox())!.height;
      release();
      const canvas = page.locator('[data-testid="wear-chart"] canvas');
      await canvas.waitFor({ state: 'visible', timeout: 15_000 });
      const drawn = (await page.locator('[data-testid="wear-chart"] figure').boundingBox())!.height;
      // Same box height before and after (h-72 on a phone, h-96 from md up).
      expect(Math.abs(reserved - drawn)).toBeLessThanOrEqual(2);
      expect(drawn).toBeGreaterThanOrEqual(280);

      // The chart's data tables start folded.
      await expect(page.getByTestId('wear-chart-table').evaluate((d) => (d as HTMLDetailsElement).open)).resolves.toBe(
        false,
      );

      // Each band swatch in the key has the colour of the band the chart drew for that element.
      const bandColours = (
        (await page.locator('[data-testid="wear-chart"] figure').getAttribute('data-band-colours')) ?? ''
      )
        .split(' ')
        .filter(Boolean);
      const swatches = await page
        .locator('[data-band-swatch]')
        .evaluateAll((els) => els.map((e) => getComputedStyle(e).borderTopColor));
      expect(bandColours.length).toBeGreaterThan(0);
      expect(swatches.map(hexOf)).toEqual(bandColours);
      // And the band really is on the canvas in that colour: its dashed edges are drawn at full strength.
      const bandPixels = await canvas.evaluate((el, hex) => {
        const c = el as HTMLCanvasElement;
        const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
        const [r, g, b] = [1, 3, 5].map((i) => Number.parseInt(hex.slice(i, i + 2), 16));
        let n = 0;
        for (let i = 0; i < d.length; i += 4)
          if (d[i] === r && d[i + 1] === g && d[i + 2] === b && d[i + 3] === 255) n++;
        return n;
      }, bandColours[0]!);
      expect(bandPixels).toBeGreaterThan(20);

      // The act point: an octagon mark at least 10 px across.
      const act = await largestActMark(page);
      expect(act.width).toBeGreaterThanOrEqual(10);
      expect(act.height).toBeGreaterThanOrEqual(10);

      expect(await seriousViolations(page)).toEqual([]);
      await screenshot(page, `phone-and-chart-machine-${label}`);
      await page
        .locator('#wear-chart')
        .screenshot({ path: path.join(SCREENSHOT_DIR, `phone-and-chart-chart-${label}.png`) });
      await context.close();
    },
  );
  test('scripts off, phone: a samples table cell carries its column label as a card line, and dates read as words', async () => {
    // Sign in with scripts on, then read the page in a context that runs none.
    const signedIn = await newContext(browser, PHONE);
    await signInAs(await signedIn.newPage(), lead.email, lead.password);
    const storageState = await signedIn.storageState();
    await signedIn.close();
    const context = await browser.newContext({
      viewport: PHONE,
      baseURL: baseUrl(),
      deviceScaleFactor: 1,
      javaScriptEnabled: false,
      storageState,
    });
    const page = await context.newPage();
    await page.goto('/samples');
    const table = page.locator('table.data-table').first();
    const drawn = table.locator('tbody tr').first().locator('td[data-label="Drawn"]');
    await expect(drawn.count()).resolves.toBe(1);
    // The label is drawn by CSS from the attribute, beside the value, with the heading row out of sight.
    const look = await drawn.evaluate((td) => {
      const before = getComputedStyle(td, '::before');
      const head = td.closest('table')!.tHead!.getBoundingClientRect();
      return {
        label: before.content,
        labelShown: before.display !== 'none' && before.visibility !== 'hidden',
        cellDisplay: getComputedStyle(td).display,
        headHeight: head.height,
        time: td.querySelector('time')?.textContent ?? '',
        datetime: td.querySelector('time')?.getAttribute('datetime') ?? '',
      };
    });
    expect(look.label).toBe('"Drawn"');
    expect(look.labelShown).toBe(true);
    expect(look.cellDisplay).toBe('block');
    expect(look.headHeight).toBeLessThanOrEqual(1);
    expect(look.time).toMatch(/^\d{1,2} (Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Oct|Nov|Dec) \d{4}$/);
    expect(look.datetime).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    // Every visible body cell of every card table on the page names its column.
    const unlabelled = await page
      .locator('table.data-table:not(.table-keep) > tbody > tr > td:not([colspan])')
      .evaluateAll(
        (tds) => tds.filter((td) => (td as HTMLElement).offsetParent !== null && !td.hasAttribute('data-label')).length,
      );
    expect(unlabelled).toBe(0);
    await screenshot(page, 'phone-and-chart-samples-no-script-phone');
    await context.close();
  });

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ] as const)(
    'screens with dates, %s: samples, machine, home, imports, samples, overview and history, for looking at',
    async (label, size) => {
      const context = await newContext(browser, size);
      const page = await context.newPage();
      await signInAs(page, lead.email, lead.password);
      await page.goto(`/machines/${actMachineId}`);
      const sampleHref = await page.locator('[data-testid="machine-samples"] tbody a').first().getAttribute('href');
      expect(sampleHref).toMatch(/^\/samples\//);
      // A shipped bottle's page keeps its drain details and history open: their dates show.
      await page.goto('/samples?state=shipped');
      const shippedHref = await page.locator('[data-testid="samples-shipped"] tbody a').first().getAttribute('href');
      for (const [name, at] of [
        ['samples', '/samples'],
        ['machine', `/machines/${actMachineId}`],
        ['home', '/'],
        ['imports', '/imports'],
        ['sample', sampleHref!],
        ['sample-shipped', shippedHref!],
        ['overview', '/overview'],
        ['history', `/machines/${actMachineId}/history`],
      ] as const) {
        await page.goto(at);
        if (name === 'machine') {
          // The chart loads when it comes into view.
          await page.locator('#wear-chart').scrollIntoViewIfNeeded();
          await page.locator('[data-testid="wear-chart"] canvas').waitFor({ state: 'visible', timeout: 15_000 });
        }
        // No page of these shows a date the old way, in a table or outside one. A lab file's name keeps its own
        // ISO day ("…-2026-02-08.csv"): only a date standing alone counts.
        const isoShown = await page.evaluate(() => {
          const main = document.querySelector('main')!;
          const walker = document.createTreeWalker(main, NodeFilter.SHOW_TEXT);
          const out: string[] = [];
          for (let node = walker.nextNode(); node; node = walker.nextNode()) {
            const el = node.parentElement;
            if (!el || el.closest('a[href^="/imports/"], script, style, [hidden]') || el.offsetParent === null)
              continue;
            if (/(?<![\w-])\d{4}-\d{2}-\d{2}(?![\w-])/.test(node.textContent ?? ''))
              out.push((node.textContent ?? '').trim().slice(0, 80));
          }
          return out;
        });
        expect(isoShown, name).toEqual([]);
        await screenshot(page, `dates-${name}-${label}`);
        if (name === 'machine') {
          // The chart across dates: its axis and table say days in words too.
          await page.getByRole('radio', { name: 'Date' }).check();
          await page.locator('[data-testid="wear-chart"] canvas').waitFor({ state: 'visible', timeout: 15_000 });
          await page
            .locator('#wear-chart')
            .screenshot({ path: path.join(SCREENSHOT_DIR, `dates-chart-by-date-${label}.png`) });
        }
      }
      await context.close();
    },
  );
});
