import type { Kysely } from 'kysely';
import type { Database, Role } from '~/lib/db/database';
import type { Actor } from '~/lib/auth/types';
import { addMember, makeCrew, makeUser } from './factories';

/** A crew with one member of the given role, as the services' Actor. */
export async function makeActor(db: Kysely<Database>, role: Role = 'rider', crewName = 'Valley crew'): Promise<Actor> {
  const crew = await makeCrew(db, crewName);
  const user = await makeUser(db);
  await addMember(db, crew.id, user.id, role);
  return { userId: user.id, membership: { crewId: crew.id, crewName: crew.name, role } };
}

/** Another member of the same crew. */
export async function addActor(db: Kysely<Database>, of: Actor, role: Role): Promise<Actor> {
  const user = await makeUser(db);
  await addMember(db, of.membership.crewId, user.id, role);
  return { userId: user.id, membership: { ...of.membership, role } };
}

/** Row counts of the rider-side tables, to prove a refusal wrote nothing. */
export async function countRiderRows(db: Kysely<Database>) {
  const tables = [
    'machines',
    'oil_changes',
    'photos',
    'samples',
    'sample_events',
    'wear_parts',
    'wear_measurements',
  ] as const;
  const out: Record<string, number> = {};
  for (const t of tables) {
    const r = await db
      .selectFrom(t)
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    out[t] = Number(r.n);
  }
  return out;
}

export const MACHINE_450 = {
  name: 'Gravel 450',
  modelYear: '2021',
  engineLayout: 'single',
  displacementCc: '449',
  cooling: 'liquid',
  sharedOil: 'on',
  oilCapacityL: '1.2',
  meter: 'mi',
  grade_0: '10W-50',
  grade_min_0: '14',
  grade_max_0: '',
  maxInterval: '3000',
  maxIntervalDays: '365',
  notes: '',
};
