/**
 * Crew overview and machine summary queries. One statement per page: the latest sample with results and the
 * latest interval call of each machine through lateral joins that walk the machine's samples newest first on the
 * (machine_id, drawn_on) index and look calls up by sample (interval_calls (sample_id, created_at)), then filter,
 * sort and limit/offset on the server.
 *
 * Measured (tests/bench/overview.bench.ts, 2,000 machines × 50 samples): selecting the calls by machine_id and
 * sorting them all by their sample's date cost ~0.25 ms per machine and pushed the plan's estimated cost past
 * PostgreSQL's JIT thresholds, which then spent ~0.6 s compiling on every page; walking samples newest first
 * stops after the first few samples (an incremental sort), and the query runs without JIT. A sample never
 * changes machine, so its call's machine is the sample's.
 */
import { sql, type Kysely, type RawBuilder } from 'kysely';
import type { Database, IntervalCallKind, Meter, Role } from '../db/database';
import { levelOfRank, levelRank } from '../levels';
import { callUrgencySql, levelRankSql } from '../levels.repository';
import { isUuid } from '../ids';
import { OVERVIEW_PAGE_SIZE, type OverviewPage, type OverviewQuery, type OverviewRow } from './overview';

interface RawRow {
  machine_id: string;
  name: string;
  meter: Meter;
  sample_id: string | null;
  bottle_code: string | null;
  drawn_on: string | null;
  state: string | null;
  worst_rank: number | null;
  top_rule: string | null;
  top_measurand: string | null;
  top_sentence: string | null;
  climbing: string[] | null;
  call: IntervalCallKind | null;
  call_source: string | null;
  call_role: Role | null;
  call_author: string | null;
  next_sample_on: string | null;
  next_sample_odometer: number | null;
  total: string;
}

// Sort expressions are chosen from this fixed map, never built from input.
const ORDER: Record<OverviewQuery['sort'], RawBuilder<unknown>> = {
  name: sql.raw('lower(name)'),
  'last-sample': sql.raw('drawn_on'),
  level: sql.raw('coalesce(worst_rank, -1)'),
  call: callUrgencySql('call'),
  due: sql.raw('next_sample_on'),
};

/** One page of the crew overview. */
export async function listOverviewPage(
  db: Kysely<Database>,
  crewId: string,
  query: OverviewQuery,
): Promise<OverviewPage> {
  const dir = query.dir === 'asc' ? sql.raw('asc') : sql.raw('desc');
  const nulls = sql.raw('nulls last');
  const offset = (query.page - 1) * OVERVIEW_PAGE_SIZE;
  const filters = [sql`true`];
  if (query.level === 'none') filters.push(sql`sample_id is null`);
  else if (query.level) filters.push(sql`worst_rank = ${levelRank(query.level)}`);
  if (query.call) filters.push(sql`call = ${query.call}`);
  if (query.climbing) filters.push(sql`cardinality(climbing) > 0`);
  const like = query.q ? `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%` : null;
  const statement = sql<RawRow>`
    with base as (
      select m.id as machine_id, m.name, m.meter,
        ls.id as sample_id, ls.bottle_code, ls.drawn_on::text as drawn_on, ls.state,
        case when ls.id is null then null else coalesce(f.worst_rank, 0) end as worst_rank, top.rule_id as top_rule, top.measurand as top_measurand, top.sentence as top_sentence,
        coalesce(cl.climbing, '{}') as climbing,
        ic.call, ic.source as call_source, ic.made_by_role as call_role, ic.made_by_name as call_author, ic.next_sample_on::text as next_sample_on, ic.next_sample_odometer
      from machines m
      left join lateral (
        select s.id, s.bottle_code, s.drawn_on, s.state from samples s
        where s.machine_id = m.id and s.state in ('results_in', 'reviewed')
        order by s.drawn_on desc, s.odometer desc limit 1
      ) ls on true
      left join lateral (
        select max(${levelRankSql('level')}) as worst_rank
        from findings where sample_id = ls.id
      ) f on true
      left join lateral (
        select rule_id, measurand, sentence from findings where sample_id = ls.id
        order by ${levelRankSql('level')} desc, created_at, id limit 1
      ) top on true
      left join lateral (
        select array_agg(distinct measurand order by measurand) as climbing from findings
        where sample_id = ls.id and rule_id = 'climbing-trend' and measurand is not null
      ) cl on true
      left join lateral (
        select ic2.call, ic2.source, ic2.next_sample_on, ic2.next_sample_odometer,
          (select cm.role from crew_members cm where cm.user_id = ic2.made_by and cm.crew_id = m.crew_id) as made_by_role,
          (select u.display_name from users u where u.id = ic2.made_by) as made_by_name
        from samples s2 join interval_calls ic2 on ic2.sample_id = s2.id
        where s2.machine_id = m.id
        order by s2.drawn_on desc, s2.odometer desc, ic2.created_at desc, case ic2.source when 'engine' then 0 else 1 end desc, ic2.id desc limit 1
      ) ic on true
      where m.crew_id = ${crewId} and m.archived_at is null
        ${like ? sql`and m.name ilike ${like}` : sql``}
    ),
    filtered as (
      select base.* from base where ${sql.join(filters, sql` and `)}
    )
    select *, count(*) over () as total from filtered
    order by ${ORDER[query.sort]} ${dir} ${nulls}, lower(name) asc, machine_id asc
    limit ${OVERVIEW_PAGE_SIZE} offset ${offset}
  `;
  // A page reads every machine of the crew, so on large crews the planner's cost estimate crosses the JIT
  // thresholds; compiling then costs far more than the query (measured ~0.6 s against ~0.1 s at 2,000 machines).
  const { rows } = await withoutJit(db, (trx) => statement.execute(trx));
  const total = rows.length > 0 ? Number(rows[0]!.total) : await countFiltered(db, crewId, query, offset);
  return {
    rows: rows.map(toOverviewRow),
    total,
    page: query.page,
    pages: Math.max(1, Math.ceil(total / OVERVIEW_PAGE_SIZE)),
  };
}

/** Runs `work` in a transaction (or the caller's) with JIT compilation off for its statements only. */
async function withoutJit<T>(db: Kysely<Database>, work: (trx: Kysely<Database>) => Promise<T>): Promise<T> {
  const run = async (trx: Kysely<Database>) => {
    await sql`set local jit = off`.execute(trx);
    return work(trx);
  };
  return db.isTransaction ? run(db) : db.transaction().execute(run);
}

// An empty page beyond the end still needs the total to offer a way back.
async function countFiltered(
  db: Kysely<Database>,
  crewId: string,
  query: OverviewQuery,
  offset: number,
): Promise<number> {
  if (offset === 0) return 0;
  const first = await listOverviewPage(db, crewId, { ...query, page: 1 });
  return first.total;
}

function toOverviewRow(r: RawRow): OverviewRow {
  return {
    machineId: r.machine_id,
    name: r.name,
    meter: r.meter,
    lastSample: r.sample_id
      ? { id: r.sample_id, bottleCode: r.bottle_code ?? '', drawnOn: r.drawn_on ?? '', state: r.state ?? '' }
      : null,
    worst: r.sample_id ? levelOfRank(r.worst_rank ?? 0) : null,
    topFinding: r.top_rule ? { ruleId: r.top_rule, measurand: r.top_measurand, sentence: r.top_sentence ?? '' } : null,
    climbing: r.climbing ?? [],
    call: r.call
      ? {
          kind: r.call,
          source: r.call_source ?? 'engine',
          authorRole: r.call_role,
          authorName: r.call_author,
          nextSampleOn: r.next_sample_on,
          nextSampleOdometer: r.next_sample_odometer === null ? null : Number(r.next_sample_odometer),
        }
      : null,
  };
}

/** One machine's row of the overview (the machine page summary), or undefined when not the crew's. */
export async function findMachineOverview(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
): Promise<OverviewRow | undefined> {
  if (!isUuid(machineId)) return undefined;
  const page = await sql<RawRow>`
    select m.id as machine_id, m.name, m.meter, ls.id as sample_id, ls.bottle_code, ls.drawn_on::text as drawn_on, ls.state,
      (select max(${levelRankSql('level')}) from findings where sample_id = ls.id) as worst_rank,
      top.rule_id as top_rule, top.measurand as top_measurand, top.sentence as top_sentence,
      (select array_agg(distinct measurand order by measurand) from findings where sample_id = ls.id and rule_id = 'climbing-trend' and measurand is not null) as climbing,
      ic.call, ic.source as call_source, ic.made_by_role as call_role, ic.made_by_name as call_author, ic.next_sample_on::text as next_sample_on, ic.next_sample_odometer, '1' as total
    from machines m
    left join lateral (
      select s.id, s.bottle_code, s.drawn_on, s.state from samples s
      where s.machine_id = m.id and s.state in ('results_in', 'reviewed') order by s.drawn_on desc, s.odometer desc limit 1
    ) ls on true
    left join lateral (
      select rule_id, measurand, sentence from findings where sample_id = ls.id
      order by ${levelRankSql('level')} desc, created_at, id limit 1
    ) top on true
    left join lateral (
      select ic2.call, ic2.source, ic2.next_sample_on, ic2.next_sample_odometer,
          (select cm.role from crew_members cm where cm.user_id = ic2.made_by and cm.crew_id = m.crew_id) as made_by_role,
          (select u.display_name from users u where u.id = ic2.made_by) as made_by_name
        from samples s2 join interval_calls ic2 on ic2.sample_id = s2.id
        where s2.machine_id = m.id
        order by s2.drawn_on desc, s2.odometer desc, ic2.created_at desc, case ic2.source when 'engine' then 0 else 1 end desc, ic2.id desc limit 1
    ) ic on true
    where m.id = ${machineId} and m.crew_id = ${crewId}
  `.execute(db);
  const r = page.rows[0];
  return r ? toOverviewRow(r) : undefined;
}

/** Odometer-against-date history of a machine (oil changes and samples), for the current-odometer estimate. */
export async function listOdometerHistory(
  db: Kysely<Database>,
  machineIds: readonly string[],
): Promise<Map<string, { date: string; odometer: number }[]>> {
  const out = new Map<string, { date: string; odometer: number }[]>();
  if (machineIds.length === 0) return out;
  const { rows } = await sql<{ machine_id: string; date: string; odometer: number }>`
    select machine_id, changed_on::text as date, odometer from oil_changes where machine_id = any(${[...machineIds]}::uuid[])
    union all
    select machine_id, drawn_on::text as date, odometer from samples where machine_id = any(${[...machineIds]}::uuid[])
  `.execute(db);
  for (const r of rows) {
    const list = out.get(r.machine_id) ?? [];
    list.push({ date: r.date, odometer: Number(r.odometer) });
    out.set(r.machine_id, list);
  }
  return out;
}
