import { sql, type Insertable, type Kysely, type Transaction } from 'kysely';
import type { Database, SampleRow, SamplesTable, SampleState } from '../db/database';
import { isUuid } from '../ids';

type Db = Kysely<Database> | Transaction<Database>;

/** One sample of the crew, or undefined. */
export function findSampleOfCrew(db: Db, crewId: string, id: string): Promise<SampleRow | undefined> {
  if (!isUuid(id)) return Promise.resolve(undefined);
  return db.selectFrom('samples').selectAll().where('crew_id', '=', crewId).where('id', '=', id).executeTakeFirst();
}

/** The sample a card key already created in this crew (a resend of the same card), or undefined. */
export function findSampleByClientKey(db: Db, crewId: string, clientKey: string): Promise<SampleRow | undefined> {
  return db
    .selectFrom('samples')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('client_key', '=', clientKey)
    .executeTakeFirst();
}

/** The sample holding a normalised bottle code in this crew, with its machine's name, or undefined. */
export function findSampleByBottleCode(db: Db, crewId: string, norm: string) {
  return db
    .selectFrom('samples')
    .innerJoin('machines', 'machines.id', 'samples.machine_id')
    .select(['samples.id', 'samples.drawn_on', 'machines.name as machine_name'])
    .where('samples.crew_id', '=', crewId)
    .where('samples.bottle_code_norm', '=', norm)
    .executeTakeFirst();
}

/** A machine's samples, newest first. */
export function findSamplesOfMachine(db: Db, crewId: string, machineId: string): Promise<SampleRow[]> {
  return db
    .selectFrom('samples')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('machine_id', '=', machineId)
    .orderBy('drawn_on', 'desc')
    .orderBy('created_at', 'desc')
    .execute();
}

/** The crew's samples with machine name and meter, optionally of one state, newest first. */
export function findSamplesOfCrew(db: Db, crewId: string, state?: SampleState) {
  let q = db
    .selectFrom('samples')
    .innerJoin('machines', 'machines.id', 'samples.machine_id')
    .selectAll('samples')
    .select(['machines.name as machine_name', 'machines.meter as machine_meter'])
    .where('samples.crew_id', '=', crewId);
  if (state) q = q.where('samples.state', '=', state);
  return q.orderBy('samples.drawn_on', 'desc').orderBy('samples.created_at', 'desc').limit(500).execute();
}

/** How many samples the crew has in each state. */
export async function countSamplesByState(db: Db, crewId: string): Promise<Record<SampleState, number>> {
  const rows = await db
    .selectFrom('samples')
    .select(['state'])
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('crew_id', '=', crewId)
    .groupBy('state')
    .execute();
  const out: Record<SampleState, number> = { drawn: 0, shipped: 0, results_in: 0, reviewed: 0 };
  for (const r of rows) out[r.state] = Number(r.n);
  return out;
}

/** A sample's state history with who set each state, oldest first. */
export function findSampleEvents(db: Db, sampleId: string) {
  return db
    .selectFrom('sample_events')
    .leftJoin('users', 'users.id', 'sample_events.actor_user_id')
    .select([
      'sample_events.id',
      'sample_events.state',
      'sample_events.note',
      'sample_events.at',
      'users.display_name as actorName',
    ])
    .where('sample_events.sample_id', '=', sampleId)
    .orderBy('sample_events.at')
    .orderBy('sample_events.id')
    .execute();
}

/**
 * Reserves a code for a device unless it is already reserved anywhere (the primary key) or used on a sample
 * of the crew; answers whether this call took it.
 */
export async function reserveBottleCode(
  db: Db,
  row: { crewId: string; userId: string; deviceKey: string; code: string },
): Promise<boolean> {
  if (await findSampleByBottleCode(db, row.crewId, row.code)) return false;
  const inserted = await db
    .insertInto('bottle_code_reservations')
    .values({ code_norm: row.code, crew_id: row.crewId, user_id: row.userId, device_key: row.deviceKey })
    .onConflict((oc) => oc.column('code_norm').doNothing())
    .returning('code_norm')
    .executeTakeFirst();
  return inserted !== undefined;
}

/**
 * Codes reserved for a user in a crew (on one device, and reserved since a time, when given) that no sample of the
 * crew uses yet, oldest first.
 */
export async function findUnusedReservedCodes(
  db: Db,
  crewId: string,
  userId: string,
  { deviceKey, since }: { deviceKey?: string; since?: Date } = {},
): Promise<string[]> {
  let q = db
    .selectFrom('bottle_code_reservations as r')
    .leftJoin('samples as s', (j) =>
      j.onRef('s.crew_id', '=', 'r.crew_id').onRef('s.bottle_code_norm', '=', 'r.code_norm'),
    )
    .select('r.code_norm')
    .where('r.crew_id', '=', crewId)
    .where('r.user_id', '=', userId)
    .where('s.id', 'is', null);
  if (deviceKey !== undefined) q = q.where('r.device_key', '=', deviceKey);
  if (since !== undefined) q = q.where('r.reserved_at', '>=', since);
  return (await q.orderBy('r.reserved_at').orderBy('r.code_norm').execute()).map((r) => r.code_norm);
}

/** The states of these samples, their rows locked for the rest of the transaction (in id order, so two callers never deadlock). */
export function lockSampleStates(db: Db, sampleIds: readonly string[]): Promise<{ id: string; state: SampleState }[]> {
  if (sampleIds.length === 0) return Promise.resolve([]);
  return db
    .selectFrom('samples')
    .select(['id', 'state'])
    .where('id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`)
    .orderBy('id')
    .forUpdate()
    .execute();
}

/** Writes a state on these samples, and the tracking note when one is given. */
export async function setSampleState(
  db: Db,
  sampleIds: readonly string[],
  state: SampleState,
  trackingNote?: string,
): Promise<void> {
  if (sampleIds.length === 0) return;
  const patch = trackingNote === undefined ? { state } : { state, tracking_note: trackingNote };
  await db
    .updateTable('samples')
    .set(patch)
    .where('id', '=', sql<string>`any(${sql.val(sampleIds)}::uuid[])`)
    .execute();
}

/** One sample event per sample: the state it reached, why, and who moved it. */
export async function insertSampleEvents(
  db: Db,
  sampleIds: readonly string[],
  state: SampleState,
  note: string,
  actorUserId: string | null,
): Promise<void> {
  if (sampleIds.length === 0) return;
  // One array parameter, whatever the number of samples a lab file holds.
  await sql`
    insert into sample_events (sample_id, state, note, actor_user_id)
    select s, ${state}, ${note}, ${actorUserId} from unnest(${sql.val(sampleIds)}::uuid[]) as t(s)`.execute(db);
}

/** Writes a sample (its first state is the column default, 'drawn') and answers the stored row. */
export function insertSample(db: Db, row: Insertable<SamplesTable>): Promise<SampleRow> {
  return db.insertInto('samples').values(row).returningAll().executeTakeFirstOrThrow();
}
