import { sql, type Kysely, type Transaction } from 'kysely';
import type { AuthTokenPurpose, Database } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

/** A user by e-mail, case-insensitively (the unique index is on lower(email)). */
export async function findUserByEmail(db: Db, email: string) {
  return db
    .selectFrom('users')
    .select(['id', 'email', 'display_name', 'password_hash', 'email_verified_at'])
    .where(sql<string>`lower(email)`, '=', email.toLowerCase())
    .executeTakeFirst();
}

/** A user by id. */
export async function findUserById(db: Db, id: string) {
  return db
    .selectFrom('users')
    .select(['id', 'email', 'display_name', 'password_hash', 'email_verified_at'])
    .where('id', '=', id)
    .executeTakeFirst();
}

/** Inserts a user. */
export async function insertUser(
  db: Db,
  v: {
    id: string;
    email: string;
    displayName: string;
    passwordHash: string;
    verified: boolean;
    timeZone?: string | undefined;
  },
): Promise<void> {
  await db
    .insertInto('users')
    .values({
      id: v.id,
      email: v.email,
      display_name: v.displayName,
      password_hash: v.passwordHash,
      email_verified_at: v.verified ? new Date() : null,
      time_zone: v.timeZone ?? null,
    })
    .execute();
}

/** Sets the zone a browser reported, only when the user has none yet (a choice made on the account page stays). */
export async function setTimeZoneIfUnset(db: Db, userId: string, timeZone: string): Promise<void> {
  await db
    .updateTable('users')
    .set({ time_zone: timeZone })
    .where('id', '=', userId)
    .where('time_zone', 'is', null)
    .execute();
}

/** Replaces a user's password hash. */
export async function updatePasswordHash(db: Db, userId: string, passwordHash: string): Promise<void> {
  await db.updateTable('users').set({ password_hash: passwordHash }).where('id', '=', userId).execute();
}

/** Marks a user's address verified (kept if it already was). */
export async function markEmailVerified(db: Db, userId: string): Promise<void> {
  await db
    .updateTable('users')
    .set({ email_verified_at: sql`coalesce(email_verified_at, now())` })
    .where('id', '=', userId)
    .execute();
}

/** Saves display preferences. */
export async function updateUserSettings(
  db: Db,
  userId: string,
  v: {
    distanceUnit: 'mi' | 'km';
    lengthUnit: 'in' | 'mm';
    temperatureUnit: 'F' | 'C';
    timeZone?: string | undefined;
    displayName?: string | undefined;
  },
): Promise<void> {
  await db
    .updateTable('users')
    .set({
      distance_unit: v.distanceUnit,
      length_unit: v.lengthUnit,
      temperature_unit: v.temperatureUnit,
      ...(v.timeZone ? { time_zone: v.timeZone } : {}),
      ...(v.displayName ? { display_name: v.displayName } : {}),
    })
    .where('id', '=', userId)
    .execute();
}

/** Ends every session of a user except one (the one they are using). */
export async function deleteOtherSessions(db: Db, userId: string, keepSessionId: string | null): Promise<number> {
  let q = db.deleteFrom('sessions').where('user_id', '=', userId);
  if (keepSessionId) q = q.where('id', '!=', keepSessionId);
  const res = await q.executeTakeFirst();
  return Number(res.numDeletedRows);
}

/** Stores a token hash; earlier unused tokens of the same purpose are spent so only the newest link works. */
export async function insertAuthToken(
  db: Db,
  v: { userId: string; purpose: AuthTokenPurpose; tokenHash: string; email: string; expiresAt: Date },
): Promise<string> {
  await db
    .updateTable('auth_tokens')
    .set({ used_at: new Date() })
    .where('user_id', '=', v.userId)
    .where('purpose', '=', v.purpose)
    .where('used_at', 'is', null)
    .execute();
  const row = await db
    .insertInto('auth_tokens')
    .values({ user_id: v.userId, purpose: v.purpose, token_hash: v.tokenHash, email: v.email, expires_at: v.expiresAt })
    .returning('id')
    .executeTakeFirstOrThrow();
  return row.id;
}

/** A token row by hash and purpose, locked for the rest of the transaction. */
export async function lockAuthToken(trx: Transaction<Database>, tokenHash: string, purpose: AuthTokenPurpose) {
  return trx
    .selectFrom('auth_tokens')
    .select(['id', 'user_id', 'email', 'expires_at', 'used_at'])
    .where('token_hash', '=', tokenHash)
    .where('purpose', '=', purpose)
    .forUpdate()
    .executeTakeFirst();
}

/** A token row by hash and purpose (read only). */
export async function findAuthToken(db: Db, tokenHash: string, purpose: AuthTokenPurpose) {
  return db
    .selectFrom('auth_tokens')
    .select(['id', 'user_id', 'email', 'expires_at', 'used_at'])
    .where('token_hash', '=', tokenHash)
    .where('purpose', '=', purpose)
    .executeTakeFirst();
}

/** Spends a token. */
export async function markAuthTokenUsed(db: Db, id: string): Promise<void> {
  await db.updateTable('auth_tokens').set({ used_at: new Date() }).where('id', '=', id).execute();
}
