// Starts the built app for end-to-end tests on its own database, with the local mail relay, the local object
// store (photos) and the job worker. Used by the e2e global setup and by benchmarks.
import { existsSync, mkdirSync, rmSync } from 'node:fs';
import path from 'node:path';
import type { ChildProcess } from 'node:child_process';
import { createDb } from '~/lib/db/db';
import { seedDemo } from '../../../sample-data/seed';
import { migrateToLatest, recreateEmbeddedDatabase } from '../../../scripts/lib/database';
import { buildIfNeeded, SERVE_ARGS, WORKER_ARGS } from '../../../scripts/lib/build';
import { ROOT, freePort, httpOk, isPortOpen, startService, stopService, waitFor } from '../../../scripts/lib/processes';

export interface RunningApp {
  baseUrl: string;
  databaseUrl: string;
  smtpPort: number;
  env: NodeJS.ProcessEnv;
  /**
   * Starts one more app server (its own supervisor) on `port` over the same database, object store and worker, with
   * `settings` over the first one's environment.
   */
  startAnotherServer(
    port: number,
    appProcesses?: number,
    settings?: Record<string, string>,
  ): Promise<{ baseUrl: string; pid: number; stop(): Promise<void> }>;
  stop(): Promise<void>;
  /** Kills and restarts only the app server (for fault tests). */
  restartServer(): Promise<void>;
}

/** Recreates database `dbName`, migrates and seeds it, builds if needed, and serves the app on a free port. */
export async function startApp(
  dbName = 'sumpwise_e2e',
  // One app process by default: tests run on a shared 2-core machine; the two-process test and the bench ask for more.
  options: { seed?: boolean; appProcesses?: number; photoStore?: 's3' | 'disk' } = {},
): Promise<RunningApp> {
  const databaseUrl = recreateEmbeddedDatabase(dbName);
  await migrateToLatest(databaseUrl, false);
  if (options.seed !== false) {
    const db = createDb(databaseUrl, { max: 2 });
    try {
      await seedDemo(db);
    } finally {
      await db.destroy();
    }
  }
  buildIfNeeded();
  const [port, smtpPort, s3Port] = [await freePort(), await freePort(), await freePort()];
  const uploads = path.join(ROOT, '.data', `${dbName}-uploads`);
  const objects = path.join(ROOT, '.data', `${dbName}-objects`);
  for (const dir of [uploads, objects]) {
    rmSync(dir, { recursive: true, force: true });
    mkdirSync(dir, { recursive: true });
  }
  const baseUrl = `http://127.0.0.1:${port}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: 'production',
    DATABASE_URL: databaseUrl,
    HOST: '127.0.0.1',
    PORT: String(port),
    PUBLIC_URL: baseUrl,
    SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
    DEV_MAILBOX: '1',
    UPLOAD_DIR: uploads,
    PHOTO_STORE: options.photoStore ?? 's3',
    S3_ENDPOINT: `http://127.0.0.1:${s3Port}`,
    APP_PROCESSES: String(options.appProcesses ?? 1),
    ASTRO_TELEMETRY_DISABLED: '1',
  };
  const node = process.execPath;
  const children: ChildProcess[] = [];
  if (existsSync(path.join(ROOT, 'scripts/mail-relay.ts')))
    children.push(startService('mail', node, ['--import', 'tsx', 'scripts/mail-relay.ts'], env, true));
  children.push(startService('object-store', node, ['--import', 'tsx', 'scripts/object-store.ts', objects], env, true));
  await waitFor(() => isPortOpen('127.0.0.1', s3Port), 30_000, 'the local object store');
  if (existsSync(path.join(ROOT, 'scripts/worker.ts')))
    children.push(startService('worker', node, WORKER_ARGS, env, true));
  let server = startService('app', node, SERVE_ARGS, env, true);
  await waitFor(() => httpOk(`${baseUrl}/api/health`), 30_000, 'the app server');
  return {
    baseUrl,
    databaseUrl,
    smtpPort,
    env,
    async startAnotherServer(otherPort, appProcesses = 1, settings = {}) {
      const other = startService(
        'app',
        node,
        SERVE_ARGS,
        { ...env, ...settings, PORT: String(otherPort), APP_PROCESSES: String(appProcesses) },
        true,
      );
      const otherUrl = `http://127.0.0.1:${otherPort}`;
      await waitFor(() => httpOk(`${otherUrl}/api/health`), 30_000, 'the second app server');
      return { baseUrl: otherUrl, pid: other.pid!, stop: () => stopService(other) };
    },
    async stop() {
      await stopService(server);
      for (const c of children.reverse()) await stopService(c);
    },
    async restartServer() {
      server.kill('SIGKILL');
      await new Promise((r) => server.once('exit', r));
      server = startService('app', node, SERVE_ARGS, env, true);
      await waitFor(() => httpOk(`${baseUrl}/api/health`), 30_000, 'the app server');
    },
  };
}
