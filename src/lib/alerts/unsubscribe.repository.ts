/** Queries of the unsubscribe link: whether the user and the membership a token names still exist. */
import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

/** Whether a user account exists. */
export async function userExists(db: Db, userId: string): Promise<boolean> {
  return (await db.selectFrom('users').select('id').where('id', '=', userId).executeTakeFirst()) !== undefined;
}

/** Whether the user is still a member of the crew. */
export async function isCrewMember(db: Db, crewId: string, userId: string): Promise<boolean> {
  return (
    (await db
      .selectFrom('crew_members')
      .select('user_id')
      .where('crew_id', '=', crewId)
      .where('user_id', '=', userId)
      .executeTakeFirst()) !== undefined
  );
}
