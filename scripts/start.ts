// `npm start`: the project's PostgreSQL, migrations, demo data on first run, a build when needed, the local
// mail relay, object store and job worker, then the built server (one app process per core) on 127.0.0.1:4321.
// One clear line when something is wrong.
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import type { ChildProcess } from 'node:child_process';
import { readConfig } from '../src/lib/config';
import { createDb } from '../src/lib/db/db';
import { isDatabaseEmpty, seedDemo } from '../sample-data/seed';
import { sendDemoLabMail } from '../sample-data/seed-lab-mail';
import { assertReachable, ensureEmbeddedDatabase, migrateToLatest } from './lib/database';
import { buildIfNeeded, SERVE_ARGS, WORKER_ARGS } from './lib/build';
import { ROOT, httpOk, isPortOpen, startService, stopService, waitFor } from './lib/processes';

const PID_FILE = path.join(ROOT, '.data/app.pid');
const started = performance.now();
const children: ChildProcess[] = [];
let ownsPidFile = false;

function fail(message: string): never {
  console.error(`[start] ${message}`);
  process.exit(1);
}

function runningInstance(): { pid: number; url: string } | null {
  if (!existsSync(PID_FILE)) return null;
  try {
    const { pid, url } = JSON.parse(readFileSync(PID_FILE, 'utf8')) as { pid: number; url: string };
    process.kill(pid, 0);
    return { pid, url };
  } catch {
    return null;
  }
}

async function main(): Promise<void> {
  const embedded = !process.env.DATABASE_URL;
  let config;
  try {
    config = readConfig({ NODE_ENV: 'production', DEV_MAILBOX: '1', ...process.env });
  } catch (error) {
    fail(error instanceof Error ? error.message : String(error));
  }
  const url = `http://${config.HOST}:${config.PORT}`;

  const other = runningInstance();
  if (other)
    fail(
      `Sumpwise is already running at ${other.url} (pid ${other.pid}); stop it first (Ctrl-C in its terminal, or kill ${other.pid}).`,
    );
  if (await isPortOpen(config.HOST, config.PORT))
    fail(
      `port ${config.PORT} on ${config.HOST} is already in use by another program: stop it or choose another port, e.g. PORT=4400 npm start`,
    );

  mkdirSync(path.join(ROOT, '.data'), { recursive: true });
  writeFileSync(PID_FILE, JSON.stringify({ pid: process.pid, url }));
  ownsPidFile = true;

  const databaseUrl = embedded ? ensureEmbeddedDatabase('sumpwise') : config.DATABASE_URL;
  await assertReachable(databaseUrl);
  await migrateToLatest(databaseUrl, false);
  const db = createDb(databaseUrl, { max: 2 });
  let seededNow = false;
  try {
    if (await isDatabaseEmpty(db)) {
      console.log(`[seed] demo data loaded: ${await seedDemo(db)}`);
      seededNow = true;
    }
  } finally {
    await db.destroy();
  }
  buildIfNeeded();

  const env: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: databaseUrl,
    HOST: config.HOST,
    PORT: String(config.PORT),
    PUBLIC_URL: process.env.PUBLIC_URL ?? url,
    DEV_MAILBOX: process.env.DEV_MAILBOX ?? '1',
    ASTRO_TELEMETRY_DISABLED: '1',
  };
  const node = process.execPath;
  const smtp = new URL(config.SMTP_URL);
  const localRelay = ['127.0.0.1', 'localhost'].includes(smtp.hostname) && !process.env.SMTP_URL;
  if (localRelay && existsSync(path.join(ROOT, 'scripts/mail-relay.ts'))) {
    if (await isPortOpen(smtp.hostname, Number(smtp.port || 25)))
      fail(`port ${smtp.port} for the local mail relay is in use: stop that program or set SMTP_URL`);
    children.push(startService('mail', node, ['--import', 'tsx', 'scripts/mail-relay.ts'], env));
  }
  // Photos go to the S3 API. An endpoint on loopback with nothing listening gets the local fake (objects under
  // .data/object-store); one already answering there (a store of your own) is used as it is.
  const s3 = new URL(config.S3_ENDPOINT);
  const s3Port = Number(s3.port || 80);
  if (config.PHOTO_STORE === 's3' && ['127.0.0.1', 'localhost'].includes(s3.hostname)) {
    if (await isPortOpen(s3.hostname, s3Port)) {
      console.log(
        `[start] photos go to the object store already answering at ${config.S3_ENDPOINT} (bucket ${config.S3_BUCKET})`,
      );
    } else {
      children.push(startService('object-store', node, ['--import', 'tsx', 'scripts/object-store.ts'], env));
      await waitFor(() => isPortOpen(s3.hostname, s3Port), 30_000, 'the local object store');
    }
  }
  if (existsSync(path.join(ROOT, 'scripts/worker.ts'))) children.push(startService('worker', node, WORKER_ARGS, env));
  const server = startService('app', node, SERVE_ARGS, env, true);
  children.push(server);
  server.once('exit', (code) => {
    if (!stopping) fail(`the app server stopped unexpectedly (exit ${code})`);
  });

  await waitFor(() => httpOk(`${url}/api/health`), 30_000, 'the app server');
  // First start of the demo: the invented lab mails a report, so a preview link waits in the local mailbox.
  if (seededNow && localRelay) {
    const mailDb = createDb(databaseUrl, { max: 1 });
    try {
      await waitFor(() => isPortOpen(smtp.hostname, Number(smtp.port || 25)), 30_000, 'the local mail relay');
      console.log(
        `[demo] ${await sendDemoLabMail(mailDb, { smtpUrl: config.SMTP_URL, domain: config.INBOUND_MAIL_DOMAIN })}`,
      );
    } catch (error) {
      console.log(
        `[demo] the demo lab mail could not be sent: ${error instanceof Error ? error.message : String(error)}`,
      );
    } finally {
      await mailDb.destroy();
    }
  }
  const seconds = ((performance.now() - started) / 1000).toFixed(1);
  console.log(`\nSumpwise is running at ${url}  (ready in ${seconds} s; Ctrl-C stops it)\n`);
}

let stopping = false;
async function shutdown(code = 0): Promise<void> {
  if (stopping) return;
  stopping = true;
  // The worker may need up to 30 s to finish a running job; stopping it sooner risks a resend.
  for (const child of children.reverse()) await stopService(child, 35_000);
  if (ownsPidFile) rmSync(PID_FILE, { force: true });
  if (children.length > 0) console.log('[start] stopped (the database keeps running; `npm run db stop` stops it)');
  process.exit(code);
}
process.on('SIGINT', () => void shutdown(0));
process.on('SIGTERM', () => void shutdown(0));
process.on('exit', () => {
  if (ownsPidFile) rmSync(PID_FILE, { force: true });
  for (const child of children) if (child.exitCode === null) child.kill('SIGTERM');
});

main().catch((error: unknown) => {
  console.error(`[start] ${error instanceof Error ? error.message : String(error)}`);
  void shutdown(1);
});
