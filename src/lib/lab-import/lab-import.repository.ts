/** Every query of the lab import. Each function takes `db` or a transaction first. */
import { sql, type Kysely, type Transaction } from 'kysely';
import { copyRows, type CopyValue } from '../db/copy';
import type { Database, IntervalCallKind, Level, SampleState } from '../db/database';
import type { StoredBand } from '../trends/trend-types';

type Db = Kysely<Database> | Transaction<Database>;

/** Column list of a lab file without its bytes. */
const FILE_COLUMNS = [
  'lab_files.id',
  'lab_files.crew_id',
  'lab_files.sha256',
  'lab_files.file_name',
  'lab_files.byte_size',
  'lab_files.uploaded_by',
  'lab_files.uploaded_at',
] as const;

/** The crew's lab file with this hash, with its import if it has one. */
export function findLabFileByHash(db: Db, crewId: string, sha256: string) {
  return db
    .selectFrom('lab_files')
    .leftJoin('lab_imports', 'lab_imports.lab_file_id', 'lab_files.id')
    .select([...FILE_COLUMNS, 'lab_imports.id as import_id', 'lab_imports.confirmed_at'])
    .where('lab_files.crew_id', '=', crewId)
    .where('lab_files.sha256', '=', sha256)
    .executeTakeFirst();
}

/** One lab file of the crew (never another crew's), with its import if any. */
export function findLabFileOfCrew(db: Db, crewId: string, id: string) {
  return db
    .selectFrom('lab_files')
    .leftJoin('lab_imports', 'lab_imports.lab_file_id', 'lab_files.id')
    .select([...FILE_COLUMNS, 'lab_imports.id as import_id', 'lab_imports.confirmed_at'])
    .where('lab_files.crew_id', '=', crewId)
    .where('lab_files.id', '=', id)
    .executeTakeFirst();
}

/** The raw bytes of a crew's lab file. */
export async function findLabFileContent(db: Db, crewId: string, id: string): Promise<Buffer | undefined> {
  const row = await db.selectFrom('lab_files').select('content').where('crew_id', '=', crewId).where('id', '=', id).executeTakeFirst();
  return row?.content;
}

/** The crew's latest lab files, newest first, with their import state. */
export function listLabFilesOfCrew(db: Db, crewId: string, limit = 20) {
  return db
    .selectFrom('lab_files')
    .leftJoin('lab_imports', 'lab_imports.lab_file_id', 'lab_files.id')
    .select([...FILE_COLUMNS, 'lab_imports.id as import_id', 'lab_imports.confirmed_at', 'lab_imports.samples_written', 'lab_imports.readings_written'])
    .where('lab_files.crew_id', '=', crewId)
    .orderBy('lab_files.uploaded_at', 'desc')
    .limit(limit)
    .execute();
}

/** Store an upload; on a hash the crew already has, insert nothing and return null. */
export async function insertLabFile(
  db: Db,
  row: { crewId: string; sha256: string; fileName: string; content: Buffer; uploadedBy: string | null; inboundMailId?: string | null },
): Promise<{ id: string } | null> {
  const inserted = await db
    .insertInto('lab_files')
    .values({
      crew_id: row.crewId,
      sha256: row.sha256,
      file_name: row.fileName,
      byte_size: row.content.byteLength,
      content: row.content,
      uploaded_by: row.uploadedBy,
      inbound_mail_id: row.inboundMailId ?? null,
    })
    .onConflict((oc) => oc.columns(['crew_id', 'sha256']).doNothing())
    .returning('id')
    .executeTakeFirst();
  return inserted ?? null;
}

/** The crew's lab profile for a header signature. */
export function findProfileBySignature(db: Db, crewId: string, signature: string) {
  return db
    .selectFrom('lab_profiles')
    .select(['id', 'name', 'header_signature', 'mapping', 'sheet_name'])
    .where('crew_id', '=', crewId)
    .where('header_signature', '=', signature)
    .executeTakeFirst();
}

/** Save (or rename and remap) the crew's profile for a header signature. */
export function upsertProfile(
  db: Db,
  row: { crewId: string; name: string; signature: string; mapping: Record<string, string>; sheetName?: string | null; createdBy: string },
) {
  return db
    .insertInto('lab_profiles')
    .values({
      crew_id: row.crewId,
      name: row.name,
      header_signature: row.signature,
      mapping: JSON.stringify(row.mapping),
      sheet_name: row.sheetName ?? null,
      created_by: row.createdBy,
    })
    .onConflict((oc) =>
      oc.columns(['crew_id', 'header_signature']).doUpdateSet({ name: row.name, mapping: JSON.stringify(row.mapping), sheet_name: row.sheetName ?? null }),
    )
    .returning(['id', 'name'])
    .executeTakeFirstOrThrow();
}

/** Sheet names the crew's lab profiles read workbooks on, most recent profile first. */
export async function listProfileSheetNames(db: Db, crewId: string): Promise<string[]> {
  const rows = await db
    .selectFrom('lab_profiles')
    .select('sheet_name')
    .where('crew_id', '=', crewId)
    .where('sheet_name', 'is not', null)
    .orderBy('created_at', 'desc')
    .limit(50)
    .execute();
  return rows.flatMap((r) => (r.sheet_name ? [r.sheet_name] : []));
}

/** The crew's samples whose normalised bottle code is in `codes`, with their machine and reading count. */
export async function findSamplesByCodes(db: Db, crewId: string, codes: readonly string[]) {
  if (codes.length === 0) return [];
  return db
    .selectFrom('samples')
    .innerJoin('machines', 'machines.id', 'samples.machine_id')
    .select((eb) => [
      'samples.id',
      'samples.machine_id',
      'samples.bottle_code',
      'samples.bottle_code_norm',
      'samples.issued_code',
      'samples.drawn_on',
      'samples.state',
      'machines.name as machine_name',
      eb.selectFrom('readings').select(sql<number>`count(*)::int`.as('n')).whereRef('readings.sample_id', '=', 'samples.id').as('reading_count'),
    ])
    .where('samples.crew_id', '=', crewId)
    .where('machines.crew_id', '=', crewId)
    .where('samples.bottle_code_norm', '=', sql<string>`any(${sql.val(codes)}::text[])`)
    .execute();
}

/** Bottle codes (normal form) of the samples an import wrote readings to. */
export async function findCodesWrittenBy(db: Db, importId: string): Promise<Set<string>> {
  const rows = await db
    .selectFrom('samples')
    .select('bottle_code_norm')
    .where((eb) => eb.exists(eb.selectFrom('readings').select('readings.sample_id').whereRef('readings.sample_id', '=', 'samples.id').where('readings.lab_import_id', '=', importId)))
    .execute();
  return new Set(rows.map((r) => r.bottle_code_norm));
}

/** The crew's machines that are not archived, for the "create the sample on" choice. */
export function findMachinesForImport(db: Db, crewId: string) {
  return db
    .selectFrom('machines')
    .select(['id', 'name'])
    .where('crew_id', '=', crewId)
    .where('archived_at', 'is', null)
    .orderBy('name')
    .execute();
}

/** The newest odometer on file for a machine (samples and oil changes), 0 when there is none. */
export async function findLatestOdometer(db: Db, machineId: string): Promise<number> {
  const row = await db
    .selectFrom('machines')
    .select((eb) => [
      eb.selectFrom('samples').select(sql<number>`max(odometer)`.as('m')).where('samples.machine_id', '=', machineId).as('sample_odo'),
      eb.selectFrom('oil_changes').select(sql<number>`max(odometer)`.as('m')).where('oil_changes.machine_id', '=', machineId).as('change_odo'),
    ])
    .where('id', '=', machineId)
    .executeTakeFirst();
  return Math.max(row?.sample_odo ?? 0, row?.change_odo ?? 0);
}

/** Create a sample for a lab row whose bottle was never registered on a drain card. */
export function insertSampleForRow(
  db: Db,
  row: { crewId: string; machineId: string; bottleCode: string; bottleCodeNorm: string; drawnOn: string; odometer: number; createdBy: string },
) {
  return db
    .insertInto('samples')
    .values({
      crew_id: row.crewId,
      machine_id: row.machineId,
      bottle_code: row.bottleCode,
      bottle_code_norm: row.bottleCodeNorm,
      drawn_on: row.drawnOn,
      odometer: row.odometer,
      distance_on_oil: null,
      // Without the odometer of its oil change, the sample cannot join the baseline honestly.
      in_baseline: false,
      tracking_note: 'Created from a lab import: bottle not registered on a drain card.',
      client_key: null,
      created_by: row.createdBy,
      sae_grade: null,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
}

export function insertLabImport(
  db: Db,
  row: { crewId: string; labFileId: string; confirmedBy: string; samplesWritten: number; readingsWritten: number },
) {
  return db
    .insertInto('lab_imports')
    .values({
      crew_id: row.crewId,
      lab_file_id: row.labFileId,
      confirmed_by: row.confirmedBy,
      samples_written: row.samplesWritten,
      readings_written: row.readingsWritten,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
}

/** Copy the current readings of these samples into reading_history, then delete them. */
export async function moveReadingsToHistory(db: Db, sampleIds: readonly string[], importId: string): Promise<number> {
  if (sampleIds.length === 0) return 0;
  const moved = await sql<{ n: number }>`
    with gone as (
      delete from readings where sample_id = any(${sql.val(sampleIds)}::uuid[])
      returning sample_id, measurand, value, qualifier
    ), kept as (
      insert into reading_history (sample_id, measurand, value, qualifier, replaced_by_import)
      select sample_id, measurand, value, qualifier, ${importId}::uuid from gone
      returning 1
    )
    select count(*)::int as n from kept`.execute(db);
  return moved.rows[0]?.n ?? 0;
}

/** Readings as parallel columns: index i of each array is one reading. */
export interface ReadingColumns {
  sampleIds: string[];
  measurands: string[];
  values: number[];
  qualifiers: ('<' | '>' | null)[];
}

/**
 * The readings, written with COPY on the caller's connection (inside its transaction): PostgreSQL's fastest way
 * in, streamed in 64 KB chunks so no statement of the whole file is built in memory.
 */
export async function insertReadings(db: Db, rows: ReadingColumns, importId: string): Promise<number> {
  const n = rows.sampleIds.length;
  if (n === 0) return 0;
  function* lines(): Generator<CopyValue[]> {
    const line: CopyValue[] = ['', '', 0, null, importId];
    for (let i = 0; i < n; i += 1) {
      line[0] = rows.sampleIds[i]!;
      line[1] = rows.measurands[i]!;
      line[2] = rows.values[i]!;
      line[3] = rows.qualifiers[i] ?? null;
      yield line;
    }
  }
  await copyRows(db, 'readings', ['sample_id', 'measurand', 'value', 'qualifier', 'lab_import_id'], lines());
  return n;
}

/** Move samples to a state, with one sample_events row each. */
export async function updateSampleStates(db: Db, sampleIds: readonly string[], state: SampleState, note: string, actorUserId: string): Promise<void> {
  if (sampleIds.length === 0) return;
  await db.updateTable('samples').set({ state }).where('id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`).execute();
  await sql`
    insert into sample_events (sample_id, state, note, actor_user_id)
    select s, ${state}, ${note}, ${actorUserId} from unnest(${sql.val(sampleIds)}::uuid[]) as t(s)`.execute(db);
}

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
    .select(['id', 'crew_id', 'cooling', 'meter', 'oil_capacity_l', 'max_interval_distance', 'max_interval_days', 'shared_oil', 'judged_by', 'engine_layout', 'displacement_cc'])
    .where('id', '=', machineId)
    .executeTakeFirst();
}

/** What the engine needs of a stored sample (with a left join of its oil change). */
const SAMPLE_POINT_COLUMNS = [
  'samples.id', 'samples.drawn_on', 'samples.odometer', 'samples.distance_on_oil', 'samples.top_up_l', 'samples.sae_grade',
  'samples.oil_product', 'samples.in_baseline', 'samples.baseline_note', 'samples.break_in', 'samples.created_at', 'oil_changes.volume_l',
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
        eb.selectFrom('readings')
          .innerJoin('lab_imports', 'lab_imports.id', 'readings.lab_import_id')
          .select((e) => e.fn.max('lab_imports.confirmed_at').as('at'))
          .whereRef('readings.sample_id', '=', 'samples.id')
          .as('results_at'),
    ])
    .where('samples.machine_id', '=', machineId)
    .where((eb) => eb.exists(eb.selectFrom('readings').select('readings.sample_id').whereRef('readings.sample_id', '=', 'samples.id')))
    .orderBy('samples.drawn_on')
    .orderBy('samples.odometer')
    .orderBy('samples.created_at')
    .execute();
}

/**
 * The crew's other machines (not archived) with this layout, cooling and sump setting, with how many samples with
 * readings each has; displacement and meter are compared by isSameEngine. Never another crew's machines.
 */
export function findEngineCandidates(db: Db, crewId: string, machineId: string, engine: { layout: string; cooling: string; sharedOil: boolean }) {
  return db
    .selectFrom('machines')
    .select(['machines.id', 'machines.engine_layout', 'machines.displacement_cc', 'machines.cooling', 'machines.shared_oil', 'machines.meter'])
    .select((eb) =>
      eb.selectFrom('samples')
        .select((e) => e.fn.countAll<string>().as('n'))
        .whereRef('samples.machine_id', '=', 'machines.id')
        .where((e) => e.exists(e.selectFrom('readings').select('readings.sample_id').whereRef('readings.sample_id', '=', 'samples.id')))
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
      sql<[string, number, string | null][]>`(select coalesce(json_agg(json_build_array(r.measurand, r.value, r.qualifier)), '[]'::json) from readings r where r.sample_id = samples.id)`.as('readings'),
      sql<string[]>`(select coalesce(array_agg(distinct f.measurand), '{}') from findings f where f.sample_id = samples.id and f.level = 'act' and f.measurand is not null)`.as('acted'),
    ])
    .where('samples.crew_id', '=', crewId)
    .where('machines.crew_id', '=', crewId)
    .where('samples.machine_id', '=', sql<string>`any(${sql.val(machineIds)}::uuid[])`)
    .where((eb) => eb.exists(eb.selectFrom('readings').select('readings.sample_id').whereRef('readings.sample_id', '=', 'samples.id')))
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

/** Replace the findings of these samples with new ones, written with COPY in the caller's transaction. */
export async function replaceFindings(db: Db, sampleIds: readonly string[], rows: readonly FindingInsert[]): Promise<void> {
  if (sampleIds.length === 0) return;
  await db.deleteFrom('findings').where('sample_id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`).execute();
  if (rows.length === 0) return;
  await copyRows(
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

/** Replace the engine's interval calls of these samples (a mechanic's confirm or override stays). */
export async function replaceEngineCalls(db: Db, sampleIds: readonly string[], rows: readonly IntervalCallInsert[]): Promise<void> {
  if (sampleIds.length === 0) return;
  await db
    .deleteFrom('interval_calls')
    .where('sample_id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`)
    .where('source', '=', 'engine')
    .execute();
  const CHUNK = 20_000;
  for (let from = 0; from < rows.length; from += CHUNK) {
    const part = rows.slice(from, from + CHUNK);
    await sql`
      insert into interval_calls (sample_id, machine_id, call, next_interval, next_sample_odometer, next_sample_on, reasons, source)
      select s, m, c, ni, no, nd::date, r::jsonb, 'engine'
      from unnest(${sql.val(part.map((c) => c.sampleId))}::uuid[], ${sql.val(part.map((c) => c.machineId))}::uuid[],
                  ${sql.val(part.map((c) => c.call))}::text[], ${sql.val(part.map((c) => c.nextInterval))}::float8[],
                  ${sql.val(part.map((c) => c.nextSampleOdometer))}::float8[], ${sql.val(part.map((c) => c.nextSampleOn))}::text[],
                  ${sql.val(part.map((c) => JSON.stringify(c.reasons)))}::text[]) as x(s, m, c, ni, no, nd, r)`.execute(db);
  }
}

/** A band as written: the stored band (the one the chart and sample page read back) of one sample and measurand. */
export interface BandInsert extends StoredBand {
  sampleId: string;
  measurand: string;
  sourceMachines: number | null;
}

/** Replace the stored baseline bands of these samples (the bands the rules used), written with COPY in the caller's transaction. */
export async function replaceBands(db: Db, sampleIds: readonly string[], rows: readonly BandInsert[]): Promise<void> {
  if (sampleIds.length === 0) return;
  await db.deleteFrom('baseline_bands').where('sample_id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`).execute();
  if (rows.length === 0) return;
  await copyRows(
    db,
    'baseline_bands',
    ['sample_id', 'measurand', 'basis', 'n', 'mean', 'lower_edge', 'watch_above', 'act_from', 'to_reported', 'source', 'source_label', 'source_machines'],
    (function* bandLines(): Generator<CopyValue[]> {
      for (const b of rows) yield [b.sampleId, b.measurand, b.basis, b.n, b.mean, b.lower, b.watchAbove, b.actFrom, b.toReported, b.source, b.sourceLabel, b.sourceMachines];
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
  return db.selectFrom('machines').select(['id', 'judged_by']).where('id', '=', machineId).forUpdate().executeTakeFirst();
}
