/** Queries of the crew's alert limits (crew_limits), scoped by crew. */
import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

/** The crew's own limits (the act level), by measurand. */
export function listCrewLimits(db: Db, crewId: string) {
  return db
    .selectFrom('crew_limits')
    .select(['measurand', 'act_at', 'updated_at'])
    .where('crew_id', '=', crewId)
    .orderBy('measurand')
    .execute();
}

/** Locks and reads the crew's limits, so two leads saving at once are applied one after the other. */
export function lockCrewLimits(db: Db, crewId: string) {
  return db
    .selectFrom('crew_limits')
    .select(['measurand', 'act_at'])
    .where('crew_id', '=', crewId)
    .forUpdate()
    .execute();
}

/** Sets or clears one limit (null: back to the default, the row is removed). */
export async function writeCrewLimit(
  db: Db,
  crewId: string,
  measurand: string,
  actAt: number | null,
  userId: string,
): Promise<void> {
  if (actAt === null) {
    await db.deleteFrom('crew_limits').where('crew_id', '=', crewId).where('measurand', '=', measurand).execute();
    return;
  }
  await db
    .insertInto('crew_limits')
    .values({ crew_id: crewId, measurand, act_at: actAt, watch_at: null, updated_by: userId })
    .onConflict((oc) =>
      oc
        .columns(['crew_id', 'measurand'])
        .doUpdateSet({ act_at: actAt, watch_at: null, updated_by: userId, updated_at: new Date() }),
    )
    .execute();
}

/** Every active machine of the crew with the ids of its samples, for the recompute after a change. */
export async function listCrewMachineSamples(db: Db, crewId: string): Promise<Map<string, string[]>> {
  const rows = await db
    .selectFrom('machines')
    .leftJoin('samples', 'samples.machine_id', 'machines.id')
    .select(['machines.id as machine_id', 'samples.id as sample_id'])
    .where('machines.crew_id', '=', crewId)
    .execute();
  const out = new Map<string, string[]>();
  for (const r of rows) {
    const list = out.get(r.machine_id) ?? [];
    if (r.sample_id) list.push(r.sample_id);
    out.set(r.machine_id, list);
  }
  return out;
}
