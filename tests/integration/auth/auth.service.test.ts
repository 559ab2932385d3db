import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { sql } from 'kysely';
import type pg from 'pg';
import { openTestDb, truncateAll } from '../test-database';
import { makeAuthDeps, firstLink, outboxFor } from './auth-test-deps';
import {
  changePassword,
  requestEmailVerification,
  requestPasswordReset,
  resetPassword,
  signIn,
  signOut,
  signUp,
  verifyEmail,
  type AuthDeps,
} from '~/lib/auth/auth.service';
import { hashToken } from '~/lib/auth/tokens';
import { findMembershipsForUser } from '~/lib/crews/crews.repository';

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

async function register(email = 'ada@example.test', password = PASSWORD) {
  const r = await signUp(deps, { email, password, displayName: 'Ada' }, meta);
  if (!r.ok) throw new Error(r.code);
  return r.value;
}

const sessionCount = async (userId: string) =>
  (
    await db
      .selectFrom('sessions')
      .select(sql<number>`count(*)::int`.as('n'))
      .where('user_id', '=', userId)
      .executeTakeFirstOrThrow()
  ).n;

describe('sign-up', () => {
  test('creates the user with an Argon2id hash, a crew they lead, a session in that crew and a verification mail', async () => {
    const r = await register();
    const user = await db.selectFrom('users').selectAll().where('id', '=', r.userId).executeTakeFirstOrThrow();
    expect(user.password_hash).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/);
    expect(user.email_verified_at).toBeNull();
    expect(await findMembershipsForUser(db, r.userId)).toEqual([
      { crewId: r.crewId, crewName: 'Ada’s crew', role: 'lead' },
    ]);
    const session = await db
      .selectFrom('sessions')
      .selectAll()
      .where('user_id', '=', r.userId)
      .executeTakeFirstOrThrow();
    expect(session.current_crew_id).toBe(r.crewId);
    expect(r.cookie.value).toBe(session.id);
    expect(r.cookie.attributes.httpOnly).toBe(true);
    expect(r.cookie.attributes.sameSite).toBe('lax');
    // Only the hash of the link's token is stored.
    const token = r.verificationToken!;
    const stored = await db
      .selectFrom('auth_tokens')
      .select(['token_hash'])
      .where('user_id', '=', r.userId)
      .executeTakeFirstOrThrow();
    expect(stored.token_hash).toBe(hashToken(token));
    expect(stored.token_hash).not.toContain(token);
    const [mail] = await outboxFor(db, 'ada@example.test');
    expect(mail?.kind).toBe('verify_email');
    expect(firstLink(mail!.text_body)).toBe(`http://127.0.0.1:4321/verify-email?token=${token}`);
  });

  test('an address already registered (in any letter case) is refused', async () => {
    await register('ada@example.test');
    const again = await signUp(deps, { email: 'ada@example.test', password: PASSWORD }, meta);
    expect(again).toMatchObject({ ok: false, status: 409, code: 'email_taken' });
  });
});

describe('sign-in', () => {
  test('a right password opens a new session and ends the one presented (the id rotates)', async () => {
    const r = await register();
    const first = await signIn(
      deps,
      { email: 'ada@example.test', password: PASSWORD },
      { ...meta, previousSessionId: r.cookie.value },
    );
    expect(first.ok).toBe(true);
    if (!first.ok) return;
    expect(first.value.cookie.value).not.toBe(r.cookie.value);
    expect((await deps.lucia.validateSession(r.cookie.value)).session).toBeNull();
    expect((await deps.lucia.validateSession(first.value.cookie.value)).session?.currentCrewId).toBe(r.crewId);
  });

  test('wrong password and unknown address give exactly the same answer', async () => {
    await register();
    const wrong = await signIn(deps, { email: 'ada@example.test', password: 'not the password' }, meta);
    const unknown = await signIn(deps, { email: 'nobody@example.test', password: 'not the password' }, meta);
    expect(wrong).toEqual({
      ok: false,
      status: 401,
      code: 'invalid_credentials',
      message: expect.any(String),
      fields: {},
    });
    expect(unknown).toEqual(wrong);
  });

  test('an unknown address still spends an Argon2 verification (no fast path to tell accounts apart)', async () => {
    await register();
    const time = async (email: string) => {
      const t0 = performance.now();
      await signIn(
        deps,
        { email, password: 'not the password' },
        { ip: `198.51.100.${Math.floor(Math.random() * 200)}` },
      );
      return performance.now() - t0;
    };
    await time('nobody@example.test'); // warms the dummy hash
    const known: number[] = [];
    const unknown: number[] = [];
    for (let i = 0; i < 3; i++) {
      known.push(await time('ada@example.test'));
      unknown.push(await time('nobody@example.test'));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[1]!;
    // A plain database miss takes ~1 ms; an Argon2id verification at m=19 MiB takes tens of ms on this machine.
    expect(median(unknown)).toBeGreaterThan(median(known) * 0.5);
  });

  test('five wrong passwords from one address block that account+address briefly, not the owner elsewhere', async () => {
    await register();
    for (let i = 0; i < 5; i++) {
      expect(await signIn(deps, { email: 'ada@example.test', password: `wrong-${i}-password` }, meta)).toMatchObject({
        status: 401,
      });
    }
    const blocked = await signIn(deps, { email: 'ada@example.test', password: PASSWORD }, meta);
    expect(blocked).toMatchObject({ ok: false, status: 429, code: 'rate_limited' });
    if (blocked.ok) return;
    expect(blocked.retryAfterSeconds).toBeGreaterThan(0);
    expect(blocked.retryAfterSeconds).toBeLessThanOrEqual(5 * 60);
    expect((await signIn(deps, { email: 'ada@example.test', password: PASSWORD }, { ip: '203.0.113.5' })).ok).toBe(
      true,
    );
  });

  test('sign-in and failed sign-in are audited against the account', async () => {
    const r = await register();
    await signIn(deps, { email: 'ada@example.test', password: 'wrong password!' }, meta);
    await signIn(deps, { email: 'ada@example.test', password: PASSWORD }, meta);
    const kinds = await db
      .selectFrom('audit_events')
      .select('kind')
      .where('subject_user_id', '=', r.userId)
      .orderBy('id')
      .execute();
    expect(kinds.map((k) => k.kind)).toEqual(['sign_up', 'sign_in_failed', 'sign_in']);
  });

  test('sign-out ends the session', async () => {
    const r = await register();
    const blank = await signOut(deps, { id: r.cookie.value, userId: r.userId }, meta);
    expect(blank.value).toBe('');
    expect(await sessionCount(r.userId)).toBe(0);
  });
});

describe('password change', () => {
  test('needs the current password, keeps this session and ends every other', async () => {
    const r = await register();
    const other = await signIn(deps, { email: 'ada@example.test', password: PASSWORD }, meta);
    if (!other.ok) throw new Error('sign-in failed');
    expect(
      await changePassword(
        deps,
        r.userId,
        r.cookie.value,
        { currentPassword: 'not it at all', newPassword: 'a new long password' },
        meta,
      ),
    ).toMatchObject({ ok: false, code: 'wrong_password', fields: { currentPassword: expect.any(String) } });
    expect(
      await changePassword(
        deps,
        r.userId,
        r.cookie.value,
        { currentPassword: PASSWORD, newPassword: 'a new long password' },
        meta,
      ),
    ).toEqual({ ok: true, value: { endedSessions: 1 } });
    expect((await deps.lucia.validateSession(r.cookie.value)).session).not.toBeNull();
    expect((await deps.lucia.validateSession(other.value.cookie.value)).session).toBeNull();
    expect((await signIn(deps, { email: 'ada@example.test', password: PASSWORD }, { ip: '203.0.113.9' })).ok).toBe(
      false,
    );
    expect(
      (await signIn(deps, { email: 'ada@example.test', password: 'a new long password' }, { ip: '203.0.113.9' })).ok,
    ).toBe(true);
  });
});

describe('e-mail verification', () => {
  test('a valid link verifies once; the same link again is refused as used', async () => {
    const r = await register();
    expect(await verifyEmail(deps, r.verificationToken!, meta)).toEqual({ ok: true, value: { userId: r.userId } });
    const user = await db
      .selectFrom('users')
      .select('email_verified_at')
      .where('id', '=', r.userId)
      .executeTakeFirstOrThrow();
    expect(user.email_verified_at).toBeInstanceOf(Date);
    expect(await verifyEmail(deps, r.verificationToken!, meta)).toMatchObject({ ok: false, code: 'used_token' });
  });

  test.each([
    ['expired', 'expired_token'],
    ['unknown', 'invalid_token'],
    ['superseded', 'used_token'],
  ])('a %s link is refused (%s)', async (kind, code) => {
    const r = await register();
    let token = r.verificationToken!;
    if (kind === 'expired')
      await db
        .updateTable('auth_tokens')
        .set({ expires_at: new Date(Date.now() - 1000) })
        .where('user_id', '=', r.userId)
        .execute();
    if (kind === 'unknown') token = 'no-such-token-at-all';
    if (kind === 'superseded') await requestEmailVerification(deps, r.userId, { ip: '192.0.2.1' });
    expect(await verifyEmail(deps, token, meta)).toMatchObject({ ok: false, code });
  });
});

describe('password reset', () => {
  test('an unknown address gets the same answer and no mail', async () => {
    expect(await requestPasswordReset(deps, 'nobody@example.test', meta)).toEqual({ ok: true, value: { token: null } });
    expect(await outboxFor(db, 'nobody@example.test')).toEqual([]);
  });

  test('the link sets a new password once, verifies the address and ends every session', async () => {
    const r = await register();
    const req = await requestPasswordReset(deps, 'ada@example.test', meta);
    if (!req.ok || !req.value.token) throw new Error('no reset token');
    const mail = (await outboxFor(db, 'ada@example.test')).find((m) => m.kind === 'reset_password');
    expect(firstLink(mail!.text_body)).toBe(`http://127.0.0.1:4321/reset-password?token=${req.value.token}`);
    expect(await resetPassword(deps, { token: req.value.token, password: 'brand new password' }, meta)).toEqual({
      ok: true,
      value: { userId: r.userId },
    });
    expect(await sessionCount(r.userId)).toBe(0);
    expect((await signIn(deps, { email: 'ada@example.test', password: 'brand new password' }, meta)).ok).toBe(true);
    expect(await resetPassword(deps, { token: req.value.token, password: 'another new password' }, meta)).toMatchObject(
      { ok: false, code: 'used_token' },
    );
  });

  test('an expired reset link is refused and changes nothing', async () => {
    await register();
    const req = await requestPasswordReset(deps, 'ada@example.test', meta);
    if (!req.ok || !req.value.token) throw new Error('no reset token');
    await db
      .updateTable('auth_tokens')
      .set({ expires_at: new Date(Date.now() - 1) })
      .where('purpose', '=', 'reset_password')
      .execute();
    expect(await resetPassword(deps, { token: req.value.token, password: 'brand new password' }, meta)).toMatchObject({
      ok: false,
      code: 'expired_token',
    });
    expect((await signIn(deps, { email: 'ada@example.test', password: PASSWORD }, meta)).ok).toBe(true);
  });

  test('reset requests for one address are rate limited (429 with a wait)', async () => {
    await register();
    const results = [];
    for (let i = 0; i < 4; i++)
      results.push(await requestPasswordReset(deps, 'ada@example.test', { ip: `203.0.113.${i}` }));
    expect(results.slice(0, 3).every((r) => r.ok)).toBe(true);
    expect(results[3]).toMatchObject({ ok: false, status: 429, retryAfterSeconds: expect.any(Number) });
  });
});
