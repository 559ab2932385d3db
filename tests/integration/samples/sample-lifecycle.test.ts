import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { confirmLabImport, storeLabFile } from '~/lib/lab-import/lab-import.service';
import { decideIntervalCall } from '~/lib/reviews/reviews.service';
import { recordSampleState, recordSampleStates } from '~/lib/samples/sample-lifecycle';
import { openTestDb, truncateAll } from '../test-database';
import { bytesOf, makeImportCrew, makeSample } from '../lab-import/lab-import-fixtures';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

// Invented lab figures; only the states and events matter here.
const report = (fe: number) => `Bottle,Sampled,Fe,Al,Cu,Si\nSW-1,2026-02-01,${fe},5,9,3\n`;

async function importReport(crewId: string, userId: string, fe: number, decisions = {}) {
  const stored = await storeLabFile(db, { crewId, userId, fileName: `report-${fe}.csv`, bytes: bytesOf(report(fe)) });
  if (!stored.ok) throw new Error(stored.message);
  const done = await confirmLabImport(db, { crewId, userId, labFileId: stored.value.labFileId, decisions });
  if (!done.ok) throw new Error(done.message);
}

const stateOf = async (id: string) =>
  (await db.selectFrom('samples').select('state').where('id', '=', id).executeTakeFirstOrThrow()).state;
const eventsOf = async (id: string) =>
  (
    await db
      .selectFrom('sample_events')
      .select(['state'])
      .where('sample_id', '=', id)
      .orderBy('at')
      .orderBy('id')
      .execute()
  ).map((e) => e.state);

describe('one sample lifecycle through the import, the review and a replaced report', () => {
  test('shipped → results in (import) → reviewed (review) → results in again (a replaced report needs a new review)', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    const sample = await makeSample(db, crewId, machineId, userId, 'SW-1');
    await importReport(crewId, userId, 30);
    expect(await stateOf(sample.id)).toBe('results_in');
    const actor = { userId, membership: { crewId, crewName: 'Valley school', role: 'lead' as const } };
    const reviewed = await decideIntervalCall(db, actor, sample.id, { action: 'confirm', note: '' });
    expect(reviewed.ok).toBe(true);
    expect(await stateOf(sample.id)).toBe('reviewed');
    // A second decision keeps the sample reviewed and writes no second "reviewed" event.
    expect((await decideIntervalCall(db, actor, sample.id, { action: 'confirm', note: '' })).ok).toBe(true);
    await importReport(crewId, userId, 44, { '2': { action: 'replace' } });
    expect(await stateOf(sample.id)).toBe('results_in');
    expect(await eventsOf(sample.id)).toEqual(['results_in', 'reviewed', 'results_in']);
  });

  test('a batch moves only the samples the table allows, and writes one event each', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    const shipped = await makeSample(db, crewId, machineId, userId, 'SW-1');
    const other = await makeSample(db, crewId, machineId, userId, 'SW-2');
    expect(await db.transaction().execute((t) => recordSampleState(t, other.id, 'reviewed', userId))).toBe(false);
    const moved = await db
      .transaction()
      .execute((t) => recordSampleStates(t, [shipped.id, other.id], 'results_in', userId, 'Lab results imported.'));
    expect(moved.sort()).toEqual([shipped.id, other.id].sort());
    const again = await db
      .transaction()
      .execute((t) => recordSampleStates(t, [shipped.id, other.id], 'shipped', userId));
    expect(again).toEqual([]);
    expect(await eventsOf(shipped.id)).toEqual(['results_in']);
  });
});
