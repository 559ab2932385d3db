// The drain card with the keyboard alone (gloves, a phone on a stand, or no pointer at all): Tab to the card
// from the machine page, type the code and odometer, Enter to register. Levels stay readable without colour.
import { describe, expect, test } from 'vitest';
import type { Page } from 'playwright-core';
import { inject } from 'vitest';
import { createDb } from '~/lib/db/db';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { PHONE, newContext, screenshot, useBrowser } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

/** Presses Tab until `matches` holds for the focused element (at most `limit` presses). */
async function tabTo(page: Page, matches: (el: Element) => boolean, limit = 80): Promise<void> {
  for (let i = 0; i < limit; i++) {
    await page.keyboard.press('Tab');
    if (
      await page.evaluate((fn) => {
        const el = document.activeElement;
        return el ? (new Function('el', `return (${fn})(el)`)(el) as boolean) : false;
      }, matches.toString())
    )
      return;
  }
  throw new Error(`no focusable element matched after ${limit} Tab presses`);
}

describe('keyboard only', () => {
  const browser = useBrowser();

  test('a rider fills and registers the drain card with the keyboard alone', async () => {
    const rider = DEMO_ACCOUNTS.find((a) => a.key === 'riderA')!;
    const db = createDb(inject('databaseUrl'), { max: 1 });
    const machine = await db
      .selectFrom('machines')
      .select(['id', 'name'])
      .where('owner_user_id', '=', 'demo-ridera')
      .orderBy('name')
      .executeTakeFirstOrThrow();
    const context = await newContext(browser(), PHONE);
    const page = await context.newPage();
    await signInAs(page, rider.email, rider.password);
    await page.goto(`/machines/${machine.id}`);

    await tabTo(page, (el) => el.getAttribute('data-testid') === 'drain-card-link');
    await Promise.all([page.waitForURL(/\/drain-card$/), page.keyboard.press('Enter')]);

    const code = `KB-${Date.now().toString().slice(-6)}`;
    await tabTo(page, (el) => el.id === 'f-bottleCode');
    await page.keyboard.type(code);
    const prev = Number(await page.getAttribute('#drain-card', 'data-prev-odometer'));
    await tabTo(page, (el) => el.id === 'f-odometer');
    await page.keyboard.press('ControlOrMeta+A');
    await page.keyboard.type(String(Math.round(prev + 850)));
    await expect(page.locator('[data-distance-out]').textContent()).resolves.toMatch(/Distance on the oil: 850/);
    await screenshot(page, 'keyboard-drain-card');
    // Enter in a text field submits the form's first submit button: it must register, not issue a code.
    await Promise.all([page.waitForURL(/\/samples\/[0-9a-f-]{36}\?registered=1$/), page.keyboard.press('Enter')]);
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toContain(code);

    const stored = await db
      .selectFrom('samples')
      .select(['bottle_code', 'machine_id'])
      .where('bottle_code', '=', code)
      .execute();
    expect(stored).toEqual([{ bottle_code: code, machine_id: machine.id }]);
    await db.destroy();
    await context.close();
  });

  test('every level badge carries its word, so levels read without colour', async () => {
    const lead = DEMO_ACCOUNTS.find((a) => a.key === 'lead')!;
    const context = await newContext(browser(), PHONE);
    const page = await context.newPage();
    await signInAs(page, lead.email, lead.password);
    for (const path of ['/', '/overview']) {
      await page.goto(path);
      // Greyscale rendering: what remains must still say which level each badge is.
      await page.emulateMedia({ colorScheme: 'light', forcedColors: 'active' });
      const badges = await page.$$eval('[data-level]', (els) =>
        els.map((e) => ({
          level: e.getAttribute('data-level'),
          text: (e.textContent ?? '').trim().toLowerCase(),
          shape: !!e.querySelector('svg'),
        })),
      );
      expect(badges.length).toBeGreaterThan(0);
      for (const b of badges) {
        expect(['steady', 'watch', 'act']).toContain(b.level);
        expect(b.text).toContain(b.level!);
        expect(b.shape).toBe(true);
      }
    }
    await context.close();
  });
});
