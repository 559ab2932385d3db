// Builders for the lab import tests: a crew with a lead, machines and drain-card samples, straight into the tables.
import { sql, type Kysely } from 'kysely';
import type { Database } from '~/lib/db/database';
import { normaliseBottleCode } from '~/lib/samples/bottle-code';
import { addMember, makeCrew, makeMachine, makeUser } from '../factories';

export async function makeImportCrew(db: Kysely<Database>, name = 'Valley school') {
  const crew = await makeCrew(db, name);
  const user = await makeUser(db);
  await addMember(db, crew.id, user.id, 'lead');
  const machine = await makeMachine(db, crew.id, user.id, { name: 'Ridge 450', max_interval_distance: 3000 } as never);
  return { crewId: crew.id, userId: user.id, machineId: machine.id };
}

export async function makeSample(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
  userId: string,
  code: string,
  over: { drawnOn?: string; odometer?: number; distanceOnOil?: number; issued?: boolean } = {},
) {
  return db
    .insertInto('samples')
    .values({
      crew_id: crewId,
      machine_id: machineId,
      bottle_code: code,
      bottle_code_norm: normaliseBottleCode(code),
      issued_code: over.issued ?? false,
      drawn_on: over.drawnOn ?? '2026-02-01',
      odometer: over.odometer ?? 1000,
      distance_on_oil: over.distanceOnOil ?? 1000,
      sae_grade: '10W-40',
      client_key: null,
      created_by: userId,
      state: 'shipped',
    })
    .returning('id')
    .executeTakeFirstOrThrow();
}

/** Row counts of every table an import writes to, to prove that a refused or failed import wrote nothing. */
export async function countImportRows(db: Kysely<Database>) {
  const { rows } = await sql<Record<string, number>>`
    select (select count(*)::int from lab_files) as lab_files,
           (select count(*)::int from lab_imports) as lab_imports,
           (select count(*)::int from readings) as readings,
           (select count(*)::int from reading_history) as reading_history,
           (select count(*)::int from findings) as findings,
           (select count(*)::int from interval_calls) as interval_calls,
           (select count(*)::int from sample_events) as sample_events,
           (select count(*)::int from samples) as samples,
           (select count(*)::int from samples where state = 'results_in') as results_in`.execute(db);
  return rows[0]!;
}

export const bytesOf = (text: string): Uint8Array => new TextEncoder().encode(text);
