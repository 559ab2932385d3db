/** Every query on notification_preferences. */
import type { Kysely, Transaction } from 'kysely';
import type { Database, NotificationDelivery, NotificationKind } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

/** The stored choices of some users in one crew for one kind (users without a row are absent). */
export async function findDeliveries(db: Db, crewId: string, kind: NotificationKind, userIds: readonly string[]) {
  if (userIds.length === 0) return new Map<string, NotificationDelivery>();
  const rows = await db
    .selectFrom('notification_preferences')
    .select(['user_id', 'delivery'])
    .where('crew_id', '=', crewId)
    .where('kind', '=', kind)
    .where('user_id', 'in', [...userIds])
    .execute();
  return new Map(rows.map((r) => [r.user_id, r.delivery]));
}

/** Every stored choice of one user. */
export async function listUserPreferences(db: Db, userId: string) {
  return db
    .selectFrom('notification_preferences')
    .select(['crew_id', 'kind', 'delivery'])
    .where('user_id', '=', userId)
    .execute();
}

/** The crews a user belongs to, with role, by name. */
export async function listUserCrews(db: Db, userId: string) {
  return db
    .selectFrom('crew_members')
    .innerJoin('crews', 'crews.id', 'crew_members.crew_id')
    .select(['crews.id as crew_id', 'crews.name as crew_name', 'crew_members.role'])
    .where('crew_members.user_id', '=', userId)
    .orderBy('crews.name')
    .execute();
}

/** Writes one choice (insert or replace). */
export async function upsertPreference(
  db: Db,
  row: { userId: string; crewId: string; kind: NotificationKind; delivery: NotificationDelivery },
) {
  await db
    .insertInto('notification_preferences')
    .values({ user_id: row.userId, crew_id: row.crewId, kind: row.kind, delivery: row.delivery })
    .onConflict((oc) =>
      oc.columns(['user_id', 'crew_id', 'kind']).doUpdateSet({ delivery: row.delivery, updated_at: new Date() }),
    )
    .execute();
}
