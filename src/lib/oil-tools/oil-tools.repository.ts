/** The oil tools' one query: the crew's machines with the grade charts from their manuals. */
import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../db/database';
import type { ToolMachine } from './oil-tools-view';

type Db = Kysely<Database> | Transaction<Database>;

/** The crew's machines that are not archived, by name, with their manual's grade chart (a bound far above a real crew). */
export async function findToolMachines(db: Db, crewId: string): Promise<ToolMachine[]> {
  const rows = await db
    .selectFrom('machines')
    .select(['id', 'name', 'recommended_grades'])
    .where('crew_id', '=', crewId)
    .where('archived_at', 'is', null)
    .orderBy('name')
    .limit(500)
    .execute();
  return rows.map((r) => ({ id: r.id, name: r.name, recommendedGrades: r.recommended_grades ?? [] }));
}
