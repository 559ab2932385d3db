import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { sql } from 'kysely';
import { openTestDb, truncateAll } from '../test-database';
import { addMember, makeCrew, makeMachine, makeUser } from '../factories';
import { makeSample } from '../lab-import/lab-import-fixtures';
import { loadCrewProgress } from '~/lib/home/home.repository';
import { firstSteps } from '~/lib/home/home-cards';

const db = openTestDb();
afterAll(() => db.destroy());
let crewId = '';
let leadId = '';
beforeEach(async () => {
  await truncateAll(db);
  crewId = (await makeCrew(db, 'First crew')).id;
  leadId = (await makeUser(db)).id;
  await addMember(db, crewId, leadId, 'lead');
});

const ticks = async () =>
  firstSteps(await loadCrewProgress(db, crewId), 'lead', crewId)?.map((s) => [s.key, s.done]) ?? null;

describe('loadCrewProgress and the first steps', () => {
  test('each step is ticked by what the crew has done, and the list goes once a machine has an oil change, a drain card and results', async () => {
    expect(await ticks()).toEqual([
      ['machine', false],
      ['oil-change', false],
      ['drain-card', false],
      ['import', false],
      ['invite', false],
    ]);

    const m = await makeMachine(db, crewId, leadId, { name: 'Kestrel' } as never);
    expect(await ticks()).toEqual([
      ['machine', true],
      ['oil-change', false],
      ['drain-card', false],
      ['import', false],
      ['invite', false],
    ]);

    await db
      .insertInto('crew_invitations')
      .values({
        crew_id: crewId,
        email: 'mech@first.example',
        role: 'mechanic',
        token_hash: 'x'.repeat(64),
        invited_by: leadId,
        expires_at: sql`now() + interval '7 days'` as never,
      })
      .execute();
    expect((await ticks())![4]).toEqual(['invite', true]);

    await db
      .insertInto('oil_changes')
      .values({
        crew_id: crewId,
        machine_id: m.id,
        changed_on: '2026-11-01',
        odometer: 1000,
        sae_grade: '10W-40',
        other_work: JSON.stringify([]),
        created_by: leadId,
      } as never)
      .execute();
    const progress = await loadCrewProgress(db, crewId);
    expect(progress).toMatchObject({
      machines: 1,
      machinesWithOilChange: 1,
      drainCards: 0,
      samplesWithResults: 0,
      firstMachineId: m.id,
      firstMachineWithOilChangeId: m.id,
    });
    expect(await ticks()).toEqual([
      ['machine', true],
      ['oil-change', true],
      ['drain-card', false],
      ['import', false],
      ['invite', true],
    ]);

    // A drain card alone leaves the import step; the lab's first results end the list.
    const sample = await makeSample(db, crewId, m.id, leadId, 'FS-1');
    expect((await ticks())!.filter(([, done]) => !done)).toEqual([['import', false]]);
    await db.updateTable('samples').set({ state: 'results_in' }).where('id', '=', sample.id).execute();
    expect(await loadCrewProgress(db, crewId)).toMatchObject({ drainCards: 1, samplesWithResults: 1 });
    expect(await ticks()).toBeNull();
  });

  test('a withdrawn or expired invitation does not tick the invite step; another crew’s machines count for nothing', async () => {
    await db
      .insertInto('crew_invitations')
      .values([
        {
          crew_id: crewId,
          email: 'a@first.example',
          role: 'mechanic',
          token_hash: 'a'.repeat(64),
          invited_by: leadId,
          expires_at: sql`now() + interval '7 days'` as never,
          revoked_at: sql`now()` as never,
        },
        {
          crew_id: crewId,
          email: 'b@first.example',
          role: 'mechanic',
          token_hash: 'b'.repeat(64),
          invited_by: leadId,
          expires_at: sql`now() - interval '1 day'` as never,
        },
      ])
      .execute();
    const other = (await makeCrew(db, 'Other')).id;
    await makeMachine(db, other, leadId, { name: 'Not ours' } as never);
    expect(await loadCrewProgress(db, crewId)).toMatchObject({
      machines: 0,
      mechanicsOrInvites: 0,
      firstMachineId: null,
    });
  });
});
