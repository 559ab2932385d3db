import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { loadMachineTrends } from '~/lib/trends/trends.service';
import { addSamples, makeCrewWithRoles } from './decision-fixtures';
import { recomputeMachineFindings } from '~/lib/findings/findings.service';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

describe('loadMachineTrends', () => {
  test('series carry readings in order, the levels and the band the engine stored, and grade changes', async () => {
    const c = await makeCrewWithRoles(db);
    const machine = await c.machine({ meter: 'km' });
    const ids = await addSamples(db, c.crew.id, machine.id, c.rider.id, [
      { drawnOn: '2026-01-01', odometer: 1000, readings: { Fe: 10, KV100: 13 } },
      { drawnOn: '2026-02-01', odometer: 2000, readings: { Fe: 10 } },
      { drawnOn: '2026-03-01', odometer: 3000, readings: { Fe: 10 } },
      { drawnOn: '2026-03-20', odometer: 4000, readings: { Fe: 10 } },
      { drawnOn: '2026-04-01', odometer: 5000, readings: { Fe: 30 } },
      { drawnOn: '2026-05-01', odometer: 6000, state: 'shipped', readings: {} },
    ]);
    // The engine judges them (as an import would) and stores the bands its rules used.
    await db.transaction().execute((trx) => recomputeMachineFindings(trx, machine.id, new Set(ids)));
    await db
      .insertInto('oil_changes')
      .values([
        {
          crew_id: c.crew.id,
          machine_id: machine.id,
          changed_on: '2026-01-01',
          odometer: 0,
          sae_grade: '10W-40',
          other_work: '[]',
          created_by: c.rider.id,
        },
        {
          crew_id: c.crew.id,
          machine_id: machine.id,
          changed_on: '2026-03-15',
          odometer: 3500,
          sae_grade: '15W-50',
          other_work: '[]',
          created_by: c.rider.id,
        },
      ])
      .execute();
    const t = await loadMachineTrends(db, c.crew.id, machine.id, {
      measurands: ['Fe', 'KV100'],
      basis: 'ppm',
      x: 'odometer',
    });
    expect(t).not.toBeNull();
    const fe = t!.series[0]!;
    expect(fe.points.map((p) => [p.odometer, p.value, p.level])).toEqual([
      [1000, 10, 'steady'],
      [2000, 10, 'steady'],
      [3000, 10, 'steady'],
      [4000, 10, 'steady'],
      [5000, 30, 'act'],
    ]);
    expect(fe.points.slice(0, 4).every((p) => p.band === null)).toBe(true);
    // Previous 10, 10, 10, 10 ppm over 1,000 km each: mean 10, spread the lab-scatter floor √(0.5² + 1.2²) = 1.3;
    // watch edge 10 + t(0.99; 3) · √1.25 · 1.3 with t(0.99; 3) = 4.541 (NIST/SEMATECH table 1.3.6.7.2) = 16.6.
    const band = fe.points[4]!.band!;
    expect(band.mean).toBeCloseTo(10, 9);
    expect(band.upper).toBeCloseTo(10 + 4.541 * Math.sqrt(1.25) * 1.3, 1);
    expect(band.lower).toBeCloseTo(10 - 4.541 * Math.sqrt(1.25) * 1.3, 1);
    expect(band.n).toBe(4);
    expect(t!.series[1]!.points).toHaveLength(1);
    expect(t!.gradeChanges).toEqual([{ date: '2026-03-15', odometer: 3500, from: '10W-40', to: '15W-50' }]);
  });

  test('a mile machine answers in miles, with rates per 1,000 mi and the approximation note', async () => {
    const c = await makeCrewWithRoles(db);
    const machine = await c.machine({ meter: 'mi' });
    // Stored in km: 1,609.344 km = 1,000 mi (NIST SP 811).
    await addSamples(db, c.crew.id, machine.id, c.rider.id, [
      { drawnOn: '2026-01-01', odometer: 1609.344 * 5, distanceOnOil: 1609.344 * 2, readings: { Fe: 20 } },
    ]);
    const t = await loadMachineTrends(db, c.crew.id, machine.id, { measurands: ['Fe'], basis: 'rate', x: 'date' });
    expect(t!.series[0]!.points[0]!.odometer).toBeCloseTo(5000, 9);
    expect(t!.series[0]!.points[0]!.value).toBeCloseTo(10, 9);
    expect(t!.series[0]!.unit).toBe('ppm per 1,000 mi');
    expect(t!.notes.join(' ')).toMatch(/approximation/);
  });

  test.each([['another crew’s machine'], ['a malformed id']])('%s is not found', async (kind) => {
    const a = await makeCrewWithRoles(db, 'A');
    const b = await makeCrewWithRoles(db, 'B');
    const machine = await b.machine();
    const id = kind === 'a malformed id' ? 'not-a-uuid' : machine.id;
    await expect(
      loadMachineTrends(db, a.crew.id, id, { measurands: ['Fe'], basis: 'ppm', x: 'odometer' }),
    ).resolves.toBeNull();
  });
});
