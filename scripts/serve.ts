// Serves the built app. A small supervisor (the primary process) starts APP_PROCESSES app processes (one per
// core by default) with Node's cluster module, all answering on one port, and starts a new one whenever one
// dies, with a line in the log and a growing pause when they keep dying at start-up; SIGTERM or SIGINT stops them in order (each finishes its open requests). Each app process runs
// Astro's own handler behind a plain HTTP server that puts the security headers on every response (static
// files included: the adapter serves those before the app's middleware runs) and decides which address a
// request came from (TRUST_PROXY) before Astro sees any forwarded header.
//
// The build bundles this file into dist/server/serve.mjs (scripts/lib/bundle-serve.mjs), so the app processes run
// on plain Node, without tsx's loader in the path of Astro's per-request dynamic imports.
// Usage: node dist/server/serve.mjs               (what `npm start` and the e2e tests run)
//        node dist/server/serve.mjs --production  (`npm run serve`: the production start, never a dev mailbox)
// Why cluster and not SO_REUSEPORT: Node 20's net.Server has no `reusePort` option (it came in 22.12/23.1),
// and cluster's primary hands accepted connections round-robin to the app processes on Linux, which spreads
// the load evenly whatever the kernel's hashing would do.
import cluster, { type Worker } from 'node:cluster';
import { existsSync } from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { readConfig, type AppConfig } from '../src/lib/config';
import { FORWARDED_HEADERS, resolveClientAddress } from '../src/lib/http/client-address';
import { securityHeaders } from '../src/lib/http/security-headers';
import { APP_NODE_FLAGS } from './lib/app-node-flags';
import { ROOT } from './lib/processes';
import { nextRestart } from './lib/restart-backoff';

/** Exit code of an app process whose port is taken: restarting cannot help, so the supervisor stops. */
const EXIT_PORT_IN_USE = 78;
/** Time an app process gets to finish open requests on stop before it is killed. */
const STOP_GRACE_MS = 10_000;

function fail(message: string): never {
  console.error(`[serve] ${message}`);
  process.exit(1);
}

function readSettings(): { config: AppConfig; processes: number } {
  const production = process.argv.includes('--production');
  if (production && process.env.DEV_MAILBOX === '1') {
    fail(
      'the production start never serves the dev mailbox: unset DEV_MAILBOX (it is for `npm start` on a loopback address only).',
    );
  }
  let config: AppConfig;
  try {
    config = readConfig(production ? { ...process.env, DEV_MAILBOX: '0' } : process.env);
  } catch (error) {
    fail(error instanceof Error ? error.message : String(error));
  }
  // Photos in production go to a real object store: the local fake's fixed credentials mean it was never set up.
  if (
    production &&
    config.PHOTO_STORE === 's3' &&
    (!process.env.S3_ACCESS_KEY_ID || !process.env.S3_SECRET_ACCESS_KEY)
  ) {
    fail(
      'the production start keeps photos in an object store: set S3_ENDPOINT, S3_BUCKET, S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY, or PHOTO_STORE=disk on a single machine.',
    );
  }
  const processes = config.APP_PROCESSES;
  return { config, processes };
}

async function runSupervisor(): Promise<void> {
  const { config, processes } = readSettings();
  if (!existsSync(path.join(ROOT, 'dist/server/entry.mjs'))) fail('the app is not built: run `npm run build` first.');
  // The app processes read their settings from the environment; the production start pins the mailbox off.
  if (process.argv.includes('--production')) process.env.DEV_MAILBOX = '0';
  let stopping = false;
  let quickDeaths = 0;
  const startedAt = new Map<number, number>();
  cluster.setupPrimary({ execArgv: [...process.execArgv, ...APP_NODE_FLAGS] });

  const fork = (): Worker => {
    const worker = cluster.fork();
    startedAt.set(worker.id, Date.now());
    return worker;
  };

  cluster.on('exit', (worker, code, signal) => {
    const lived = Date.now() - (startedAt.get(worker.id) ?? 0);
    startedAt.delete(worker.id);
    if (stopping) return;
    if (code === EXIT_PORT_IN_USE) {
      console.error(`[serve] port ${config.PORT} on ${config.HOST} is already in use; stopping.`);
      stopping = true;
      for (const w of Object.values(cluster.workers ?? {})) w?.kill('SIGTERM');
      process.exitCode = 1;
      return;
    }
    // A crash loop at start-up backs off (scripts/lib/restart-backoff.ts); a process that ran a while is replaced at once.
    const next = nextRestart(quickDeaths, lived);
    quickDeaths = next.quickDeaths;
    const delay = next.delayMs;
    console.error(
      `[serve] app process ${worker.process.pid} died (${signal ?? `exit ${code}`}) after ${(lived / 1000).toFixed(1)} s; starting another${delay ? ` in ${delay} ms` : ''}`,
    );
    setTimeout(() => {
      if (!stopping) fork();
    }, delay);
  });

  let listening = 0;
  cluster.on('listening', () => {
    listening += 1;
    if (listening === processes)
      console.log(
        `listening on http://${config.HOST}:${config.PORT} (${processes} app process${processes === 1 ? '' : 'es'})`,
      );
  });

  const stop = (signal: NodeJS.Signals) => {
    if (stopping) return;
    stopping = true;
    const workers = Object.values(cluster.workers ?? {}).filter((w): w is Worker => w !== undefined);
    console.log(`[serve] ${signal}: stopping ${workers.length} app process${workers.length === 1 ? '' : 'es'}`);
    const killTimer = setTimeout(() => {
      for (const w of workers) w.process.kill('SIGKILL');
    }, STOP_GRACE_MS);
    killTimer.unref();
    // disconnect(): the process stops accepting, finishes its open requests, then exits.
    for (const w of workers) w.disconnect();
    const check = setInterval(() => {
      if (workers.every((w) => w.isDead())) {
        clearInterval(check);
        process.exit(0);
      }
    }, 50);
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));

  for (let i = 0; i < processes; i++) fork();
}

async function runAppProcess(): Promise<void> {
  const { config } = readSettings();
  process.env.ASTRO_NODE_AUTOSTART = 'disabled';
  const entry = pathToFileURL(path.join(ROOT, 'dist/server/entry.mjs')).href;
  const { handler } = (await import(entry)) as { handler: http.RequestListener };
  const headers = Object.entries(securityHeaders());

  const server = http.createServer((req, res) => {
    // Astro takes the client address from the first X-Forwarded-For entry. Replace the header with the one
    // address we trust, and drop the other forwarded headers when no proxy is trusted.
    const address = resolveClientAddress(req.socket.remoteAddress, req.headers['x-forwarded-for'], config.TRUST_PROXY);
    const strip = config.TRUST_PROXY > 0 ? ['x-forwarded-for', 'forwarded', 'x-real-ip'] : FORWARDED_HEADERS;
    for (const name of strip) delete req.headers[name];
    if (address) req.headers['x-forwarded-for'] = address;
    // Set first: a page's own headers (written later by the app) take precedence over these defaults.
    for (const [name, value] of headers) res.setHeader(name, value);
    handler(req, res);
  });
  server.on('error', (error: NodeJS.ErrnoException) => {
    if (error.code === 'EADDRINUSE') process.exit(EXIT_PORT_IN_USE);
    console.error(`[serve] server error: ${error.message}`);
    process.exit(1);
  });
  server.listen(config.PORT, config.HOST);

  const stop = () => server.close(() => process.exit(0));
  // Ctrl-C reaches every process of the terminal: each app process finishes its requests and exits.
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
  // The supervisor is gone (stopped in order, or killed): nothing routes requests here any more.
  process.on('disconnect', () => process.exit(0));
}

await (cluster.isPrimary ? runSupervisor() : runAppProcess());
