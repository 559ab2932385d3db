/** Queries behind the wear chart: one machine's samples with results, their readings and stored findings. */
import { sql, type Kysely } from 'kysely';
import type { MeasurandCode } from '../analysis';
import type { Database, Level, MachineRow } from '../db/database';
import { isUuid } from '~/lib/ids';

/** A machine of the crew, or undefined (another crew's machine is "not found", never forbidden). */
export async function findCrewMachine(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
): Promise<Pick<MachineRow, 'id' | 'name' | 'meter' | 'cooling' | 'oil_capacity_l'> | undefined> {
  if (!isUuid(machineId)) return undefined;
  return db
    .selectFrom('machines')
    .select(['id', 'name', 'meter', 'cooling', 'oil_capacity_l'])
    .where('id', '=', machineId)
    .where('crew_id', '=', crewId)
    .executeTakeFirst();
}

/**
 * Everything the wear chart is drawn from for one machine of the crew and these measurands, built by PostgreSQL
 * in one query as compact JSON text (see trend-snapshot.ts for its layout): the machine, its samples with results
 * oldest first, their readings, worst finding levels and stored bands for the measurands, and its oil changes.
 * One round trip instead of six and no per-row decoding in the driver. Undefined when the machine is not the crew's
 * (another crew's machine is "not found", never forbidden).
 */
export async function findTrendSnapshot(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
  measurands: readonly MeasurandCode[],
): Promise<string | undefined> {
  if (!isUuid(machineId)) return undefined;
  const codes = sql`${[...measurands]}::text[]`;
  // The child rows are found by the machine's sample ids as one array built in the query, so each lookup goes
  // through the child table's primary key. The cast to text leaves the parsing to trend-snapshot.ts.
  const result = await sql<{ snapshot: string }>`
    with machine as (
      select id, name, meter, oil_capacity_l from machines where id = ${machineId} and crew_id = ${crewId}
    ), chart_samples as (
      select s.id, s.bottle_code, s.drawn_on, s.odometer, s.distance_on_oil, s.sae_grade, s.top_up_l,
             s.in_baseline, s.baseline_note, s.break_in, oc.volume_l
      from samples s left join oil_changes oc on oc.id = s.oil_change_id
      where s.machine_id = (select id from machine) and s.state in ('results_in', 'reviewed')
    )
    select json_build_array(
      json_build_array(m.id, m.name, m.meter, m.oil_capacity_l),
      (select coalesce(json_agg(json_build_array(s.id, s.bottle_code, s.drawn_on, s.odometer, s.distance_on_oil,
                 s.sae_grade, s.top_up_l, s.in_baseline, s.baseline_note, s.break_in, s.volume_l)
                 order by s.drawn_on, s.odometer, s.id), '[]')
       from chart_samples s),
      (select coalesce(json_agg(json_build_array(r.sample_id, r.measurand, r.value, r.qualifier)
                 order by r.sample_id, r.measurand), '[]')
       from readings r
       where r.sample_id = any(array(select id from chart_samples)) and r.measurand = any(${codes})),
      (select coalesce(json_agg(json_build_array(f.sample_id, f.measurand, f.level)
                 order by f.sample_id, f.measurand, f.level), '[]')
       from findings f
       where f.sample_id = any(array(select id from chart_samples)) and f.measurand = any(${codes})),
      (select coalesce(json_agg(json_build_array(b.sample_id, b.measurand, b.basis, b.n, b.mean, b.lower_edge,
                 b.watch_above, b.act_from, b.to_reported, b.source, b.source_label)
                 order by b.sample_id, b.measurand), '[]')
       from baseline_bands b
       where b.sample_id = any(array(select id from chart_samples)) and b.measurand = any(${codes})),
      (select coalesce(json_agg(json_build_array(o.changed_on, o.odometer, o.sae_grade)
                 order by o.odometer, o.changed_on, o.id), '[]')
       from oil_changes o where o.machine_id = m.id)
    )::text as snapshot
    from machine m
  `.execute(db);
  return result.rows[0]?.snapshot;
}

/** The stored findings of the machine's latest sample with results (none when it has no results yet). */
export async function listLatestSampleFindings(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
): Promise<{ measurand: string | null; level: Level; ruleId: string; numbers: Record<string, unknown> }[]> {
  if (!isUuid(machineId)) return [];
  const latest = await db
    .selectFrom('samples')
    .select('id')
    .where('machine_id', '=', machineId)
    .where('crew_id', '=', crewId)
    .where('state', 'in', ['results_in', 'reviewed'])
    .orderBy('drawn_on', 'desc')
    .orderBy('odometer', 'desc')
    .limit(1)
    .executeTakeFirst();
  if (!latest) return [];
  const rows = await db
    .selectFrom('findings')
    .select(['measurand', 'level', 'rule_id', 'numbers'])
    .where('sample_id', '=', latest.id)
    .execute();
  return rows.map((r) => ({ measurand: r.measurand, level: r.level, ruleId: r.rule_id, numbers: r.numbers ?? {} }));
}

/**
 * A fingerprint of everything the wear chart reads for one machine of the crew and these measurands, without
 * reading it: per table, the count of the rows and the sum of their xmin (the id of the transaction that last wrote
 * each row, which PostgreSQL keeps on every row version). An insert or delete changes the count, an update gives its
 * row a newer xmin, so any committed write the chart would see changes the fingerprint, and a write to an element
 * the chart does not show does not. Undefined when the machine is not the crew's.
 */
export async function findTrendDataFingerprint(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
  measurands: readonly MeasurandCode[],
): Promise<string | undefined> {
  if (!isUuid(machineId)) return undefined;
  const codes = sql`${[...measurands]}::text[]`;
  const result = await sql<{ fingerprint: string | null }>`
    with machine as (
      select id, xmin::text as x from machines where id = ${machineId} and crew_id = ${crewId}
    ), machine_samples as (
      select s.id, s.xmin from samples s where s.machine_id = (select id from machine)
    )
    select (select x from machine)
      || '|' || (select count(*) || ':' || coalesce(sum(xmin::text::bigint), 0) from machine_samples)
      || '|' || (select count(*) || ':' || coalesce(sum(r.xmin::text::bigint), 0)
                 from readings r
                 where r.sample_id = any(array(select id from machine_samples)) and r.measurand = any(${codes}))
      || '|' || (select count(*) || ':' || coalesce(sum(f.xmin::text::bigint), 0)
                 from findings f
                 where f.sample_id = any(array(select id from machine_samples)) and f.measurand = any(${codes}))
      || '|' || (select count(*) || ':' || coalesce(sum(b.xmin::text::bigint), 0)
                 from baseline_bands b
                 where b.sample_id = any(array(select id from machine_samples)) and b.measurand = any(${codes}))
      || '|' || (select count(*) || ':' || coalesce(sum(o.xmin::text::bigint), 0)
                 from oil_changes o where o.machine_id = (select id from machine)) as fingerprint
  `.execute(db);
  return result.rows[0]?.fingerprint ?? undefined;
}
