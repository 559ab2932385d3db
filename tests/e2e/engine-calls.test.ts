// The decision engine on screen, in Chromium: the demo's machines and samples show the calls the engine made
// (fix-first for the dusty week and the coolant leak, shorten for the climbing aluminium and the winter fuel),
// and a mechanic takes a sample out of the baseline: the wear chart marks it and the later call changes.
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../sample-data/seed-accounts';
import { createDb } from '~/lib/db/db';
import { recomputeMachineFindings } from '~/lib/findings/findings.service';
import { normaliseBottleCode } from '~/lib/samples/bottle-code';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

const mechanic = DEMO_ACCOUNTS.find((a) => a.key === 'mechanic')!;

/** The sample links of one element's table under the wear chart, with each row's level and baseline mark. */
async function chartRows(page: Page, machineHref: string, code: string) {
  await page.goto(`${machineHref}?chart=${code}`);
  await page.locator('#wear-chart').scrollIntoViewIfNeeded();
  const table = page.locator(`[data-testid="wear-chart-table"] table[data-measurand="${code}"]`);
  // On a phone the tables sit folded under the chart: present, not shown.
  await table.waitFor({ state: 'attached', timeout: 15_000 });
  return table.locator('tbody tr').evaluateAll((rows) =>
    rows.map((r) => ({
      href: r.querySelector('a')?.getAttribute('href') ?? '',
      level: r.getAttribute('data-level') ?? '',
      inBaseline: r.querySelector('[data-testid="in-baseline"]')?.getAttribute('data-in-baseline') ?? '',
    })),
  );
}

async function machineHref(page: Page, name: string): Promise<string> {
  await page.goto('/overview');
  const href = await page.locator(`tr[data-machine="${name}"] th a`).getAttribute('href');
  expect(href).toMatch(/^\/machines\/[0-9a-f-]{36}$/);
  return href!;
}

async function callOn(page: Page, sampleHref: string): Promise<string | null> {
  await page.goto(sampleHref);
  return page.getByTestId('current-call').getAttribute('data-call');
}

/** A machine of the demo school with seven judged samples: iron steady but for one high reading early on. */
async function addMachineWithOutlier(name: string): Promise<void> {
  const db = createDb(inject('databaseUrl'), { max: 1 });
  try {
    const crew = await db
      .selectFrom('crew_members')
      .innerJoin('users', 'users.id', 'crew_members.user_id')
      .select(['crew_members.crew_id', 'users.id'])
      .where('users.email', '=', mechanic.email)
      .executeTakeFirstOrThrow();
    const machine = await db
      .insertInto('machines')
      .values({
        crew_id: crew.crew_id,
        owner_user_id: crew.id,
        name,
        engine_layout: 'single',
        displacement_cc: 500,
        cooling: 'air',
        meter: 'km',
        recommended_grades: JSON.stringify([]),
        max_interval_distance: 6000,
      } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    const fe = [20, 45, 20, 21, 19, 20, 50];
    for (const [i, v] of fe.entries()) {
      const code = `${name.split(' ')[1]!.toUpperCase()}-${i + 1}`;
      const sample = await db
        .insertInto('samples')
        .values({
          crew_id: crew.crew_id,
          machine_id: machine.id,
          bottle_code: code,
          bottle_code_norm: normaliseBottleCode(code),
          drawn_on: `2025-0${i + 1}-10`,
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
      const readings = { Fe: v, Al: 4, Cu: 3, Si: 7, KV100: 13.8, FUEL: 0.5, WATER: 0.02 };
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
    await db.transaction().execute((trx) => recomputeMachineFindings(trx, machine.id, new Set()));
  } finally {
    await db.destroy();
  }
}

describe.each([
  ['phone', PHONE],
  ['desktop', DESKTOP],
] as const)('engine calls on screen (%s)', (label, viewport) => {
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

  test('the demo stories show the recomputed calls on machine and sample pages', async () => {
    // The dusty week on the 690: dirt, so fix the cause first.
    const heron = await machineHref(page, 'Heron');
    const si = await chartRows(page, heron, 'Si');
    const dusty = si.find((r) => r.level === 'act')!;
    expect(dusty).toBeDefined();
    expect(await callOn(page, dusty.href)).toBe('fix-first');
    await expect(page.getByTestId('current-call').textContent()).resolves.toContain('Fix the cause first');
    await screenshot(page, `engine-${label}-dusty-week-fix-first`);
    expect(si.at(-1)!.level).toBe('steady');

    // The coolant leak on the twin: fix first too; the climbing aluminium and the winter fuel: shorten.
    const bruin = await chartRows(page, await machineHref(page, 'Old Bruin'), 'Na');
    expect(await callOn(page, bruin.at(-1)!.href)).toBe('fix-first');
    const marten = await chartRows(page, await machineHref(page, 'Marten'), 'Al');
    expect(await callOn(page, marten.at(-1)!.href)).toBe('shorten');
    const sorrel = await chartRows(page, await machineHref(page, 'Sorrel'), 'FUEL');
    expect(await callOn(page, sorrel.at(-1)!.href)).toBe('shorten');

    // The machine page's summary shows the latest call in words.
    await page.goto(heron);
    await expect(page.getByTestId('summary-call').getAttribute('data-call')).resolves.toBeTruthy();
    expect(errors).toEqual([]);
  });

  test('a mechanic takes a sample out of the baseline: the chart marks it and the later call changes', async () => {
    const name = `Outlier ${label}`;
    await addMachineWithOutlier(name);
    const href = await machineHref(page, name);
    const before = await chartRows(page, href, 'Fe');
    expect(before.map((r) => r.inBaseline)).toEqual(Array(7).fill('true'));
    expect(before.at(-1)!.level).toBe('steady');
    const latest = before.at(-1)!.href;
    expect(await callOn(page, latest)).toBe('stretch');

    // The 45 ppm sample was drawn from the drain plug after a top-up: the mechanic takes it out.
    await page.goto(before[1]!.href);
    // The form is folded under its heading until asked for.
    await page.locator('[data-testid="baseline-details"] summary').click();
    const form = page.getByTestId('baseline-form');
    await form.locator('textarea[name="reason"]').fill('Drawn from the drain plug after a top-up, not mid-stream');
    await Promise.all([
      page.waitForURL(/review_saved=baseline-out/),
      form.getByRole('button', { name: 'Take out of baseline' }).click(),
    ]);
    await expect(page.getByTestId('baseline-status').getAttribute('data-in-baseline')).resolves.toBe('false');
    await expect(page.getByTestId('baseline-status').textContent()).resolves.toContain('Drawn from the drain plug');
    await screenshot(page, `engine-${label}-sample-out-of-baseline`);

    const after = await chartRows(page, href, 'Fe');
    expect(after[1]!.inBaseline).toBe('false');
    expect(after.at(-1)!.level).toBe('act');
    await page.locator('#wear-chart').scrollIntoViewIfNeeded();
    await screenshot(page, `engine-${label}-chart-after-exclusion`);
    expect(await callOn(page, latest)).toBe('shorten');
    // The sample page shows the band the rule used: four in-control samples of 20 ppm, act from about 43 ppm.
    const feBand = await page
      .locator('[data-testid="readings-table"] tr[data-measurand="Fe"] [data-testid="reading-band"]')
      .textContent();
    expect(feBand).toMatch(/act from 4\d(\.\d+)?/);
    expect(feBand).toMatch(/usual 20\b/);
    expect(feBand).toContain('judged per distance');
    await screenshot(page, `engine-${label}-call-after-exclusion`);
    expect(errors).toEqual([]);
  });
});
