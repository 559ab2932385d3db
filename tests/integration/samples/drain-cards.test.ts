import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { addActor, countRiderRows, makeActor, MACHINE_450 } from '../rider-fixtures';
import { collectMachineForm } from '~/lib/machines/machines';
import type { Actor } from '~/lib/auth/types';
import { readFormObject } from '~/lib/http/result';
import { createMachine } from '~/lib/machines/machines.service';
import { createOilChange } from '~/lib/oil-changes/oil-changes.service';
import { computeCheckSymbol } from '~/lib/samples/bottle-code';
import {
  getSampleDetail,
  issueBottleCode,
  listSamplesByState,
  markSampleShipped,
  prefillDrainCard,
  registerDrainCard,
} from '~/lib/samples/samples.service';
import { recordSampleState } from '~/lib/samples/sample-lifecycle';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

async function setup(actor?: Actor) {
  const rider = actor ?? (await makeActor(db));
  const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
  if (!m.ok) throw new Error('setup');
  await createOilChange(db, rider, m.value.id, {
    changedOn: '2025-01-10',
    odometer: '9000',
    saeGrade: '10W-40',
    oilProduct: 'Old oil',
  });
  await createOilChange(db, rider, m.value.id, {
    changedOn: '2025-04-01',
    odometer: '12000',
    saeGrade: '10W-50',
    oilProduct: 'Valley Lube 4T',
    volumeL: '1.2',
  });
  return { rider, machineId: m.value.id };
}

const card = (o: Record<string, unknown> = {}) => ({
  bottleCode: 'vl-20931',
  codeSource: 'kit',
  drawnOn: '2025-07-01',
  odometer: '14,500',
  topUpL: '0.1',
  saeGrade: '10W-50',
  oilProduct: 'Valley Lube 4T',
  drawMethod: 'midstream',
  ...o,
});

describe('drain cards', () => {
  test('prefilled from the latest oil change; distance on oil computed; the drawn state recorded with its author', async () => {
    const { rider, machineId } = await setup();
    const pre = await prefillDrainCard(db, rider, machineId);
    expect(pre.values).toMatchObject({ saeGrade: '10W-50', oilProduct: 'Valley Lube 4T', volumeL: 1.2 });
    // The last reading is long past: no recent riding to estimate from, and never the oil change's own reading.
    expect(pre.values.odometer).toBeNull();
    // 20 days after the change: 12,000 mi plus the pace of the two changes (3,000 mi in 81 days) for 20 days.
    const recent = await prefillDrainCard(db, rider, machineId, '2025-04-21');
    expect(recent.values.odometer).toBe(Math.round((12000 + (3000 / 81) * 20) * 1.609344));
    const r = await registerDrainCard(db, rider, machineId, card());
    if (!r.ok) throw new Error(JSON.stringify(r));
    expect(r.value.sample.bottleCodeNorm).toBe('VL20931');
    expect(r.value.sample.distanceOnOil).toBeCloseTo(2500 * 1.609344, 6); // 14,500 − 12,000 mi, NIST SP 811 B.8
    const detail = await getSampleDetail(db, rider, r.value.sample.id);
    if (!detail.ok) throw new Error('detail');
    expect(detail.value.events.map((e) => e.state)).toEqual(['drawn']);
    expect(detail.value.events[0]!.actorName).toBe('Test Rider');
  });

  test('a sample at the very reading of the last change belongs to the oil that change drained', async () => {
    const { rider, machineId } = await setup();
    const r = await registerDrainCard(db, rider, machineId, card({ drawnOn: '2025-04-01', odometer: '12000' }));
    if (!r.ok) throw new Error(JSON.stringify(r));
    expect(r.value.sample.distanceOnOil).toBeCloseTo(3000 * 1.609344, 6);
  });

  test('a Sumpwise-issued code passes its check; a mistyped one is refused and writes nothing', async () => {
    const { rider, machineId } = await setup();
    const code = await issueBottleCode(db, rider);
    const ok = await registerDrainCard(
      db,
      rider,
      machineId,
      card({ bottleCode: `${code.slice(0, 3)}-${code.slice(3)}`, codeSource: 'issued' }),
    );
    expect(ok.ok).toBe(true);
    const data = 'K7MQ4X';
    const good = data + computeCheckSymbol(data);
    const typo = `K7MQ4${good[5] === 'Y' ? 'W' : 'Y'}${good[6]}`;
    const before = await countRiderRows(db);
    const bad = await registerDrainCard(db, rider, machineId, card({ bottleCode: typo, codeSource: 'issued' }));
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.fields['bottleCode']).toMatch(/fails its check character/);
    expect(await countRiderRows(db)).toEqual(before);
  });

  test.each([
    {
      name: 'duplicate bottle code (other spelling)',
      over: { bottleCode: 'VL 20931' },
      field: 'bottleCode',
      status: 409,
      message: /already on a sample of Gravel 450 drawn on 1 Jul 2025/,
    },
    {
      name: 'negative odometer',
      over: { odometer: '-1' },
      field: 'odometer',
      status: 400,
      message: /cannot be negative/,
    },
    {
      name: 'absurd odometer',
      over: { odometer: '99999999' },
      field: 'odometer',
      status: 400,
      message: /further than any engine/,
    },
    {
      name: 'odometer below the oil change',
      over: { odometer: '100', drawnOn: '2025-07-02' },
      field: 'odometer',
      status: 400,
      message: /Lower than at the oil change/,
    },
    {
      name: 'grade that is not SAE',
      over: { saeGrade: '10W-45' },
      field: 'saeGrade',
      status: 400,
      message: /not an SAE/,
    },
    {
      name: 'bottle code with odd characters',
      over: { bottleCode: '#!' },
      field: 'bottleCode',
      status: 400,
      message: /letters and digits/,
    },
    {
      name: 'unknown draw method',
      over: { drawMethod: 'bucket' },
      field: 'drawMethod',
      status: 400,
      message: /how the sample was drawn/,
    },
  ])('$name is refused and writes nothing', async ({ over, field, status, message }) => {
    const { rider, machineId } = await setup();
    const first = await registerDrainCard(db, rider, machineId, card());
    expect(first.ok).toBe(true);
    const before = await countRiderRows(db);
    const r = await registerDrainCard(db, rider, machineId, card(over));
    expect(r.ok ? 200 : r.status).toBe(status);
    if (!r.ok) expect(r.fields[field]).toMatch(message);
    expect(await countRiderRows(db)).toEqual(before);
  });

  test('the same card sent twice (same client key) makes one sample', async () => {
    const { rider, machineId } = await setup();
    const key = 'card-5d1c0f7a-1b2c';
    const [a, b] = await Promise.all([
      registerDrainCard(db, rider, machineId, card({ clientKey: key })),
      registerDrainCard(db, rider, machineId, card({ clientKey: key })),
    ]);
    const c = await registerDrainCard(db, rider, machineId, card({ clientKey: key }));
    if (!a.ok || !b.ok || !c.ok) throw new Error('resend refused');
    expect(new Set([a.value.sample.id, b.value.sample.id, c.value.sample.id]).size).toBe(1);
    expect(c.value.repeated).toBe(true);
    expect((await countRiderRows(db)).samples).toBe(1);
    expect((await countRiderRows(db)).sample_events).toBe(1);
  });

  test('another crew cannot register, read or ship', async () => {
    const { rider, machineId } = await setup();
    const stranger = await makeActor(db, 'lead', 'Other crew');
    const reg = await registerDrainCard(db, stranger, machineId, card());
    expect(reg.ok ? 200 : reg.status).toBe(404);
    const mine = await registerDrainCard(db, rider, machineId, card());
    if (!mine.ok) throw new Error('setup');
    const read = await getSampleDetail(db, stranger, mine.value.sample.id);
    expect(read.ok ? 200 : read.status).toBe(404);
    const ship = await markSampleShipped(db, stranger, mine.value.sample.id, {});
    expect(ship.ok ? 200 : ship.status).toBe(404);
  });
});

describe('sample states', () => {
  test('drawn → shipped (with note) → results in → reviewed, each with time and author; listed by state', async () => {
    const { rider, machineId } = await setup();
    const mech = await addActor(db, rider, 'mechanic');
    const s = await registerDrainCard(db, rider, machineId, card());
    if (!s.ok) throw new Error('setup');
    const id = s.value.sample.id;
    const shipped = await markSampleShipped(db, rider, id, { trackingNote: 'Posted, tracking VX123' });
    if (!shipped.ok) throw new Error(JSON.stringify(shipped));
    expect(shipped.value.state).toBe('shipped');
    expect(shipped.value.trackingNote).toBe('Posted, tracking VX123');
    const again = await markSampleShipped(db, rider, id, {});
    expect(again.ok ? 200 : again.status).toBe(409);
    expect(await db.transaction().execute((t) => recordSampleState(t, id, 'results_in', null))).toBe(true);
    expect(await db.transaction().execute((t) => recordSampleState(t, id, 'shipped', rider.userId))).toBe(false);
    expect(await db.transaction().execute((t) => recordSampleState(t, id, 'reviewed', mech.userId))).toBe(true);
    const d = await getSampleDetail(db, rider, id);
    if (!d.ok) throw new Error('detail');
    expect(d.value.events.map((e) => [e.state, e.actorName !== null])).toEqual([
      ['drawn', true],
      ['shipped', true],
      ['results_in', false],
      ['reviewed', true],
    ]);
    expect(d.value.events.every((e) => e.at instanceof Date)).toBe(true);
    const list = await listSamplesByState(db, rider);
    expect(list.counts).toEqual({ drawn: 0, shipped: 0, results_in: 0, reviewed: 1 });
    expect((await listSamplesByState(db, rider, 'reviewed')).samples[0]!.machineName).toBe('Gravel 450');
  });

  test('a crew-mate rider cannot ship someone else’s sample', async () => {
    const { rider, machineId } = await setup();
    const mate = await addActor(db, rider, 'rider');
    const s = await registerDrainCard(db, rider, machineId, card());
    if (!s.ok) throw new Error('setup');
    const r = await markSampleShipped(db, mate, s.value.sample.id, {});
    expect(r.ok ? 200 : r.status).toBe(403);
  });
});
