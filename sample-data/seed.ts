// The demo scenario (invented): a trail-riding school in an invented valley with four bikes, and one
// rider on their own. Each feature contributes a step; the orchestrator runs them in one transaction, once,
// on an empty database.
import { sql, type Kysely } from 'kysely';
import type { Database } from '../src/lib/db/database';
import { DEMO_ACCOUNTS, seedAccounts } from './seed-accounts';

/** True when the database holds no users yet (a fresh install). */
export async function isDatabaseEmpty(db: Kysely<Database>): Promise<boolean> {
  const row = await db.selectFrom('users').select(sql<number>`count(*)::int`.as('n')).executeTakeFirstOrThrow();
  return row.n === 0;
}

/** Loads the demo scenario into an empty database, all or nothing. Returns a one-line summary. */
export async function seedDemo(db: Kysely<Database>): Promise<string> {
  return db.transaction().execute(async (trx) => {
    const accounts = await seedAccounts(trx);
    const summary = [`${DEMO_ACCOUNTS.length} demo accounts in 2 crews`];
    void accounts;
    return summary.join(', ');
  });
}
