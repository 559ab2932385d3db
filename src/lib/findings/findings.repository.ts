/**
 * Every query of judging a machine's samples: what the engine reads (profile, samples with readings, crew limits,
 * same-engine peers) and what it writes (findings, the engine's interval calls, the bands the rules used).
 * Each function takes `db` or a transaction first.
 */
import { sql, type Kysely, type Transaction } from 'kysely';
import { copyRows, type CopyValue } from '../db/copy';
import { BAND_FIGURE_COLUMNS, type Database, type IntervalCallKind, type Level } from '../db/database';
import type { StoredBand } from '../trends/trend-types';
import type { FindingsSample, StoredFinding, StoredReading, StoredSampleBand } from './findings-view';

type Db = Kysely<Database> | Transaction<Database>;

/** A machine's profile for the analysis engine, scoped to the crew through the sample. */
export function findMachineOfSample(db: Db, sampleId: string) {
  return db
    .selectFrom('samples')
    .innerJoin('machines', 'machines.id', 'samples.machine_id')
    .select([
      'machines.id',
      'machines.crew_id',
      'machines.cooling',
      'machines.meter',
      'machines.oil_capacity_l',
      'machines.max_interval_distance',
      'machines.max_interval_days',
    ])
    .where('samples.id', '=', sampleId)
    .executeTakeFirst();
}

export function findMachineProfile(db: Db, machineId: string) {
  return db
    .selectFrom('machines')
    .select([
      'id',
      'crew_id',
      'cooling',
      'meter',
      'oil_capacity_l',
      'max_interval_distance',
      'max_interval_days',
      'shared_oil',
      'judged_by',
      'engine_layout',
      'displacement_cc',
    ])
    .where('id', '=', machineId)
    .executeTakeFirst();
}

/** What the engine needs of a stored sample (with a left join of its oil change). */
const SAMPLE_POINT_COLUMNS = [
  'samples.id',
  'samples.drawn_on',
  'samples.odometer',
  'samples.distance_on_oil',
  'samples.top_up_l',
  'samples.sae_grade',
  'samples.oil_product',
  'samples.in_baseline',
  'samples.baseline_note',
  'samples.break_in',
  'samples.created_at',
  'oil_changes.volume_l',
] as const;

/** Every sample of a machine that has readings, oldest first, with its oil change's oil volume. */
export function findSamplesWithReadings(db: Db, machineId: string) {
  return db
    .selectFrom('samples')
    .leftJoin('oil_changes', 'oil_changes.id', 'samples.oil_change_id')
    .select([
      ...SAMPLE_POINT_COLUMNS,
      // The day the results arrived: "next sample by" counts from it when the lab took a while.
      (eb) =>
        eb
          .selectFrom('readings')
          .innerJoin('lab_imports', 'lab_imports.id', 'readings.lab_import_id')
          .select((e) => e.fn.max('lab_imports.confirmed_at').as('at'))
          .whereRef('readings.sample_id', '=', 'samples.id')
          .as('results_at'),
    ])
    .where('samples.machine_id', '=', machineId)
    .where((eb) =>
      eb.exists(
        eb.selectFrom('readings').select('readings.sample_id').whereRef('readings.sample_id', '=', 'samples.id'),
      ),
    )
    .orderBy('samples.drawn_on')
    .orderBy('samples.odometer')
    .orderBy('samples.created_at')
    .execute();
}

/**
 * The crew's other machines (not archived) with this layout, cooling and sump setting, with how many samples with
 * readings each has; displacement and meter are compared by isSameEngine. Never another crew's machines.
 */
export function findEngineCandidates(
  db: Db,
  crewId: string,
  machineId: string,
  engine: { layout: string; cooling: string; sharedOil: boolean },
) {
  return db
    .selectFrom('machines')
    .select([
      'machines.id',
      'machines.engine_layout',
      'machines.displacement_cc',
      'machines.cooling',
      'machines.shared_oil',
      'machines.meter',
    ])
    .select((eb) =>
      eb
        .selectFrom('samples')
        .select((e) => e.fn.countAll<string>().as('n'))
        .whereRef('samples.machine_id', '=', 'machines.id')
        .where((e) =>
          e.exists(
            e.selectFrom('readings').select('readings.sample_id').whereRef('readings.sample_id', '=', 'samples.id'),
          ),
        )
        .as('samples_with_readings'),
    )
    .where('machines.crew_id', '=', crewId)
    .where('machines.id', '!=', machineId)
    .where('machines.archived_at', 'is', null)
    .where('machines.engine_layout', '=', engine.layout as 'single')
    .where('machines.cooling', '=', engine.cooling as 'air')
    .where('machines.shared_oil', '=', engine.sharedOil)
    .orderBy('machines.id')
    .execute();
}

/** The most recent samples a crew reference may read (a bound on one query, far above what a band uses). */
export const REFERENCE_SAMPLE_CAP = 2000;

/**
 * Samples with readings of these machines of the crew, oldest first, each with its readings and the measurands an
 * act finding named (those stay out of any band): one query for all machines. Crew-scoped twice (the sample and
 * its machine), so a machine id of another crew brings nothing.
 */
export async function findReferenceSamples(db: Db, crewId: string, machineIds: readonly string[]) {
  if (machineIds.length === 0) return [];
  const rows = await db
    .selectFrom('samples')
    .innerJoin('machines', 'machines.id', 'samples.machine_id')
    .leftJoin('oil_changes', 'oil_changes.id', 'samples.oil_change_id')
    .select([
      ...SAMPLE_POINT_COLUMNS,
      'samples.machine_id',
      'machines.oil_capacity_l',
      sql<Date | null>`null::timestamptz`.as('results_at'),
      sql<
        [string, number, string | null][]
      >`(select coalesce(json_agg(json_build_array(r.measurand, r.value, r.qualifier)), '[]'::json) from readings r where r.sample_id = samples.id)`.as(
        'readings',
      ),
      sql<
        string[]
      >`(select coalesce(array_agg(distinct f.measurand), '{}') from findings f where f.sample_id = samples.id and f.level = 'act' and f.measurand is not null)`.as(
        'acted',
      ),
    ])
    .where('samples.crew_id', '=', crewId)
    .where('machines.crew_id', '=', crewId)
    .where('samples.machine_id', '=', sql<string>`any(${sql.val(machineIds)}::uuid[])`)
    .where((eb) =>
      eb.exists(
        eb.selectFrom('readings').select('readings.sample_id').whereRef('readings.sample_id', '=', 'samples.id'),
      ),
    )
    .orderBy('samples.drawn_on', 'desc')
    .orderBy('samples.odometer', 'desc')
    .orderBy('samples.created_at', 'desc')
    .limit(REFERENCE_SAMPLE_CAP)
    .execute();
  return rows.reverse();
}

/** The readings of a set of samples. */
export async function findReadingsOfSamples(db: Db, sampleIds: readonly string[]) {
  if (sampleIds.length === 0) return [];
  return db
    .selectFrom('readings')
    .select(['sample_id', 'measurand', 'value', 'qualifier'])
    .where('sample_id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`)
    .execute();
}

/** The crew's own fixed limits (act level), by measurand. */
export function findCrewLimits(db: Db, crewId: string) {
  return db.selectFrom('crew_limits').select(['measurand', 'act_at']).where('crew_id', '=', crewId).execute();
}

export interface FindingInsert {
  sampleId: string;
  measurand: string | null;
  level: Level;
  ruleId: string;
  numbers: Record<string, number>;
  sentence: string;
}

/**
 * Delete what the engine stored for these samples (findings, its interval calls, bands), in the caller's
 * transaction, before they are judged again: a mechanic's confirm or override of a call stays.
 */
export async function deleteJudgements(db: Db, sampleIds: readonly string[]): Promise<void> {
  if (sampleIds.length === 0) return;
  const ids = sql<string>`any(${sql.val(sampleIds)}::uuid[])`;
  await db.deleteFrom('findings').where('sample_id', '=', ids).execute();
  await db.deleteFrom('interval_calls').where('sample_id', '=', ids).where('source', '=', 'engine').execute();
  await db.deleteFrom('baseline_bands').where('sample_id', '=', ids).execute();
}

/**
 * The one statement that writes findings: COPY on the caller's connection (inside its transaction). The rows may
 * be a generator, read once as they are sent. Returns how many were written.
 */
export async function insertFindings(db: Db, rows: Iterable<FindingInsert>): Promise<number> {
  return copyRows(
    db,
    'findings',
    ['sample_id', 'measurand', 'level', 'rule_id', 'numbers', 'sentence'],
    (function* findingLines(): Generator<CopyValue[]> {
      for (const f of rows) yield [f.sampleId, f.measurand, f.level, f.ruleId, JSON.stringify(f.numbers), f.sentence];
    })(),
  );
}

export interface IntervalCallInsert {
  sampleId: string;
  machineId: string;
  call: IntervalCallKind;
  nextInterval: number | null;
  nextSampleOdometer: number | null;
  nextSampleOn: string | null;
  reasons: string[];
}

/** Write the engine's interval calls (the samples' earlier ones deleted by deleteJudgements). */
export async function insertEngineCalls(db: Db, rows: readonly IntervalCallInsert[]): Promise<void> {
  const CHUNK = 20_000;
  for (let from = 0; from < rows.length; from += CHUNK) {
    const part = rows.slice(from, from + CHUNK);
    await sql`
      insert into interval_calls (sample_id, machine_id, call, next_interval, next_sample_odometer, next_sample_on, reasons, source)
      select s, m, c, ni, no, nd::date, r::jsonb, 'engine'
      from unnest(${sql.val(part.map((c) => c.sampleId))}::uuid[], ${sql.val(part.map((c) => c.machineId))}::uuid[],
                  ${sql.val(part.map((c) => c.call))}::text[], ${sql.val(part.map((c) => c.nextInterval))}::float8[],
                  ${sql.val(part.map((c) => c.nextSampleOdometer))}::float8[], ${sql.val(part.map((c) => c.nextSampleOn))}::text[],
                  ${sql.val(part.map((c) => JSON.stringify(c.reasons)))}::text[]) as x(s, m, c, ni, no, nd, r)`.execute(
      db,
    );
  }
}

/** A band as written: the stored band (the one the chart and sample page read back) of one sample and measurand. */
export interface BandInsert extends StoredBand {
  sampleId: string;
  measurand: string;
  sourceMachines: number | null;
}

/** Write the stored baseline bands (the bands the rules used); the samples' earlier ones go by deleteJudgements. */
export async function insertBands(db: Db, rows: Iterable<BandInsert>): Promise<void> {
  // As many bands as readings: COPY, like the readings.
  await copyRows(
    db,
    'baseline_bands',
    ['sample_id', ...BAND_FIGURE_COLUMNS],
    (function* bandLines(): Generator<CopyValue[]> {
      for (const b of rows)
        yield [
          b.sampleId,
          b.measurand,
          b.basis,
          b.n,
          b.mean,
          b.lower,
          b.watchAbove,
          b.actFrom,
          b.toReported,
          b.source,
          b.sourceLabel,
          b.sourceMachines,
        ];
    })(),
  );
}

/** Records which engine version judged a machine's stored results. */
export async function markMachineJudged(db: Db, machineId: string, version: string): Promise<void> {
  await db.updateTable('machines').set({ judged_by: version }).where('id', '=', machineId).execute();
}

/** Machines whose stored results another engine version judged (or none), up to `limit`, after `afterId`. */
export function listStaleMachines(db: Db, version: string, afterId: string | null, limit: number) {
  let q = db
    .selectFrom('machines')
    .select('id')
    .where((eb) => eb.or([eb('judged_by', 'is', null), eb('judged_by', '!=', version)]))
    .orderBy('id')
    .limit(limit);
  if (afterId) q = q.where('id', '>', afterId);
  return q.execute();
}

/** Locks one machine row for the rest of the transaction; undefined when it is gone. */
export function lockMachine(db: Db, machineId: string) {
  return db
    .selectFrom('machines')
    .select(['id', 'judged_by'])
    .where('id', '=', machineId)
    .forUpdate()
    .executeTakeFirst();
}

/** A sample of the crew with its machine's distance unit, for its findings view; undefined for another crew's. */
export async function findFindingsSample(
  db: Db,
  crewId: string,
  sampleId: string,
): Promise<FindingsSample | undefined> {
  const row = await db
    .selectFrom('samples')
    .innerJoin('machines', 'machines.id', 'samples.machine_id')
    .select(['samples.id', 'samples.state', 'samples.distance_on_oil', 'machines.meter'])
    .where('samples.id', '=', sampleId)
    .where('samples.crew_id', '=', crewId)
    .executeTakeFirst();
  return (
    row && {
      id: row.id,
      state: row.state,
      distanceOnOil: row.distance_on_oil === null ? null : Number(row.distance_on_oil),
      meter: row.meter,
    }
  );
}

/** The readings of one sample. */
export async function findReadingsOfSample(db: Db, sampleId: string): Promise<StoredReading[]> {
  const rows = await db
    .selectFrom('readings')
    .select(['measurand', 'value', 'qualifier'])
    .where('sample_id', '=', sampleId)
    .execute();
  return rows.map((r) => ({ measurand: r.measurand, value: Number(r.value), qualifier: r.qualifier }));
}

/** The stored findings of one sample. */
export async function findFindingsOfSample(db: Db, sampleId: string): Promise<StoredFinding[]> {
  const rows = await db
    .selectFrom('findings')
    .select(['id', 'measurand', 'level', 'rule_id', 'numbers', 'sentence'])
    .where('sample_id', '=', sampleId)
    .execute();
  return rows.map((r) => ({
    id: r.id,
    measurand: r.measurand,
    level: r.level,
    ruleId: r.rule_id,
    numbers: r.numbers ?? {},
    sentence: r.sentence,
  }));
}

/** The bands the rules used for one sample's readings (ready bands only). */
export async function findBandsOfSample(db: Db, sampleId: string): Promise<StoredSampleBand[]> {
  const rows = await db
    .selectFrom('baseline_bands')
    .select(BAND_FIGURE_COLUMNS)
    .where('sample_id', '=', sampleId)
    .execute();
  return rows.map((b) => ({
    measurand: b.measurand,
    basis: b.basis,
    n: b.n,
    mean: Number(b.mean),
    watchAbove: Number(b.watch_above),
    actFrom: Number(b.act_from),
    toReported: Number(b.to_reported),
    source: b.source,
    sourceLabel: b.source_label,
    sourceMachines: b.source_machines,
  }));
}
