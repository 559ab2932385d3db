import type { Kysely } from 'kysely';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { seedLabReports, type SeededLabReports } from '../../../sample-data/seed-labs';
import type { Database } from '~/lib/db/database';
import { addMember, makeCrew, makeMachine, makeUser } from '../factories';
import { openTestDb, truncateAll } from '../test-database';
import { makeSample } from './lab-import-fixtures';

// The demo stories on factory-made machines and samples shaped like the machines seed's (eight samples each:
// four to make a ready baseline, the story after it).
const db: Kysely<Database> = openTestDb();
afterAll(async () => {
  await db.destroy();
});

const MACHINES = [
  { key: '450', name: 'Ridge 450', engine_layout: 'single', displacement_cc: 449, cooling: 'liquid' },
  { key: '690', name: 'Dune 690', engine_layout: 'single', displacement_cc: 690, cooling: 'liquid' },
  { key: '1200', name: 'Tarn 1200', engine_layout: 'twin', displacement_cc: 1200, cooling: 'liquid' },
  { key: '650', name: 'Moss 650', engine_layout: 'single', displacement_cc: 650, cooling: 'air' },
] as const;

const ids: Record<string, string> = {};
let seeded: SeededLabReports;

beforeAll(async () => {
  await truncateAll(db);
  const school = await makeCrew(db, 'School');
  const solo = await makeCrew(db, 'Solo');
  const lead = await makeUser(db);
  await addMember(db, school.id, lead.id, 'lead');
  await addMember(db, solo.id, lead.id, 'lead');
  const all = [
    ...MACHINES.map((m) => ({ ...m, crewId: school.id })),
    {
      key: 'solo',
      name: 'Heath 500',
      engine_layout: 'single',
      displacement_cc: 500,
      cooling: 'liquid',
      crewId: solo.id,
    },
  ];
  for (const m of all) {
    const { key, crewId, ...row } = m;
    const machine = await makeMachine(db, crewId, lead.id, {
      ...row,
      meter: 'km',
      max_interval_distance: 6000,
    } as never);
    ids[key] = machine.id;
    for (let i = 0; i < 8; i++) {
      await makeSample(db, crewId, machine.id, lead.id, `${key}-${i + 1}`, {
        drawnOn: `${2024 + Math.floor(i / 6)}-${String((i % 6) * 2 + 1).padStart(2, '0')}-1${i}`,
        odometer: 3000 * (i + 1),
        distanceOnOil: 3000,
      });
    }
  }
  seeded = await db
    .transaction()
    .execute((trx) => seedLabReports(trx, { crewIds: [school.id, solo.id], userId: lead.id }));
});

async function lastSampleWithResults(machineKey: string) {
  return db
    .selectFrom('samples')
    .select(['id', 'bottle_code'])
    .where('machine_id', '=', ids[machineKey]!)
    .where('state', '=', 'results_in')
    .orderBy('drawn_on', 'desc')
    .executeTakeFirstOrThrow();
}

async function findingsOf(sampleId: string) {
  return db
    .selectFrom('findings')
    .select(['rule_id', 'measurand', 'level'])
    .where('sample_id', '=', sampleId)
    .execute();
}

describe('seedLabReports', () => {
  test('imports every sample but one through the three layouts, with the raw files kept', async () => {
    expect(seeded.samples).toBe(39);
    const files = await db.selectFrom('lab_files').select('file_name').execute();
    const names = files.map((f) => f.file_name).join(' ');
    for (const lab of ['hollow-creek-oil-lab', 'thistlefen-tribology-bench', 'cinderpass-fluid-works'])
      expect(names).toContain(lab);
    expect(await db.selectFrom('lab_imports').selectAll().execute()).toHaveLength(seeded.files);
    const waiting = await db
      .selectFrom('samples')
      .select(['machine_id', 'state'])
      .where('state', '!=', 'results_in')
      .execute();
    expect(waiting).toEqual([{ machine_id: ids['650'], state: 'shipped' }]);
  });

  test.each([
    ['450: aluminium climbing', '450', 'climbing-trend', 'Al'],
    ['1200 twin: coolant markers', '1200', 'coolant-markers', 'Na'],
    ['650 air-cooled: fuel dilution', '650', 'fuel-dilution', 'FUEL'],
  ])('%s shows on its newest results', async (_name, key, rule, measurand) => {
    const sample = await lastSampleWithResults(key);
    const findings = await findingsOf(sample.id);
    expect(findings.some((f) => f.rule_id === rule && f.measurand === measurand)).toBe(true);
  });

  test('690: a silicon spike flagged as dirt, then gone after the new air filter', async () => {
    const samples = await db
      .selectFrom('samples')
      .select('id')
      .where('machine_id', '=', ids['690']!)
      .orderBy('drawn_on')
      .execute();
    const spike = await findingsOf(samples.at(-3)!.id);
    expect(spike.some((f) => f.rule_id === 'dirt' && f.level === 'act')).toBe(true);
    const after = await findingsOf(samples.at(-1)!.id);
    expect(after.filter((f) => f.measurand === 'Si')).toEqual([]);
  });

  test("the solo rider's bike earns a stretch", async () => {
    const sample = await lastSampleWithResults('solo');
    expect(await findingsOf(sample.id)).toEqual([]);
    const call = await db
      .selectFrom('interval_calls')
      .select(['call', 'source'])
      .where('sample_id', '=', sample.id)
      .executeTakeFirstOrThrow();
    expect(call).toEqual({ call: 'stretch', source: 'engine' });
  });
});
