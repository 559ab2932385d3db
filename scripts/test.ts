// `npm test`: the formatter check and the linter, the type check, unit tests (with coverage thresholds),
// integration tests against the project's PostgreSQL, a build, and end-to-end tests in headless Chromium
// against the built server. Exits non-zero on any failure and ends with one line counting every test.
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import path from 'node:path';
import { ROOT, run } from './lib/processes';
import { buildIfNeeded } from './lib/build';

const bin = (name: string) => path.join(ROOT, 'node_modules/.bin', name);
const results = path.join(ROOT, '.data/test-results');
const env = { ...process.env, ASTRO_TELEMETRY_DISABLED: '1' };
const timings: string[] = [];
let passed = 0;
let failed = 0;
let skipped = 0;

function step(name: string, fn: () => boolean): boolean {
  const t = performance.now();
  console.log(`\n── ${name} ──`);
  const ok = fn();
  timings.push(`${name}: ${((performance.now() - t) / 1000).toFixed(1)} s${ok ? '' : ' (FAILED)'}`);
  return ok;
}

function ensureChromium(): boolean {
  const chromium = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
  if (existsSync(chromium)) return true;
  if (process.getuid?.() === 0) {
    console.log('[test] Chromium is missing: installing Debian’s chromium package…');
    const code = run('bash', [
      '-c',
      'apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null',
    ]);
    if (code === 0 && existsSync(chromium)) return true;
  }
  console.error(
    `[test] Chromium not found at ${chromium}. Install it as root: sudo apt-get install -y chromium (or set CHROMIUM_PATH)`,
  );
  return false;
}

function vitest(project: string, extra: string[] = []): boolean {
  const out = path.join(results, `${project}.json`);
  rmSync(out, { force: true });
  const code = run(
    bin('vitest'),
    [
      'run',
      '--config',
      'tests/vitest.config.ts',
      '--project',
      project,
      '--reporter=default',
      '--reporter=json',
      `--outputFile.json=${out}`,
      ...extra,
    ],
    { env },
  );
  if (existsSync(out)) {
    const r = JSON.parse(readFileSync(out, 'utf8')) as {
      numPassedTests: number;
      numFailedTests: number;
      numPendingTests: number;
      numTodoTests: number;
    };
    passed += r.numPassedTests;
    failed += r.numFailedTests;
    skipped += r.numPendingTests + r.numTodoTests;
    if (r.numPassedTests + r.numFailedTests === 0) {
      console.error(`[test] the ${project} project ran no test`);
      return false;
    }
  }
  return code === 0;
}

mkdirSync(results, { recursive: true });
const started = performance.now();
// The formatter and the linter both run (so one report shows both) and keep a content-based cache under
// .data/cache, so a second run reads only the files that changed.
const cache = path.join(ROOT, '.data/cache');
const cacheArgs = (tool: string) => [
  '--cache',
  '--cache-strategy',
  'content',
  '--cache-location',
  path.join(cache, tool),
];
const formatted = step(
  'format (prettier --check)',
  () => run(bin('prettier'), ['--check', ...cacheArgs('prettier'), '.']) === 0,
);
const linted = step('lint (eslint)', () => run(bin('eslint'), [...cacheArgs('eslint'), '.']) === 0);
// A server this run starts is stopped when it ends; one already running (a developer's `npm start`) is left running.
let startedDatabase = false;
const ok =
  formatted &&
  linted &&
  ensureChromium() &&
  step('database', () => {
    startedDatabase = run('bash', ['scripts/db.sh', 'status']) !== 0;
    return run('bash', ['scripts/db.sh', 'start']) === 0;
  }) &&
  step('type check (astro check)', () => run(bin('astro'), ['check', '--minimumSeverity', 'warning'], { env }) === 0) &&
  step('unit tests (coverage of src/lib)', () => vitest('unit', ['--coverage'])) &&
  step('integration tests (PostgreSQL)', () => vitest('integration', ['--no-file-parallelism'])) &&
  step('build', () => {
    try {
      buildIfNeeded();
      return true;
    } catch (e) {
      console.error(String(e));
      return false;
    }
  }) &&
  step('end-to-end tests (Chromium)', () => vitest('e2e', ['--no-file-parallelism']));

if (startedDatabase) run('bash', ['scripts/db.sh', 'stop']);

console.log(`\n${timings.join('\n')}\ntotal: ${((performance.now() - started) / 1000).toFixed(1)} s`);
console.log(`\ntests: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
if (!ok && failed === 0) console.log('[test] a step failed before or outside the test runner (see above)');
process.exit(ok && failed === 0 ? 0 : 1);
