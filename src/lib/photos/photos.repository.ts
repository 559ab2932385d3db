import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../db/database';
import { isUuid } from '../ids';

type Db = Kysely<Database> | Transaction<Database>;

export type PhotoRow = import('kysely').Selectable<Database['photos']>;

/** Inserts a photo row. */
export function insertPhoto(db: Db, row: import('kysely').Insertable<Database['photos']>): Promise<PhotoRow> {
  return db.insertInto('photos').values(row).returningAll().executeTakeFirstOrThrow();
}

/** A photo of one of the given crews, or undefined. */
export function findPhotoOfCrews(db: Db, crewIds: readonly string[], id: string): Promise<PhotoRow | undefined> {
  if (!isUuid(id) || crewIds.length === 0) return Promise.resolve(undefined);
  return db.selectFrom('photos').selectAll().where('id', '=', id).where('crew_id', 'in', crewIds).executeTakeFirst();
}

/** Photos of an oil change. */
export function findPhotosOfOilChanges(db: Db, crewId: string, oilChangeIds: readonly string[]): Promise<PhotoRow[]> {
  if (oilChangeIds.length === 0) return Promise.resolve([]);
  return db
    .selectFrom('photos')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('oil_change_id', 'in', oilChangeIds)
    .orderBy('created_at')
    .execute();
}

/** Attaches the actor's own loose photos to an oil change; returns how many were attached. */
export async function attachPhotos(
  db: Db,
  crewId: string,
  userId: string,
  photoIds: readonly string[],
  oilChangeId: string,
): Promise<number> {
  if (photoIds.length === 0) return 0;
  const r = await db
    .updateTable('photos')
    .set({ oil_change_id: oilChangeId })
    .where('crew_id', '=', crewId)
    .where('created_by', '=', userId)
    .where('oil_change_id', 'is', null)
    .where('id', 'in', photoIds)
    .executeTakeFirst();
  return Number(r.numUpdatedRows);
}
