/** Every query of wear parts and their measurements. Each function takes `db` or a transaction first; reads are crew-scoped. */
import { sql, type Insertable, type Kysely, type Transaction } from 'kysely';
import type { Database, WearMeasurementRow, WearMeasurementsTable, WearPartRow, WearPartsTable } from '../db/database';
import { isUuid } from '../ids';

type Db = Kysely<Database> | Transaction<Database>;

/** A machine's wear parts of the crew, by name. */
export function findWearPartsOfMachine(db: Db, crewId: string, machineId: string): Promise<WearPartRow[]> {
  return db
    .selectFrom('wear_parts')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('machine_id', '=', machineId)
    .orderBy('name')
    .execute();
}

/** One wear part of the crew, or undefined (an id that is not a uuid finds nothing). */
export function findWearPartOfCrew(db: Db, crewId: string, partId: string): Promise<WearPartRow | undefined> {
  if (!isUuid(partId)) return Promise.resolve(undefined);
  return db
    .selectFrom('wear_parts')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('id', '=', partId)
    .executeTakeFirst();
}

/** Writes a wear part and answers the stored row. */
export function insertWearPart(db: Db, row: Insertable<WearPartsTable>): Promise<WearPartRow> {
  return db.insertInto('wear_parts').values(row).returningAll().executeTakeFirstOrThrow();
}

/**
 * The measurements of these parts (already checked to be the crew's), each part's by odometer then day: one
 * query for however many parts a machine has.
 */
export function findMeasurementsOfParts(db: Db, partIds: readonly string[]): Promise<WearMeasurementRow[]> {
  if (partIds.length === 0) return Promise.resolve([]);
  return db
    .selectFrom('wear_measurements')
    .selectAll()
    .where('wear_part_id', '=', sql<string>`any(${sql.val(partIds)}::uuid[])`)
    .orderBy('wear_part_id')
    .orderBy('odometer')
    .orderBy('measured_on')
    .execute();
}

/** The measurement a device's key already created on this part, or undefined (the part is already checked to be the crew's). */
export function findMeasurementByClientKey(
  db: Db,
  partId: string,
  clientKey: string,
): Promise<WearMeasurementRow | undefined> {
  return db
    .selectFrom('wear_measurements')
    .selectAll()
    .where('wear_part_id', '=', partId)
    .where('client_key', '=', clientKey)
    .executeTakeFirst();
}

/** Writes a measurement; undefined when one with the same device key is already on the part (a racing resend). */
export function insertMeasurement(
  db: Db,
  row: Insertable<WearMeasurementsTable>,
): Promise<WearMeasurementRow | undefined> {
  return db
    .insertInto('wear_measurements')
    .values(row)
    .onConflict((oc) => oc.columns(['wear_part_id', 'client_key']).where('client_key', 'is not', null).doNothing())
    .returningAll()
    .executeTakeFirst();
}
