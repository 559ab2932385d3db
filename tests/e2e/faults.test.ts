// Faults on a PostgreSQL cluster of this file's own (its own port and data folder), so restarting it
// cannot disturb the database the other end-to-end files use.
import { execFile, execFileSync } from 'node:child_process';
import { promisify } from 'node:util';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { freePort } from '../../scripts/lib/processes';
import { startApp, type RunningApp } from './helpers/server';
import { sessionCookieFor } from './helpers/sign-in';
import { createDb } from '~/lib/db/db';
import { hashPassword } from '~/lib/auth/password';

const dbSh = path.resolve(new URL('../../scripts/db.sh', import.meta.url).pathname);
const execFileAsync = promisify(execFile);
let app: RunningApp;
let pgDir: string;

/** Calls /api/health once and returns the status (0 when the request itself failed). */
async function healthStatus(baseUrl: string): Promise<number> {
  try {
    return (await fetch(`${baseUrl}/api/health`, { signal: AbortSignal.timeout(4_000) })).status;
  } catch {
    return 0;
  }
}

describe('faults', () => {
  beforeAll(async () => {
    pgDir = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-faults-pg-'));
    execFileSync('chmod', ['755', pgDir]);
    process.env.SUMPWISE_PG_DIR = pgDir;
    process.env.SUMPWISE_PG_PORT = String(await freePort());
    app = await startApp('sumpwise_faults', { seed: false });
  });
  afterAll(async () => {
    await app?.stop();
    execFileSync('bash', [dbSh, 'stop'], { stdio: 'ignore' });
    rmSync(pgDir, { recursive: true, force: true });
  });

  test('the database restarted under traffic: 503 while it is down, recovered by itself within seconds', async () => {
    expect(await healthStatus(app.baseUrl)).toBe(200);

    // Traffic keeps flowing throughout: a loop of requests records every status it sees.
    const seen: number[] = [];
    let running = true;
    const traffic = (async () => {
      while (running) {
        seen.push(await healthStatus(app.baseUrl));
        await new Promise((r) => setTimeout(r, 50));
      }
    })();

    // An account, so a page behind a session (which reads the database on every request) can be asked for.
    const db = createDb(app.databaseUrl, { max: 1 });
    await db
      .insertInto('users')
      .values({
        id: 'faults-rider',
        email: 'faults@example.test',
        display_name: 'Faults',
        password_hash: await hashPassword('faults test password'),
        email_verified_at: new Date(),
      })
      .execute();
    await db.destroy();
    const signedIn = await sessionCookieFor(app.baseUrl, 'faults@example.test', 'faults test password');
    // Asynchronously, so the traffic loop keeps running while the server goes down.
    await execFileAsync('bash', [dbSh, 'stop']);
    await new Promise((r) => setTimeout(r, 1_000));
    const downStatus = await healthStatus(app.baseUrl);
    expect(downStatus).toBe(503);
    const body = (await (await fetch(`${app.baseUrl}/api/health`)).json()) as {
      status: string;
      database: { reachable: boolean; reason?: string };
    };
    expect(body.status).toBe('unavailable');
    expect(body.database.reachable).toBe(false);
    // The raw error (host, port, errno) stays in the server log.
    expect(body.database.reason).toBeUndefined();
    expect(JSON.stringify(body)).not.toMatch(/ECONN|127\.0\.0\.1|connect|terminat/i);
    // Pages behind a session answer the friendly 503 page, not a 500.
    const page = await fetch(`${app.baseUrl}/`, { headers: { cookie: signedIn }, redirect: 'manual' });
    expect(page.status).toBe(503);
    expect(page.headers.get('retry-after')).toBe('30');
    expect(await page.text()).toContain('cannot reach its database right now');

    await execFileAsync('bash', [dbSh, 'start']);
    const back = Date.now();
    let recovered = false;
    while (Date.now() - back < 10_000) {
      if ((await healthStatus(app.baseUrl)) === 200) {
        recovered = true;
        break;
      }
      await new Promise((r) => setTimeout(r, 100));
    }
    running = false;
    await traffic;
    expect(recovered).toBe(true);
    // The app itself never failed: only 200 (up) and 503 (database down), no 500s, no dropped requests.
    expect(new Set(seen.filter((s) => s !== 200 && s !== 503))).toEqual(new Set());
    expect(seen).toContain(503);
  });

  test('starting the same data folder on another port says which server holds it, and leaves it running', async () => {
    const port = process.env.SUMPWISE_PG_PORT!;
    const other = String(await freePort());
    const refused = await execFileAsync('bash', [dbSh, 'start'], {
      env: { ...process.env, SUMPWISE_PG_PORT: other },
    }).then(
      () => null,
      (error: { code?: number; stderr?: string }) => error,
    );
    expect(refused?.code).toBe(1);
    expect(refused?.stderr).toContain('already served by PostgreSQL');
    expect(refused?.stderr).toContain(`on port ${port}; use SUMPWISE_PG_PORT=${port}`);
    expect(await healthStatus(app.baseUrl)).toBe(200);
  });
});
