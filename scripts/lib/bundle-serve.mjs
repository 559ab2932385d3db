// Bundles scripts/serve.ts (the supervisor and app-process wrapper) and the few project modules it imports into
// one plain JavaScript file next to the Astro server, so that the app processes run on Node alone: under tsx's
// loader every dynamic import Astro makes per request (its lazy page modules) crosses to the loader's thread and
// back. The job worker (scripts/worker.ts) is bundled beside it the same way, so production runs no TypeScript
// loader at all. Packages stay imports of node_modules. Run by `npm run build` and by scripts/lib/build.ts.
import { buildSync } from 'esbuild';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
/** Where the server bundle goes: inside dist/server, two folders below the project, as scripts/lib/processes.ts expects. */
export const SERVE_BUNDLE = path.join(ROOT, 'dist/server/serve.mjs');
/** The job worker's bundle, beside it. */
export const WORKER_BUNDLE = path.join(ROOT, 'dist/server/worker.mjs');

/**
 * Writes the server bundle to `outfile` and the worker's to `workerOutfile` (SERVE_BUNDLE and WORKER_BUNDLE
 * unless told), synchronously: esbuild takes a few milliseconds for each. Other outfiles must also sit two
 * folders below the project for the bundles to find it.
 */
export function bundleServe(outfile = SERVE_BUNDLE, workerOutfile = WORKER_BUNDLE) {
  bundleForNode(path.join(ROOT, 'scripts/serve.ts'), outfile);
  bundleForNode(path.join(ROOT, 'scripts/worker.ts'), workerOutfile);
}

/** One TypeScript entry and the project modules it imports as one ES module for Node 20; packages stay imports. */
export function bundleForNode(entry, outfile) {
  buildSync({
    entryPoints: [entry],
    outfile,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    packages: 'external',
    tsconfig: path.join(ROOT, 'tsconfig.json'),
    logLevel: 'warning',
  });
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) bundleServe();
