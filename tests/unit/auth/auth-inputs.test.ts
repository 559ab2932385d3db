import { describe, expect, test } from 'vitest';
import { z } from 'zod';
import { signInSchema, signUpSchema } from '~/lib/auth/auth';
import { hashToken, generateToken } from '~/lib/auth/tokens';
import { parseJsonBody } from '~/lib/http/json';
import { safeNextPath } from '~/lib/http/form';
import {
  canEditMachine,
  canImportLabReport,
  canManageCrew,
  canReadCrew,
  canReviewSample,
  canCreateMachine,
  canEditLimits,
} from '~/lib/auth/permissions';
import type { Role } from '~/lib/db/database';

describe('password rules (length only, no composition rules: NIST SP 800-63B §3.1.1.2)', () => {
  test.each([
    ['9 characters', 'a'.repeat(9), false],
    ['10 characters', 'a'.repeat(10), true],
    ['only lower-case letters and spaces', 'all lower case words', true],
    ['128 characters', 'x'.repeat(128), true],
    ['256 characters', 'x'.repeat(256), true],
    ['257 characters', 'x'.repeat(257), false],
  ])('%s → accepted %s', (_name, password, ok) => {
    expect(signUpSchema.safeParse({ email: 'a@example.test', password }).success).toBe(ok);
  });
});

describe('e-mail and body shape', () => {
  test.each([
    [' Ada@Example.TEST ', 'ada@example.test'],
    ['rider@larchwood.example', 'rider@larchwood.example'],
  ])('%j is normalised to %j', (input, expected) => {
    expect(signInSchema.parse({ email: input, password: 'x' }).email).toBe(expected);
  });

  test.each([['not-an-address'], [''], [`${'a'.repeat(250)}@example.test`]])('%j is refused', (email) => {
    expect(signInSchema.safeParse({ email, password: 'x' }).success).toBe(false);
  });

  test('a forged role or crew id in a sign-up body is refused, not ignored', () => {
    const r = signUpSchema.safeParse({
      email: 'a@example.test',
      password: 'long enough pw',
      role: 'lead',
      crewId: 'x',
    });
    expect(r.success).toBe(false);
  });
});

describe('tokens', () => {
  test.each([
    // FIPS 180-2, Appendix B.1: SHA-256("abc")
    ['abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
    // FIPS 180-2 / NIST CSRC example: SHA-256 of the empty string
    ['', 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'],
  ])('hashToken(%j) is the SHA-256 hex digest', (input, digest) => {
    expect(hashToken(input)).toBe(digest);
  });

  test('generated tokens carry 256 bits and do not repeat', () => {
    const tokens = new Set(Array.from({ length: 200 }, generateToken));
    expect(tokens.size).toBe(200);
    for (const t of tokens) expect(Buffer.from(t, 'base64url').length).toBe(32);
  });
});

describe('parseJsonBody', () => {
  const schema = z.strictObject({ email: z.email(), role: z.enum(['lead', 'mechanic', 'rider']) });
  const req = (body: string, type = 'application/json') =>
    new Request('http://x.test/', { method: 'POST', body, headers: { 'content-type': type } });

  test.each([
    [
      'oversized',
      req(JSON.stringify({ email: 'a@example.test', role: 'rider', pad: 'x'.repeat(20_000) })),
      413,
      'payload_too_large',
      {},
    ],
    ['not JSON content type', req('email=a', 'application/x-www-form-urlencoded'), 415, 'unsupported_media_type', {}],
    ['malformed JSON', req('{"email":'), 400, 'invalid_json', {}],
    [
      'bad field',
      req(JSON.stringify({ email: 'nope', role: 'rider' })),
      400,
      'invalid_input',
      { email: expect.any(String) },
    ],
    [
      'forged extra key',
      req(JSON.stringify({ email: 'a@example.test', role: 'rider', crewId: 'other' })),
      400,
      'invalid_input',
      { crewId: 'is not accepted here' },
    ],
  ])('%s → %i %s', async (_name, request, status, code, fields) => {
    const r = await parseJsonBody(request, schema, 16 * 1024);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.response.status).toBe(status);
    expect(await r.response.json()).toEqual({ error: { code, message: expect.any(String), fields } });
  });

  test('a valid body comes back typed', async () => {
    const r = await parseJsonBody(req(JSON.stringify({ email: 'a@example.test', role: 'mechanic' })), schema);
    expect(r).toEqual({ ok: true, data: { email: 'a@example.test', role: 'mechanic' } });
  });
});

describe('safeNextPath keeps redirects on this site', () => {
  test.each([
    ['/crews', '/crews'],
    ['/machines/1?x=2', '/machines/1?x=2'],
    ['//evil.example/', '/'],
    ['/\\evil.example', '/'],
    ['https://evil.example/', '/'],
    // Browsers drop tabs and newlines and read \\ as / (WHATWG URL Standard, "basic URL parser").
    ['/\t/evil.example', '/'],
    ['/\n/evil.example', '/'],
    ['/\r\n/evil.example', '/'],
    ['\t//evil.example', '/'],
    ['/\\/evil.example', '/'],
    ['/.//evil.example', '/'],
    ['/./\\evil.example', '/'],
    ['/x/..//evil.example', '/'],
    // Encoded forms stay one path segment on this site: the browser does not decode them before resolving.
    ['/%09/evil.example', '/%09/evil.example'],
    ['/%2F%2Fevil.example', '/%2F%2Fevil.example'],
    ['/%5C%5Cevil.example', '/%5C%5Cevil.example'],
    ['/\u0000/evil.example', '/'],
    ['/machines/../crews', '/crews'],
    ['/' + 'a'.repeat(5000), '/'],
    ['', '/'],
    [null, '/'],
  ])('%j → %j', (next, expected) => {
    expect(safeNextPath(next)).toBe(expected);
  });
});

describe('permissions follow the role table of PRODUCT.md', () => {
  const m = (role: Role) => ({ crewId: 'c', crewName: 'C', role });
  test.each([
    // role,      read, manage, createMachine, importLab, review, editLimits
    ['lead', true, true, true, true, true, true],
    ['mechanic', true, false, false, true, true, false],
    ['rider', true, false, true, false, false, false],
  ] as const)('%s', (role, read, manage, create, importLab, review, limits) => {
    expect([
      canReadCrew(m(role)),
      canManageCrew(m(role)),
      canCreateMachine(m(role)),
      canImportLabReport(m(role)),
      canReviewSample(m(role)),
      canEditLimits(m(role)),
    ]).toEqual([read, manage, create, importLab, review, limits]);
  });

  test.each([
    ['lead', 'someone else', true],
    ['rider', 'me', true],
    ['rider', 'someone else', false],
    ['mechanic', 'me', false],
  ] as const)('%s editing a machine owned by %s → %s', (role, owner, expected) => {
    expect(canEditMachine(m(role), { ownerUserId: owner === 'me' ? 'u1' : 'u2' }, 'u1')).toBe(expected);
  });

  test('no membership may do nothing', () => {
    expect([canReadCrew(null), canManageCrew(null), canEditMachine(null, { ownerUserId: 'u1' }, 'u1')]).toEqual([
      false,
      false,
      false,
    ]);
  });
});
