/**
 * Crew overview at size: one invented crew of 2,000 machines × 50 samples (readings for five measurands, a finding on
 * most samples, an engine interval call on each), bulk-inserted with generate_series. Times the overview's service
 * function for the first page, a sorted page, a filtered page and a deep page (median of 20 runs each, after a
 * warm-up), then GET /overview through the built server. Target: under 200 ms per page (reported, not asserted).
 * Prints JSON, with the query plan's top lines for the slowest case. Run: node --import tsx tests/bench/overview.bench.ts
 */
import { randomBytes } from 'node:crypto';
import { performance } from 'node:perf_hooks';
import { sql } from 'kysely';
import { createDb } from '~/lib/db/db';
import { DEFAULT_OVERVIEW_QUERY, type OverviewQuery } from '~/lib/overview/overview';
import { loadOverview } from '~/lib/overview/overview.service';
import { startApp } from '../e2e/helpers/server';
import { quantile } from './bench-app';

const MACHINES = Number(process.env.OVERVIEW_MACHINES ?? 2000);
const SAMPLES = Number(process.env.OVERVIEW_SAMPLES ?? 50);
const RUNS = 20;
const TARGET_MS = 200;

const r1 = (v: number) => Math.round(v * 10) / 10;
const median = (xs: number[]) =>
  quantile(
    [...xs].sort((a, b) => a - b),
    0.5,
  );

const app = await startApp('sumpwise_bench_overview', { seed: false });
const db = createDb(app.databaseUrl, { max: 4 });
try {
  const seedStart = performance.now();
  await sql`insert into users (id, email, display_name, password_hash, email_verified_at) values ('overview-lead', 'overview@bench.example', 'Overview lead', 'not-a-real-hash', now())`.execute(
    db,
  );
  const crew = (
    await sql<{ id: string }>`insert into crews (name) values ('Overview bench crew') returning id`.execute(db)
  ).rows[0]!;
  await sql`insert into crew_members (crew_id, user_id, role) values (${crew.id}, 'overview-lead', 'lead')`.execute(db);
  await sql`
    insert into machines (crew_id, owner_user_id, name, engine_layout, cooling, meter, oil_capacity_l, recommended_grades, max_interval_distance)
    select ${crew.id}, 'overview-lead', 'Bench ' || lpad(n::text, 4, '0') || case n % 3 when 0 then ' single' when 1 then ' twin' else ' dual-sport' end,
      case n % 2 when 0 then 'single' else 'twin' end, case n % 3 when 0 then 'air' else 'liquid' end, 'km', 1.5, '[]'::jsonb, 4000
    from generate_series(1, ${MACHINES}) n`.execute(db);
  // One in 25 machines has no results yet (its samples only shipped), so the "no results" filter has rows too.
  await sql`
    insert into samples (crew_id, machine_id, bottle_code, bottle_code_norm, drawn_on, odometer, distance_on_oil, sae_grade, state, created_by)
    select ${crew.id}, m.id, code, code, date '2022-01-01' + (i * 7 + m.rn % 5)::int, i * 2000 + 1900, 1900, '10W-40',
      case when m.rn % 25 = 0 then 'shipped' when i = ${SAMPLES} - 1 and m.rn % 4 = 0 then 'reviewed' else 'results_in' end, 'overview-lead'
    from (select id, row_number() over (order by name) as rn from machines) m, generate_series(0, ${SAMPLES - 1}) i,
      lateral (select 'OV' || lpad(m.rn::text, 4, '0') || 'S' || lpad(i::text, 3, '0') as code) c`.execute(db);
  await sql`
    insert into readings (sample_id, measurand, value)
    select s.id, x.m, round((x.v * (0.7 + 0.6 * random()))::numeric, 2)
    from samples s, (values ('Fe', 20.0), ('Al', 4.0), ('Si', 7.0), ('Cu', 5.0), ('KV100', 14.0)) x(m, v)
    where s.state <> 'shipped'`.execute(db);
  // Findings: every sample a steady note; every third a watch (a climbing trend on Al for a few machines); every
  // eleventh an act. Interval calls: one engine call per sample, the call kind spread over the three.
  await sql`
    insert into findings (sample_id, measurand, level, rule_id, sentence)
    select s.id, 'Fe', 'steady', 'baseline-jump', 'Invented bench finding: within the band.' from samples s where s.state <> 'shipped'
    union all
    select s.id, 'Al', 'watch', case when hashtext(s.machine_id::text) % 7 = 0 then 'climbing-trend' else 'baseline-jump' end, 'Invented bench finding: aluminium above the band.'
      from samples s where s.state <> 'shipped' and hashtext(s.id::text) % 3 = 0
    union all
    select s.id, 'Si', 'act', 'fixed-limit', 'Invented bench finding: silicon over the fixed limit.' from samples s where s.state <> 'shipped' and hashtext(s.id::text) % 11 = 0`.execute(
    db,
  );
  await sql`
    insert into interval_calls (sample_id, machine_id, call, next_interval, next_sample_odometer, next_sample_on, source)
    select s.id, s.machine_id, (array['shorten', 'hold', 'stretch'])[1 + abs(hashtext(s.id::text)) % 3], 2000, s.odometer + 2000, s.drawn_on + 60, 'engine'
    from samples s where s.state <> 'shipped'`.execute(db);
  await sql`analyze`.execute(db);
  const counts = (
    await sql<{ samples: string; readings: string; findings: string; calls: string }>`
    select (select count(*) from samples)::text as samples, (select count(*) from readings)::text as readings,
      (select count(*) from findings)::text as findings, (select count(*) from interval_calls)::text as calls`.execute(
      db,
    )
  ).rows[0]!;
  const seedMs = performance.now() - seedStart;

  const cases: Record<string, OverviewQuery> = {
    firstPage: { ...DEFAULT_OVERVIEW_QUERY },
    sortedByName: { ...DEFAULT_OVERVIEW_QUERY, sort: 'name', dir: 'asc' },
    sortedByDue: { ...DEFAULT_OVERVIEW_QUERY, sort: 'due', dir: 'asc' },
    filteredActShorten: { ...DEFAULT_OVERVIEW_QUERY, level: 'act', call: 'shorten' },
    filteredClimbing: { ...DEFAULT_OVERVIEW_QUERY, climbing: true },
    searchByName: { ...DEFAULT_OVERVIEW_QUERY, q: 'twin' },
    deepPage: { ...DEFAULT_OVERVIEW_QUERY, sort: 'name', dir: 'asc', page: Math.ceil(MACHINES / 50) },
  };
  const service: Record<string, { medianMs: number; p95Ms: number; rows: number; total: number }> = {};
  for (const [name, query] of Object.entries(cases)) {
    await loadOverview(db, crew.id, query);
    const times: number[] = [];
    let rows = 0;
    let total = 0;
    for (let i = 0; i < RUNS; i++) {
      const t0 = performance.now();
      const page = await loadOverview(db, crew.id, query);
      times.push(performance.now() - t0);
      rows = page.rows.length;
      total = page.total;
    }
    if (rows === 0) throw new Error(`the ${name} case found no rows: the synthetic data does not exercise it`);
    service[name] = {
      medianMs: r1(median(times)),
      p95Ms: r1(
        quantile(
          [...times].sort((a, b) => a - b),
          0.95,
        ),
      ),
      rows,
      total,
    };
  }

  // The page itself, through the built server, with a session written straight into the sessions table.
  const sessionId = randomBytes(20).toString('hex');
  await sql`insert into sessions (id, user_id, expires_at, current_crew_id) values (${sessionId}, 'overview-lead', now() + interval '1 day', ${crew.id})`.execute(
    db,
  );
  const cookie = `sumpwise_session=${sessionId}`;
  const http: Record<string, { medianMs: number; status: number; bytes: number }> = {};
  for (const [name, path] of [
    ['firstPage', '/overview'],
    ['deepPage', `/overview?sort=name&page=${Math.ceil(MACHINES / 50)}`],
    ['filtered', '/overview?level=act&call=shorten'],
  ] as const) {
    let status = 0;
    let bytes = 0;
    const times: number[] = [];
    for (let i = 0; i < RUNS + 1; i++) {
      const t0 = performance.now();
      const res = await fetch(`${app.baseUrl}${path}`, { headers: { cookie } });
      const body = await res.arrayBuffer();
      if (i > 0) times.push(performance.now() - t0);
      status = res.status;
      bytes = body.byteLength;
    }
    if (status !== 200) throw new Error(`GET ${path} answered ${status}: the page timing would measure an error`);
    http[name] = { medianMs: r1(median(times)), status, bytes };
  }

  const slowest = Object.entries(service).sort((a, b) => b[1].medianMs - a[1].medianMs)[0]!;
  console.log(
    JSON.stringify({
      bench: 'overview',
      data: {
        machines: MACHINES,
        samplesPerMachine: SAMPLES,
        samples: Number(counts.samples),
        readings: Number(counts.readings),
        findings: Number(counts.findings),
        intervalCalls: Number(counts.calls),
        seedSeconds: r1(seedMs / 1000),
      },
      runs: RUNS,
      service,
      http,
      slowest: { case: slowest[0], medianMs: slowest[1].medianMs },
      targetMs: TARGET_MS,
      withinTarget: Object.values(service).every((s) => s.medianMs < TARGET_MS),
      node: process.version,
    }),
  );
} finally {
  await db.destroy();
  await app.stop();
}
