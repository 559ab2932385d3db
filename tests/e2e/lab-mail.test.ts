// A lab report that arrives by mail, end to end in Chromium: the invented demo lab mails a one-row-per-test
// spreadsheet to the school's import address through the local relay; the worker keeps it as a pending lab
// file and mails the mechanic; the mechanic follows the link from /dev/mailbox, checks the preview, confirms,
// and the sample page shows the readings. At phone and desktop sizes.
import nodemailer from 'nodemailer';
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser } from 'playwright-core';
import { createDb } from '~/lib/db/db';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { buildDemoLabMail, DEMO_MAIL_LAB } from '../../sample-data/seed-lab-mail';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot } from './helpers/browser';
import { waitForMail } from './helpers/mailbox';
import { signInAs } from './helpers/sign-in';

const mechanic = DEMO_ACCOUNTS.find((a) => a.key === 'mechanic')!;
const DOMAIN = 'import.sumpwise.test';

describe('a lab report by mail', () => {
  let browser: Browser;
  const db = createDb(inject('databaseUrl'), { max: 2 });
  let bottle = '';

  beforeAll(async () => {
    const mail = await buildDemoLabMail(db, DOMAIN);
    if (!mail) throw new Error('the demo has no bottle waiting for results');
    bottle = mail.bottle;
    const transport = nodemailer.createTransport({
      host: '127.0.0.1',
      port: inject('smtpPort'),
      secure: false,
      ignoreTLS: true,
    });
    try {
      await transport.sendMail({ envelope: { from: DEMO_MAIL_LAB.sender, to: [mail.to] }, raw: mail.raw });
    } finally {
      transport.close();
    }
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await db.destroy();
  });

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ] as const)(
    'the mechanic follows the link from the mailbox, previews, confirms, and sees the readings (%s)',
    async (size, viewport) => {
      const notice = await waitForMail(db, mechanic.email, /Lab report by mail/);
      const context = await newContext(browser, viewport);
      const page = await context.newPage();
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      await signInAs(page, mechanic.email, mechanic.password);

      await page.goto(`/dev/mailbox/${notice.id}`);
      await screenshot(page, `lab-mail-notice-${size}`);
      const link = page.locator('a[href*="/imports/"]').first();
      await expect(link.isVisible()).resolves.toBe(true);
      await link.click();
      await page.waitForURL(/\/imports\/[0-9a-f-]{36}$/);
      const previewUrl = page.url();
      const body = await page.locator('main').innerText();
      expect(body).toContain('by mail');
      expect(body).toContain('sheet “Results by test”');
      expect(body).toContain(bottle);
      await screenshot(page, `lab-mail-preview-${size}`);

      if (size === 'phone') {
        // The first pass confirms; the second finds the file imported and only checks the result.
        await page.getByTestId('confirm-import').click();
        await page.waitForURL(/done=1/);
      }
      await expect(page.getByTestId('import-done').isVisible()).resolves.toBe(true);
      expect(page.url().startsWith(previewUrl.split('?')[0]!)).toBe(true);

      const sample = await db
        .selectFrom('samples')
        .select('id')
        .where('bottle_code', '=', bottle)
        .executeTakeFirstOrThrow();
      await page.goto(`/samples/${sample.id}`);
      const table = page.getByTestId('readings-table');
      await expect(table.isVisible()).resolves.toBe(true);
      // Readings sit in groups; those without a flagged reading are folded: open them all to read every row.
      await table.locator('details').evaluateAll((ds) =>
        ds.forEach((d) => {
          (d as HTMLDetailsElement).open = true;
        }),
      );
      // Figures from the invented lab's workbook: fuel 7.1 %, iron 22 ppm. On a phone a row stacks its cells, so
      // each row is read on its own.
      expect(await table.locator('tr[data-measurand="FUEL"]').innerText()).toMatch(/7\.1/);
      expect(await table.locator('tr[data-measurand="Fe"]').innerText()).toMatch(/\b22\b/);
      await screenshot(page, `lab-mail-sample-${size}`);
      expect(errors).toEqual([]);
      await context.close();
    },
  );

  test('the import page shows the address to the mechanic, and the mail as read and waiting or imported', async () => {
    const context = await newContext(browser, DESKTOP);
    const page = await context.newPage();
    await signInAs(page, mechanic.email, mechanic.password);
    await page.goto('/imports');
    const card = page.getByTestId('import-address-card');
    expect(await page.getByTestId('import-address').innerText()).toMatch(/^lab-[a-z2-7]{26}@import\.sumpwise\.test$/);
    expect(await card.innerText()).toContain(DEMO_MAIL_LAB.sender);
    // Mechanics see the address and the list; only the lead replaces the address.
    expect(await page.getByTestId('rotate-import-address').count()).toBe(0);
    await screenshot(page, 'lab-mail-import-page-desktop');
    await context.close();
  });
});
