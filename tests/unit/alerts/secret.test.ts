import { mkdtempSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, test } from 'vitest';
import { readAppSecret } from '~/lib/alerts/secret';

const freshDir = () => mkdtempSync(path.join(tmpdir(), 'sumpwise-secret-'));

describe('readAppSecret', () => {
  test('APP_SECRET wins and no file is written', () => {
    const file = path.join(freshDir(), 'app-secret');
    expect(readAppSecret('a-configured-secret-of-32-characters-x', file)).toBe(
      'a-configured-secret-of-32-characters-x',
    );
    expect(() => statSync(file)).toThrow(/ENOENT/);
  });

  test('without APP_SECRET one is generated once, with mode 600, in a folder made for it', () => {
    const file = path.join(freshDir(), 'nested', 'app-secret');
    const first = readAppSecret(undefined, file);
    // 32 random bytes in base64url are 43 characters (RFC 4648 §5, no padding).
    expect(first).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(statSync(file).mode & 0o777).toBe(0o600);
    expect(readFileSync(file, 'utf8').trim()).toBe(first);
    expect(readAppSecret(undefined, file)).toBe(first);
  });

  test('an existing file is reused as it is (another process made it)', () => {
    const file = path.join(freshDir(), 'app-secret');
    writeFileSync(file, 'made-by-the-web-server-process-0123456789\n', { mode: 0o600 });
    expect(readAppSecret(undefined, file)).toBe('made-by-the-web-server-process-0123456789');
  });

  test('an empty file is an error that says what to do, not a silent empty key', () => {
    const file = path.join(freshDir(), 'app-secret');
    writeFileSync(file, '\n', { mode: 0o600 });
    expect(() => readAppSecret(undefined, file)).toThrow(/empty/);
  });

  test('two generated secrets differ', () => {
    expect(readAppSecret(undefined, path.join(freshDir(), 's'))).not.toBe(
      readAppSecret(undefined, path.join(freshDir(), 's')),
    );
  });
});
