import type { Kysely, Transaction } from 'kysely';
import type { Database, Role } from '../db/database';
import type { CrewMembership } from '../auth/types';
import type { CrewMember, PendingInvitation } from './crews';

type Db = Kysely<Database> | Transaction<Database>;

/** Every crew a user belongs to, oldest membership first (their own crew comes first). */
export async function findMembershipsForUser(db: Db, userId: string): Promise<CrewMembership[]> {
  const rows = await db
    .selectFrom('crew_members as m')
    .innerJoin('crews as c', 'c.id', 'm.crew_id')
    .select(['m.crew_id as crewId', 'c.name as crewName', 'm.role'])
    .where('m.user_id', '=', userId)
    .orderBy('m.joined_at')
    .orderBy('c.name')
    .execute();
  return rows;
}

/** The user's membership of one crew, or null when they are not in it. */
export async function findMembership(db: Db, crewId: string, userId: string): Promise<CrewMembership | null> {
  const row = await db
    .selectFrom('crew_members as m')
    .innerJoin('crews as c', 'c.id', 'm.crew_id')
    .select(['m.crew_id as crewId', 'c.name as crewName', 'm.role'])
    .where('m.crew_id', '=', crewId)
    .where('m.user_id', '=', userId)
    .executeTakeFirst();
  return row ?? null;
}

/** Creates a crew and returns its id. */
export async function insertCrew(db: Db, name: string): Promise<string> {
  const row = await db.insertInto('crews').values({ name }).returning('id').executeTakeFirstOrThrow();
  return row.id;
}

/** Adds a member; an existing membership is left as it is (returns false). */
export async function insertMember(db: Db, crewId: string, userId: string, role: Role): Promise<boolean> {
  const res = await db
    .insertInto('crew_members')
    .values({ crew_id: crewId, user_id: userId, role })
    .onConflict((oc) => oc.columns(['crew_id', 'user_id']).doNothing())
    .executeTakeFirst();
  return Number(res.numInsertedOrUpdatedRows ?? 0) > 0;
}

/** The crew's members, leads first. */
export async function listMembers(db: Db, crewId: string): Promise<CrewMember[]> {
  const rows = await db
    .selectFrom('crew_members as m')
    .innerJoin('users as u', 'u.id', 'm.user_id')
    .select(['m.user_id as userId', 'u.display_name as displayName', 'u.email', 'm.role', 'm.joined_at as joinedAt'])
    .where('m.crew_id', '=', crewId)
    .execute();
  const order: Record<Role, number> = { lead: 0, mechanic: 1, rider: 2 };
  return rows.sort((a, b) => order[a.role] - order[b.role] || a.displayName.localeCompare(b.displayName));
}

/** Locks the crew's membership rows and returns each member's role (for last-lead checks in a transaction). */
export async function lockMemberRoles(trx: Transaction<Database>, crewId: string): Promise<Map<string, Role>> {
  const rows = await trx
    .selectFrom('crew_members')
    .select(['user_id', 'role'])
    .where('crew_id', '=', crewId)
    .forUpdate()
    .execute();
  return new Map(rows.map((r) => [r.user_id, r.role]));
}

/** Sets a member's role. */
export async function updateMemberRole(db: Db, crewId: string, userId: string, role: Role): Promise<void> {
  await db
    .updateTable('crew_members')
    .set({ role })
    .where('crew_id', '=', crewId)
    .where('user_id', '=', userId)
    .execute();
}

/** Removes a member and clears sessions that were working in that crew. */
export async function deleteMember(db: Db, crewId: string, userId: string): Promise<void> {
  await db.deleteFrom('crew_members').where('crew_id', '=', crewId).where('user_id', '=', userId).execute();
  await db
    .updateTable('sessions')
    .set({ current_crew_id: null })
    .where('user_id', '=', userId)
    .where('current_crew_id', '=', crewId)
    .execute();
}

/** Points a session at a crew. */
export async function updateSessionCrew(db: Db, sessionId: string, crewId: string): Promise<void> {
  await db.updateTable('sessions').set({ current_crew_id: crewId }).where('id', '=', sessionId).execute();
}

/** Stores an invitation (its token only as a hash). */
export async function insertInvitation(
  db: Db,
  v: { crewId: string; email: string; role: Role; tokenHash: string; invitedBy: string; expiresAt: Date },
): Promise<string> {
  const row = await db
    .insertInto('crew_invitations')
    .values({
      crew_id: v.crewId,
      email: v.email,
      role: v.role,
      token_hash: v.tokenHash,
      invited_by: v.invitedBy,
      expires_at: v.expiresAt,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return row.id;
}

/** Withdraws earlier open invitations of one address to one crew (a new one replaces them). */
export async function revokeOpenInvitationsFor(db: Db, crewId: string, email: string): Promise<void> {
  await db
    .updateTable('crew_invitations')
    .set({ revoked_at: new Date() })
    .where('crew_id', '=', crewId)
    .where('email', '=', email)
    .where('accepted_at', 'is', null)
    .where('revoked_at', 'is', null)
    .execute();
}

/** An invitation by its token hash, with its crew's name. */
export async function findInvitationByHash(db: Db, tokenHash: string) {
  return db
    .selectFrom('crew_invitations as i')
    .innerJoin('crews as c', 'c.id', 'i.crew_id')
    .select([
      'i.id',
      'i.crew_id as crewId',
      'c.name as crewName',
      'i.email',
      'i.role',
      'i.expires_at as expiresAt',
      'i.accepted_at as acceptedAt',
      'i.revoked_at as revokedAt',
    ])
    .where('i.token_hash', '=', tokenHash)
    .executeTakeFirst();
}

/** Marks an invitation used, only if it still is open (returns false when someone got there first). */
export async function markInvitationAccepted(db: Db, id: string, userId: string): Promise<boolean> {
  const res = await db
    .updateTable('crew_invitations')
    .set({ accepted_at: new Date(), accepted_by: userId })
    .where('id', '=', id)
    .where('accepted_at', 'is', null)
    .where('revoked_at', 'is', null)
    .where('expires_at', '>', new Date())
    .executeTakeFirst();
  return Number(res.numUpdatedRows) > 0;
}

/** Open invitations of a crew, newest first. */
export async function listOpenInvitations(db: Db, crewId: string): Promise<PendingInvitation[]> {
  return db
    .selectFrom('crew_invitations')
    .select(['id', 'email', 'role', 'expires_at as expiresAt', 'created_at as createdAt'])
    .where('crew_id', '=', crewId)
    .where('accepted_at', 'is', null)
    .where('revoked_at', 'is', null)
    .where('expires_at', '>', new Date())
    .orderBy('created_at', 'desc')
    .execute();
}

/** Withdraws one open invitation of a crew; false when there was none. */
export async function revokeInvitation(
  db: Db,
  crewId: string,
  invitationId: string,
): Promise<{ email: string } | null> {
  const row = await db
    .updateTable('crew_invitations')
    .set({ revoked_at: new Date() })
    .where('id', '=', invitationId)
    .where('crew_id', '=', crewId)
    .where('accepted_at', 'is', null)
    .where('revoked_at', 'is', null)
    .returning('email')
    .executeTakeFirst();
  return row ?? null;
}
