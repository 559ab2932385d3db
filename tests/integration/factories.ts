import { randomUUID } from 'node:crypto';
import type { Kysely } from 'kysely';
import type { Database, Role } from '~/lib/db/database';

// Small builders for integration tests: rows straight into the real tables, with sensible defaults.

export async function makeUser(db: Kysely<Database>, over: Partial<{ email: string; displayName: string }> = {}) {
  const id = randomUUID();
  const email = over.email ?? `user-${id.slice(0, 8)}@example.test`;
  await db
    .insertInto('users')
    .values({
      id,
      email,
      display_name: over.displayName ?? 'Test Rider',
      password_hash: 'not-a-real-hash',
      email_verified_at: new Date(),
    })
    .execute();
  return { id, email };
}

export async function makeCrew(db: Kysely<Database>, name = 'Test crew') {
  return db.insertInto('crews').values({ name }).returning(['id', 'name']).executeTakeFirstOrThrow();
}

export async function addMember(db: Kysely<Database>, crewId: string, userId: string, role: Role) {
  await db.insertInto('crew_members').values({ crew_id: crewId, user_id: userId, role }).execute();
  return { crewId, userId, role };
}

export async function makeMachine(
  db: Kysely<Database>,
  crewId: string,
  ownerUserId: string,
  over: Partial<Database['machines']> = {},
) {
  return db
    .insertInto('machines')
    .values({
      crew_id: crewId,
      owner_user_id: ownerUserId,
      name: 'Test 450',
      engine_layout: 'single',
      cooling: 'liquid',
      meter: 'km',
      recommended_grades: JSON.stringify([{ grade: '10W-40', minC: -10, maxC: 40 }]),
      ...(over as object),
    } as never)
    .returning(['id', 'name'])
    .executeTakeFirstOrThrow();
}
