// The demo scenario (invented): a trail-riding school in an invented valley with four bikes, and one
// rider on their own. Each feature contributes a step; the orchestrator runs them in one transaction, once,
// on an empty database.
import { sql, type Kysely } from 'kysely';
import type { Database } from '../src/lib/db/database';
import { DEMO_ACCOUNTS, seedAccounts } from './seed-accounts';
import { seedMachines } from './seed-machines';
import { seedLabReports } from './seed-labs';
import { seedImportSenders } from './seed-lab-mail';

/** True when the database holds no users yet (a fresh install). */
export async function isDatabaseEmpty(db: Kysely<Database>): Promise<boolean> {
  const row = await db
    .selectFrom('users')
    .select(sql<number>`count(*)::int`.as('n'))
    .executeTakeFirstOrThrow();
  return row.n === 0;
}

/** Loads the demo scenario into an empty database, all or nothing. Returns a one-line summary. */
export async function seedDemo(db: Kysely<Database>): Promise<string> {
  return db.transaction().execute(async (trx) => {
    const accounts = await seedAccounts(trx);
    const machines = await seedMachines(trx, {
      crewId: accounts.schoolCrewId,
      ownerUserIds: [accounts.userIds.riderA, accounts.userIds.riderB, accounts.userIds.lead],
      soloCrewId: accounts.soloCrewId,
      soloUserId: accounts.userIds.solo,
    });
    // The school's mechanic imports the school's reports; the solo rider imports their own.
    const schoolLabs = await seedLabReports(trx, {
      crewIds: [accounts.schoolCrewId],
      userId: accounts.userIds.mechanic,
    });
    const soloLabs = await seedLabReports(trx, { crewIds: [accounts.soloCrewId], userId: accounts.userIds.solo });
    // The school's lab mails its reports; only its address is accepted at the school's import address.
    await seedImportSenders(trx, { crewId: accounts.schoolCrewId, userId: accounts.userIds.lead });
    return [
      `${DEMO_ACCOUNTS.length} accounts in 2 crews`,
      `${Object.keys(machines.machineIds).length} machines`,
      `${machines.oilChanges} oil changes`,
      `${machines.samples} samples`,
      `${schoolLabs.files + soloLabs.files} lab reports with ${schoolLabs.readings + soloLabs.readings} readings`,
    ].join(', ');
  });
}
