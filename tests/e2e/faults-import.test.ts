// Faults around writes, against the built app on a database of this file's own: the server killed (SIGKILL)
// halfway through a lab import's confirm, and photo uploads onto a full or unusable upload folder.
import { execFileSync } from 'node:child_process';
import { randomFillSync } from 'node:crypto';
import { mkdirSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { sql, type Kysely } from 'kysely';
import { PNG } from 'pngjs';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import { DEMO_ACCOUNTS, DEMO_SCHOOL_NAME } from '../../sample-data/seed-accounts';
import { startApp, type RunningApp } from './helpers/server';
import { sessionCookieFor } from './helpers/sign-in';

const MACHINES = 10;
const SAMPLES_PER_MACHINE = 300;
const ROWS = MACHINES * SAMPLES_PER_MACHINE;
const MEASURANDS = ['Fe', 'Al', 'Cu', 'Si', 'Na', 'Zn', 'KV100'];

let app: RunningApp;
let db: Kysely<Database>;
let cookie: string;
let uploadDir: string;
let tmpfsMounted = false;

const lead = DEMO_ACCOUNTS.find((a) => a.key === 'lead')!;

/** Every file under `dir` (recursively), as paths relative to it. */
function listFiles(dir: string): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...listFiles(full).map((f) => path.join(entry.name, f)));
    else out.push(entry.name);
  }
  return out;
}

/** A PNG of random pixels (does not compress), `side` pixels square. */
function noisyPng(side: number): Uint8Array {
  const png = new PNG({ width: side, height: side });
  randomFillSync(png.data);
  return new Uint8Array(PNG.sync.write(png));
}

async function postPhoto(bytes: Uint8Array, name: string, type = 'image/png'): Promise<Response> {
  const form = new FormData();
  form.append('file', new Blob([Buffer.from(bytes)], { type }), name);
  return fetch(`${app.baseUrl}/api/photos`, {
    method: 'POST',
    headers: { cookie, origin: app.baseUrl, accept: 'application/json' },
    body: form,
  });
}

async function photoRows(): Promise<number> {
  return Number((await sql<{ n: string }>`select count(*)::text as n from photos`.execute(db)).rows[0]!.n);
}

describe('faults around writes', () => {
  beforeAll(async () => {
    app = await startApp('sumpwise_faults_import', { seed: true, photoStore: 'disk' });
    db = createDb(app.databaseUrl, { max: 2 });
    cookie = await sessionCookieFor(app.baseUrl, lead.email, lead.password);
    uploadDir = app.env.UPLOAD_DIR!;
  });
  afterAll(async () => {
    if (tmpfsMounted) execFileSync('umount', [uploadDir]);
    await db?.destroy();
    await app?.stop();
  });

  test('the server killed mid-confirm leaves the whole import or nothing; confirming again after the restart writes it once', async () => {
    // Invented machines in the demo school with shipped samples waiting for results, one lab row for each.
    const crew = await db
      .selectFrom('crews')
      .select('id')
      .where('name', '=', DEMO_SCHOOL_NAME)
      .executeTakeFirstOrThrow();
    const owner = await db.selectFrom('users').select('id').where('email', '=', lead.email).executeTakeFirstOrThrow();
    await sql`
      insert into machines (crew_id, owner_user_id, name, engine_layout, cooling, meter, recommended_grades, max_interval_distance)
      select ${crew.id}, ${owner.id}, 'Fault bike ' || n, 'single', 'liquid', 'km', '[]'::jsonb, 3000 from generate_series(1, ${MACHINES}) n`.execute(
      db,
    );
    await sql`
      insert into samples (crew_id, machine_id, bottle_code, bottle_code_norm, drawn_on, odometer, distance_on_oil, sae_grade, state, created_by)
      select m.crew_id, m.id, c, c, date '2024-01-01' + i * 3, 1500 * (i + 1), 1400, '10W-40', 'shipped', ${owner.id}
      from machines m, generate_series(0, ${SAMPLES_PER_MACHINE - 1}) i,
        lateral (select 'KILL' || substring(m.name from 12) || 'N' || lpad(i::text, 4, '0') as c) code
      where m.name like 'Fault bike %'`.execute(db);
    const codes = (
      await sql<{
        c: string;
        d: string;
      }>`select bottle_code as c, drawn_on::text as d from samples where bottle_code like 'KILL%' order by bottle_code`.execute(
        db,
      )
    ).rows;
    expect(codes).toHaveLength(ROWS);
    const csv = [
      `Bottle,Sampled,${MEASURANDS.join(',')}`,
      ...codes.map((r, i) => `${r.c},${r.d},${20 + (i % 9)},${4 + (i % 3)},5,${7 + (i % 5)},3,1100,14.1`),
    ].join('\n');

    const form = new FormData();
    form.append('file', new Blob([csv], { type: 'text/csv' }), 'kill-halfway.csv');
    const uploaded = await fetch(`${app.baseUrl}/api/imports`, {
      method: 'POST',
      headers: { cookie, origin: app.baseUrl, accept: 'application/json' },
      body: form,
    });
    expect(uploaded.status).toBe(201);
    const { labFileId } = (await uploaded.json()) as { labFileId: string };

    const confirm = () =>
      fetch(`${app.baseUrl}/api/imports/${labFileId}/confirm`, {
        method: 'POST',
        headers: { cookie, origin: app.baseUrl, 'content-type': 'application/json' },
        body: '{"decisions":{}}',
      });
    // Start the confirm and wait until its transaction has written readings (a row lock on the readings table held
    // by the app's connection), then kill the server while the findings are still being computed.
    let settled = false;
    const inFlight = confirm().then(
      (r) => {
        settled = true;
        return r.status;
      },
      () => {
        settled = true;
        return 0;
      },
    );
    const writingReadings = async () =>
      Number(
        (
          await sql<{ n: string }>`
      select count(*)::text as n from pg_locks l join pg_class c on c.oid = l.relation
      where c.relname = 'readings' and l.mode = 'RowExclusiveLock' and l.pid <> pg_backend_pid()`.execute(db)
        ).rows[0]!.n,
      ) > 0;
    const deadline = Date.now() + 30_000;
    let caught = false;
    while (!settled && Date.now() < deadline) {
      if (await writingReadings()) {
        caught = true;
        break;
      }
      await new Promise((r) => setTimeout(r, 5));
    }
    expect(caught, 'the confirm finished (or never wrote) before it could be interrupted: make the import larger').toBe(
      true,
    );
    await app.restartServer();
    expect(await inFlight).toBe(0); // the client saw the connection drop, not an answer

    // PostgreSQL rolls the dead connection's transaction back once it notices the socket is gone.
    const gone = Date.now() + 15_000;
    while (await writingReadings()) {
      if (Date.now() > gone) throw new Error('the killed import still holds its locks after 15 s');
      await new Promise((r) => setTimeout(r, 50));
    }
    const state = async () =>
      (
        await sql<{
          readings: string;
          imports: string;
          results: string;
          events: string;
          findings: string;
          calls: string;
        }>`
      select
        (select count(*) from readings r join samples s on s.id = r.sample_id where s.bottle_code like 'KILL%')::text as readings,
        (select count(*) from lab_imports where lab_file_id = ${labFileId})::text as imports,
        (select count(*) from samples where bottle_code like 'KILL%' and state <> 'shipped')::text as results,
        (select count(*) from sample_events e join samples s on s.id = e.sample_id where s.bottle_code like 'KILL%')::text as events,
        (select count(*) from findings f join samples s on s.id = f.sample_id where s.bottle_code like 'KILL%')::text as findings,
        (select count(*) from interval_calls ic join samples s on s.id = ic.sample_id where s.bottle_code like 'KILL%')::text as calls
    `.execute(db)
      ).rows[0]!;
    expect(await state()).toEqual({
      readings: '0',
      imports: '0',
      results: '0',
      events: '0',
      findings: '0',
      calls: '0',
    });

    // The kept file is still there and confirms once after the restart; a second confirm writes nothing.
    const again = await confirm();
    expect(again.status).toBe(201);
    expect((await again.json()) as { samplesWritten: number; readingsWritten: number }).toMatchObject({
      samplesWritten: ROWS,
      readingsWritten: ROWS * MEASURANDS.length,
    });
    const after = await state();
    expect(after).toMatchObject({ readings: String(ROWS * MEASURANDS.length), imports: '1', results: String(ROWS) });
    expect(Number(after.calls)).toBeGreaterThan(0);
    const twice = await confirm();
    expect(twice.status).toBe(409);
    expect(((await twice.json()) as { error: { code: string } }).error.code).toBe('already_imported');
    expect((await state()).readings).toBe(String(ROWS * MEASURANDS.length));
  }, 180_000);

  test('a full upload disk: a clear 507 for the photo, no photos row and no half-written file; a small photo still fits', async () => {
    // As root a 64 KiB tmpfs is mounted over the app's upload folder (the server resolves the folder on each write).
    try {
      execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=64k', 'tmpfs', uploadDir], { stdio: 'pipe' });
      tmpfsMounted = true;
    } catch (e) {
      console.warn(
        `[faults-import] tmpfs mount refused (${(e as Error).message.split('\n')[0]}): the full-disk case is skipped; the unusable-folder case below still runs`,
      );
      return;
    }
    try {
      const before = await photoRows();
      const big = noisyPng(256); // ~260 KB: more than the tmpfs holds
      expect(big.byteLength).toBeGreaterThan(128 * 1024);
      const res = await postPhoto(big, 'cover-bolts.png');
      expect(res.status).toBe(507);
      const body = (await res.json()) as { error: { code: string; message: string } };
      expect(body.error.code).toBe('storage_full');
      expect(body.error.message).toMatch(/no room/i);
      expect(body.error.message).not.toMatch(/ENOSPC|at .*\(|\/work\//); // words for a person, no errno or stack or path
      expect(await photoRows()).toBe(before);
      expect(listFiles(uploadDir)).toEqual([]);

      const small = noisyPng(8);
      const ok = await postPhoto(small, 'washer.png');
      expect(ok.status).toBe(201);
      expect(await photoRows()).toBe(before + 1);
      expect(listFiles(uploadDir)).toHaveLength(1);
      expect(listFiles(uploadDir)[0]).not.toMatch(/\.part$/);
    } finally {
      execFileSync('umount', [uploadDir]);
      tmpfsMounted = false;
    }
  });

  test('an unusable upload folder (a file where the folder should be): a clear 503, no photos row', async () => {
    // Root ignores permission bits, so a read-only folder would not fail; a plain file in its place does (ENOTDIR).
    rmSync(uploadDir, { recursive: true, force: true });
    writeFileSync(uploadDir, 'not a folder');
    try {
      const before = await photoRows();
      const res = await postPhoto(noisyPng(8), 'gasket.png');
      expect(res.status).toBe(503);
      const body = (await res.json()) as { error: { code: string; message: string } };
      expect(body.error.code).toBe('storage_unavailable');
      expect(body.error.message).not.toMatch(/ENOTDIR|EEXIST|\/work\//);
      expect(await photoRows()).toBe(before);
      expect(statSync(uploadDir).isFile()).toBe(true);
    } finally {
      rmSync(uploadDir, { force: true });
      mkdirSync(uploadDir, { recursive: true });
    }
  });
});
