// Builds the Astro server when its output is missing or older than any of its inputs.
import { existsSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { APP_NODE_FLAGS } from './app-node-flags';
import { bundleServe, SERVE_BUNDLE, WORKER_BUNDLE } from './bundle-serve.mjs';
import { ROOT, run } from './processes';

const INPUTS = ['src', 'public', 'astro.config.mjs', 'tailwind.config.cjs', 'package-lock.json', 'tsconfig.json'];
export const SERVER_ENTRY = path.join(ROOT, 'dist/server/entry.mjs');
/**
 * Arguments to `node` that serve the built app: scripts/serve.ts (which wraps the entry with security headers),
 * bundled by the build into plain JavaScript (scripts/lib/bundle-serve.mjs).
 */
export const SERVE_ARGS = [SERVE_BUNDLE];
/** Arguments to `node` that run the job worker from its bundle, with the app processes' V8 flags. */
export const WORKER_ARGS = [...APP_NODE_FLAGS, WORKER_BUNDLE];
/** What the two bundles are made of: their scripts, the script helpers and the project modules they import. */
const SERVE_INPUTS = ['scripts/serve.ts', 'scripts/worker.ts', 'scripts/lib', 'src', 'tsconfig.json'];

function newestMtime(p: string): number {
  const s = statSync(p);
  if (!s.isDirectory()) return s.mtimeMs;
  let newest = s.mtimeMs;
  for (const name of readdirSync(p)) newest = Math.max(newest, newestMtime(path.join(p, name)));
  return newest;
}

/** True when dist/ is missing or older than a source file. */
export function buildIsStale(): boolean {
  if (!existsSync(SERVER_ENTRY)) return true;
  const built = statSync(SERVER_ENTRY).mtimeMs;
  return INPUTS.some((i) => existsSync(path.join(ROOT, i)) && newestMtime(path.join(ROOT, i)) > built);
}

function serveBundleIsStale(): boolean {
  if (!existsSync(SERVE_BUNDLE) || !existsSync(WORKER_BUNDLE)) return true;
  const built = Math.min(statSync(SERVE_BUNDLE).mtimeMs, statSync(WORKER_BUNDLE).mtimeMs);
  return SERVE_INPUTS.some((i) => existsSync(path.join(ROOT, i)) && newestMtime(path.join(ROOT, i)) > built);
}

/**
 * Runs `astro build` when needed (or always with force), then bundles the server wrapper when it is missing or
 * older than its inputs; throws when either fails.
 */
export function buildIfNeeded(force = false): boolean {
  if (!force && !buildIsStale()) {
    if (!serveBundleIsStale()) return false;
    bundleServe();
    return true;
  }
  console.log('[build] building the server…');
  const code = run(path.join(ROOT, 'node_modules/.bin/astro'), ['build', '--silent'], {
    // Always a production build: under Vitest NODE_ENV is 'test', which would bundle React's development JSX.
    env: { ...process.env, NODE_ENV: 'production', ASTRO_TELEMETRY_DISABLED: '1' },
  });
  if (code !== 0) throw new Error('astro build failed (see above)');
  // astro build empties dist/server: the wrapper is bundled after it.
  bundleServe();
  return true;
}
