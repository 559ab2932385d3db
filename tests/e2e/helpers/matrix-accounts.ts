// Users for the role matrix and other permission tests: crew A with a lead, a mechanic and a rider, and
// crew B with its own lead. Created straight in the e2e database, once per run.
import type { Kysely } from 'kysely';
import type { Database, Role } from '~/lib/db/database';
import { hashPassword } from '~/lib/auth/password';

export const MATRIX_PASSWORD = 'matrix-password-for-tests';

export const MATRIX_USERS = {
  lead: 'matrix-lead@crew-a.example',
  mechanic: 'matrix-mechanic@crew-a.example',
  rider: 'matrix-rider@crew-a.example',
  otherLead: 'matrix-lead@crew-b.example',
} as const;

export interface MatrixCrews {
  crewA: { id: string; leadId: string; mechanicId: string; riderId: string };
  crewB: { id: string; leadId: string };
}

/** Creates (or finds) the matrix crews and users. */
export async function ensureMatrixAccounts(db: Kysely<Database>): Promise<MatrixCrews> {
  const existing = await db
    .selectFrom('users as u')
    .innerJoin('crew_members as m', 'm.user_id', 'u.id')
    .select(['u.id', 'u.email', 'm.crew_id'])
    .where('u.email', 'in', Object.values(MATRIX_USERS))
    .execute();
  const byEmail = new Map(existing.map((r) => [r.email, r]));
  if (byEmail.size === 4) {
    const g = (e: string) => byEmail.get(e)!;
    return {
      crewA: {
        id: g(MATRIX_USERS.lead).crew_id,
        leadId: g(MATRIX_USERS.lead).id,
        mechanicId: g(MATRIX_USERS.mechanic).id,
        riderId: g(MATRIX_USERS.rider).id,
      },
      crewB: { id: g(MATRIX_USERS.otherLead).crew_id, leadId: g(MATRIX_USERS.otherLead).id },
    };
  }
  const passwordHash = await hashPassword(MATRIX_PASSWORD);
  return db.transaction().execute(async (trx) => {
    const crewA = await trx
      .insertInto('crews')
      .values({ name: 'Matrix crew A' })
      .returning('id')
      .executeTakeFirstOrThrow();
    const crewB = await trx
      .insertInto('crews')
      .values({ name: 'Matrix crew B' })
      .returning('id')
      .executeTakeFirstOrThrow();
    const add = async (key: keyof typeof MATRIX_USERS, crewId: string, role: Role) => {
      const id = `matrix-${key}`;
      await trx
        .insertInto('users')
        .values({
          id,
          email: MATRIX_USERS[key],
          display_name: `Matrix ${key}`,
          password_hash: passwordHash,
          email_verified_at: new Date(),
        })
        .execute();
      await trx.insertInto('crew_members').values({ crew_id: crewId, user_id: id, role }).execute();
      return id;
    };
    return {
      crewA: {
        id: crewA.id,
        leadId: await add('lead', crewA.id, 'lead'),
        mechanicId: await add('mechanic', crewA.id, 'mechanic'),
        riderId: await add('rider', crewA.id, 'rider'),
      },
      crewB: { id: crewB.id, leadId: await add('otherLead', crewB.id, 'lead') },
    };
  });
}
