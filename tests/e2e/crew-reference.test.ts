// A crew reference on screen, in Chromium: the demo school gets three machines of one engine (a test fixture; the
// demo stories stay as they are) and a new machine of that engine with two samples. Its wear chart draws the crew
// reference band with its label in the key; the sample page and the call's reasons say where the band came from.
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { createDb } from '~/lib/db/db';
import { recomputeMachineFindings } from '~/lib/findings/findings.service';
import { normaliseBottleCode } from '~/lib/samples/bottle-code';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

const mechanic = DEMO_ACCOUNTS.find((a) => a.key === 'mechanic')!;
// An engine no demo machine and no other e2e fixture runs, so this file's figures stand alone.
const LABEL = "from the crew's other 300 cc liquid-cooled singles";
const NEW_MACHINE = 'Kestrel New';

/** Machines of one invented engine: three peers with five samples each, and a new one with two. Invented figures. */
async function addKestrels(): Promise<void> {
  const db = createDb(inject('databaseUrl'), { max: 1 });
  try {
    const crew = await db
      .selectFrom('crew_members')
      .innerJoin('users', 'users.id', 'crew_members.user_id')
      .select(['crew_members.crew_id', 'users.id'])
      .where('users.email', '=', mechanic.email)
      .executeTakeFirstOrThrow();
    const exists = await db
      .selectFrom('machines')
      .select('id')
      .where('crew_id', '=', crew.crew_id)
      .where('name', '=', NEW_MACHINE)
      .executeTakeFirst();
    if (exists) return;
    const machines: [name: string, fe: number[], year: number][] = [
      ['Kestrel One', [11, 12, 12, 13, 12], 2024],
      ['Kestrel Two', [13, 14, 13, 13, 14], 2024],
      ['Kestrel Three', [10, 11, 12, 11, 11], 2024],
      [NEW_MACHINE, [12, 13], 2026],
    ];
    for (const [m, [name, fe, year]] of machines.entries()) {
      const machine = await db
        .insertInto('machines')
        .values({
          crew_id: crew.crew_id,
          owner_user_id: crew.id,
          name,
          engine_layout: 'single',
          displacement_cc: 300,
          cooling: 'liquid',
          meter: 'km',
          recommended_grades: JSON.stringify([]),
          max_interval_distance: 5000,
        } as never)
        .returning('id')
        .executeTakeFirstOrThrow();
      for (const [i, v] of fe.entries()) {
        const code = `KST${m}-${i + 1}`;
        const sample = await db
          .insertInto('samples')
          .values({
            crew_id: crew.crew_id,
            machine_id: machine.id,
            bottle_code: code,
            bottle_code_norm: normaliseBottleCode(code),
            drawn_on: `${year}-0${i + 2}-10`,
            odometer: (i + 1) * 3000,
            distance_on_oil: 3000,
            sae_grade: '10W-40',
            oil_product: 'Test Oil 10W-40',
            client_key: null,
            created_by: crew.id,
            state: 'results_in',
          } as never)
          .returning('id')
          .executeTakeFirstOrThrow();
        const readings = { Fe: v, Al: 3, Cu: 2, Si: 6, KV100: 13.8, FUEL: 0.5, WATER: 0.02 };
        await db
          .insertInto('readings')
          .values(
            Object.entries(readings).map(([measurand, value]) => ({
              sample_id: sample.id,
              measurand,
              value,
              qualifier: null,
              lab_import_id: null,
            })),
          )
          .execute();
      }
      await db.transaction().execute((trx) => recomputeMachineFindings(trx, machine.id, null));
    }
  } finally {
    await db.destroy();
  }
}

beforeAll(addKestrels);

describe.each([
  ['phone', PHONE],
  ['desktop', DESKTOP],
] as const)('crew reference on screen (%s)', (label, viewport) => {
  let browser: Browser;
  let page: Page;
  const errors: string[] = [];

  beforeAll(async () => {
    browser = await launchBrowser();
    const context = await newContext(browser, viewport);
    page = await context.newPage();
    page.on('pageerror', (e) => errors.push(e.message));
    await signInAs(page, mechanic.email, mechanic.password);
  });
  afterAll(async () => {
    await browser?.close();
  });

  test('a new machine of an engine the crew runs shows the crew reference band, labelled, on its chart and sample page', async () => {
    await page.goto('/overview');
    const href = await page.locator(`tr[data-machine="${NEW_MACHINE}"] th a`).getAttribute('href');
    expect(href).toMatch(/^\/machines\/[0-9a-f-]{36}$/);
    await page.goto(`${href}?chart=Fe`);
    // The chart island hydrates when it comes into view (below the fold on a phone), then fetches its series.
    await page.locator('#wear-chart').scrollIntoViewIfNeeded();
    const key = page.getByTestId('crew-reference-legend');
    await key.waitFor({ state: 'visible', timeout: 30_000 });
    await expect(key.textContent()).resolves.toContain(LABEL);
    await page.locator('#wear-chart').scrollIntoViewIfNeeded();
    await screenshot(page, `crew-reference-${label}-chart`);

    // Both samples were judged on the crew reference: the table rows link to them.
    const table = page.locator('[data-testid="wear-chart-table"] table[data-measurand="Fe"]');
    await table.waitFor({ state: 'attached', timeout: 15_000 });
    const links = await table.locator('tbody tr a').evaluateAll((as) => as.map((a) => a.getAttribute('href') ?? ''));
    expect(links).toHaveLength(2);

    await page.goto(links.at(-1)!);
    await expect(page.getByTestId('crew-reference-note').textContent()).resolves.toContain(LABEL);
    const band = await page
      .locator('[data-testid="readings-table"] tr[data-measurand="Fe"] [data-testid="reading-band"]')
      .textContent();
    expect(band).toContain(`crew reference, ${LABEL}`);
    // Steady on a crew reference: a hold, never a stretch, and the reasons say whose band it was.
    await expect(page.getByTestId('current-call').getAttribute('data-call')).resolves.toBe('hold');
    await expect(page.getByTestId('current-call').textContent()).resolves.toContain(LABEL);
    await page.getByTestId('crew-reference-note').scrollIntoViewIfNeeded();
    await screenshot(page, `crew-reference-${label}-sample`);
    expect(errors).toEqual([]);
  });
});
