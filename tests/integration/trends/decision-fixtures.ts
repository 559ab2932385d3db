// Builders for the decision tests: a machine's samples with readings, findings and calls straight into the
// real tables (invented figures).
import type { Kysely } from 'kysely';
import type { Database, Level } from '~/lib/db/database';
import { addMember, makeCrew, makeMachine, makeUser } from '../factories';

export interface SampleSpec {
  drawnOn: string;
  odometer: number;
  distanceOnOil?: number;
  state?: 'drawn' | 'shipped' | 'results_in' | 'reviewed';
  readings?: Record<string, number>;
  findings?: { measurand: string | null; level: Level; ruleId: string }[];
  call?: { call: 'shorten' | 'hold' | 'stretch'; nextSampleOn?: string; nextSampleOdometer?: number };
  grade?: string;
}

let bottle = 0;

/** Inserts samples of a machine in order; returns their ids. */
export async function addSamples(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
  userId: string,
  specs: SampleSpec[],
): Promise<string[]> {
  const ids: string[] = [];
  for (const s of specs) {
    bottle += 1;
    const code = `T${String(bottle).padStart(6, '0')}`;
    const row = await db
      .insertInto('samples')
      .values({
        crew_id: crewId,
        machine_id: machineId,
        bottle_code: code,
        bottle_code_norm: code,
        drawn_on: s.drawnOn,
        odometer: s.odometer,
        distance_on_oil: s.distanceOnOil ?? 1000,
        sae_grade: s.grade ?? '10W-40',
        state: s.state ?? 'results_in',
        created_by: userId,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    ids.push(row.id);
    const readings = Object.entries(s.readings ?? {});
    if (readings.length)
      await db
        .insertInto('readings')
        .values(
          readings.map(([measurand, value]) => ({
            sample_id: row.id,
            measurand,
            value,
            qualifier: null,
            lab_import_id: null,
          })),
        )
        .execute();
    for (const f of s.findings ?? []) {
      await db
        .insertInto('findings')
        .values({
          sample_id: row.id,
          measurand: f.measurand,
          level: f.level,
          rule_id: f.ruleId,
          numbers: JSON.stringify({ value: 1 }),
          sentence: `${f.ruleId} on ${f.measurand}`,
        })
        .execute();
    }
    if (s.call) {
      await db
        .insertInto('interval_calls')
        .values({
          sample_id: row.id,
          machine_id: machineId,
          call: s.call.call,
          next_interval: 1000,
          next_sample_odometer: s.call.nextSampleOdometer ?? null,
          next_sample_on: s.call.nextSampleOn ?? null,
          reasons: JSON.stringify(['engine reason']),
          source: 'engine',
          made_by: null,
        })
        .execute();
    }
  }
  return ids;
}

/** A crew with a lead, a mechanic and a rider. */
export async function makeCrewWithRoles(db: Kysely<Database>, name = 'Crew') {
  const crew = await makeCrew(db, name);
  const [lead, mechanic, rider] = await Promise.all([
    makeUser(db, { displayName: 'Lead' }),
    makeUser(db, { displayName: 'Mech' }),
    makeUser(db, { displayName: 'Rider' }),
  ]);
  await addMember(db, crew.id, lead.id, 'lead');
  await addMember(db, crew.id, mechanic.id, 'mechanic');
  await addMember(db, crew.id, rider.id, 'rider');
  return {
    crew,
    lead,
    mechanic,
    rider,
    m: (role: 'lead' | 'mechanic' | 'rider') => ({ crewId: crew.id, crewName: name, role }),
    machine: (over: Partial<Database['machines']> = {}) => makeMachine(db, crew.id, rider.id, over),
  };
}
