/** Queries of review notes and interval calls; every read is scoped by the crew. */
import { sql, type Kysely, type Transaction } from 'kysely';
import { BAND_FIGURE_COLUMNS, type Database } from '../db/database';
import { isUuid } from '../ids';
import type { BaselineStatus, CallHistoryEntry, ReviewNote } from './reviews';

type Db = Kysely<Database> | Transaction<Database>;

/** The crew's sample with its machine's meter, or undefined. */
export async function findReviewSample(db: Db, crewId: string, sampleId: string) {
  if (!isUuid(sampleId)) return undefined;
  return db
    .selectFrom('samples')
    .innerJoin('machines', 'machines.id', 'samples.machine_id')
    .select([
      'samples.id',
      'samples.machine_id',
      'samples.state',
      'samples.odometer',
      'samples.bottle_code',
      'machines.meter',
      'machines.name as machine_name',
    ])
    .where('samples.id', '=', sampleId)
    .where('samples.crew_id', '=', crewId)
    .executeTakeFirst();
}

/** Every interval call of a sample, newest first, with who made it. */
export async function listCallHistory(db: Db, sampleId: string): Promise<CallHistoryEntry[]> {
  const rows = await db
    .selectFrom('interval_calls')
    .leftJoin('users', 'users.id', 'interval_calls.made_by')
    .select([
      'interval_calls.id',
      'interval_calls.call',
      'interval_calls.source',
      'interval_calls.next_interval',
      'interval_calls.next_sample_odometer',
      'interval_calls.next_sample_on',
      'interval_calls.reasons',
      'interval_calls.note',
      'interval_calls.created_at',
      'users.display_name',
    ])
    .where('interval_calls.sample_id', '=', sampleId)
    .orderBy('interval_calls.created_at', 'desc')
    // Rows written in one transaction share created_at: a reviewer's call ranks above the engine's.
    .orderBy(sql`case interval_calls.source when 'engine' then 0 else 1 end`, 'desc')
    .orderBy('interval_calls.id', 'desc')
    .execute();
  return rows.map((r) => ({
    id: r.id,
    call: r.call,
    source: r.source,
    nextInterval: r.next_interval === null ? null : Number(r.next_interval),
    nextSampleOdometer: r.next_sample_odometer === null ? null : Number(r.next_sample_odometer),
    nextSampleOn: r.next_sample_on === null ? null : String(r.next_sample_on).slice(0, 10),
    reasons: Array.isArray(r.reasons) ? r.reasons : [],
    note: r.note,
    madeByName: r.display_name,
    createdAt: r.created_at,
  }));
}

/** Insert one interval call row (a confirm or an override). */
export async function insertIntervalCall(
  db: Db,
  row: {
    sampleId: string;
    machineId: string;
    call: CallHistoryEntry['call'];
    source: 'confirmed' | 'override';
    nextInterval: number | null;
    nextSampleOdometer: number | null;
    nextSampleOn: string | null;
    reasons: string[];
    note: string;
    madeBy: string;
  },
): Promise<string> {
  const r = await db
    .insertInto('interval_calls')
    .values({
      sample_id: row.sampleId,
      machine_id: row.machineId,
      call: row.call,
      source: row.source,
      next_interval: row.nextInterval,
      next_sample_odometer: row.nextSampleOdometer,
      next_sample_on: row.nextSampleOn,
      reasons: JSON.stringify(row.reasons),
      note: row.note,
      made_by: row.madeBy,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return r.id;
}

/** Review notes of a sample, oldest first, with the author's name and role in the sample's crew. */
export async function listReviewNotes(db: Db, crewId: string, sampleId: string): Promise<ReviewNote[]> {
  const rows = await db
    .selectFrom('review_notes')
    .innerJoin('users', 'users.id', 'review_notes.author_user_id')
    .leftJoin('crew_members', (j) =>
      j.onRef('crew_members.user_id', '=', 'review_notes.author_user_id').on('crew_members.crew_id', '=', crewId),
    )
    .select([
      'review_notes.id',
      'review_notes.body',
      'review_notes.created_at',
      'users.display_name',
      'crew_members.role',
    ])
    .where('review_notes.sample_id', '=', sampleId)
    .orderBy('review_notes.created_at')
    .orderBy('review_notes.id')
    .execute();
  return rows.map((r) => ({
    id: r.id,
    body: r.body,
    authorName: r.display_name,
    authorRole: r.role,
    createdAt: r.created_at,
  }));
}

/** Insert a review note. */
export async function insertReviewNote(db: Db, sampleId: string, authorUserId: string, body: string): Promise<string> {
  const r = await db
    .insertInto('review_notes')
    .values({ sample_id: sampleId, author_user_id: authorUserId, body })
    .returning('id')
    .executeTakeFirstOrThrow();
  return r.id;
}

/** Whether the crew's sample counts in its machine's baseline, with who changed that and why. */
export async function findBaselineStatus(
  db: Db,
  crewId: string,
  sampleId: string,
): Promise<BaselineStatus | undefined> {
  if (!isUuid(sampleId)) return undefined;
  const row = await db
    .selectFrom('samples')
    .leftJoin('users', 'users.id', 'samples.baseline_changed_by')
    .select([
      'samples.in_baseline',
      'samples.baseline_note',
      'samples.break_in',
      'samples.baseline_changed_at',
      'users.display_name',
    ])
    .where('samples.id', '=', sampleId)
    .where('samples.crew_id', '=', crewId)
    .executeTakeFirst();
  if (!row) return undefined;
  return {
    inBaseline: row.in_baseline,
    note: row.baseline_note,
    breakIn: row.break_in,
    changedByName: row.display_name,
    changedAt: row.baseline_changed_at,
  };
}

/** Takes a sample out of its machine's baseline or puts it back, with the reason and who did it. */
export async function updateSampleBaseline(
  db: Db,
  sampleId: string,
  change: { inBaseline: boolean; note: string; breakIn: boolean; userId: string },
): Promise<void> {
  await db
    .updateTable('samples')
    .set({
      in_baseline: change.inBaseline,
      baseline_note: change.note,
      break_in: change.breakIn,
      baseline_changed_by: change.userId,
      baseline_changed_at: sql`now()`,
    })
    .where('id', '=', sampleId)
    .execute();
}

/** The baseline bands the rules used for a sample's readings (ready bands only), by measurand. */
export async function listSampleBands(db: Db, sampleId: string) {
  if (!isUuid(sampleId)) return [];
  return db.selectFrom('baseline_bands').select(BAND_FIGURE_COLUMNS).where('sample_id', '=', sampleId).execute();
}

/**
 * The reviewer's own confirmations among `callIds` on the crew's samples, with whether each was written within
 * the last `withinSeconds` and is still its sample's current call.
 */
export async function findOwnConfirmations(
  db: Db,
  crewId: string,
  userId: string,
  callIds: readonly string[],
  withinSeconds: number,
): Promise<{ id: string; sample_id: string; fresh: boolean; current: boolean }[]> {
  const ids = callIds.filter(isUuid);
  if (ids.length === 0) return [];
  const { rows } = await sql<{ id: string; sample_id: string; fresh: boolean; current: boolean }>`
    select ic.id, ic.sample_id, ic.created_at > now() - make_interval(secs => ${withinSeconds}) as fresh,
      ic.id = (
        select x.id from interval_calls x where x.sample_id = ic.sample_id
        order by x.created_at desc, case x.source when 'engine' then 0 else 1 end desc, x.id desc limit 1
      ) as current
    from interval_calls ic join samples s on s.id = ic.sample_id
    where ic.id = any(${ids}::uuid[]) and s.crew_id = ${crewId} and ic.made_by = ${userId} and ic.source = 'confirmed'
  `.execute(db);
  return rows;
}

/** Deletes interval calls by id (the caller has checked whose they are). */
export async function deleteIntervalCalls(db: Db, callIds: readonly string[]): Promise<number> {
  if (callIds.length === 0) return 0;
  const r = await db
    .deleteFrom('interval_calls')
    .where('id', 'in', [...callIds])
    .executeTakeFirst();
  return Number(r.numDeletedRows);
}
