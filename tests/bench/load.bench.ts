/**
 * Mixed load on loopback: 50 connections (autocannon, programmatic) for 60 s (LOAD_SECONDS to shorten) against the
 * built app, each connection a lead of an invented crew of its own who signs in once per cycle and then reads the
 * home page, the machine page and the wear chart's trend endpoint, and imports a one-row lab file (upload, then
 * confirm), each from an address of its own behind one trusted proxy. Beside it, the floor: GET /api/health alone
 * for 10 s at the same concurrency. Run once with one app process and once with one per core. Prints JSON: counts
 * by status class (429 apart), p50/p95/p99 per kind and overall, throughput, ratios against the floor, and the
 * throughput of all cores against one process. No assertion.
 * Run: node --import tsx tests/bench/load.bench.ts
 */
import { createRequire } from 'node:module';
import os from 'node:os';
import { sql } from 'kysely';
import { hashPassword } from '~/lib/auth/password';
import { createDb } from '~/lib/db/db';
import { startApp } from '../e2e/helpers/server';
import { quantile } from './bench-app';
import { cpuBetween, takeCpuSnapshot } from './cpu-shares';

const CONNECTIONS = Number(process.env.LOAD_CONNECTIONS ?? 50);
const SECONDS = Number(process.env.LOAD_SECONDS ?? 60);
const FLOOR_SECONDS = Number(process.env.LOAD_FLOOR_SECONDS ?? 10);
/** Samples of history per bench machine (readings, findings, calls), and shipped samples waiting for results. */
const HISTORY = 40;
const WAITING = 200;
/** Twice as many bench users as connections: a connection leases a free one per cycle (autocannon clears its context each cycle). */
const USERS = CONNECTIONS * 2;
const PASSWORD = 'load-bench-password';

// autocannon 8 ships no types: the few parts used here, typed locally.
interface AcContext {
  n?: number;
  cookie?: string;
  labFileId?: string;
}
interface AcRequest {
  method?: string;
  path?: string;
  headers?: Record<string, string>;
  body?: string | Buffer;
  setupRequest?: (req: AcRequest, context: AcContext) => AcRequest;
  onResponse?: (status: number, body: string, context: AcContext, headers: Record<string, string | string[]>) => void;
}
interface AcResult {
  requests: { total: number };
  errors: number;
  timeouts: number;
  non2xx: number;
  '2xx': number;
  '4xx': number;
  '5xx': number;
  duration: number;
}
interface AcInstance {
  on(event: 'response', fn: (client: unknown, status: number, bytes: number, ms: number) => void): void;
}
type Autocannon = (opts: Record<string, unknown>, cb: (err: Error | null, result: AcResult) => void) => AcInstance;
const autocannon = createRequire(import.meta.url)('autocannon') as Autocannon;

type Kind = 'signIn' | 'home' | 'machine' | 'trend' | 'upload' | 'confirm';
/** One connection's cycle: one sign-in, then reads and one small import, in this order. */
const CYCLE: Kind[] = [
  'signIn',
  'home',
  'trend',
  'machine',
  'trend',
  'home',
  'trend',
  'upload',
  'confirm',
  'machine',
  'trend',
  'home',
  'machine',
  'trend',
];

interface Tally {
  latencies: number[];
  s2xx: number;
  s3xx: number;
  s4xx: number;
  s429: number;
  s5xx: number;
  other: number;
}
const newTally = (): Tally => ({ latencies: [], s2xx: 0, s3xx: 0, s4xx: 0, s429: 0, s5xx: 0, other: 0 });
function count(t: Tally, status: number, ms: number): void {
  t.latencies.push(ms);
  if (status === 429) t.s429++;
  else if (status >= 200 && status < 300) t.s2xx++;
  else if (status >= 300 && status < 400) t.s3xx++;
  else if (status >= 400 && status < 500) t.s4xx++;
  else if (status >= 500) t.s5xx++;
  else t.other++;
}
const r1 = (v: number) => Math.round(v * 10) / 10;
function summarise(t: Tally, seconds: number) {
  const sorted = [...t.latencies].sort((a, b) => a - b);
  return {
    requests: sorted.length,
    '2xx': t.s2xx,
    '3xx': t.s3xx,
    '4xx': t.s4xx,
    '429': t.s429,
    '5xx': t.s5xx,
    perSecond: r1(sorted.length / seconds),
    /** Answers the riders wanted (2xx): a refusal is cheap, so counting it would flatter a run that refuses. */
    okPerSecond: r1(t.s2xx / seconds),
    p50Ms: r1(quantile(sorted, 0.5)),
    p95Ms: r1(quantile(sorted, 0.95)),
    p99Ms: r1(quantile(sorted, 0.99)),
    maxMs: r1(sorted.at(-1) ?? NaN),
  };
}

/** Promise wrapper that also taps every response (kind taken from the request that was just answered). */
function runAutocannon(
  opts: Record<string, unknown>,
  onResponse: (status: number, ms: number) => void,
): Promise<AcResult> {
  return new Promise((resolve, reject) => {
    const instance = autocannon(opts, (err, result) => (err ? reject(err) : resolve(result)));
    instance.on('response', (_client, status, _bytes, ms) => onResponse(status, ms));
  });
}

/** One run of the mixed load and its floor against the built app started with `processes` app processes. */
async function runLoad(processes: number) {
  process.env.TRUST_PROXY = '1';
  // Passed to startApp, which sets APP_PROCESSES itself (one unless told, whatever this process's environment says).
  const app = await startApp('sumpwise_bench_load', { seed: false, appProcesses: processes });
  const db = createDb(app.databaseUrl, { max: 4 });
  try {
    // USERS invented crews of one lead each, with one liquid-cooled single of HISTORY samples (8 readings each, a watch
    // finding on every fifth, an engine call on each) and WAITING shipped samples for the imports to fill, in date order.
    const hash = await hashPassword(PASSWORD);
    await sql`
      insert into users (id, email, display_name, password_hash, email_verified_at)
      select 'load-user-' || n, 'load-' || n || '@bench.example', 'Load rider ' || n, ${hash}, now() from generate_series(1, ${USERS}) n`.execute(
      db,
    );
    await sql`insert into crews (name) select 'Load crew ' || n from generate_series(1, ${USERS}) n`.execute(db);
    await sql`
      insert into crew_members (crew_id, user_id, role)
      select c.id, 'load-user-' || substring(c.name from 11), 'lead' from crews c where c.name like 'Load crew %'`.execute(
      db,
    );
    await sql`
      insert into machines (crew_id, owner_user_id, name, engine_layout, cooling, meter, oil_capacity_l, recommended_grades, max_interval_distance)
      select c.id, 'load-user-' || substring(c.name from 11), 'Load 450 no. ' || substring(c.name from 11), 'single', 'liquid', 'km', 1.2,
        '[{"grade":"10W-40","minC":-10,"maxC":40}]'::jsonb, 3000
      from crews c where c.name like 'Load crew %'`.execute(db);
    await sql`
      insert into samples (crew_id, machine_id, bottle_code, bottle_code_norm, drawn_on, odometer, distance_on_oil, sae_grade, state, created_by)
      select m.crew_id, m.id, code, code, date '2020-01-01' + i * 14, i * 1500 + 1450, 1450, '10W-40',
        case when i < ${HISTORY} then 'results_in' else 'shipped' end, m.owner_user_id
      from machines m, generate_series(0, ${HISTORY + WAITING - 1}) i,
        lateral (select 'LD' || substring(m.owner_user_id from 11) || 'X' || lpad(i::text, 4, '0') as code) c
      where m.name like 'Load 450 no. %'`.execute(db);
    await sql`
      insert into readings (sample_id, measurand, value)
      select s.id, x.m, round((x.v * (0.8 + 0.4 * random()))::numeric, 2)
      from samples s, (values ('Fe', 20.0), ('Al', 4.0), ('Cu', 5.0), ('Si', 7.0), ('Na', 5.0), ('KV100', 14.0), ('Zn', 1100.0), ('FUEL', 0.6)) x(m, v)
      where s.bottle_code like 'LD%' and s.state = 'results_in'`.execute(db);
    await sql`
      insert into findings (sample_id, measurand, level, rule_id, sentence)
      select s.id, 'Al', 'watch', 'baseline-jump', 'Invented bench finding.'
      from samples s where s.bottle_code like 'LD%' and s.state = 'results_in' and right(s.bottle_code, 1) in ('4', '9')`.execute(
      db,
    );
    await sql`
      insert into interval_calls (sample_id, machine_id, call, next_interval, next_sample_odometer, source)
      select s.id, s.machine_id, 'hold', 1500, s.odometer + 1500, 'engine' from samples s where s.bottle_code like 'LD%' and s.state = 'results_in'`.execute(
      db,
    );
    const machines = new Map(
      (
        await sql<{ n: string; id: string }>`
      select substring(owner_user_id from 11) as n, id from machines where name like 'Load 450 no. %'`.execute(db)
      ).rows.map((r) => [Number(r.n), r.id]),
    );

    const origin = app.baseUrl;
    // A user is leased for one cycle, so no two connections sign in as the same user or import into the same machine
    // at once; a lease lost to a timed-out request falls back to round robin rather than stalling.
    const free = Array.from({ length: USERS }, (_, i) => i + 1);
    const importsOf = new Map<number, number>();
    let roundRobin = 0;
    let lastKind: Kind = 'signIn';
    const at = (kind: Kind, index: number, build: (req: AcRequest, ctx: AcContext) => AcRequest): AcRequest => ({
      setupRequest(req, ctx) {
        ctx.n ??= free.shift() ?? (roundRobin++ % USERS) + 1;
        return build(req, ctx);
      },
      onResponse(status, body, ctx, headers) {
        lastKind = kind;
        if (index === CYCLE.length - 1 && ctx.n !== undefined) free.push(ctx.n);
        if (kind === 'signIn') {
          const set = headers['set-cookie'];
          const cookie = (Array.isArray(set) ? set : set ? [set] : []).find((c) => c.startsWith('sumpwise_session='));
          if (cookie) ctx.cookie = cookie.split(';')[0];
        }
        if (kind === 'upload') {
          ctx.labFileId = undefined;
          if (status < 300) {
            try {
              ctx.labFileId = (JSON.parse(body) as { labFileId?: string }).labFileId;
            } catch {
              /* counted by its status */
            }
          }
        }
      },
    });
    // Each rider on an address of their own, as behind one trusted proxy: the sign-in limit per address (credential
    // stuffing) would otherwise count the whole bench as one client.
    const addressOf = (n: number) => `10.77.${n >> 8}.${n & 255}`;
    const withCookie = (ctx: AcContext): Record<string, string> => ({
      'x-forwarded-for': addressOf(ctx.n ?? 0),
      ...(ctx.cookie ? { cookie: ctx.cookie } : {}),
    });
    const BOUNDARY = '----sumpwiseLoadBench';
    const requests: AcRequest[] = CYCLE.map((kind, index) => {
      switch (kind) {
        case 'signIn':
          return at(kind, index, (req, ctx) => ({
            ...req,
            method: 'POST',
            path: '/api/auth/sign-in',
            // Each rider from an address of its own, like the other requests: fifty riders behind one address
            // would run into the per-address sign-in limit, and the refused ones would load nothing.
            headers: { 'content-type': 'application/json', origin, 'x-forwarded-for': addressOf(ctx.n ?? 0) },
            body: JSON.stringify({ email: `load-${ctx.n}@bench.example`, password: PASSWORD }),
          }));
        case 'home':
          return at(kind, index, (req, ctx) => ({
            ...req,
            method: 'GET',
            path: '/',
            headers: withCookie(ctx),
            body: '',
          }));
        case 'machine':
          return at(kind, index, (req, ctx) => ({
            ...req,
            method: 'GET',
            path: `/machines/${machines.get(ctx.n!)}`,
            headers: withCookie(ctx),
            body: '',
          }));
        case 'trend':
          return at(kind, index, (req, ctx) => ({
            ...req,
            method: 'GET',
            path: `/api/trends/${machines.get(ctx.n!)}?measurands=Fe,Al,Si`,
            headers: withCookie(ctx),
            body: '',
          }));
        case 'upload':
          return at(kind, index, (req, ctx) => {
            const done = importsOf.get(ctx.n!) ?? 0;
            importsOf.set(ctx.n!, done + 1);
            const i = HISTORY + (done % WAITING);
            const code = `LD${ctx.n}X${String(i).padStart(4, '0')}`;
            const day = new Date(Date.UTC(2020, 0, 1) + i * 14 * 86_400_000).toISOString().slice(0, 10);
            const csv = `Bottle,Sampled,Fe,Al,Cu,Si,Na,Zn,KV100\n${code},${day},${18 + (i % 7)},${3 + (i % 3)},5,${6 + (i % 4)},4,1080,13.9\n`;
            const body = `--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="load-${code}.csv"\r\nContent-Type: text/csv\r\n\r\n${csv}\r\n--${BOUNDARY}--\r\n`;
            return {
              ...req,
              method: 'POST',
              path: '/api/imports',
              headers: {
                ...withCookie(ctx),
                origin,
                accept: 'application/json',
                'content-type': `multipart/form-data; boundary=${BOUNDARY}`,
              },
              body,
            };
          });
        case 'confirm':
          return at(kind, index, (req, ctx) => ({
            ...req,
            method: 'POST',
            path: `/api/imports/${ctx.labFileId ?? 'no-upload'}/confirm`,
            headers: { ...withCookie(ctx), origin, 'content-type': 'application/json' },
            body: '{"decisions":{}}',
          }));
      }
    });

    // Warm-up: one user through one whole cycle by fetch, so the first measured requests do not pay for cold code paths.
    {
      const signIn = await fetch(`${origin}/api/auth/sign-in`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ email: 'load-1@bench.example', password: PASSWORD }),
      });
      if (signIn.status !== 200) throw new Error(`warm-up sign-in answered ${signIn.status}`);
      const cookie = signIn.headers.getSetCookie()[0]!.split(';')[0]!;
      for (const path of ['/', `/machines/${machines.get(1)}`, `/api/trends/${machines.get(1)}?measurands=Fe,Al,Si`]) {
        const res = await fetch(`${origin}${path}`, { headers: { cookie } });
        await res.arrayBuffer();
        if (res.status !== 200) throw new Error(`warm-up ${path} answered ${res.status}`);
      }
    }

    // The floor: the health endpoint alone (one cheap database round trip), same concurrency.
    const floor = newTally();
    const floorRun = await runAutocannon(
      { url: `${origin}/api/health`, connections: CONNECTIONS, duration: FLOOR_SECONDS },
      (status, ms) => count(floor, status, ms),
    );

    const kinds = Object.fromEntries(CYCLE.map((k) => [k, newTally()])) as Record<Kind, Tally>;
    const overall = newTally();
    const cpuBefore = takeCpuSnapshot();
    const loadRun = await runAutocannon(
      { url: origin, connections: CONNECTIONS, duration: SECONDS, requests, timeout: 30 },
      (status, ms) => {
        count(kinds[lastKind], status, ms);
        count(overall, status, ms);
      },
    );

    // Where the machine's cores went during the mixed load: app processes, PostgreSQL, this load generator.
    const cpu = cpuBetween(cpuBefore, takeCpuSnapshot());
    // The supervisor and its app processes: a run that did not get the processes it asked for measures nothing.
    if (process.platform === 'linux' && cpu.processes.app !== processes + 1)
      throw new Error(`asked for ${processes} app processes, found ${cpu.processes.app - 1} running`);
    const imports = await sql<{ n: string }>`select count(*)::text as n from lab_imports`.execute(db);
    const floorSummary = summarise(floor, floorRun.duration);
    const overallSummary = summarise(overall, loadRun.duration);
    const perKind = Object.fromEntries(Object.entries(kinds).map(([k, t]) => [k, summarise(t, loadRun.duration)]));
    const ratio = (a: number, b: number) => Math.round((a / b) * 100) / 100;
    return {
      processes,
      connections: CONNECTIONS,
      seconds: loadRun.duration,
      cycle: CYCLE.join(','),
      overall: { ...overallSummary, socketErrors: loadRun.errors, timeouts: loadRun.timeouts },
      perKind,
      importsWritten: Number(imports.rows[0]!.n),
      cpu,
      floor: {
        endpoint: 'GET /api/health',
        seconds: floorRun.duration,
        ...floorSummary,
        socketErrors: floorRun.errors,
      },
      ratiosToFloor: {
        overallP50: ratio(overallSummary.p50Ms, floorSummary.p50Ms),
        overallP99: ratio(overallSummary.p99Ms, floorSummary.p99Ms),
        throughput: ratio(overallSummary.perSecond, floorSummary.perSecond),
        ...Object.fromEntries(Object.entries(perKind).map(([k, s]) => [`${k}P50`, ratio(s.p50Ms, floorSummary.p50Ms)])),
      },
      serverErrors: overall.s5xx,
    };
  } finally {
    await db.destroy();
    await app.stop();
  }
}

// The same load with one app process, then with one per core (the scale-out the supervisor in scripts/serve.ts
// gives): the ratio of their throughputs shows how much the second core adds.
const cores = os.cpus().length;
const one = await runLoad(1);
const all = await runLoad(cores);
const r2 = (v: number) => Math.round(v * 100) / 100;
const scaling = r2(all.overall.okPerSecond / one.overall.okPerSecond);
console.log(
  JSON.stringify({
    bench: 'load',
    connections: CONNECTIONS,
    cores,
    oneProcess: one,
    allCores: all,
    throughputRatioAllCoresToOne: scaling,
    summary: [
      {
        what: `mixed load, ${CONNECTIONS} connections, 1 app process`,
        result: `${one.overall.okPerSecond} answered/s (${one.overall.perSecond} req/s with ${one.overall['4xx']} × 4xx), p95 ${one.overall.p95Ms} ms, ${one.serverErrors} × 5xx`,
        floor: `GET /api/health ${one.floor.perSecond} req/s`,
        ratio: one.ratiosToFloor.throughput,
        limit: '0 × 5xx',
        ok: one.serverErrors === 0,
      },
      {
        what: `mixed load, ${CONNECTIONS} connections, ${cores} app processes`,
        result: `${all.overall.okPerSecond} answered/s (${all.overall.perSecond} req/s with ${all.overall['4xx']} × 4xx), p95 ${all.overall.p95Ms} ms, ${all.serverErrors} × 5xx; cores busy: app ${all.cpu.coresBusy.app}, PostgreSQL ${all.cpu.coresBusy.postgres}, load generator ${all.cpu.coresBusy.bench} (1 process: ${one.cpu.coresBusy.app}, ${one.cpu.coresBusy.postgres}, ${one.cpu.coresBusy.bench}; machine idle ${Math.round((one.cpu.machineIdle ?? 0) * 100)} %)`,
        floor: `1 process ${one.overall.okPerSecond} answered/s`,
        ratio: scaling,
        limit: cores >= 2 ? '≥ 1.6 ×, 0 × 5xx' : '0 × 5xx',
        ok: all.serverErrors === 0 && (cores < 2 || scaling >= 1.6),
      },
    ],
    node: process.version,
  }),
);
