// Limits an attacker meets: on the account whatever the address, spent before the check so parallel guesses
// cannot slip past, without locking the owner's own browser out; mail that accounts can make us send.
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { sql } from 'kysely';
import type pg from 'pg';
import { openTestDb, truncateAll } from '../test-database';
import { addMember, makeCrew, makeUser } from '../factories';
import { makeAuthDeps, outboxFor } from './auth-test-deps';
import { changePassword, requestEmailVerification, signIn, signUp, type AuthDeps } from '~/lib/auth/auth.service';
import { inviteMember, type CrewActor } from '~/lib/crews/crews.service';
import { findMembership } from '~/lib/crews/crews.repository';
import { LIMIT_RULES, createRateLimits } from '~/lib/rate-limit/rate-limits';
import { deleteExpiredRateLimits } from '~/lib/rate-limit/rate-limits.repository';

const db = openTestDb();
const { deps, pool }: { deps: AuthDeps; pool: pg.Pool } = makeAuthDeps(db);
afterAll(async () => {
  await pool.end();
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

// RFC 5737 documentation addresses: 192.0.2.0/24, 198.51.100.0/24, 203.0.113.0/24.
const addressNo = (i: number) => `198.51.100.${i + 1}`;
const PASSWORD = 'correct horse battery staple';

async function account(email = 'owner@example.test') {
  const r = await signUp(deps, { email, password: PASSWORD, displayName: 'Owner' }, { ip: '192.0.2.1' });
  if (!r.ok) throw new Error(r.code);
  return r.value;
}

describe('sign-in limits', () => {
  test('twelve wrong passwords from twelve addresses: the account limit answers 429 from the eleventh on', async () => {
    await account();
    const statuses: number[] = [];
    for (let i = 0; i < 12; i++) {
      const r = await signIn(deps, { email: 'owner@example.test', password: `wrong-${i}` }, { ip: addressNo(i) });
      statuses.push(r.ok ? 200 : r.status);
    }
    // LIMIT_RULES.signInAccount: 10 attempts per 15 minutes per account.
    expect(statuses).toEqual([...Array(10).fill(401), 429, 429]);
    // Even the right password from a new browser waits out the window: a guess would look the same.
    const fresh = await signIn(deps, { email: 'owner@example.test', password: PASSWORD }, { ip: addressNo(20) });
    expect(fresh).toMatchObject({ ok: false, status: 429 });
    expect(fresh.ok ? '' : fresh.message).toMatch(/reset your password/);
  });

  test("the owner's own browser is not locked out by an attack on the account", async () => {
    await account();
    for (let i = 0; i < 12; i++)
      await signIn(deps, { email: 'owner@example.test', password: 'wrong' }, { ip: addressNo(i) });
    const r = await signIn(
      deps,
      { email: 'owner@example.test', password: PASSWORD },
      { ip: '203.0.113.5', knownDevice: true },
    );
    expect(r.ok).toBe(true);
  });

  test('the lock-out ends with its window', async () => {
    const limits = createRateLimits(pool, {
      ...LIMIT_RULES,
      signInAccount: { keyPrefix: 'signin_acct', points: 2, duration: 1 },
    });
    const short = { ...deps, limits };
    await account();
    for (let i = 0; i < 3; i++)
      await signIn(short, { email: 'owner@example.test', password: 'wrong' }, { ip: addressNo(i) });
    expect(
      await signIn(short, { email: 'owner@example.test', password: PASSWORD }, { ip: addressNo(5) }),
    ).toMatchObject({ status: 429 });
    await new Promise((r) => setTimeout(r, 1_100));
    expect((await signIn(short, { email: 'owner@example.test', password: PASSWORD }, { ip: addressNo(5) })).ok).toBe(
      true,
    );
  });

  test('twenty guesses at once from one address: no more than the five of the per-address limit are judged', async () => {
    await account();
    const results = await Promise.all(
      Array.from({ length: 20 }, (_, i) =>
        signIn(deps, { email: 'owner@example.test', password: `wrong-${i}` }, { ip: '203.0.113.9' }),
      ),
    );
    const judged = results.filter((r) => !r.ok && r.status === 401).length;
    // LIMIT_RULES.signInAccountIp: 5 per 5 minutes for one account from one address.
    expect(judged).toBe(5);
    expect(results.filter((r) => !r.ok && r.status === 429)).toHaveLength(15);
  });

  test('a rate-limited attempt is in the audit log with its address', async () => {
    await account();
    for (let i = 0; i < 7; i++)
      await signIn(deps, { email: 'owner@example.test', password: 'wrong' }, { ip: '203.0.113.9' });
    const { rows } = await sql<{
      ip: string | null;
      detail: { reason?: string };
    }>`select ip::text as ip, detail from audit_events where kind = 'sign_in_failed' order by at, id`.execute(db);
    expect(rows.map((r) => r.detail.reason)).toEqual([
      ...Array(5).fill('wrong_password'),
      'rate_limited',
      'rate_limited',
    ]);
    expect(new Set(rows.map((r) => r.ip?.replace(/\/32$/, '')))).toEqual(new Set(['203.0.113.9']));
  });

  test('a successful sign-in gives back what it spent on the address', async () => {
    await account();
    for (let i = 0; i < 40; i++) {
      const r = await signIn(
        deps,
        { email: 'owner@example.test', password: PASSWORD },
        { ip: '203.0.113.77', knownDevice: true },
      );
      expect(r.ok).toBe(true);
    }
  });
});

describe('mail and password limits', () => {
  test('verification links: three an hour per account, then 429 with a sentence, and no fourth mail', async () => {
    const r = await account('unverified@example.test');
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) {
      const sent = await requestEmailVerification(deps, r.userId, { ip: addressNo(i) });
      statuses.push(sent.ok ? 200 : sent.status);
    }
    expect(statuses).toEqual([200, 200, 200, 429, 429]);
    // One from sign-up plus three re-sends.
    expect((await outboxFor(db, 'unverified@example.test')).filter((m) => m.kind === 'verify_email')).toHaveLength(4);
  });

  test('verification links from one address across accounts: ten an hour', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) {
      const r = await account(`a${i}@example.test`);
      const sent = await requestEmailVerification(deps, r.userId, { ip: '203.0.113.50' });
      statuses.push(sent.ok ? 200 : sent.status);
    }
    expect(statuses.filter((s) => s === 429)).toEqual([429]);
  });

  test('password changes: five tries in 15 minutes, the sixth waits even with the right password', async () => {
    const r = await account();
    const session = await deps.lucia.createSession(r.userId, { current_crew_id: r.crewId });
    for (let i = 0; i < 5; i++) {
      expect(
        await changePassword(
          deps,
          r.userId,
          session.id,
          { currentPassword: 'wrong', newPassword: 'another long password' },
          { ip: null },
        ),
      ).toMatchObject({ status: 400 });
    }
    expect(
      await changePassword(
        deps,
        r.userId,
        session.id,
        { currentPassword: PASSWORD, newPassword: 'another long password' },
        { ip: null },
      ),
    ).toMatchObject({ ok: false, status: 429 });
  });
});

describe('invitations', () => {
  async function lead(verified: boolean) {
    const crew = await makeCrew(db, 'Crew');
    const user = await makeUser(db, { email: `lead-${verified}@example.test` });
    if (!verified) await db.updateTable('users').set({ email_verified_at: null }).where('id', '=', user.id).execute();
    await addMember(db, crew.id, user.id, 'lead');
    const actor: CrewActor = {
      userId: user.id,
      displayName: 'Lead',
      membership: await findMembership(db, crew.id, user.id),
    };
    return { crew, actor };
  }

  test('an unverified lead cannot invite, and no mail is queued', async () => {
    const { actor } = await lead(false);
    const r = await inviteMember(deps, actor, { email: 'someone@example.test', role: 'rider' }, { ip: null });
    expect(r).toMatchObject({ ok: false, status: 403, code: 'email_not_verified' });
    expect(await outboxFor(db, 'someone@example.test')).toHaveLength(0);
  });

  test('a crew sends at most its daily number of invitations', async () => {
    const limits = createRateLimits(pool, {
      ...LIMIT_RULES,
      inviteCrew: { keyPrefix: 'invite_crew', points: 3, duration: 24 * 60 * 60 },
    });
    const { actor } = await lead(true);
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) {
      const r = await inviteMember(
        { ...deps, limits },
        actor,
        { email: `p${i}@example.test`, role: 'rider' },
        { ip: null },
      );
      statuses.push(r.ok ? 200 : r.status);
    }
    expect(statuses).toEqual([200, 200, 200, 429]);
    expect(await outboxFor(db, 'p3@example.test')).toHaveLength(0);
  });
});

describe('rate_limits housekeeping', () => {
  test('prune deletes counters whose window has ended and keeps live ones', async () => {
    const limits = createRateLimits(pool, {
      ...LIMIT_RULES,
      signUpIp: { keyPrefix: 'signup_ip', points: 5, duration: 1 },
    });
    await limits.consume('signUpIp', 'old');
    await limits.consume('resetIp', 'live');
    await new Promise((r) => setTimeout(r, 1_100));
    expect(await deleteExpiredRateLimits(db)).toBe(1);
    const { rows } = await sql<{ key: string }>`select key from rate_limits`.execute(db);
    expect(rows.map((r) => r.key)).toEqual(['reset_ip:live']);
  });

  test('a key longer than the column (a long e-mail and an address) is stored hashed, not refused', async () => {
    const long = `${'x'.repeat(240)}@example.test|2001:db8::1`;
    expect((await deps.limits.consume('signInAccountIp', long)).allowed).toBe(true);
    expect((await deps.limits.check('signInAccountIp', long)).allowed).toBe(true);
  });
});
