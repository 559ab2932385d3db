import type { Insertable, Kysely, Transaction } from 'kysely';
import type { Database, OilChangeRow, OilChangesTable } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

/** A machine's oil changes, oldest first (date, then odometer, then entry order). */
export function findOilChangesOfMachine(db: Db, crewId: string, machineId: string): Promise<OilChangeRow[]> {
  return db
    .selectFrom('oil_changes')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('machine_id', '=', machineId)
    .orderBy('changed_on')
    .orderBy('odometer')
    .orderBy('created_at')
    .execute();
}

/** The latest oil change on or before a day, or undefined. */
export function findOilChangeBefore(
  db: Db,
  crewId: string,
  machineId: string,
  day: string,
): Promise<OilChangeRow | undefined> {
  return db
    .selectFrom('oil_changes')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('machine_id', '=', machineId)
    .where('changed_on', '<=', day)
    .orderBy('changed_on', 'desc')
    .orderBy('odometer', 'desc')
    .orderBy('created_at', 'desc')
    .limit(1)
    .executeTakeFirst();
}

/** The earliest oil change after a day, or undefined. */
export function findOilChangeAfter(
  db: Db,
  crewId: string,
  machineId: string,
  day: string,
): Promise<OilChangeRow | undefined> {
  return db
    .selectFrom('oil_changes')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('machine_id', '=', machineId)
    .where('changed_on', '>', day)
    .orderBy('changed_on')
    .orderBy('odometer')
    .limit(1)
    .executeTakeFirst();
}

/** The machine's latest oil change, or undefined. */
export function findLatestOilChange(db: Db, crewId: string, machineId: string): Promise<OilChangeRow | undefined> {
  return db
    .selectFrom('oil_changes')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('machine_id', '=', machineId)
    .orderBy('changed_on', 'desc')
    .orderBy('odometer', 'desc')
    .orderBy('created_at', 'desc')
    .limit(1)
    .executeTakeFirst();
}

/** The oil change a device's key already created in this crew (a resend of a queued write), or undefined. */
export function findOilChangeByClientKey(db: Db, crewId: string, clientKey: string): Promise<OilChangeRow | undefined> {
  return db
    .selectFrom('oil_changes')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('client_key', '=', clientKey)
    .executeTakeFirst();
}

/** One oil change of the crew by id, or undefined. */
export function findOilChangeOfCrew(db: Db, crewId: string, id: string): Promise<OilChangeRow | undefined> {
  return db.selectFrom('oil_changes').selectAll().where('crew_id', '=', crewId).where('id', '=', id).executeTakeFirst();
}

/** Writes an oil change and answers the stored row. */
export function insertOilChange(db: Db, row: Insertable<OilChangesTable>): Promise<OilChangeRow> {
  return db.insertInto('oil_changes').values(row).returningAll().executeTakeFirstOrThrow();
}
