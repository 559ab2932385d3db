import { describe, expect, test } from 'vitest';
import { isSecureOrigin, readConfig } from '../../src/lib/config';

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
  ])('rejects %o with one line naming the variable', (env, message) => {
    expect(() => readConfig(env)).toThrow(message);
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
