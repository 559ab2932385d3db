// axe-core on every page a visitor and a signed-in demo user can reach by following links, at phone size:
// no serious or critical violations. Pages are grouped by route (ids replaced) so each kind is checked once.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { PHONE, baseUrl, launchBrowser } from './helpers/browser';
import { seriousViolations, type AxeViolation } from './helpers/axe';
import { signInAs } from './helpers/sign-in';

const MAX_PAGES = 60;
/** Links that change state or leave the page shell, never crawled. */
const SKIP = [/^\/sign-out/, /^\/api\//, /\.(csv|pdf|png|jpe?g|webp|heic)$/i, /^\/photos\//, /\/export/];

function routeKey(pathname: string): string {
  return pathname
    .replace(/[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}/gi, ':id')
    .replace(/\/\d+(?=\/|$)/g, '/:n');
}

/** One readable line per page with problems, so a failure says what to fix. */
function describeProblems(problems: { url: string; violations: AxeViolation[] }[]): string[] {
  return problems.map(
    (p) => `${p.url}: ${p.violations.map((v) => `${v.id} (${v.impact}) at ${v.targets.join(' | ')}`).join('; ')}`,
  );
}

/** Follows same-origin links breadth-first from `start`; runs axe on the first page of each route. */
async function crawl(
  page: Page,
  start: string,
): Promise<{ pages: string[]; problems: { url: string; violations: AxeViolation[] }[] }> {
  const origin = new URL(baseUrl()).origin;
  const queue = [start];
  const seenRoutes = new Set<string>();
  const pages: string[] = [];
  const problems: { url: string; violations: AxeViolation[] }[] = [];
  while (queue.length > 0 && pages.length < MAX_PAGES) {
    const path = queue.shift()!;
    const key = routeKey(path);
    if (seenRoutes.has(key)) continue;
    seenRoutes.add(key);
    const response = await page.goto(path);
    if (!response || response.status() >= 400 || !(response.headers()['content-type'] ?? '').includes('text/html'))
      continue;
    pages.push(path);
    const violations = await seriousViolations(page);
    if (violations.length > 0) problems.push({ url: path, violations });
    const hrefs = await page.$$eval('a[href]', (as) => as.map((a) => (a as HTMLAnchorElement).href));
    for (const href of hrefs) {
      const u = new URL(href);
      if (u.origin !== origin) continue;
      const p = u.pathname + u.search;
      if (SKIP.some((r) => r.test(u.pathname))) continue;
      if (!seenRoutes.has(routeKey(u.pathname + u.search))) queue.push(p);
    }
  }
  return { pages, problems };
}

/** A phone context that lets axe-core's injected script run: the app's CSP rightly refuses inline scripts. */
function axeContext(browser: Browser): Promise<BrowserContext> {
  return browser.newContext({ viewport: PHONE, baseURL: baseUrl(), deviceScaleFactor: 1, bypassCSP: true });
}

describe('accessibility (axe-core, WCAG 2.1 A/AA, serious and critical)', () => {
  let browser: Browser;
  let context: BrowserContext;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  test('every page a signed-out visitor can reach', async () => {
    context = await axeContext(browser);
    const page = await context.newPage();
    const { pages, problems } = await crawl(page, '/');
    for (const p of ['/sign-in', '/sign-up']) expect(pages).toContain(p);
    expect(describeProblems(problems)).toEqual([]);
    await context.close();
  });

  test.each(['lead', 'mechanic', 'riderA'] as const)(
    'every page the demo %s can reach',
    async (key) => {
      const account = DEMO_ACCOUNTS.find((a) => a.key === key)!;
      context = await axeContext(browser);
      const page = await context.newPage();
      await signInAs(page, account.email, account.password);
      const { pages, problems } = await crawl(page, '/');
      expect(pages.length).toBeGreaterThan(5);
      expect(describeProblems(problems)).toEqual([]);
      await context.close();
    },
    180_000,
  );
});
