// Wear-part screens with the honest forecast: an unworn clutch pack (no odometer), a drive chain that grows
// to a maximum (km and mm), and brake pads past their limit (a firm "do not ride"), at both screen sizes.
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { createDb } from '~/lib/db/db';
import { hashPassword } from '~/lib/auth/password';
import { DESKTOP, PHONE, launchBrowser, newContext, screenshot } from './helpers/browser';
import { signInAs } from './helpers/sign-in';

const stamp = Date.now().toString(36);
const PASSWORD = 'a long enough password';
const email = `wear-rider-${stamp}@brackfen.example`;
const parts: Record<'pack' | 'chain' | 'pads', string> = { pack: '', chain: '', pads: '' };
let machineId = '';

// Figures: clutch plates new 2.92–3.08 mm, limit 2.60 mm; a 520 chain over 20 pitches 317.5 mm new (20 × 15.875 mm,
// the 5/8 in pitch of ANSI 520, from memory), limit 323.0 mm; brake pads 4.5–5.0 mm new, limit 1.0 mm. Service-manual
// style figures, common practice, no published source.
async function prepare(): Promise<void> {
  const db = createDb(inject('databaseUrl'), { max: 1 });
  try {
    const hash = await hashPassword(PASSWORD);
    const crew = await db
      .insertInto('crews')
      .values({ name: `Brackfen rider ${stamp}` })
      .returning('id')
      .executeTakeFirstOrThrow();
    const userId = `wear-rider-${stamp}`;
    await db
      .insertInto('users')
      .values({ id: userId, email, display_name: 'Cass Brackfen', password_hash: hash, email_verified_at: new Date() })
      .execute();
    await db.insertInto('crew_members').values({ crew_id: crew.id, user_id: userId, role: 'lead' }).execute();
    const m = await db
      .insertInto('machines')
      .values({
        crew_id: crew.id,
        owner_user_id: userId,
        name: 'Brack 690',
        engine_layout: 'single',
        cooling: 'liquid',
        meter: 'km',
        recommended_grades: JSON.stringify([]),
      } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    machineId = m.id;
    const part = async (
      name: string,
      o: { pieces: number; min: number; max: number; limit: number; dir: 'min' | 'max'; fitted: number },
      readings: [string, number, number[]][],
    ) => {
      const p = await db
        .insertInto('wear_parts')
        .values({
          crew_id: crew.id,
          machine_id: m.id,
          name,
          piece_count: o.pieces,
          new_min_mm: o.min,
          new_max_mm: o.max,
          service_limit_mm: o.limit,
          limit_direction: o.dir,
          fitted_odometer: o.fitted,
          manual_unit: 'mm',
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      for (const [on, odometer, pieces] of readings) {
        await db
          .insertInto('wear_measurements')
          .values({
            wear_part_id: p.id,
            measured_on: on,
            odometer,
            pieces_mm: JSON.stringify(pieces),
            summary_mm: o.dir === 'min' ? Math.min(...pieces) : Math.max(...pieces),
            created_by: userId,
          })
          .execute();
      }
      return p.id;
    };
    parts.pack = await part(
      'Clutch friction plates',
      { pieces: 7, min: 2.92, max: 3.08, limit: 2.6, dir: 'min', fitted: 20_000 },
      [['2026-03-01', 31_000, [3.01, 2.95, 2.93, 3.05, 2.99, 2.97, 2.92]]],
    );
    parts.chain = await part(
      'Drive chain, 20 pitches',
      { pieces: 1, min: 317.5, max: 317.5, limit: 323, dir: 'max', fitted: 30_000 },
      [
        ['2025-10-02', 40_000, [319.0]],
        ['2026-05-14', 50_000, [320.5]],
      ],
    );
    parts.pads = await part(
      'Front brake pads',
      { pieces: 2, min: 4.5, max: 5.0, limit: 1.0, dir: 'min', fitted: 14_500 },
      [
        ['2026-04-01', 27_400, [2.5, 2.6]],
        ['2026-10-05', 33_900, [0.9, 1.1]],
      ],
    );
  } finally {
    await db.destroy();
  }
}

describe('wear-part forecasts in Chromium', () => {
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  const errors: string[] = [];

  beforeAll(async () => {
    await prepare();
    browser = await launchBrowser();
    context = await newContext(browser, PHONE);
    page = await context.newPage();
    page.on('pageerror', (e) => errors.push(e.message));
    await signInAs(page, email, PASSWORD);
  });
  afterAll(async () => {
    await browser?.close();
  });

  const forecastOf = async (key: keyof typeof parts) => {
    await page.goto(`/machines/${machineId}/wear-parts/${parts[key]}`);
    return (await page.getByTestId('wear-forecast').textContent()) ?? '';
  };

  test('an unworn pack says "no measurable wear yet" and gives no odometer', async () => {
    await forecastOf('pack');
    const words = `${await page.getByTestId('forecast-headline').textContent()} ${await page.getByTestId('forecast-detail').textContent()}`;
    expect(words).toContain('No measurable wear yet');
    // The words name no odometer (the chart's axis still shows where the readings are).
    expect(words).not.toMatch(/Service limit near|\d{2},\d{3} km/);
    await screenshot(page, 'wear-01-unworn-pack-phone');
  });

  test('a chain grows towards its maximum: forecast in km, worded for a part that grows', async () => {
    const text = await forecastOf('chain');
    // From 317.5 mm at 30,000 km by 1.5 mm per 10,000 km (the two readings): 323.0 mm near 66,667 km.
    expect(text).toMatch(/Service limit near 6\d,\d{3} km/);
    expect(text).toContain('longest');
    expect(text).not.toMatch(/thinn/);
    expect(await page.locator('th', { hasText: 'Longest piece' }).count()).toBe(1);
    await screenshot(page, 'wear-02-chain-phone');
  });

  test('brake pads past the limit: do not ride until they are replaced, as an act level with word and shape', async () => {
    const text = await forecastOf('pads');
    expect(text).toContain('do not ride until it is replaced');
    expect(text).toMatch(/licensed mechanic/);
    expect(await page.getByTestId('wear-forecast').locator('[data-level="act"]').textContent()).toContain('Act');
    await screenshot(page, 'wear-03-brake-past-limit-phone');
    await page.setViewportSize(DESKTOP);
    await screenshot(page, 'wear-04-brake-past-limit-desktop');
    await page.goto(`/machines/${machineId}`);
    const overview = (await page.locator('section', { hasText: 'Wear parts' }).last().textContent()) ?? '';
    expect(overview).toContain('Past the service limit — do not ride until it is replaced');
    expect(overview).toContain('No measurable wear yet');
    await screenshot(page, 'wear-05-machine-desktop');
    expect(errors).toEqual([]);
  });
});
