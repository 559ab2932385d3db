import { describe, expect, test } from 'vitest';
import { z } from 'zod';
import { wantsPage } from '~/lib/http/form';
import { handleFormPost, settleFormPost, type FormPage } from '~/lib/http/form-post';
import { refusalJson } from '~/lib/http/responses';
import { refuse, refuseInvalid, refuseNotFound, succeed, type Result } from '~/lib/http/result';

const FORM = 'application/x-www-form-urlencoded';
const MULTIPART = 'multipart/form-data; boundary=x';

function request(headers: Record<string, string>, body?: string): Request {
  return new Request('http://local/', { method: 'POST', headers, body });
}

describe('wantsPage', () => {
  test.each([
    // accept, content type, bareForm, wants a page?
    ['text/html,application/xhtml+xml,*/*;q=0.8', FORM, undefined, true],
    ['text/html,application/xhtml+xml,*/*;q=0.8', 'application/json', 'page', true],
    ['application/json', FORM, 'page', false],
    ['text/html, application/json', FORM, 'page', false],
    ['*/*', FORM, undefined, false],
    ['*/*', FORM, 'page', true],
    ['*/*', MULTIPART, 'page', true],
    ['*/*', MULTIPART, 'json', false],
    ['*/*', 'application/json', 'page', false],
    ['', '', 'page', false],
  ] as const)('Accept %j, Content-Type %j, bare forms as %s → %s', (accept, type, bareForm, expected) => {
    const headers: Record<string, string> = {};
    if (accept) headers.accept = accept;
    if (type) headers['content-type'] = type;
    expect(wantsPage(request(headers), bareForm ? { bareForm } : {})).toBe(expected);
  });
});

describe('refusals', () => {
  test('refuseInvalid names the first problem of each field, and a forged key by its own name', () => {
    const schema = z.strictObject({
      email: z.string().email('Enter an e-mail address.'),
      age: z.number().int().min(16, 'Too young.'),
    });
    const parsed = schema.safeParse({ email: 'nope', age: 3, crewId: 'x' });
    if (parsed.success) throw new Error('expected a failure');
    expect(refuseInvalid(parsed.error)).toEqual({
      ok: false,
      status: 400,
      code: 'invalid_input',
      message: 'Some fields need attention.',
      fields: { email: 'Enter an e-mail address.', age: 'Too young.', crewId: 'is not accepted here' },
    });
  });

  test('refuseNotFound never says whether the record exists in another crew', () => {
    expect(refuseNotFound('machine')).toMatchObject({
      status: 404,
      code: 'not_found',
      message: 'No such machine in your crew.',
      fields: {},
    });
    expect(refuseNotFound().message).toBe('There is nothing here, or it belongs to a crew you are not in.');
  });

  test('refusalJson sends the shared error shape, with Retry-After only when set', async () => {
    const limited = refusalJson(refuse(429, 'rate_limited', 'Wait.', {}, { retryAfterSeconds: 90 }));
    expect(limited.status).toBe(429);
    expect(limited.headers.get('retry-after')).toBe('90');
    expect(await limited.json()).toEqual({ error: { code: 'rate_limited', message: 'Wait.', fields: {} } });
    const taken = refusalJson(refuse(409, 'email_taken', 'Taken.', { email: 'Taken.' }));
    expect(taken.headers.get('retry-after')).toBeNull();
    expect(await taken.json()).toEqual({
      error: { code: 'email_taken', message: 'Taken.', fields: { email: 'Taken.' } },
    });
  });
});

describe('handleFormPost', () => {
  const schema = z.strictObject({ name: z.string().trim().min(1, 'Give it a name.') });
  const page = (body: string, type = FORM): FormPage => ({
    request: request({ 'content-type': type }, body),
    response: { status: 200, headers: new Headers() },
  });
  const steps = (run: (data: { name: string }) => Promise<Result<string>>) => ({
    schema,
    input: (f: URLSearchParams) => ({ name: f.get('name') ?? '' }),
    run,
  });

  test('valid input reaches the service and comes back with the parsed data', async () => {
    const p = page('name=%20Larch%20');
    const out = await handleFormPost(
      p,
      steps(async (d) => succeed(`made ${d.name}`)),
    );
    expect(out).toMatchObject({ status: 'done', value: 'made Larch', data: { name: 'Larch' } });
    expect(p.response.status).toBe(200);
  });

  test('invalid input answers 400 with per-field messages and never calls the service', async () => {
    const p = page('name=');
    let called = false;
    const out = await handleFormPost(
      p,
      steps(async () => {
        called = true;
        return succeed('x');
      }),
    );
    expect(out).toMatchObject({ status: 'refused', fields: { name: 'Give it a name.' }, message: '' });
    expect(p.response.status).toBe(400);
    expect(called).toBe(false);
  });

  test.each([
    [
      'a refusal about a field shows beside it',
      refuse(409, 'taken', 'Taken.', { name: 'Already used.' }),
      { name: 'Already used.' },
      '',
      null,
    ],
    [
      'any other refusal is one sentence, with its wait',
      refuse(429, 'rate_limited', 'Try later.', {}, { retryAfterSeconds: 60 }),
      {},
      'Try later.',
      '60',
    ],
  ] as const)('%s', async (_, refusal, fields, message, retryAfter) => {
    const p = page('name=Larch');
    const out = await handleFormPost(
      p,
      steps(async () => refusal),
    );
    expect(out).toMatchObject({ status: 'refused', fields, message });
    expect(p.response.status).toBe(refusal.status);
    expect(p.response.headers.get('retry-after')).toBe(retryAfter);
  });

  test('a body that is not a form, or too large, is answered before anything else', async () => {
    expect(
      await handleFormPost(
        page('{}', 'application/json'),
        steps(async () => succeed('x')),
      ),
    ).toMatchObject({ status: 'unreadable', response: { status: 415 } });
    expect(
      await handleFormPost(
        page(`name=${'a'.repeat(20_000)}`),
        steps(async () => succeed('x')),
      ),
    ).toMatchObject({ status: 'unreadable', response: { status: 413 } });
  });

  test('settleFormPost works on a form the page has already read', async () => {
    const p = page('');
    const out = await settleFormPost(
      p,
      new URLSearchParams('name=Wren'),
      steps(async (d) => succeed(d.name)),
    );
    expect(out).toMatchObject({ status: 'done', value: 'Wren' });
  });
});
