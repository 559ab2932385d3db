import { sql, type Kysely, type Transaction } from 'kysely';
import type { Database } from '../db/database';

/** Bytes a crew keeps in photos and raw lab files. */
export async function sumCrewStorageBytes(
  db: Kysely<Database> | Transaction<Database>,
  crewId: string,
): Promise<number> {
  const { rows } = await sql<{ bytes: string }>`
    select (coalesce((select sum(byte_size) from photos where crew_id = ${crewId}::uuid), 0)
          + coalesce((select sum(byte_size) from lab_files where crew_id = ${crewId}::uuid), 0))::text as bytes`.execute(
    db,
  );
  return Number(rows[0]?.bytes ?? 0);
}
