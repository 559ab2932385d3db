/** The health check's one query. */
import { sql, type Kysely } from 'kysely';

/** The cheapest round trip to the database: `select 1`. */
export async function pingDatabase(db: Kysely<any>): Promise<void> {
  await sql`select 1`.execute(db);
}
