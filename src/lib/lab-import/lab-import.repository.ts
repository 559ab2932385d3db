/** Every query of the lab import. Each function takes `db` or a transaction first. */
import { sql, type Kysely, type Transaction } from 'kysely';
import { copyRows, type CopyValue } from '../db/copy';
import type { Database } from '../db/database';

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

/** Locks a crew's lab file row for the rest of the transaction: one confirm of a file at a time. */
export async function lockLabFile(db: Db, crewId: string, id: string): Promise<void> {
  await db
    .selectFrom('lab_files')
    .select('id')
    .where('id', '=', id)
    .where('crew_id', '=', crewId)
    .forUpdate()
    .execute();
}

/** The raw bytes of a crew's lab file. */
export async function findLabFileContent(db: Db, crewId: string, id: string): Promise<Buffer | undefined> {
  const row = await db
    .selectFrom('lab_files')
    .select('content')
    .where('crew_id', '=', crewId)
    .where('id', '=', id)
    .executeTakeFirst();
  return row?.content;
}

/** The crew's latest lab files, newest first, with their import state. */
export function listLabFilesOfCrew(db: Db, crewId: string, limit = 20) {
  return db
    .selectFrom('lab_files')
    .leftJoin('lab_imports', 'lab_imports.lab_file_id', 'lab_files.id')
    .select([
      ...FILE_COLUMNS,
      'lab_imports.id as import_id',
      'lab_imports.confirmed_at',
      'lab_imports.samples_written',
      'lab_imports.readings_written',
    ])
    .where('lab_files.crew_id', '=', crewId)
    .orderBy('lab_files.uploaded_at', 'desc')
    .limit(limit)
    .execute();
}

/** Store an upload; on a hash the crew already has, insert nothing and return null. */
export async function insertLabFile(
  db: Db,
  row: {
    crewId: string;
    sha256: string;
    fileName: string;
    content: Buffer;
    uploadedBy: string | null;
    inboundMailId?: string | null;
  },
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
  row: {
    crewId: string;
    name: string;
    signature: string;
    mapping: Record<string, string>;
    sheetName?: string | null;
    createdBy: string;
  },
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
      oc
        .columns(['crew_id', 'header_signature'])
        .doUpdateSet({ name: row.name, mapping: JSON.stringify(row.mapping), sheet_name: row.sheetName ?? null }),
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
      eb
        .selectFrom('readings')
        .select(sql<number>`count(*)::int`.as('n'))
        .whereRef('readings.sample_id', '=', 'samples.id')
        .as('reading_count'),
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
    .where((eb) =>
      eb.exists(
        eb
          .selectFrom('readings')
          .select('readings.sample_id')
          .whereRef('readings.sample_id', '=', 'samples.id')
          .where('readings.lab_import_id', '=', importId),
      ),
    )
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
      eb
        .selectFrom('samples')
        .select(sql<number>`max(odometer)`.as('m'))
        .where('samples.machine_id', '=', machineId)
        .as('sample_odo'),
      eb
        .selectFrom('oil_changes')
        .select(sql<number>`max(odometer)`.as('m'))
        .where('oil_changes.machine_id', '=', machineId)
        .as('change_odo'),
    ])
    .where('id', '=', machineId)
    .executeTakeFirst();
  return Math.max(row?.sample_odo ?? 0, row?.change_odo ?? 0);
}

/** Create a sample for a lab row whose bottle was never registered on a drain card. */
export function insertSampleForRow(
  db: Db,
  row: {
    crewId: string;
    machineId: string;
    bottleCode: string;
    bottleCodeNorm: string;
    drawnOn: string;
    odometer: number;
    createdBy: string;
  },
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
