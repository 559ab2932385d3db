import { mkdtempSync, mkdirSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, test } from 'vitest';
import { useEmbeddedPassword } from '~/lib/db/embedded-password';

describe('the embedded server password reaches connections made without one', () => {
  const clone = () => {
    const root = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-pw-'));
    mkdirSync(path.join(root, '.data'));
    return root;
  };

  test('read from .data/pg-password into PGPASSWORD', () => {
    const root = clone();
    writeFileSync(path.join(root, '.data/pg-password'), 'Generated123\n');
    const env: NodeJS.ProcessEnv = {};
    useEmbeddedPassword(root, env);
    expect(env.PGPASSWORD).toBe('Generated123');
  });

  test('a PGPASSWORD already set wins', () => {
    const root = clone();
    writeFileSync(path.join(root, '.data/pg-password'), 'Generated123\n');
    const env: NodeJS.ProcessEnv = { PGPASSWORD: 'chosen' };
    useEmbeddedPassword(root, env);
    expect(env.PGPASSWORD).toBe('chosen');
  });

  test('no file, no password (an external database)', () => {
    const env: NodeJS.ProcessEnv = {};
    useEmbeddedPassword(clone(), env);
    expect(env.PGPASSWORD).toBeUndefined();
  });
});
