import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { listExportReadings } from '~/lib/exports/exports.repository';
import { buildReadingsCsv } from '~/lib/exports/readings-csv';
import { addSamples, makeCrewWithRoles } from '../trends/decision-fixtures';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

describe('readings export', () => {
  test('a crew export holds its own readings with levels, one machine’s export only that machine, never another crew', async () => {
    const c = await makeCrewWithRoles(db);
    const a = await c.machine({ name: '=Alder' });
    const b = await c.machine({ name: 'Birch' });
    await addSamples(db, c.crew.id, a.id, c.rider.id, [
      {
        drawnOn: '2026-01-01',
        odometer: 1000,
        readings: { Fe: 12, Al: 30 },
        findings: [{ measurand: 'Al', level: 'act', ruleId: 'fixed-limit' }],
      },
    ]);
    await addSamples(db, c.crew.id, b.id, c.rider.id, [{ drawnOn: '2026-01-02', odometer: 500, readings: { Fe: 5 } }]);
    const other = await makeCrewWithRoles(db, 'Other');
    await addSamples(db, other.crew.id, (await other.machine({ name: 'Other bike' })).id, other.rider.id, [
      { drawnOn: '2026-01-01', odometer: 1, readings: { Fe: 99 } },
    ]);

    const all = await listExportReadings(db, c.crew.id);
    expect(all.map((r) => [r.machineName, r.measurand, r.value, r.level])).toEqual([
      ['=Alder', 'Al', 30, 'act'],
      ['=Alder', 'Fe', 12, 'steady'],
      ['Birch', 'Fe', 5, 'steady'],
    ]);
    const one = await listExportReadings(db, c.crew.id, b.id);
    expect(one.map((r) => r.machineName)).toEqual(['Birch']);
    const csv = buildReadingsCsv(all);
    // The formula-like machine name is neutralised (OWASP CSV Injection).
    expect(csv).toContain("\r\n'=Alder,");
    expect(csv).not.toContain('Other bike');
  });
});
