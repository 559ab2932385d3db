/** Queries of the crew home page; every one scoped by crew. */
import { sql, type Kysely } from 'kysely';
import type { Database, IntervalCallKind } from '../db/database';
import { levelRankSql } from '../levels.repository';
import type { Meter } from '../machines/machines';
import type { CrewProgress, OpenFinding } from './home-cards';

/**
 * Samples of the crew in a state, with machine name (limited): drawn bottles oldest first (the longest waiting to
 * ship), results waiting for review newest first (the freshest news about each engine).
 */
export async function listSamplesInState(
  db: Kysely<Database>,
  crewId: string,
  state: 'drawn' | 'results_in',
  limit = 50,
) {
  return db
    .selectFrom('samples')
    .innerJoin('machines', 'machines.id', 'samples.machine_id')
    .select([
      'samples.id',
      'samples.bottle_code',
      'samples.drawn_on',
      'samples.machine_id',
      'machines.name as machine_name',
    ])
    .where('samples.crew_id', '=', crewId)
    .where('samples.state', '=', state)
    .orderBy('samples.drawn_on', state === 'results_in' ? 'desc' : 'asc')
    .limit(limit)
    .execute();
}

/** Samples shipped on or before `shippedBefore` (YYYY-MM-DD) with no results yet. */
export async function listOverdueShipments(db: Kysely<Database>, crewId: string, shippedBefore: string, limit = 50) {
  const { rows } = await sql<{
    id: string;
    bottle_code: string;
    drawn_on: string;
    machine_name: string;
    shipped_on: string;
  }>`
    select s.id, s.bottle_code, s.drawn_on::text as drawn_on, m.name as machine_name,
      coalesce((select max(e.at) from sample_events e where e.sample_id = s.id and e.state = 'shipped')::date, s.drawn_on)::text as shipped_on
    from samples s join machines m on m.id = s.machine_id
    where s.crew_id = ${crewId} and s.state = 'shipped'
      and coalesce((select max(e.at) from sample_events e where e.sample_id = s.id and e.state = 'shipped')::date, s.drawn_on) <= ${shippedBefore}::date
    order by shipped_on limit ${limit}
  `.execute(db);
  return rows;
}

/** Watch and act findings on each machine's latest sample with results: the ones still open. */
export async function listOpenFindings(db: Kysely<Database>, crewId: string, limit = 500) {
  const { rows } = await sql<OpenFinding>`
    select ls.id as sample_id, ls.bottle_code, ls.drawn_on::text as drawn_on, m.id as machine_id, m.name as machine_name,
      f.level, f.rule_id, f.measurand, f.sentence
    from machines m
    join lateral (
      select s.id, s.bottle_code, s.drawn_on from samples s
      where s.machine_id = m.id and s.state in ('results_in', 'reviewed') order by s.drawn_on desc, s.odometer desc limit 1
    ) ls on true
    join findings f on f.sample_id = ls.id and f.level in ('watch', 'act')
    where m.crew_id = ${crewId} and m.archived_at is null
    order by ls.drawn_on desc, m.name, ${levelRankSql('f.level')} desc, f.rule_id limit ${limit}
  `.execute(db);
  return rows;
}

/** How far a crew has come: machines, oil changes, drain cards, samples with results, mechanics and invitations. */
export async function loadCrewProgress(db: Kysely<Database>, crewId: string): Promise<CrewProgress> {
  const { rows } = await sql<{
    machines: string;
    with_change: string;
    drain_cards: string;
    with_results: string;
    mechanics: string;
    first_machine: string | null;
    first_with_change: string | null;
  }>`
    select
      (select count(*) from machines m where m.crew_id = ${crewId} and m.archived_at is null) as machines,
      (select count(*) from machines m where m.crew_id = ${crewId} and m.archived_at is null
         and exists (select 1 from oil_changes oc where oc.machine_id = m.id)) as with_change,
      (select count(*) from samples s where s.crew_id = ${crewId}) as drain_cards,
      (select count(*) from samples s where s.crew_id = ${crewId} and s.state in ('results_in', 'reviewed')) as with_results,
      (select count(*) from crew_members cm where cm.crew_id = ${crewId} and cm.role = 'mechanic')
        + (select count(*) from crew_invitations ci where ci.crew_id = ${crewId} and ci.role = 'mechanic'
             and ci.accepted_at is null and ci.revoked_at is null and ci.expires_at > now()) as mechanics,
      (select m.id from machines m where m.crew_id = ${crewId} and m.archived_at is null order by m.created_at, m.id limit 1) as first_machine,
      (select m.id from machines m where m.crew_id = ${crewId} and m.archived_at is null
         and exists (select 1 from oil_changes oc where oc.machine_id = m.id) order by m.created_at, m.id limit 1) as first_with_change
  `.execute(db);
  const r = rows[0]!;
  return {
    machines: Number(r.machines),
    machinesWithOilChange: Number(r.with_change),
    drainCards: Number(r.drain_cards),
    samplesWithResults: Number(r.with_results),
    mechanicsOrInvites: Number(r.mechanics),
    firstMachineId: r.first_machine,
    firstMachineWithOilChangeId: r.first_with_change,
  };
}

/** Each active machine of the crew with its latest interval call and manufacturer limits, for the due check. */
export async function listMachinesForDue(db: Kysely<Database>, crewId: string) {
  const { rows } = await sql<{
    id: string;
    name: string;
    meter: Meter;
    next_sample_on: string | null;
    next_sample_odometer: number | null;
    call: IntervalCallKind | null;
    last_change_on: string | null;
    last_change_odometer: number | null;
    max_interval_distance: number | null;
    max_interval_days: number | null;
  }>`
    select m.id, m.name, m.meter, ic.call, ic.next_sample_on::text as next_sample_on, ic.next_sample_odometer,
      oc.changed_on::text as last_change_on, oc.odometer as last_change_odometer, m.max_interval_distance, m.max_interval_days
    from machines m
    left join lateral (select ic2.call, ic2.next_sample_on, ic2.next_sample_odometer from interval_calls ic2 join samples s2 on s2.id = ic2.sample_id
        where ic2.machine_id = m.id
        order by s2.drawn_on desc, s2.odometer desc, ic2.created_at desc, case ic2.source when 'engine' then 0 else 1 end desc, ic2.id desc limit 1) ic on true
    left join lateral (select changed_on, odometer from oil_changes where machine_id = m.id order by odometer desc, changed_on desc limit 1) oc on true
    where m.crew_id = ${crewId} and m.archived_at is null
    order by m.name
  `.execute(db);
  return rows;
}
