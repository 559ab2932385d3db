// Two app servers on two ports over one database, one object store and one worker, as several machines behind
// a load balancer would run: nothing a request leaves behind may live in one process. Plain HTTP (fetch) is
// enough here: what is proved is where state lives, not how a page looks.
import { execFileSync } from 'node:child_process';
import { createHash, randomFillSync, randomUUID } from 'node:crypto';
import { sql, type Kysely } from 'kysely';
import { PNG } from 'pngjs';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import { DEMO_ACCOUNTS, DEMO_SCHOOL_NAME } from '../../sample-data/seed-accounts';
import { freePort } from '../../scripts/lib/processes';
import { startApp, type RunningApp } from './helpers/server';
import { sessionCookieFor } from './helpers/sign-in';

let app: RunningApp;
let other: { baseUrl: string; pid: number; stop(): Promise<void> };
let db: Kysely<Database>;
let A: string;
let B: string;

const lead = DEMO_ACCOUNTS.find((a) => a.key === 'lead')!;
const riderB = DEMO_ACCOUNTS.find((a) => a.key === 'riderB')!;

beforeAll(async () => {
  app = await startApp('sumpwise_two_processes', { seed: true });
  // The second machine runs its supervisor with two app processes (cluster, one port), as `npm start` does on two cores.
  other = await app.startAnotherServer(await freePort(), 2);
  db = createDb(app.databaseUrl, { max: 2 });
  [A, B] = [app.baseUrl, other.baseUrl];
});
afterAll(async () => {
  await other?.stop();
  await db?.destroy();
  await app?.stop();
});

const json = (cookie: string, origin: string) => ({
  cookie,
  origin,
  'content-type': 'application/json',
  accept: 'application/json',
});

async function signIn(base: string, email: string, password: string): Promise<number> {
  const res = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  await res.arrayBuffer();
  return res.status;
}

/** A PNG of random pixels (does not compress): 1,200 × 1,200 RGBA is about 5.5 MB. */
function noisyPng(side: number): Buffer {
  const png = new PNG({ width: side, height: side });
  randomFillSync(png.data);
  return PNG.sync.write(png);
}

describe('two app servers, one database, one object store, one worker', () => {
  test('the two are separate servers on separate ports; the second runs two app processes under its supervisor', async () => {
    expect(A).not.toBe(B);
    for (const base of [A, B]) expect((await fetch(`${base}/api/health`)).status).toBe(200);
    const children = execFileSync('pgrep', ['-P', String(other.pid)])
      .toString()
      .trim()
      .split('\n')
      .filter(Boolean);
    expect(children).toHaveLength(2);
    // Twenty requests at once are all answered by the pair.
    const statuses = await Promise.all(
      Array.from({ length: 20 }, () => fetch(`${B}/api/health`).then((r) => r.status)),
    );
    expect(statuses.every((s) => s === 200)).toBe(true);
  });

  test('a session made on one is valid on the other, and signing out on the other ends it on both', async () => {
    const cookie = await sessionCookieFor(A, lead.email, lead.password);
    const me = await fetch(`${B}/api/auth/me`, { headers: { cookie } });
    expect(me.status).toBe(200);
    expect(JSON.stringify(await me.json())).toContain(lead.email);
    const out = await fetch(`${B}/api/auth/sign-out`, { method: 'POST', headers: { cookie, origin: B } });
    expect(out.status).toBe(204);
    for (const base of [A, B]) expect((await fetch(`${base}/api/auth/me`, { headers: { cookie } })).status).toBe(401);
  });

  test('a rate limit counted on one holds on the other: five wrong passwords spread over both, then even the right one waits', async () => {
    // signInAccountIp allows five wrong passwords per account and address (src/lib/rate-limit/rate-limits.ts).
    const statuses: number[] = [];
    for (const base of [A, B, A, B, A]) statuses.push(await signIn(base, riderB.email, 'not the password at all'));
    expect(statuses).toEqual([401, 401, 401, 401, 401]);
    expect(await signIn(B, riderB.email, riderB.password)).toBe(429);
    expect(await signIn(A, riderB.email, riderB.password)).toBe(429);
  });

  test('a photo uploaded to one is served by the other, byte for byte, streamed (5 MB+, chunked request body)', async () => {
    const cookie = await sessionCookieFor(A, lead.email, lead.password);
    const bytes = noisyPng(1200);
    expect(bytes.byteLength).toBeGreaterThan(5 * 1024 * 1024);
    const boundary = `----two-processes-${randomUUID()}`;
    const head = Buffer.from(
      `--${boundary}\r\ncontent-disposition: form-data; name="file"; filename="cover.jpg"\r\ncontent-type: image/jpeg\r\n\r\n`,
    );
    const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
    // A ReadableStream body has no length: the request goes out chunked, 64 KB at a time.
    const parts = [
      head,
      ...Array.from({ length: Math.ceil(bytes.byteLength / 65536) }, (_, i) =>
        bytes.subarray(i * 65536, (i + 1) * 65536),
      ),
      tail,
    ];
    const body = new ReadableStream<Uint8Array>({
      pull(c) {
        const next = parts.shift();
        if (next) c.enqueue(next);
        else c.close();
      },
    });
    const up = await fetch(`${A}/api/photos`, {
      method: 'POST',
      headers: {
        cookie,
        origin: A,
        accept: 'application/json',
        'content-type': `multipart/form-data; boundary=${boundary}`,
      },
      body,
      duplex: 'half',
    } as RequestInit);
    expect(up.status).toBe(201);
    const { photo } = (await up.json()) as { photo: { url: string; contentType: string; sha256: string } };
    // The name said .jpg and the part said image/jpeg: the bytes say PNG, and PNG is what is kept.
    expect(photo.contentType).toBe('image/png');
    expect(photo.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    const served = await fetch(`${B}${photo.url}`, { headers: { cookie } });
    expect(served.status).toBe(200);
    expect(served.headers.get('content-type')).toBe('image/png');
    expect(Number(served.headers.get('content-length'))).toBe(bytes.byteLength);
    expect(
      createHash('sha256')
        .update(Buffer.from(await served.arrayBuffer()))
        .digest('hex'),
    ).toBe(photo.sha256);
    expect(
      (await fetch(`${A}${photo.url}`, { headers: { cookie, 'if-none-match': `"${photo.sha256}"` } })).status,
    ).toBe(304);
  });

  test.each([
    {
      name: 'an HTML page sent as image/png',
      part: 'image/png',
      bytes: () => Buffer.from('<!doctype html><script>alert(document.cookie)</script>'),
      status: 415,
    },
    {
      name: 'a chunked body of 40 MB',
      part: 'image/jpeg',
      bytes: () => Buffer.concat([Buffer.from([0xff, 0xd8, 0xff]), Buffer.alloc(40 * 1024 * 1024)]),
      status: 413,
    },
  ])('$name is refused on either server and nothing is stored', async ({ part, bytes, status }) => {
    const cookie = await sessionCookieFor(B, lead.email, lead.password);
    const before = Number((await sql<{ n: string }>`select count(*)::text as n from photos`.execute(db)).rows[0]!.n);
    const b = bytes();
    const boundary = `----attack-${randomUUID()}`;
    const chunks = [
      Buffer.from(
        `--${boundary}\r\ncontent-disposition: form-data; name="file"; filename="x.png"\r\ncontent-type: ${part}\r\n\r\n`,
      ),
      b,
      Buffer.from(`\r\n--${boundary}--\r\n`),
    ];
    const body = new ReadableStream<Uint8Array>({
      pull(c) {
        const next = chunks.shift();
        if (next) c.enqueue(next);
        else c.close();
      },
    });
    const res = await fetch(`${B}/api/photos`, {
      method: 'POST',
      headers: {
        cookie,
        origin: B,
        accept: 'application/json',
        'content-type': `multipart/form-data; boundary=${boundary}`,
      },
      body,
      duplex: 'half',
    } as RequestInit);
    expect(res.status).toBe(status);
    expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(
      status === 415 ? /not a photo/ : /at most 10 MB/,
    );
    expect(Number((await sql<{ n: string }>`select count(*)::text as n from photos`.execute(db)).rows[0]!.n)).toBe(
      before,
    );
  });

  test('an import confirmed on both at once runs once, and what it wrote is seen on the other', async () => {
    const cookie = await sessionCookieFor(A, lead.email, lead.password);
    const crew = await db
      .selectFrom('crews')
      .select('id')
      .where('name', '=', DEMO_SCHOOL_NAME)
      .executeTakeFirstOrThrow();
    const owner = await db.selectFrom('users').select('id').where('email', '=', lead.email).executeTakeFirstOrThrow();
    const machine = (
      await sql<{ id: string }>`
      insert into machines (crew_id, owner_user_id, name, engine_layout, cooling, meter, recommended_grades, max_interval_distance)
      values (${crew.id}, ${owner.id}, 'Two-server bike', 'single', 'liquid', 'km', '[]'::jsonb, 3000) returning id`.execute(
        db,
      )
    ).rows[0]!;
    await sql`
      insert into samples (crew_id, machine_id, bottle_code, bottle_code_norm, drawn_on, odometer, distance_on_oil, sae_grade, state, created_by)
      select ${crew.id}, ${machine.id}, 'TWOSRV' || lpad(i::text, 3, '0'), 'TWOSRV' || lpad(i::text, 3, '0'), date '2024-01-01' + i * 20, 1500 * (i + 1), 1400, '10W-40', 'shipped', ${owner.id}
      from generate_series(0, 5) i`.execute(db);
    const csv = [
      'Bottle,Sampled,Fe,Al,Cu,Si',
      ...Array.from({ length: 6 }, (_, i) => {
        const day = new Date(Date.UTC(2024, 0, 1 + i * 20)).toISOString().slice(0, 10);
        return `TWOSRV${String(i).padStart(3, '0')},${day},${20 + i},4,5,7`;
      }),
    ].join('\n');
    const form = new FormData();
    form.append('file', new Blob([csv], { type: 'text/csv' }), 'two-servers.csv');
    const up = await fetch(`${A}/api/imports`, {
      method: 'POST',
      headers: { cookie, origin: A, accept: 'application/json' },
      body: form,
    });
    expect(up.status).toBe(201);
    const { labFileId } = (await up.json()) as { labFileId: string };
    const confirm = (base: string) =>
      fetch(`${base}/api/imports/${labFileId}/confirm`, {
        method: 'POST',
        headers: json(cookie, base),
        body: '{"decisions":{}}',
      });
    const answers = await Promise.all([confirm(A), confirm(B)]);
    expect(answers.map((r) => r.status).sort()).toEqual([201, 409]);
    const readings = await sql<{
      n: string;
    }>`select count(*)::text as n from readings r join samples s on s.id = r.sample_id where s.machine_id = ${machine.id}`.execute(
      db,
    );
    expect(readings.rows[0]!.n).toBe(String(6 * 4));
    expect(
      (await db.selectFrom('lab_imports').select('id').where('lab_file_id', '=', labFileId).execute()).length,
    ).toBe(1);
    // The other server sees the results at once: nothing cached in the process that wrote them.
    const samples = await fetch(`${B}/api/samples?state=results_in`, {
      headers: { cookie, accept: 'application/json' },
    });
    expect(samples.status).toBe(200);
    expect((JSON.stringify(await samples.json()).match(/TWOSRV00\d/g) ?? []).length).toBeGreaterThanOrEqual(6);
  });

  test('an offline-queued oil change sent to both at once (a replay after a lost answer) is written once', async () => {
    const cookie = await sessionCookieFor(A, lead.email, lead.password);
    const machine = await db
      .selectFrom('machines')
      .innerJoin('crews', 'crews.id', 'machines.crew_id')
      .select('machines.id')
      .where('crews.name', '=', DEMO_SCHOOL_NAME)
      .where('machines.name', '=', 'Two-server bike')
      .executeTakeFirstOrThrow();
    const clientKey = randomUUID();
    const payload = JSON.stringify({ changedOn: '2024-06-01', odometer: '12000', saeGrade: '10W-40', clientKey });
    const send = (base: string) =>
      fetch(`${base}/api/machines/${machine.id}/oil-changes`, {
        method: 'POST',
        headers: json(cookie, base),
        body: payload,
      });
    const answers = await Promise.all([send(A), send(B), send(A), send(B)]);
    const statuses = answers.map((r) => r.status);
    expect(statuses.filter((s) => s === 201)).toHaveLength(1);
    expect(statuses.filter((s) => s === 200)).toHaveLength(3);
    const ids = new Set(
      await Promise.all(answers.map(async (r) => (await r.json()) as { oilChange?: { id: string }; id?: string })).then(
        (xs) => xs.map((x) => x.oilChange?.id ?? x.id),
      ),
    );
    expect(ids.size).toBe(1);
    expect((await db.selectFrom('oil_changes').select('id').where('client_key', '=', clientKey).execute()).length).toBe(
      1,
    );
  });

  test('mail queued through both servers is delivered once each by the one worker', async () => {
    // Two reset requests, one on each server, for two accounts: each writes its outbox row and wakes the
    // worker; each message must reach the relay exactly once, however many wake-ups it gets.
    const targets = [
      { base: A, email: lead.email },
      { base: B, email: DEMO_ACCOUNTS.find((a) => a.key === 'mechanic')!.email },
    ];
    for (const t of targets) {
      const res = await fetch(`${t.base}/forgot-password`, {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded', origin: t.base },
        body: new URLSearchParams({ email: t.email }),
      });
      expect(res.status).toBe(200);
      expect(await res.text()).toContain('a link to choose a new password is on its way');
    }
    const outbox = async () =>
      (
        await sql<{ message_id: string; sent: boolean }>`
      select message_id, sent_at is not null as sent from mail_outbox where kind = 'reset_password' and to_address in (${sql.join(targets.map((t) => t.email))})`.execute(
          db,
        )
      ).rows;
    const deadline = Date.now() + 45_000;
    while ((await outbox()).some((r) => !r.sent) || (await outbox()).length < 2) {
      if (Date.now() > deadline) throw new Error('the worker did not send both messages within 45 s');
      await new Promise((r) => setTimeout(r, 300));
    }
    // Give any duplicate delivery time to show up before counting.
    await new Promise((r) => setTimeout(r, 2_000));
    for (const row of await outbox()) {
      const delivered = await sql<{
        n: string;
      }>`select count(*)::text as n from dev_mailbox where position(${row.message_id} in raw) > 0`.execute(db);
      expect(delivered.rows[0]!.n).toBe('1');
    }
  });
});
