// Demo accounts of the invented scenario: the Larchwood Valley Trail School (an invented riding school in an
// invented valley) with a lead, a mechanic and two riders, plus one rider on their own. The passwords are
// for the demo only and are printed in the README as such: never reuse them for a real deployment.
import type { Kysely, Transaction } from 'kysely';
import type { Database, Role } from '../src/lib/db/database';
import { hashPassword } from '../src/lib/auth/password';

export interface DemoAccount {
  key: 'lead' | 'mechanic' | 'riderA' | 'riderB' | 'solo';
  email: string;
  /** Demo only. */
  password: string;
  displayName: string;
  /** Role in the school; the solo rider leads a crew of one. */
  role: Role;
  crew: 'school' | 'solo';
}

export const DEMO_SCHOOL_NAME = 'Larchwood Valley Trail School';
export const DEMO_SOLO_CREW_NAME = 'Corin’s garage';

/** The demo sign-ins (demo-only passwords; addresses under the reserved .example domain, RFC 2606). */
export const DEMO_ACCOUNTS: readonly DemoAccount[] = [
  {
    key: 'lead',
    email: 'isla.lead@larchwood.example',
    password: 'demo-larchwood-lead',
    displayName: 'Isla Brackwater',
    role: 'lead',
    crew: 'school',
  },
  {
    key: 'mechanic',
    email: 'tomas.mechanic@larchwood.example',
    password: 'demo-larchwood-mechanic',
    displayName: 'Tomas Rennick',
    role: 'mechanic',
    crew: 'school',
  },
  {
    key: 'riderA',
    email: 'juno.rider@larchwood.example',
    password: 'demo-larchwood-rider',
    displayName: 'Juno Farrow',
    role: 'rider',
    crew: 'school',
  },
  {
    key: 'riderB',
    email: 'pell.rider@larchwood.example',
    password: 'demo-larchwood-rider2',
    displayName: 'Pell Ashby',
    role: 'rider',
    crew: 'school',
  },
  {
    key: 'solo',
    email: 'corin@solo-rider.example',
    password: 'demo-solo-rider',
    displayName: 'Corin Vale',
    role: 'lead',
    crew: 'solo',
  },
];

export interface SeededAccounts {
  schoolCrewId: string;
  soloCrewId: string;
  userIds: Record<DemoAccount['key'], string>;
}

/** Creates the demo users, the school crew and the solo rider's crew (call inside the seed transaction). */
export async function seedAccounts(db: Kysely<Database> | Transaction<Database>): Promise<SeededAccounts> {
  const school = await db
    .insertInto('crews')
    .values({ name: DEMO_SCHOOL_NAME })
    .returning('id')
    .executeTakeFirstOrThrow();
  const solo = await db
    .insertInto('crews')
    .values({ name: DEMO_SOLO_CREW_NAME })
    .returning('id')
    .executeTakeFirstOrThrow();
  const userIds = {} as SeededAccounts['userIds'];
  for (const a of DEMO_ACCOUNTS) {
    const id = `demo-${a.key.toLowerCase()}`;
    userIds[a.key] = id;
    await db
      .insertInto('users')
      .values({
        id,
        email: a.email,
        display_name: a.displayName,
        password_hash: await hashPassword(a.password),
        email_verified_at: new Date(),
        distance_unit: a.crew === 'solo' ? 'mi' : 'km',
        length_unit: a.crew === 'solo' ? 'in' : 'mm',
        temperature_unit: a.crew === 'solo' ? 'F' : 'C',
      })
      .execute();
    await db
      .insertInto('crew_members')
      .values({ crew_id: a.crew === 'school' ? school.id : solo.id, user_id: id, role: a.role })
      .execute();
  }
  return { schoolCrewId: school.id, soloCrewId: solo.id, userIds };
}
