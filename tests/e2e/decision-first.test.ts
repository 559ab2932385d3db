// The decision first, in Chromium on the seeded demo at phone and desktop size: every list shows the level of
// each machine or sample with results, an act machine's page opens on a verdict banner with the call and a
// review button above the wear chart, and a mechanic confirms every steady call waiting in one step (one review
// per sample) and undoes it within the seconds offered.
import { describe, expect, test } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { DESKTOP, PHONE, newContext, screenshot, useBrowser } from './helpers/browser';
import { signInAs } from './helpers/sign-in';
import { seriousViolations } from './helpers/axe';

const mechanic = DEMO_ACCOUNTS.find((a) => a.key === 'mechanic')!;
const LEVEL_WORDS = /^(Steady|Watch|Act)$/;

async function levelWords(page: Page, rows: string): Promise<string[]> {
  return page
    .locator(rows)
    .evaluateAll((els) =>
      els.map((el) => (el.querySelector('[data-level] span:last-child')?.textContent ?? '').trim()),
    );
}

describe('decision first', () => {
  const browser = useBrowser();

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ])('at %s size every list leads with the level, and an act machine with its verdict', async (name, viewport) => {
    const context = await newContext(browser(), viewport);
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await signInAs(page, mechanic.email, mechanic.password);

    // Machines: every card of a machine with results carries a level pill (word + shape), worst first.
    await page.goto('/machines');
    const cards = page.locator('[data-testid="machine-list"] li');
    const levels = await cards.evaluateAll((ls) => ls.map((l) => l.getAttribute('data-level')));
    expect(levels.filter((l) => l !== 'none').length).toBeGreaterThan(0);
    const rank = (l: string | null) => ['none', 'steady', 'watch', 'act'].indexOf(l ?? 'none');
    expect(levels.map(rank)).toEqual([...levels.map(rank)].sort((a, b) => b - a));
    for (const word of await levelWords(page, '[data-testid="machine-list"] li:not([data-level="none"])'))
      expect(word).toMatch(LEVEL_WORDS);
    await screenshot(page, `decision-machines-${name}`);
    expect(await seriousViolations(page)).toEqual([]);

    // Samples: each row with results has a level and (from the engine) a call.
    await page.goto('/samples?state=results_in');
    const rows = '[data-testid="samples-results_in"] tbody tr';
    const words = await levelWords(page, rows);
    expect(words.length).toBeGreaterThan(0);
    for (const w of words) expect(w).toMatch(LEVEL_WORDS);
    expect(await page.locator(`${rows} [data-call]`).count()).toBe(words.length);
    await screenshot(page, `decision-samples-${name}`);
    expect(await seriousViolations(page)).toEqual([]);

    // Home: the review queue shows a level per sample, newest first.
    await page.goto('/');
    const queue = '[data-testid="home-waiting"] li';
    for (const w of await levelWords(page, queue)) expect(w).toMatch(LEVEL_WORDS);
    const dates = await page
      .locator(`${queue} a > time`)
      .evaluateAll((els) => els.map((e) => e.getAttribute('datetime') ?? ''));
    expect(dates.length).toBeGreaterThan(0);
    for (const d of dates) expect(d).toMatch(/^\d{4}-\d{2}-\d{2}/);
    expect(dates).toEqual([...dates].sort().reverse());
    await screenshot(page, `decision-home-${name}`);

    // An act machine: the banner with its call and a review button, above the wear chart.
    await page.goto('/overview?level=act');
    const href = await page.locator('tr[data-level="act"] th a').first().getAttribute('href');
    expect(href).toMatch(/^\/machines\//);
    await page.goto(href!);
    const banner = page.getByTestId('verdict-banner');
    await expect(banner.getAttribute('data-level')).resolves.toBe('act');
    await expect(banner.locator('[data-level] span:last-child').textContent()).resolves.toBe('Act');
    expect(await page.getByTestId('verdict-call').textContent()).toMatch(/^↓?!?(Shorten|Hold|Stretch|Fix first)/);
    const review = page.getByTestId('verdict-review');
    await expect(review.isVisible()).resolves.toBe(true);
    const top = (sel: string) =>
      page
        .locator(sel)
        .first()
        .evaluate((e) => e.getBoundingClientRect().top + scrollY);
    expect(await top('[data-testid="verdict-banner"]')).toBeLessThan(await top('#wear-chart'));
    // The machine's samples table shows a level for each sample with results.
    for (const w of await levelWords(page, '[data-testid="machine-samples"] tbody tr:not([data-level="none"])'))
      expect(w).toMatch(LEVEL_WORDS);
    await screenshot(page, `decision-machine-${name}`);
    expect(await seriousViolations(page)).toEqual([]);

    // The sample it points at: the verdict sits right under the title.
    await review.click();
    await page.waitForURL(/\/samples\//);
    const verdict = page.getByTestId('sample-verdict');
    await expect(verdict.isVisible()).resolves.toBe(true);
    expect(await top('[data-testid="sample-verdict"]')).toBeLessThan(await top('#review'));
    await screenshot(page, `decision-sample-${name}`);
    expect(await seriousViolations(page)).toEqual([]);
    expect(errors).toEqual([]);
    await context.close();
  });

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ])('at %s size a mechanic confirms every steady call in one step, then undoes it', async (name, viewport) => {
    const context = await newContext(browser(), viewport);
    const page = await context.newPage();
    await signInAs(page, mechanic.email, mechanic.password);
    await page.goto('/');
    const button = page.getByTestId('confirm-steady');
    const label = (await button.textContent())!.trim();
    const count = Number(/^Confirm (\d+) steady calls?$/.exec(label)?.[1]);
    expect(count).toBeGreaterThan(0);
    const waitingBefore = await page.request.get('/samples?state=results_in').then((r) => r.text());
    const before = Number(/Results in <span class="num">\((\d+)\)/.exec(waitingBefore)?.[1]);

    await Promise.all([page.waitForURL(/steady_confirmed=/), button.click()]);
    const notice = page.getByTestId('queue-notice');
    await expect(notice.textContent()).resolves.toContain(`Confirmed ${count} steady call`);
    // One review per sample: each left the queue, and no steady call is left to confirm.
    await page.goto('/samples?state=results_in');
    const after = await page.locator('[data-testid="samples-results_in"] tbody tr').count();
    expect(after).toBe(before - count);
    expect(
      await page.locator('[data-testid="samples-results_in"] tbody tr[data-level="steady"] [data-call="hold"]').count(),
    ).toBe(0);
    await page.goto('/samples?state=reviewed');
    expect(await page.locator('[data-testid="samples-reviewed"] tbody tr').count()).toBeGreaterThanOrEqual(count);
    await page.goBack();
    await page.goBack();
    await expect(page.getByTestId('confirm-steady').count()).resolves.toBe(0);
    await screenshot(page, `decision-confirmed-${name}`);
    expect(await seriousViolations(page)).toEqual([]);

    // Undo within the seconds offered: the samples are back in the queue.
    await Promise.all([page.waitForURL(/steady_undone=/), page.getByRole('button', { name: 'Undo' }).click()]);
    await expect(page.getByTestId('queue-notice').textContent()).resolves.toContain(`Undone: ${count} sample`);
    await expect(page.getByTestId('confirm-steady').textContent()).resolves.toBe(label);
    await page.goto('/samples?state=results_in');
    expect(await page.locator('[data-testid="samples-results_in"] tbody tr').count()).toBe(before);
    await context.close();
  });

  test('the endpoints refuse forged origins, foreign ids and oversized bodies, and write nothing', async () => {
    const context = await newContext(browser(), DESKTOP);
    const page = await context.newPage();
    await signInAs(page, mechanic.email, mechanic.password);
    const forged = await page.request.post('/api/reviews/steady-calls', {
      headers: { origin: 'https://evil.example', 'x-forwarded-for': '203.0.113.9', 'x-forwarded-host': 'evil.example' },
      form: { confirm: 'steady' },
      maxRedirects: 0,
    });
    expect(forged.status()).toBe(403);
    const foreign = await page.request.post('/api/reviews/steady-calls/undo', {
      data: { callIds: ['00000000-0000-4000-8000-000000000000'] },
    });
    expect(foreign.status()).toBe(404);
    const big = await page.request.post('/api/reviews/steady-calls/undo', { data: { callIds: ['x'.repeat(100_000)] } });
    expect([400, 413]).toContain(big.status());
    await page.goto('/');
    await expect(page.getByTestId('confirm-steady').isVisible()).resolves.toBe(true);
    await context.close();
  });
});
