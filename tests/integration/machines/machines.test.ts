import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { addActor, countRiderRows, makeActor, MACHINE_450 } from '../rider-fixtures';
import { collectMachineForm } from '~/lib/machines/machines';
import { readFormObject } from '~/lib/http/result';
import {
  createMachine,
  deleteMachine,
  describeMachineDeletion,
  getMachine,
  listMachines,
  setMachineArchived,
  updateMachine,
} from '~/lib/machines/machines.service';
import { createOilChange, listOilChanges } from '~/lib/oil-changes/oil-changes.service';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

const form = (o: Record<string, string>) => collectMachineForm(readFormObject(new URLSearchParams(o)));

describe('machines', () => {
  test('a rider adds a machine; grades are stored in °C and the interval in km', async () => {
    const rider = await makeActor(db);
    const r = await createMachine(db, rider, form(MACHINE_450), 'F');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.ownerUserId).toBe(rider.userId);
    // 14 °F = −10 °C (NIST SP 811 B.9); the open top of the band runs to 55 °C.
    expect(r.value.recommendedGrades).toEqual([{ grade: '10W-50', minC: -10, maxC: 55 }]);
    // 3000 mi × 1.609344 km/mi (NIST SP 811 B.8).
    expect(r.value.maxIntervalStored).toBeCloseTo(4828.032, 6);
  });

  test.each([
    { field: 'name', over: { name: '' }, message: /Give the machine a name/ },
    { field: 'grades.0.grade', over: { grade_0: '10W-45' }, message: /not an SAE high-temperature grade/ },
    { field: 'cooling', over: { cooling: 'water' }, message: /Choose how the engine is cooled/ },
    { field: 'oilCapacityL', over: { oilCapacityL: '-1' }, message: /more than 0 L/ },
    { field: 'modelYear', over: { modelYear: '1850' }, message: /from 1900/ },
  ])('bad $field is refused beside the field and writes nothing', async ({ field, over, message }) => {
    const rider = await makeActor(db);
    const r = await createMachine(db, rider, form({ ...MACHINE_450, ...over }), 'C');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fields[field]).toMatch(message);
    expect((await countRiderRows(db)).machines).toBe(0);
  });

  test('a mechanic cannot add machines', async () => {
    const mech = await makeActor(db, 'mechanic');
    const r = await createMachine(db, mech, form(MACHINE_450), 'C');
    expect(r.ok ? 200 : r.status).toBe(403);
  });

  test('another crew’s machine id answers not found, for reads and writes', async () => {
    const a = await makeActor(db, 'lead', 'A');
    const b = await makeActor(db, 'lead', 'B');
    const made = await createMachine(db, a, form(MACHINE_450), 'C');
    if (!made.ok) throw new Error('setup');
    const id = made.value.id;
    for (const r of [
      await getMachine(db, b, id),
      await updateMachine(db, b, id, form({ ...MACHINE_450, name: 'Taken' }), 'C'),
      await setMachineArchived(db, b, id, true),
      await deleteMachine(db, b, id),
      await createOilChange(db, b, id, { changedOn: '2025-01-01', odometer: '10', saeGrade: '10W-40' }),
      await listOilChanges(db, b, id),
      await getMachine(db, b, 'not-a-uuid'),
    ]) {
      expect(r.ok ? 200 : r.status).toBe(404);
    }
    expect((await getMachine(db, a, id)).ok).toBe(true);
    expect((await listMachines(db, b)).length).toBe(0);
  });

  test('a rider edits their own machine but not a crew-mate’s; the lead edits both', async () => {
    const lead = await makeActor(db, 'lead');
    const rider = await addActor(db, lead, 'rider');
    const other = await addActor(db, lead, 'rider');
    const made = await createMachine(db, rider, form(MACHINE_450), 'C');
    if (!made.ok) throw new Error('setup');
    expect((await updateMachine(db, rider, made.value.id, form({ ...MACHINE_450, name: 'Renamed' }), 'C')).ok).toBe(
      true,
    );
    const denied = await updateMachine(db, other, made.value.id, form({ ...MACHINE_450, name: 'Nope' }), 'C');
    expect(denied.ok ? 200 : denied.status).toBe(403);
    expect((await updateMachine(db, lead, made.value.id, form({ ...MACHINE_450, name: 'Lead edit' }), 'C')).ok).toBe(
      true,
    );
  });

  test('a machine with records is archived, never deleted; an empty one may be deleted', async () => {
    const rider = await makeActor(db);
    const m = await createMachine(db, rider, form(MACHINE_450), 'C');
    const empty = await createMachine(db, rider, form({ ...MACHINE_450, name: 'Spare' }), 'C');
    if (!m.ok || !empty.ok) throw new Error('setup');
    await createOilChange(db, rider, m.value.id, { changedOn: '2025-01-01', odometer: '1000', saeGrade: '10W-40' });
    const del = await deleteMachine(db, rider, m.value.id);
    expect(del.ok ? 200 : del.status).toBe(409);
    // The edit page shows the same reason beside a disabled button, before anyone clicks.
    const why = await describeMachineDeletion(db, rider, m.value.id);
    expect(why.ok && why.value).toEqual({ allowed: false, reason: del.ok ? '' : del.message });
    const free = await describeMachineDeletion(db, rider, empty.value.id);
    expect(free.ok && free.value).toEqual({ allowed: true, reason: null });
    if (!del.ok) expect(del.message).toMatch(/archive it instead/);
    expect((await setMachineArchived(db, rider, m.value.id, true)).ok).toBe(true);
    expect((await listMachines(db, rider)).map((x) => x.name)).toEqual(['Spare']);
    expect((await listMachines(db, rider, { includeArchived: true })).length).toBe(2);
    expect((await deleteMachine(db, rider, empty.value.id)).ok).toBe(true);
    expect((await countRiderRows(db)).oil_changes).toBe(1);
  });
});
