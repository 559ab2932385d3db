// Oil tools refusals in Chromium (no account needed): swapped viscosities, a VI too high for an engine oil,
// and a KV100 that fits three SAE grades, at both screen sizes.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot } from './helpers/browser';

describe('oil tools in Chromium', () => {
  let browser: Browser;
  let page: Page;
  const errors: string[] = [];

  beforeAll(async () => {
    browser = await launchBrowser();
    page = await (await newContext(browser, PHONE)).newPage();
    page.on('pageerror', (e) => errors.push(e.message));
  });
  afterAll(async () => {
    await browser?.close();
  });

  test('swapped viscosities are refused beside the KV40 field, with no VI shown', async () => {
    await page.goto('/tools');
    await page.getByLabel('KV at 40 °C').first().fill('8.86');
    await page.getByLabel('KV at 100 °C').first().fill('73.3');
    await Promise.all([page.waitForURL(/tool=vi/), page.getByRole('button', { name: 'Work out the VI' }).click()]);
    expect(await page.locator('#vi-40-e').textContent()).toMatch(/must be higher than the one at 100 °C.*swapped/);
    expect(await page.getByTestId('vi-result').count()).toBe(0);
  });

  test('a VI above 400 comes with a warning in words and a shape', async () => {
    await page.goto('/tools?tool=vi&kv40=12&kv100=10#vi');
    const warning = page.getByTestId('vi-warning');
    expect(await warning.textContent()).toMatch(/▲\s*Check this:.*far above any engine oil/);
    await screenshot(page, 'tools-01-vi-warning-phone');
  });

  test('7.0 mm²/s answers SAE 12, 16 or 20 and says the HTHS viscosity decides', async () => {
    await page.goto('/tools?tool=grade&kv100=7.0#grade');
    const text = (await page.getByTestId('grade-result').textContent()) ?? '';
    expect(text).toContain('SAE 12, 16 or 20');
    // SAE J300 minimum HTHS at 150 °C: 12 → 2.0, 16 → 2.3, 20 → 2.6 mPa·s (from memory of the table).
    expect(text).toMatch(/HTHS.*2\.6 mPa·s for SAE 20/);
    await screenshot(page, 'tools-02-grade-overlap-phone');
    await page.setViewportSize(DESKTOP);
    await screenshot(page, 'tools-03-grade-overlap-desktop');
    expect(errors).toEqual([]);
  });
});
