import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type pg from 'pg';
import { openTestDb, truncateAll } from '../test-database';
import { makeAuthDeps } from './auth-test-deps';
import { signIn, signUp, updateAccountSettings, type AuthDeps } from '~/lib/auth/auth.service';
import { signInSchema, signUpSchema, unitsSchema } from '~/lib/auth/auth';

const db = openTestDb();
const { deps, pool }: { deps: AuthDeps; pool: pg.Pool } = makeAuthDeps(db);
afterAll(async () => {
  await pool.end();
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

const meta = { ip: '192.0.2.10' }; // RFC 5737 documentation address
const PASSWORD = 'correct horse battery';
const zoneOf = async (email: string) =>
  (await db.selectFrom('users').select('time_zone').where('email', '=', email).executeTakeFirstOrThrow()).time_zone;

describe('the time zone a user reads times in', () => {
  test('sign-up keeps the zone the browser reported; a junk zone is dropped, not refused', async () => {
    const good = signUpSchema.parse({ email: 'ada@example.test', password: PASSWORD, timeZone: 'Europe/London' });
    expect((await signUp(deps, good, meta)).ok).toBe(true);
    expect(await zoneOf('ada@example.test')).toBe('Europe/London');
    const junk = signUpSchema.parse({ email: 'ben@example.test', password: PASSWORD, timeZone: 'x'.repeat(100_000) });
    expect(junk.timeZone).toBeUndefined();
    expect((await signUp(deps, junk, { ip: '192.0.2.11' })).ok).toBe(true);
    expect(await zoneOf('ben@example.test')).toBeNull();
  });

  test('sign-in fills a missing zone but never replaces one the user chose', async () => {
    await signUp(deps, signUpSchema.parse({ email: 'ada@example.test', password: PASSWORD }), meta);
    expect(await zoneOf('ada@example.test')).toBeNull();
    const first = signInSchema.parse({ email: 'ada@example.test', password: PASSWORD, timeZone: 'America/New_York' });
    expect((await signIn(deps, first, meta)).ok).toBe(true);
    expect(await zoneOf('ada@example.test')).toBe('America/New_York');
    const travelling = signInSchema.parse({ email: 'ada@example.test', password: PASSWORD, timeZone: 'Asia/Tokyo' });
    expect((await signIn(deps, travelling, meta)).ok).toBe(true);
    expect(await zoneOf('ada@example.test')).toBe('America/New_York');
  });

  test('the account page saves a chosen zone and refuses one the runtime does not know', async () => {
    const r = await signUp(deps, signUpSchema.parse({ email: 'ada@example.test', password: PASSWORD }), meta);
    if (!r.ok) throw new Error(r.code);
    const units = { distanceUnit: 'km', lengthUnit: 'mm', temperatureUnit: 'C' };
    await updateAccountSettings(db, r.value.userId, unitsSchema.parse({ ...units, timeZone: 'Asia/Kolkata' }));
    expect(await zoneOf('ada@example.test')).toBe('Asia/Kolkata');
    const bad = unitsSchema.safeParse({ ...units, timeZone: 'Mars/Olympus' });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0]?.message).toBe('Choose a time zone from the list, such as Europe/London.');
    await updateAccountSettings(db, r.value.userId, unitsSchema.parse(units));
    expect(await zoneOf('ada@example.test')).toBe('Asia/Kolkata');
  });

  test('the column refuses junk written around the app', async () => {
    await signUp(deps, signUpSchema.parse({ email: 'ada@example.test', password: PASSWORD }), meta);
    await expect(
      db
        .updateTable('users')
        .set({ time_zone: "Europe/London'; --" })
        .where('email', '=', 'ada@example.test')
        .execute(),
    ).rejects.toThrow(/check constraint/);
  });
});
