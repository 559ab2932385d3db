import { describe, expect, test } from 'vitest';
import { isSecureOrigin, readConfig } from '~/lib/config';

describe('readConfig', () => {
  test('defaults serve a local machine', () => {
    const c = readConfig({});
    expect(c.DATABASE_URL).toBe('postgres://sumpwise@127.0.0.1:54329/sumpwise');
    expect(c.PUBLIC_URL).toBe('http://127.0.0.1:4321');
    expect(c.PORT).toBe(4321);
  });

  test.each([
    [{ PORT: 'eighty' }, /PORT/],
    [{ PORT: '70000' }, /PORT/],
    [{ DATABASE_URL: 'mysql://x' }, /DATABASE_URL must be a postgres/],
    [{ PUBLIC_URL: 'not a url' }, /PUBLIC_URL/],
    [{ APP_SECRET: 'short' }, /APP_SECRET/],
    [{ TRUST_PROXY: 'yes' }, /TRUST_PROXY must be off, on, or the number of proxies/],
    [{ TRUST_PROXY: '12' }, /TRUST_PROXY/],
    [{ DEV_MAILBOX: '1', HOST: '0.0.0.0' }, /DEV_MAILBOX is 1, but .* only when HOST is a loopback address .* not 0\.0\.0\.0/],
    [{ DEV_MAILBOX: '1', HOST: '192.0.2.10' }, /DEV_MAILBOX/],
  ])('rejects %o with one line naming the variable', (env, message) => {
    expect(() => readConfig(env)).toThrow(message);
  });

  test.each([
    [{}, 0],
    [{ TRUST_PROXY: 'off' }, 0],
    [{ TRUST_PROXY: 'on' }, 1],
    [{ TRUST_PROXY: '2' }, 2],
  ])('TRUST_PROXY %o trusts %d proxies', (env, n) => {
    expect(readConfig(env).TRUST_PROXY).toBe(n);
  });

  test.each(['127.0.0.1', '127.1.2.3', '::1', 'localhost'])('the dev mailbox may be served on loopback %s', (HOST) => {
    expect(readConfig({ DEV_MAILBOX: '1', HOST }).DEV_MAILBOX).toBe(true);
  });

  test('empty strings count as unset', () => {
    expect(readConfig({ PORT: '' }).PORT).toBe(4321);
  });

  test.each([
    ['https://sumpwise.example', true],
    ['http://127.0.0.1:4321', false],
  ])('cookies are Secure for %s: %s', (url, secure) => {
    expect(isSecureOrigin(readConfig({ PUBLIC_URL: url }))).toBe(secure);
  });
});
