import { createHmac } from 'node:crypto';
import { describe, expect, test } from 'vitest';
import { signUnsubscribeToken, verifyUnsubscribeToken, type UnsubscribeScope } from '~/lib/alerts/unsubscribe-token';

const SECRET = 'unit-test-secret-of-at-least-32-characters';
const CREW = '6f1c2a9e-3b7d-4c55-9a1e-2d4f6b8c0e11';

describe('signUnsubscribeToken / verifyUnsubscribeToken', () => {
  test.each<[string, UnsubscribeScope]>([
    ['one kind of one crew', { userId: 'u_rider1', crewId: CREW, kind: 'sample_due' }],
    ['import findings', { userId: 'u_lead', crewId: CREW, kind: 'import_findings' }],
    ['shipped overdue', { userId: 'u_mech', crewId: CREW, kind: 'shipped_overdue' }],
    ['invitation pending', { userId: 'u_lead', crewId: CREW, kind: 'invitation_pending' }],
    ['the daily digest', { userId: 'u_rider1', crewId: null, kind: 'digest' }],
    ['a user id with punctuation', { userId: 'a.b-c_d:é', crewId: CREW, kind: 'sample_due' }],
  ])('%s round-trips and is URL-safe', (_name, scope) => {
    const token = signUnsubscribeToken(scope, SECRET);
    expect(token).toMatch(/^[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+$/);
    expect(verifyUnsubscribeToken(token, SECRET)).toEqual(scope);
  });

  test('the signature is HMAC-SHA256 (RFC 2104) of the payload under the secret', () => {
    const token = signUnsubscribeToken({ userId: 'u1', crewId: CREW, kind: 'sample_due' }, SECRET);
    const [payload, signature] = token.split('.') as [string, string];
    // Recomputed independently; 32 bytes is the SHA-256 output length (FIPS 180-4).
    const expected = createHmac('sha256', SECRET).update(payload).digest();
    expect(Buffer.from(signature, 'base64url')).toEqual(expected);
    expect(expected.length).toBe(32);
  });

  const good = signUnsubscribeToken({ userId: 'u_rider1', crewId: CREW, kind: 'sample_due' }, SECRET);
  const [payload, sig] = good.split('.') as [string, string];
  const otherPayload = Buffer.from(JSON.stringify(['u1', 'u_lead', CREW, 'sample_due'])).toString('base64url');
  const flip = (s: string) => `${s.slice(0, -2)}${s.at(-2) === 'A' ? 'B' : 'A'}${s.at(-1)}`;
  test.each([
    ['another secret', good, 'another-secret-of-at-least-32-characters!!'],
    ['a changed signature', `${payload}.${flip(sig)}`, SECRET],
    ['another payload under the same signature', `${otherPayload}.${sig}`, SECRET],
    ['a truncated signature', `${payload}.${sig.slice(0, 20)}`, SECRET],
    ['no signature', payload, SECRET],
    ['an extra part', `${good}.x`, SECRET],
    ['empty', '', SECRET],
    ['a very long token', `${'a'.repeat(2000)}.${sig}`, SECRET],
  ])('refuses %s', (_name, token, secret) => {
    expect(verifyUnsubscribeToken(token, secret)).toBeNull();
  });

  test.each([
    ['an unknown version', ['u0', 'u1', CREW, 'sample_due']],
    ['an unknown kind', ['u1', 'u1', CREW, 'marketing']],
    ['a digest bound to a crew', ['u1', 'u1', CREW, 'digest']],
    ['a kind without a crew', ['u1', 'u1', null, 'sample_due']],
    ['an empty user', ['u1', '', CREW, 'sample_due']],
    ['not an array', { u: 'u1' }],
  ])('refuses a correctly signed payload with %s', (_name, parts) => {
    const forgedPayload = Buffer.from(JSON.stringify(parts)).toString('base64url');
    const signed = `${forgedPayload}.${createHmac('sha256', SECRET).update(forgedPayload).digest('base64url')}`;
    expect(verifyUnsubscribeToken(signed, SECRET)).toBeNull();
  });
});
