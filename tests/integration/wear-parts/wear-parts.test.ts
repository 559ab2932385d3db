import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { countRiderRows, makeActor, MACHINE_450 } from '../rider-fixtures';
import { collectMachineForm } from '~/lib/machines/machines';
import { readFormObject } from '~/lib/http/result';
import { createMachine, getMachine } from '~/lib/machines/machines.service';
import {
  addWearMeasurement,
  createWearPart,
  getWearPartDetail,
  listWearPartDetails,
} from '~/lib/wear-parts/wear-parts.service';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

// Clutch friction plates: new 0.115–0.121 in, service limit 0.100 in — common practice for that engine,
// no published source.
const CLUTCH = {
  name: 'Clutch friction plates',
  pieceCount: '8',
  unit: 'in',
  newMin: '0.115',
  newMax: '0.121',
  serviceLimit: '0.100',
  fittedOdometer: '0',
};

async function setup() {
  const rider = await makeActor(db);
  const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
  if (!m.ok) throw new Error('setup');
  const part = await createWearPart(db, rider, m.value.id, CLUTCH);
  if (!part.ok) throw new Error(JSON.stringify(part));
  return { rider, machineId: m.value.id, partId: part.value.id };
}

describe('wear parts', () => {
  test('stored in mm; a measurement at 17,000 mi forecasts the limit at 47,000 mi with a wide range', async () => {
    const { rider, partId } = await setup();
    const r = await addWearMeasurement(db, rider, partId, {
      measuredOn: '2025-05-01',
      odometer: '17000',
      unit: 'in',
      pieces: '0.111 0.110 0.112 0.111 0.110 0.111 0.112 0.111',
    });
    if (!r.ok) throw new Error(JSON.stringify(r));
    expect(r.value.summaryMm).toBeCloseTo(0.11 * 25.4, 9); // worst piece, NIST SP 811 B.8
    const d = await getWearPartDetail(db, rider, partId);
    if (!d.ok) throw new Error('detail');
    expect(d.value.part.newMinMm).toBeCloseTo(2.921, 9);
    const f = d.value.forecast;
    if (f.status !== 'forecast') throw new Error(f.status);
    // From the expected thinnest of 8 new plates, 0.115 + 0.006/9 in, to 0.110 in at 17,000 mi: the limit of
    // 0.100 in at 17,000 · 141/51 = 47,000 mi (hand arithmetic; see tests/unit/analysis/wear-forecast.test.ts).
    expect(f.limitAt).toBeCloseTo(47_000, 3);
    expect(f.sureness).toBe('wide');
  });

  test('an unworn pack measured in mm on a km machine has no measurable wear and no forecast odometer', async () => {
    const rider = await makeActor(db);
    const m = await createMachine(
      db,
      rider,
      collectMachineForm(readFormObject(new URLSearchParams({ ...MACHINE_450, meter: 'km' }))),
      'C',
    );
    if (!m.ok) throw new Error(JSON.stringify(m));
    const part = await createWearPart(db, rider, m.value.id, {
      ...CLUTCH,
      unit: 'mm',
      newMin: '2.92',
      newMax: '3.08',
      serviceLimit: '2.60',
    });
    if (!part.ok) throw new Error(JSON.stringify(part));
    const r = await addWearMeasurement(db, rider, part.value.id, {
      measuredOn: '2025-05-01',
      odometer: '12000',
      unit: 'mm',
      pieces: '3.01 2.95 2.93 3.05 2.99 2.97 3.00 2.92',
    });
    if (!r.ok) throw new Error(JSON.stringify(r));
    const d = await getWearPartDetail(db, rider, part.value.id);
    if (!d.ok) throw new Error('detail');
    expect(d.value.meter).toBe('km');
    expect(d.value.forecast.status).toBe('no-measurable-wear');
  });

  test.each([
    { name: 'above the new range', input: { summary: '0.130' }, field: 'summary', message: /above the new range/ },
    { name: 'below zero', input: { summary: '-0.01' }, field: 'summary', message: /more than zero/ },
    {
      name: 'a piece above the new range',
      input: { pieces: '0.110 0.140' },
      field: 'pieces',
      message: /above the new range/,
    },
    {
      name: 'more pieces than the part has',
      input: { pieces: '0.11 0.11 0.11 0.11 0.11 0.11 0.11 0.11 0.11' },
      field: 'pieces',
      message: /has 8 piece/,
    },
    { name: 'no value', input: {}, field: 'summary', message: /Enter the measurement/ },
    {
      name: 'a negative odometer',
      input: { summary: '0.11', odometer: '-3' },
      field: 'odometer',
      message: /cannot be negative/,
    },
    {
      name: 'an absurd odometer',
      input: { summary: '0.11', odometer: '3000000' },
      field: 'odometer',
      message: /further than any engine/,
    },
  ])('a measurement $name is refused and writes nothing', async ({ input, field, message }) => {
    const { rider, partId } = await setup();
    const r = await addWearMeasurement(db, rider, partId, {
      measuredOn: '2025-05-01',
      odometer: '17000',
      unit: 'in',
      ...input,
    });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fields[field]).toMatch(message);
    expect((await countRiderRows(db)).wear_measurements).toBe(0);
  });

  test.each([
    { name: 'limit above the new range', over: { serviceLimit: '0.125' }, field: 'serviceLimit' },
    { name: 'new range upside down', over: { newMin: '0.121', newMax: '0.115' }, field: 'newMax' },
    { name: 'no name', over: { name: '' }, field: 'name' },
  ])('a part with $name is refused', async ({ over, field }) => {
    const { rider, machineId } = await setup();
    const r = await createWearPart(db, rider, machineId, { ...CLUTCH, ...over });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fields[field]).toBeTruthy();
    expect((await countRiderRows(db)).wear_parts).toBe(1);
  });

  test('another crew’s wear part answers not found', async () => {
    const { partId } = await setup();
    const stranger = await makeActor(db, 'lead', 'Elsewhere');
    const r = await addWearMeasurement(db, stranger, partId, {
      measuredOn: '2025-05-01',
      odometer: '1',
      unit: 'in',
      summary: '0.11',
    });
    expect(r.ok ? 200 : r.status).toBe(404);
    const d = await getWearPartDetail(db, stranger, partId);
    expect(d.ok ? 200 : d.status).toBe(404);
  });
});

describe('the machine page’s wear parts', () => {
  test('all parts with their measurements and forecasts in two queries, the same as each part’s detail', async () => {
    const { rider, machineId, partId } = await setup();
    const chain = await createWearPart(db, rider, machineId, { ...CLUTCH, name: 'Steel plates', pieceCount: '1' });
    const bare = await createWearPart(db, rider, machineId, { ...CLUTCH, name: 'Another part', pieceCount: '1' });
    if (!chain.ok || !bare.ok) throw new Error('setup');
    for (const [id, odometer, value] of [
      [partId, '17000', '0.111'],
      [partId, '9000', '0.114'],
      [chain.value.id, '12000', '0.113'],
    ] as const) {
      const r = await addWearMeasurement(db, rider, id, {
        measuredOn: '2025-05-01',
        odometer,
        unit: 'in',
        summary: value,
      });
      if (!r.ok) throw new Error(JSON.stringify(r));
    }
    const machine = await getMachine(db, rider, machineId);
    if (!machine.ok) throw new Error('machine');
    let queries = 0;
    const counted = db.withPlugin({
      transformQuery: (args) => {
        queries += 1;
        return args.node;
      },
      transformResult: async (args) => args.result,
    });
    const list = await listWearPartDetails(counted, rider, machine.value);
    expect(queries).toBe(2);
    const one = await Promise.all(
      [partId, chain.value.id, bare.value.id].map((id) => getWearPartDetail(db, rider, id)),
    );
    const byName = (a: { part: { name: string } }, b: { part: { name: string } }) =>
      a.part.name.localeCompare(b.part.name);
    expect(list).toEqual(one.map((d) => (d.ok ? d.value : null)).sort((a, b) => byName(a!, b!)));
    // Stored in km, oldest reading first: 1 mi = 1.609344 km exactly (NIST SP 811, B.8).
    expect(list.map((d) => d.measurements.map((m) => m.odometer))).toEqual(
      [[], [17000 * 1.609344, 9000 * 1.609344].sort((a, b) => a - b), [12000 * 1.609344]].map((xs) =>
        xs.map((x) => expect.closeTo(x, 6)),
      ),
    );
  });
});
