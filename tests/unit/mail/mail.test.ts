import { describe, expect, test } from 'vitest';
import { computeRetryDelayMs, DEFAULT_BACKOFF, deriveMessageId, queuedMailSchema } from '~/lib/mail/mail';

describe('computeRetryDelayMs', () => {
  // Doubling from 30 s, capped at 30 min: our own policy (common practice, no published source).
  test.each([
    [1, 30_000],
    [2, 60_000],
    [3, 120_000],
    [6, 960_000],
    [7, 1_800_000],
    [40, 1_800_000],
  ])('after %i failed attempt(s): %i ms', (attempts, expected) => {
    expect(computeRetryDelayMs(attempts, DEFAULT_BACKOFF)).toBe(expected);
  });
});

describe('deriveMessageId', () => {
  test('is stable per key, distinct across keys, and in the sender domain', () => {
    const a = deriveMessageId('verify:user-1:token-1', 'Sumpwise <no-reply@Sumpwise.test>');
    expect(deriveMessageId('verify:user-1:token-1', 'Sumpwise <no-reply@Sumpwise.test>')).toBe(a);
    expect(deriveMessageId('verify:user-1:token-2', 'Sumpwise <no-reply@Sumpwise.test>')).not.toBe(a);
    // RFC 5322 §3.6.4 msg-id: "<" id-left "@" id-right ">".
    expect(a).toMatch(/^<[0-9a-f]{40}\.mail@sumpwise\.test>$/);
  });

  test.each([
    ['no-reply@mail.sumpwise.test', 'mail.sumpwise.test'],
    ['Sumpwise <no-reply@sumpwise.test>', 'sumpwise.test'],
    ['not an address', 'sumpwise.invalid'],
  ])('domain of %s is %s', (from, domain) => {
    expect(deriveMessageId('k', from).endsWith(`@${domain}>`)).toBe(true);
  });
});

describe('queuedMailSchema', () => {
  const ok = {
    to: 'rider@example.test',
    subject: 'Confirm your e-mail',
    text: 't',
    html: '<p>t</p>',
    idempotencyKey: 'verify:1',
    kind: 'verify_email',
  };
  test.each([
    ['a valid message', ok, true],
    ['custom header', { ...ok, headers: { 'List-Unsubscribe': '<https://sumpwise.test/u>' } }, true],
    ['CR/LF in the subject (header injection)', { ...ok, subject: 'hi\r\nBcc: x@example.test' }, false],
    ['CR/LF in a header value', { ...ok, headers: { 'X-Note': 'a\nBcc: x@example.test' } }, false],
    ['a reserved header', { ...ok, headers: { Bcc: 'x@example.test' } }, false],
    ['a header name with a colon', { ...ok, headers: { 'X-A:b': 'c' } }, false],
    ['not an address', { ...ok, to: 'rider' }, false],
    ['empty idempotency key', { ...ok, idempotencyKey: '' }, false],
    ['kind with spaces', { ...ok, kind: 'Verify Email' }, false],
  ])('%s', (_name, input, valid) => {
    expect(queuedMailSchema.safeParse(input).success).toBe(valid);
  });
});
