import { describe, expect, test } from 'vitest';
import { DESKTOP, PHONE, newContext, screenshot, useBrowser } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

// The pages that invite removing covers, lifting the bike and measuring brake parts carry the safety cautions,
// brakes included; the caution style is kept for safety and never borrows a level colour.
describe('safety cautions where the work can hurt', () => {
  const browser = useBrowser();

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ])(
    'oil-change, wear-part and new wear-part pages show the cautions with a brake line (%s)',
    async (name, viewport) => {
      const context = await newContext(browser(), viewport);
      const page = await context.newPage();
      await signInAs(page, 'isla.lead@larchwood.example', 'demo-larchwood-lead');
      await page.goto('/machines');
      const machineHref = await page
        .locator('a[href^="/machines/"]')
        .filter({ hasNotText: 'Add' })
        .first()
        .getAttribute('href');
      expect(machineHref).toMatch(/^\/machines\/[0-9a-f-]{36}$/);
      await page.goto(machineHref!);
      const partHref = await page
        .locator('a[href*="/wear-parts/"]')
        .filter({ hasNotText: /add/i })
        .first()
        .getAttribute('href');

      for (const [label, path] of [
        ['oil-change', `${machineHref}/oil-change`],
        ['wear-part-new', `${machineHref}/wear-parts/new`],
        ['wear-part', partHref],
      ] as const) {
        expect(path, `${label} link`).toBeTruthy();
        const res = await page.goto(path!);
        expect(res?.status(), label).toBe(200);
        const cautions = page.getByRole('complementary', { name: 'Safety cautions' });
        await expect(cautions.isVisible(), label).resolves.toBe(true);
        const text = (await cautions.textContent()) ?? '';
        expect(text, label).toMatch(/Brakes: .*torque.*test the brakes.*licensed mechanic/s);
        expect(text, label).toMatch(/collection point/);
        // Safety has its own colour: the caution's border is not the watch level's amber (#8a5a00).
        const border = await cautions.evaluate((el) => getComputedStyle(el).borderLeftColor);
        expect(border, label).toBe('rgb(70, 60, 140)');
        await screenshot(page, `cautions-${label}-${name}`);
      }
      await context.close();
    },
  );
});
