import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { APP_NODE_FLAGS } from '../../../scripts/lib/app-node-flags';
import { bundleServe } from '../../../scripts/lib/bundle-serve.mjs';
import { ROOT } from '../../../scripts/lib/processes';

// Two folders below the project, like dist/server/serve.mjs, so that the bundle's ROOT and node_modules resolve.
const dir = mkdtempSync(path.join(ROOT, '.data', 'bundle-'));
const outfile = path.join(dir, 'serve.mjs');
const workerOutfile = path.join(dir, 'worker.mjs');

/** The `import … from "…"` specifiers of a bundle. */
function importsOf(file: string): string[] {
  return [...readFileSync(file, 'utf8').matchAll(/^import .* from "([^"]+)";$/gm)].map((m) => m[1]!);
}

/** Only Node built-ins and packages: no TypeScript source and nothing relative. */
function expectNoSources(specifiers: string[]): void {
  for (const s of specifiers) expect(s).toMatch(/^(node:[a-z_/]+|[a-z@][\w@./-]*)$/);
  expect(specifiers.filter((s) => s.endsWith('.ts') || s.startsWith('.') || s.startsWith('~/'))).toEqual([]);
}

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the server wrapper bundle', () => {
  test('imports only Node built-ins and packages, no TypeScript source', () => {
    bundleServe(outfile, workerOutfile);
    const specifiers = importsOf(outfile);
    expect(specifiers).toContain('node:cluster');
    expect(specifiers).toContain('zod');
    expectNoSources(specifiers);
  });

  test.each([
    { env: { PORT: 'not-a-port' }, says: 'PORT' },
    { env: { DEV_MAILBOX: '1' }, args: ['--production'], says: 'never serves the dev mailbox' },
  ])('runs on plain Node (no tsx) and refuses a bad setting: $says', ({ env, args = [], says }) => {
    bundleServe(outfile, workerOutfile);
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

describe('the job worker bundle', () => {
  test('imports only Node built-ins and packages, no TypeScript source', () => {
    bundleServe(outfile, workerOutfile);
    const specifiers = importsOf(workerOutfile);
    expect(specifiers).toContain('pg-boss');
    expectNoSources(specifiers);
  });

  test('runs on plain Node (no tsx) and refuses a bad setting', () => {
    bundleServe(outfile, workerOutfile);
    const run = spawnSync(process.execPath, [...APP_NODE_FLAGS, workerOutfile], {
      cwd: ROOT,
      encoding: 'utf8',
      env: { PATH: process.env.PATH, WORKER_POOL_SIZE: 'lots' },
      timeout: 20_000,
    });
    expect(run.status).not.toBe(0);
    expect(run.stderr).toContain('WORKER_POOL_SIZE');
  });

  test("`npm run worker` gives it the app processes' V8 flags", () => {
    const scripts = (
      JSON.parse(readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as {
        scripts: Record<string, string>;
      }
    ).scripts;
    expect(scripts.worker).toBe(`node ${APP_NODE_FLAGS.join(' ')} dist/server/worker.mjs`);
  });
});
