import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { bundleServe } from '../../../scripts/lib/bundle-serve.mjs';
import { ROOT } from '../../../scripts/lib/processes';

// Two folders below the project, like dist/server/serve.mjs, so that the bundle's ROOT and node_modules resolve.
const dir = mkdtempSync(path.join(ROOT, '.data', 'bundle-'));
const outfile = path.join(dir, 'serve.mjs');

describe('the server wrapper bundle', () => {
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  test('imports only Node built-ins and packages, no TypeScript source', () => {
    bundleServe(outfile);
    const text = readFileSync(outfile, 'utf8');
    const specifiers = [...text.matchAll(/^import .* from "([^"]+)";$/gm)].map((m) => m[1]!);
    expect(specifiers).toContain('node:cluster');
    expect(specifiers).toContain('zod');
    for (const s of specifiers) expect(s).toMatch(/^(node:[a-z_/]+|[a-z@][\w@./-]*)$/);
    expect(specifiers.filter((s) => s.endsWith('.ts') || s.startsWith('.') || s.startsWith('~/'))).toEqual([]);
  });

  test.each([
    { env: { PORT: 'not-a-port' }, says: 'PORT' },
    { env: { DEV_MAILBOX: '1' }, args: ['--production'], says: 'never serves the dev mailbox' },
  ])('runs on plain Node (no tsx) and refuses a bad setting: $says', ({ env, args = [], says }) => {
    bundleServe(outfile);
    const run = spawnSync(process.execPath, [outfile, ...args], {
      cwd: ROOT,
      encoding: 'utf8',
      env: { PATH: process.env.PATH, ...env },
      timeout: 20_000,
    });
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('[serve]');
    expect(run.stderr).toContain(says);
  });
});
