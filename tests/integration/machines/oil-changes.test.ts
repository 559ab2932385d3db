import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { countingQueries, openTestDb, truncateAll } from '../test-database';
import { countRiderRows, makeActor, MACHINE_450 } from '../rider-fixtures';
import { collectMachineForm } from '~/lib/machines/machines';
import { readFormObject } from '~/lib/http/result';
import { createMachine } from '~/lib/machines/machines.service';
import { createOilChange, listOilChanges, listOilChangesOf } from '~/lib/oil-changes/oil-changes.service';
import { getMachine } from '~/lib/machines/machines.service';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

async function setup() {
  const rider = await makeActor(db);
  const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
  if (!m.ok) throw new Error('setup');
  return { rider, machineId: m.value.id };
}

const change = (o: Record<string, unknown> = {}) => ({
  changedOn: '2025-04-01',
  odometer: '12000',
  oilProduct: 'Valley Lube 4T',
  saeGrade: '10w50',
  volumeL: '1.2',
  filterChanged: 'on',
  topUpL: '0.2',
  otherWork: 'Drain plug crush washer replaced\n\nValve clearances checked',
  notes: '',
  ...o,
});

describe('oil changes', () => {
  test('logged in the machine’s miles, stored in km, with the distance since the previous change', async () => {
    const { rider, machineId } = await setup();
    expect(
      (await createOilChange(db, rider, machineId, change({ changedOn: '2024-10-01', odometer: '9,000' }))).ok,
    ).toBe(true);
    const r = await createOilChange(db, rider, machineId, change());
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.saeGrade).toBe('10W-50');
    expect(r.value.otherWork).toEqual(['Drain plug crush washer replaced', 'Valve clearances checked']);
    expect(r.value.odometer).toBeCloseTo(12000 * 1.609344, 6); // NIST SP 811 B.8
    const list = await listOilChanges(db, rider, machineId);
    if (!list.ok) throw new Error('list');
    expect(list.value.map((c) => c.changedOn)).toEqual(['2025-04-01', '2024-10-01']);
    expect(list.value[0]!.distanceSincePrevious).toBeCloseTo(3000 * 1.609344, 6);
    expect(list.value[1]!.distanceSincePrevious).toBeNull();
  });

  test.each([
    { name: 'negative odometer', over: { odometer: '-5' }, field: 'odometer', message: /cannot be negative/ },
    {
      name: 'absurd odometer',
      over: { odometer: '5000000' },
      field: 'odometer',
      message: /further than any engine runs/,
    },
    {
      name: 'odometer that is not a number',
      over: { odometer: 'lots' },
      field: 'odometer',
      message: /must be a number/,
    },
    { name: 'missing odometer', over: { odometer: '' }, field: 'odometer', message: /Enter the odometer/ },
    {
      name: 'grade that is not SAE',
      over: { saeGrade: '10W-45' },
      field: 'saeGrade',
      message: /not an SAE high-temperature grade/,
    },
    { name: 'reversed grade', over: { saeGrade: '40W-10' }, field: 'saeGrade', message: /not an SAE winter grade/ },
    {
      name: 'date in the future',
      over: { changedOn: '2999-01-01' },
      field: 'changedOn',
      message: /cannot be in the future/,
    },
    { name: 'absurd volume', over: { volumeL: '55' }, field: 'volumeL', message: /under 40 L/ },
  ])('$name is refused beside the field and writes nothing', async ({ over, field, message }) => {
    const { rider, machineId } = await setup();
    const r = await createOilChange(db, rider, machineId, change(over));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fields[field]).toMatch(message);
    expect((await countRiderRows(db)).oil_changes).toBe(0);
  });

  test('an odometer below the previous change is refused unless the meter was replaced', async () => {
    const { rider, machineId } = await setup();
    await createOilChange(db, rider, machineId, change({ changedOn: '2025-01-01', odometer: '12000' }));
    const lower = await createOilChange(db, rider, machineId, change({ changedOn: '2025-06-01', odometer: '300' }));
    expect(lower.ok).toBe(false);
    if (!lower.ok)
      expect(lower.fields['odometer']).toMatch(
        /Lower than the reading at the oil change on 1 Jan 2025 \(12,000 mi\).*meter replaced/,
      );
    expect((await countRiderRows(db)).oil_changes).toBe(1);
    const replaced = await createOilChange(
      db,
      rider,
      machineId,
      change({ changedOn: '2025-06-01', odometer: '300', meterReplaced: 'on' }),
    );
    expect(replaced.ok).toBe(true);
    const list = await listOilChanges(db, rider, machineId);
    if (list.ok) expect(list.value[0]!.distanceSincePrevious).toBeNull();
  });

  test('a change entered late may not read higher than a later change', async () => {
    const { rider, machineId } = await setup();
    await createOilChange(db, rider, machineId, change({ changedOn: '2025-03-01', odometer: '5000' }));
    const r = await createOilChange(db, rider, machineId, change({ changedOn: '2025-02-01', odometer: '6000' }));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fields['odometer']).toMatch(/Higher than the reading at the later oil change/);
  });

  test('someone else’s photo id cannot be attached; the oil change is rolled back', async () => {
    const { rider, machineId } = await setup();
    const r = await createOilChange(
      db,
      rider,
      machineId,
      change({ photoIds: ['6f1c2d3e-4b5a-4c6d-8e7f-0123456789ab'] }),
    );
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fields['photos']).toMatch(/could not be attached/);
    expect((await countRiderRows(db)).oil_changes).toBe(0);
  });

  test('for a machine already loaded, the same list in two queries instead of three', async () => {
    const { rider, machineId } = await setup();
    for (const [changedOn, odometer] of [
      ['2024-10-01', '9000'],
      ['2025-04-01', '12000'],
    ] as const) {
      expect((await createOilChange(db, rider, machineId, change({ changedOn, odometer }))).ok).toBe(true);
    }
    const machine = await getMachine(db, rider, machineId);
    if (!machine.ok) throw new Error('setup');
    const { counted, sent } = countingQueries(db);
    const byId = await listOilChanges(counted, rider, machineId);
    expect(sent).toHaveLength(3);
    sent.length = 0;
    const loaded = await listOilChangesOf(counted, rider, machine.value);
    expect(sent).toHaveLength(2);
    expect(byId.ok && byId.value).toEqual(loaded);
    expect(loaded.map((c) => c.changedOn)).toEqual(['2025-04-01', '2024-10-01']);
  });
});
