/** Queries of a machine's printable history: its samples with key readings, findings and interval calls. */
import { sql, type Kysely, type Transaction } from 'kysely';
import type { Database } from '../db/database';
import type { HistoryCall, HistoryFinding, HistoryReading, HistorySample } from './machine-history';

type Db = Kysely<Database> | Transaction<Database>;

/** The machine's samples of the crew, oldest first (day drawn, then odometer). */
export async function findHistorySamples(db: Db, crewId: string, machineId: string): Promise<HistorySample[]> {
  const rows = await db
    .selectFrom('samples')
    .select(['id', 'bottle_code', 'drawn_on', 'odometer', 'distance_on_oil', 'sae_grade', 'state'])
    .where('crew_id', '=', crewId)
    .where('machine_id', '=', machineId)
    .orderBy('drawn_on')
    .orderBy('odometer')
    .execute();
  return rows.map((r) => ({
    id: r.id,
    bottleCode: r.bottle_code,
    drawnOn: r.drawn_on,
    odometer: Number(r.odometer),
    distanceOnOil: r.distance_on_oil === null ? null : Number(r.distance_on_oil),
    saeGrade: r.sae_grade,
    state: r.state,
  }));
}

/** The readings of these samples for the given measurands only. */
export async function findHistoryReadings(
  db: Db,
  sampleIds: readonly string[],
  measurands: readonly string[],
): Promise<HistoryReading[]> {
  if (sampleIds.length === 0) return [];
  const rows = await db
    .selectFrom('readings')
    .select(['sample_id', 'measurand', 'value', 'qualifier'])
    .where('sample_id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`)
    .where('measurand', 'in', [...measurands])
    .execute();
  return rows.map((r) => ({
    sampleId: r.sample_id,
    measurand: r.measurand,
    value: Number(r.value),
    qualifier: r.qualifier,
  }));
}

/** The findings of these samples. */
export async function findHistoryFindings(db: Db, sampleIds: readonly string[]): Promise<HistoryFinding[]> {
  if (sampleIds.length === 0) return [];
  const rows = await db
    .selectFrom('findings')
    .select(['sample_id', 'measurand', 'level', 'rule_id', 'sentence'])
    .where('sample_id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`)
    .execute();
  return rows.map((r) => ({
    sampleId: r.sample_id,
    measurand: r.measurand,
    level: r.level,
    ruleId: r.rule_id,
    sentence: r.sentence,
  }));
}

/** Every interval call of these samples, newest first, with its author's name and role in the crew. */
export async function findHistoryCalls(db: Db, crewId: string, sampleIds: readonly string[]): Promise<HistoryCall[]> {
  if (sampleIds.length === 0) return [];
  const rows = await db
    .selectFrom('interval_calls')
    .leftJoin('crew_members as cm', (j) =>
      j.onRef('cm.user_id', '=', 'interval_calls.made_by').on('cm.crew_id', '=', crewId),
    )
    .leftJoin('users as u', 'u.id', 'interval_calls.made_by')
    .select([
      'interval_calls.sample_id',
      'interval_calls.call',
      'interval_calls.source',
      'interval_calls.note',
      'interval_calls.created_at',
      'cm.role as author_role',
      'u.display_name as author_name',
    ])
    .where('interval_calls.sample_id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`)
    .orderBy('interval_calls.created_at', 'desc')
    .execute();
  return rows.map((r) => ({
    sampleId: r.sample_id,
    call: r.call,
    source: r.source,
    note: r.note,
    createdAt: r.created_at,
    authorRole: r.author_role,
    authorName: r.author_name,
  }));
}
