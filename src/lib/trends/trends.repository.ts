/** Queries behind the wear chart: one machine's samples with results, their readings and stored findings. */
import { sql, type Kysely } from 'kysely';
import { isMeasurandCode, type MeasurandCode } from '../analysis';
import { BAND_FIGURE_COLUMNS, type Database, type Level, type MachineRow } from '../db/database';
import { levelRank } from '../levels';
import type { TrendOilChangeRow, TrendSampleRow } from './trends';
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

/** Samples with results (results in or reviewed), oldest first, with the requested readings and finding levels. */
export async function listTrendSamples(
  db: Kysely<Database>,
  machine: { id: string; oil_capacity_l: number | null },
  measurands: readonly MeasurandCode[],
): Promise<TrendSampleRow[]> {
  const samples = await db
    .selectFrom('samples')
    .leftJoin('oil_changes', 'oil_changes.id', 'samples.oil_change_id')
    .select([
      'samples.id',
      'samples.bottle_code',
      'samples.drawn_on',
      'samples.odometer',
      'samples.distance_on_oil',
      'samples.sae_grade',
      'samples.top_up_l',
      'samples.in_baseline',
      'samples.baseline_note',
      'samples.break_in',
      'oil_changes.volume_l',
    ])
    .where('samples.machine_id', '=', machine.id)
    .where('samples.state', 'in', ['results_in', 'reviewed'])
    .orderBy('samples.drawn_on')
    .orderBy('samples.odometer')
    .execute();
  if (samples.length === 0) return [];
  // The child rows are found by the machine's sample ids as one array built in the query, not as a list of 200
  // parameters from here: nothing per sample to send or plan, and each lookup still goes through the child
  // table's primary key (a join may choose to scan the whole readings table while it is small).
  const ofSamples = sql<boolean>`sample_id = any(array(
    select id from samples where machine_id = ${machine.id} and state in ('results_in', 'reviewed')))`;
  const [readings, findings, bands] = await Promise.all([
    db
      .selectFrom('readings')
      .select(['sample_id', 'measurand', 'value', 'qualifier'])
      .where(ofSamples)
      .where('measurand', 'in', [...measurands])
      .execute(),
    db
      .selectFrom('findings')
      .select(['sample_id', 'measurand', 'level'])
      .where(ofSamples)
      .where('measurand', 'in', [...measurands])
      .execute(),
    db
      .selectFrom('baseline_bands')
      .select(['sample_id', ...BAND_FIGURE_COLUMNS])
      .where(ofSamples)
      .where('measurand', 'in', [...measurands])
      .execute(),
  ]);
  const byId = new Map<string, TrendSampleRow>();
  for (const s of samples) {
    byId.set(s.id, {
      id: s.id,
      bottleCode: s.bottle_code,
      drawnOn: s.drawn_on,
      odometerStored: Number(s.odometer),
      distanceOnOilStored: s.distance_on_oil === null ? null : Number(s.distance_on_oil),
      grade: s.sae_grade,
      topUpL: Number(s.top_up_l),
      oilVolumeL:
        s.volume_l !== null
          ? Number(s.volume_l)
          : machine.oil_capacity_l !== null
            ? Number(machine.oil_capacity_l)
            : null,
      inBaseline: s.in_baseline,
      baselineNote: s.in_baseline
        ? null
        : s.baseline_note || (s.break_in ? 'Break-in oil.' : 'Kept out of the baseline.'),
      readings: {},
      bands: {},
      levels: {},
    });
  }
  for (const r of readings) {
    const row = byId.get(r.sample_id);
    if (row && isMeasurandCode(r.measurand))
      row.readings[r.measurand] = { value: Number(r.value), qualifier: r.qualifier };
  }
  for (const b of bands) {
    const row = byId.get(b.sample_id);
    if (!row || !isMeasurandCode(b.measurand)) continue;
    row.bands[b.measurand] = {
      basis: b.basis,
      n: b.n,
      mean: Number(b.mean),
      lower: Number(b.lower_edge),
      watchAbove: Number(b.watch_above),
      actFrom: Number(b.act_from),
      toReported: Number(b.to_reported),
      source: b.source,
      sourceLabel: b.source_label,
    };
  }
  for (const f of findings) {
    const row = byId.get(f.sample_id);
    if (!row || f.measurand === null || !isMeasurandCode(f.measurand)) continue;
    const prev: Level = row.levels[f.measurand] ?? 'steady';
    if (levelRank(f.level) > levelRank(prev)) row.levels[f.measurand] = f.level;
  }
  return [...byId.values()];
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

/** The machine's oil changes with the grade poured, for grade-change marks. */
export async function listTrendOilChanges(db: Kysely<Database>, machineId: string): Promise<TrendOilChangeRow[]> {
  const rows = await db
    .selectFrom('oil_changes')
    .select(['changed_on', 'odometer', 'sae_grade'])
    .where('machine_id', '=', machineId)
    .orderBy('odometer')
    .execute();
  return rows.map((r) => ({ changedOn: r.changed_on, odometerStored: Number(r.odometer), grade: r.sae_grade }));
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
