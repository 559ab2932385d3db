/**
 * The verdict of samples and machines for lists: the worst finding's level and the current interval call, in
 * one statement per list (no query per row). The current call is the newest; among rows written in one
 * transaction a reviewer's ranks above the engine's, as in the review panel's call history.
 */
import { sql, type Kysely, type RawBuilder, type Transaction } from 'kysely';
import type { Database, IntervalCallKind } from '../db/database';
import { levelOfRank } from '../levels';
import { levelRankSql } from '../levels.repository';
import { isUuid } from '../ids';
import type { Verdict } from './verdicts';

type Db = Kysely<Database> | Transaction<Database>;

interface RawVerdict {
  sample_id: string;
  machine_id: string;
  worst_rank: number | null;
  call: IntervalCallKind | null;
  next_interval: number | string | null;
  top_rule: string | null;
  top_measurand: string | null;
}

// Worst level, top finding and current call of the samples `s` the caller's from-clause names.
const VERDICT_COLUMNS = sql`
  s.id as sample_id, s.machine_id,
  (select max(${levelRankSql('f.level')}) from findings f where f.sample_id = s.id) as worst_rank,
  top.rule_id as top_rule, top.measurand as top_measurand,
  c.call, c.next_interval`;
const VERDICT_JOINS = sql`
  left join lateral (
    select f.rule_id, f.measurand from findings f where f.sample_id = s.id
    order by ${levelRankSql('f.level')} desc, f.created_at, f.id limit 1
  ) top on true
  left join lateral (
    select ic.call, ic.next_interval from interval_calls ic where ic.sample_id = s.id
    order by ic.created_at desc, case ic.source when 'engine' then 0 else 1 end desc, ic.id desc limit 1
  ) c on true`;

function toVerdict(r: RawVerdict): Verdict {
  return {
    sampleId: r.sample_id,
    machineId: r.machine_id,
    level: levelOfRank(Number(r.worst_rank ?? 0)),
    call: r.call,
    nextInterval: r.next_interval === null ? null : Number(r.next_interval),
    top: r.top_rule ? { ruleId: r.top_rule, measurand: r.top_measurand } : null,
  };
}

async function runVerdicts(db: Db, from: RawBuilder<unknown>): Promise<Verdict[]> {
  const { rows } = await sql<RawVerdict>`select ${VERDICT_COLUMNS} from ${from} ${VERDICT_JOINS}`.execute(db);
  return rows.map(toVerdict);
}

/** The verdicts of the crew's samples among `sampleIds` that have results, by sample id. */
export async function listSampleVerdicts(
  db: Db,
  crewId: string,
  sampleIds: readonly string[],
): Promise<Map<string, Verdict>> {
  const ids = sampleIds.filter(isUuid);
  if (ids.length === 0) return new Map();
  const verdicts = await runVerdicts(
    db,
    sql`(select id, machine_id from samples where crew_id = ${crewId} and id = any(${ids}::uuid[])
      and state in ('results_in', 'reviewed')) s`,
  );
  return new Map(verdicts.map((v) => [v.sampleId, v]));
}

/** The verdict of each crew machine's latest sample with results, by machine id (machines without any: absent). */
export async function listMachineVerdicts(
  db: Db,
  crewId: string,
  machineIds: readonly string[],
): Promise<Map<string, Verdict>> {
  const ids = machineIds.filter(isUuid);
  if (ids.length === 0) return new Map();
  const verdicts = await runVerdicts(
    db,
    sql`(select ls.id, ls.machine_id from machines m
      join lateral (
        select x.id, x.machine_id from samples x
        where x.machine_id = m.id and x.state in ('results_in', 'reviewed')
        order by x.drawn_on desc, x.odometer desc limit 1
      ) ls on true
      where m.crew_id = ${crewId} and m.id = any(${ids}::uuid[])) s`,
  );
  return new Map(verdicts.map((v) => [v.machineId, v]));
}

// The crew's samples waiting for review whose worst level is steady and whose current call is hold or stretch.
const steadyQueue = (crewId: string) => sql`
  select s.id, s.drawn_on from samples s
  join lateral (
    select ic.call from interval_calls ic where ic.sample_id = s.id
    order by ic.created_at desc, case ic.source when 'engine' then 0 else 1 end desc, ic.id desc limit 1
  ) c on true
  where s.crew_id = ${crewId} and s.state = 'results_in' and c.call in ('hold', 'stretch')
    and not exists (select 1 from findings f where f.sample_id = s.id and f.level <> 'steady')`;

/**
 * The steady samples waiting for review with a hold or stretch call: the routine reviews a mechanic may confirm
 * in one step. Oldest first, at most `limit`.
 */
export async function listSteadyReviewQueue(db: Db, crewId: string, limit: number): Promise<string[]> {
  const { rows } = await sql<{ id: string }>`
    select q.id from (${steadyQueue(crewId)}) q order by q.drawn_on, q.id limit ${limit}
  `.execute(db);
  return rows.map((r) => r.id);
}

/** How many samples listSteadyReviewQueue would return without a limit. */
export async function countSteadyReviewQueue(db: Db, crewId: string): Promise<number> {
  const { rows } = await sql<{ n: string }>`select count(*) as n from (${steadyQueue(crewId)}) q`.execute(db);
  return Number(rows[0]?.n ?? 0);
}
