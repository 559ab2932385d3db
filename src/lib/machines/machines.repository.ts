import type { Kysely, Transaction } from 'kysely';
import type { Database, MachineRow, NewMachineRow, MachineRowUpdate } from '../db/database';
import { isUuid } from '~/lib/ids';

type Db = Kysely<Database> | Transaction<Database>;

// Every machines query is scoped by crew id: another crew's machine id finds nothing.

/** The crew's machines, newest first; archived ones only when asked. */
export function findMachinesOfCrew(
  db: Db,
  crewId: string,
  options: { includeArchived?: boolean } = {},
): Promise<MachineRow[]> {
  let q = db.selectFrom('machines').selectAll().where('crew_id', '=', crewId);
  if (!options.includeArchived) q = q.where('archived_at', 'is', null);
  return q.orderBy('archived_at', 'desc').orderBy('name').execute();
}

/** One machine of the crew, or undefined. */
export function findMachineOfCrew(db: Db, crewId: string, id: string): Promise<MachineRow | undefined> {
  if (!isUuid(id)) return Promise.resolve(undefined);
  return db.selectFrom('machines').selectAll().where('crew_id', '=', crewId).where('id', '=', id).executeTakeFirst();
}

/** Inserts a machine and returns the row. */
export function insertMachine(db: Db, row: NewMachineRow): Promise<MachineRow> {
  return db.insertInto('machines').values(row).returningAll().executeTakeFirstOrThrow();
}

/** Updates a crew's machine and returns the row. */
export function updateMachineRow(
  db: Db,
  crewId: string,
  id: string,
  patch: MachineRowUpdate,
): Promise<MachineRow | undefined> {
  return db
    .updateTable('machines')
    .set({ ...patch, updated_at: new Date() })
    .where('crew_id', '=', crewId)
    .where('id', '=', id)
    .returningAll()
    .executeTakeFirst();
}

/** How many samples and oil changes hang from a machine (a machine with records is archived, never deleted). */
export async function countMachineRecords(db: Db, machineId: string): Promise<{ samples: number; oilChanges: number }> {
  const [s, o] = await Promise.all([
    db
      .selectFrom('samples')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('machine_id', '=', machineId)
      .executeTakeFirstOrThrow(),
    db
      .selectFrom('oil_changes')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('machine_id', '=', machineId)
      .executeTakeFirstOrThrow(),
  ]);
  return { samples: Number(s.n), oilChanges: Number(o.n) };
}

/** Deletes a machine of the crew (only called when nothing hangs from it). */
export async function deleteMachineRow(db: Db, crewId: string, id: string): Promise<boolean> {
  const r = await db.deleteFrom('machines').where('crew_id', '=', crewId).where('id', '=', id).executeTakeFirst();
  return Number(r.numDeletedRows) > 0;
}
