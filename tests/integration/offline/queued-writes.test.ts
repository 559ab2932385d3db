// Writes sent from a device's offline queue: each carries a client key the server stores, so a resend
// (a reply lost on the way back, two sends racing) writes nothing twice; and bottle codes reserved ahead
// of time for a device are never handed out twice.
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { addActor, makeActor, MACHINE_450 } from '../rider-fixtures';
import { collectMachineForm } from '~/lib/machines/machines';
import type { Actor } from '~/lib/auth/types';
import { readFormObject } from '~/lib/http/result';
import { createMachine } from '~/lib/machines/machines.service';
import { createOilChange } from '~/lib/oil-changes/oil-changes.service';
import { hasValidCheckSymbol } from '~/lib/samples/bottle-code';
import {
  findSampleIdByBottleCode,
  issueBottleCode,
  registerDrainCard,
  reserveBottleCodes,
  RESERVED_BLOCK_SIZE,
  RESERVED_COUNT_DAYS,
  RESERVED_PER_RIDER,
} from '~/lib/samples/samples.service';
import { addWearMeasurement, createWearPart } from '~/lib/wear-parts/wear-parts.service';
import { listPagesToKeep, MACHINES_KEPT_OFFLINE } from '~/lib/offline/offline.service';
import { makeMachine } from '../factories';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

async function machineOf(rider: Actor): Promise<string> {
  const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
  if (!m.ok) throw new Error(JSON.stringify(m));
  return m.value.id;
}

const KEY = '8d5a3c1e-2b4f-4e6a-9c7d-0f1e2d3c4b5a';
const change = { changedOn: '2025-04-01', odometer: '12000', saeGrade: '10W-50', clientKey: KEY };

describe('oil changes with a client key', () => {
  test('a resend answers the first oil change and writes nothing', async () => {
    const rider = await makeActor(db);
    const machineId = await machineOf(rider);
    const first = await createOilChange(db, rider, machineId, change);
    const again = await createOilChange(db, rider, machineId, { ...change, odometer: '12,500' });
    if (!first.ok || !again.ok) throw new Error(JSON.stringify([first, again]));
    expect(first.value.repeated).toBe(false);
    expect(again.value).toMatchObject({ id: first.value.id, repeated: true });
    expect(await db.selectFrom('oil_changes').select('client_key').execute()).toEqual([{ client_key: KEY }]);
  });

  test('two sends racing write one row', async () => {
    const rider = await makeActor(db);
    const machineId = await machineOf(rider);
    const results = await Promise.all([1, 2, 3].map(() => createOilChange(db, rider, machineId, change)));
    expect(results.every((r) => r.ok)).toBe(true);
    expect(new Set(results.map((r) => (r.ok ? r.value.id : '')))).toHaveProperty('size', 1);
    expect(await db.selectFrom('oil_changes').select('id').execute()).toHaveLength(1);
  });

  test('the same key for another machine is refused, and a key is per crew', async () => {
    const rider = await makeActor(db);
    const [a, b] = [await machineOf(rider), await machineOf(rider)];
    expect((await createOilChange(db, rider, a, change)).ok).toBe(true);
    const other = await createOilChange(db, rider, b, change);
    expect(other).toMatchObject({ ok: false, status: 409, code: 'client_key_reused' });
    const stranger = await makeActor(db, 'rider', 'Other crew');
    expect((await createOilChange(db, stranger, await machineOf(stranger), change)).ok).toBe(true);
    expect(await db.selectFrom('oil_changes').select('id').execute()).toHaveLength(2);
  });

  test('a malformed key is refused beside its field and writes nothing', async () => {
    const rider = await makeActor(db);
    const r = await createOilChange(db, rider, await machineOf(rider), { ...change, clientKey: 'x'.repeat(100_000) });
    expect(r).toMatchObject({ ok: false, status: 400, fields: { clientKey: 'Not a valid card key.' } });
    expect(await db.selectFrom('oil_changes').select('id').execute()).toHaveLength(0);
  });
});

describe('wear-part measurements with a client key', () => {
  test('a resend answers the first measurement; racing sends write one row', async () => {
    const rider = await makeActor(db);
    const machineId = await machineOf(rider);
    // Friction plates of 2.9–3.1 mm new with a 2.6 mm limit: common practice, no published source.
    const part = await createWearPart(db, rider, machineId, {
      name: 'Clutch plates',
      pieceCount: '8',
      newMin: '2.9',
      newMax: '3.1',
      serviceLimit: '2.6',
      unit: 'mm',
    });
    if (!part.ok) throw new Error(JSON.stringify(part));
    const input = { measuredOn: '2025-05-01', odometer: '17000', unit: 'mm', summary: '2.95', clientKey: KEY };
    const results = await Promise.all([1, 2, 3].map(() => addWearMeasurement(db, rider, part.value.id, input)));
    expect(results.every((r) => r.ok)).toBe(true);
    const again = await addWearMeasurement(db, rider, part.value.id, input);
    expect(again.ok && results[0]!.ok && again.value.id === results[0]!.value.id).toBe(true);
    expect(await db.selectFrom('wear_measurements').select('client_key').execute()).toEqual([{ client_key: KEY }]);
  });
});

describe('bottle codes reserved for a device', () => {
  test('a device gets a block of valid codes; asking again answers the same block; used codes are replaced', async () => {
    const rider = await makeActor(db);
    const machineId = await machineOf(rider);
    const first = await reserveBottleCodes(db, rider, 'device-one-0001');
    if (!first.ok) throw new Error(JSON.stringify(first));
    expect(first.value.codes).toHaveLength(RESERVED_BLOCK_SIZE);
    expect(first.value.codes.every((c) => c.length === 7 && hasValidCheckSymbol(c))).toBe(true);
    expect(
      (await reserveBottleCodes(db, rider, 'device-one-0001')).ok &&
        (await reserveBottleCodes(db, rider, 'device-one-0001')),
    ).toMatchObject({ value: { codes: first.value.codes } });
    const used = first.value.codes[0]!;
    const r = await registerDrainCard(db, rider, machineId, {
      bottleCode: used,
      codeSource: 'issued',
      drawnOn: '2025-07-01',
      odometer: '100',
    });
    expect(r.ok).toBe(true);
    expect(await findSampleIdByBottleCode(db, rider, `${used.slice(0, 3)}-${used.slice(3)}`)).toBe(
      r.ok ? r.value.sample.id : null,
    );
    const topped = await reserveBottleCodes(db, rider, 'device-one-0001');
    if (!topped.ok) throw new Error('topped');
    expect(topped.value.codes).toHaveLength(RESERVED_BLOCK_SIZE);
    expect(topped.value.codes).not.toContain(used);
  });

  test('no code is ever handed out twice: across devices, riders, crews and the online button', async () => {
    const rider = await makeActor(db);
    const lead = await addActor(db, rider, 'lead');
    const stranger = await makeActor(db, 'rider', 'Other crew');
    const codes: string[] = [];
    for (const [actor, device] of [
      [rider, 'device-a-0001'],
      [rider, 'device-b-0001'],
      [lead, 'device-c-0001'],
      [stranger, 'device-d-0001'],
    ] as const) {
      const r = await reserveBottleCodes(db, actor, device);
      if (!r.ok) throw new Error(JSON.stringify(r));
      codes.push(...r.value.codes);
    }
    for (let i = 0; i < 5; i++) codes.push(await issueBottleCode(db, rider));
    expect(new Set(codes).size).toBe(codes.length);
    expect(await db.selectFrom('bottle_code_reservations').select('code_norm').execute()).toHaveLength(codes.length);
  });

  test('a rider cannot hoard codes over many made-up devices; a mechanic gets none', async () => {
    const rider = await makeActor(db);
    for (let i = 0; i < RESERVED_PER_RIDER / RESERVED_BLOCK_SIZE; i++)
      expect((await reserveBottleCodes(db, rider, `device-${i}-0001`)).ok).toBe(true);
    expect(await reserveBottleCodes(db, rider, 'device-x-0001')).toMatchObject({
      ok: false,
      status: 409,
      code: 'too_many_reserved',
    });
    const mechanic = await addActor(db, rider, 'mechanic');
    expect(await reserveBottleCodes(db, mechanic, 'device-m-0001')).toMatchObject({ ok: false, status: 403 });
  });

  test('a lost phone’s block stops counting after its days, and stays reserved: the next device gets fresh codes', async () => {
    const rider = await makeActor(db);
    const blocks: string[][] = [];
    for (let i = 0; i < RESERVED_PER_RIDER / RESERVED_BLOCK_SIZE; i++) {
      const r = await reserveBottleCodes(db, rider, `device-${i}-0001`);
      if (!r.ok) throw new Error(JSON.stringify(r));
      blocks.push(r.value.codes);
    }
    const refused = await reserveBottleCodes(db, rider, 'device-new-0001');
    expect(refused).toMatchObject({ ok: false, code: 'too_many_reserved' });
    expect(!refused.ok && refused.message).toContain(`last ${RESERVED_COUNT_DAYS} days`);
    // The first phone's block was handed out a day past the window; another's a day inside it.
    const ago = (days: number) => new Date(Date.now() - days * 86_400_000);
    await db
      .updateTable('bottle_code_reservations')
      .set({ reserved_at: ago(RESERVED_COUNT_DAYS + 1) })
      .where('device_key', '=', 'device-0-0001')
      .execute();
    await db
      .updateTable('bottle_code_reservations')
      .set({ reserved_at: ago(RESERVED_COUNT_DAYS - 1) })
      .where('device_key', '=', 'device-1-0001')
      .execute();
    const next = await reserveBottleCodes(db, rider, 'device-new-0001');
    if (!next.ok) throw new Error(JSON.stringify(next));
    expect(next.value.codes).toHaveLength(RESERVED_BLOCK_SIZE);
    expect(next.value.codes.filter((c) => blocks.flat().includes(c))).toEqual([]);
    // Still 50 counted now (four recent blocks and the new one): a sixth recent device is refused again.
    expect(await reserveBottleCodes(db, rider, 'device-other-0001')).toMatchObject({ ok: false, status: 409 });
    // The old phone still gets its own block back, unchanged, if it turns up.
    const old = await reserveBottleCodes(db, rider, 'device-0-0001');
    expect(old.ok && [...old.value.codes].sort()).toEqual([...blocks[0]!].sort());
  });
});

describe('pages a device keeps', () => {
  test('the garage pages of the machines the actor may write to; a mechanic keeps only reading pages', async () => {
    const rider = await makeActor(db);
    const machineId = await machineOf(rider);
    expect(await listPagesToKeep(db, rider)).toEqual([
      '/',
      '/machines',
      '/outbox',
      `/machines/${machineId}`,
      `/machines/${machineId}/drain-card`,
      `/machines/${machineId}/oil-change`,
    ]);
    const mechanic = await addActor(db, rider, 'mechanic');
    expect(await listPagesToKeep(db, mechanic)).toEqual(['/', '/machines', '/outbox', `/machines/${machineId}`]);
  });

  test('a large crew keeps a bounded set of machines, the rider’s own first', async () => {
    const lead = await makeActor(db, 'lead');
    const others = [];
    for (let i = 0; i < MACHINES_KEPT_OFFLINE + 3; i++)
      others.push(
        await makeMachine(db, lead.membership.crewId, lead.userId, { name: `A${String(i).padStart(2, '0')}` }),
      );
    const rider = await addActor(db, lead, 'rider');
    // Named to sort last in the crew's list, so only the own-first rule can bring it in.
    const own = await makeMachine(db, lead.membership.crewId, rider.userId, { name: 'Zz own' });

    const riderPages = await listPagesToKeep(db, rider);
    const machineIds = (pages: string[]) => new Set(pages.map((p) => p.split('/')[2]).filter(Boolean));
    expect(machineIds(riderPages).size).toBe(MACHINES_KEPT_OFFLINE);
    expect(riderPages.slice(0, 6)).toEqual([
      '/',
      '/machines',
      '/outbox',
      `/machines/${own.id}`,
      `/machines/${own.id}/drain-card`,
      `/machines/${own.id}/oil-change`,
    ]);
    // The others the rider can only read: their page, no forms.
    expect(riderPages.length).toBe(3 + 3 + (MACHINES_KEPT_OFFLINE - 1));

    const leadPages = await listPagesToKeep(db, lead);
    expect(machineIds(leadPages).size).toBe(MACHINES_KEPT_OFFLINE);
    expect(leadPages.length).toBe(3 + 3 * MACHINES_KEPT_OFFLINE);
    expect(others.length).toBeGreaterThan(MACHINES_KEPT_OFFLINE);
  });
});
