import { describe, expect, test } from 'vitest';
import { parseTrendSnapshot } from '~/lib/trends/trend-snapshot';

// Invented rows in the layout findTrendSnapshot sends (see trend-snapshot.ts).
const MACHINE = ['m-1', 'Trail 450', 'km', 1.6];
const sample = (id: string, over: Partial<Record<number, unknown>> = {}): unknown[] => {
  const row: unknown[] = [id, `BTL-${id}`, '2026-03-01', 1200, 900, '10W-40', 0.2, true, null, false, 1.4];
  for (const [i, v] of Object.entries(over)) row[Number(i)] = v;
  return row;
};
const snapshot = (parts: Partial<Record<0 | 1 | 2 | 3 | 4 | 5, unknown[]>>): string =>
  JSON.stringify([parts[0] ?? MACHINE, parts[1] ?? [], parts[2] ?? [], parts[3] ?? [], parts[4] ?? [], parts[5] ?? []]);

describe('parseTrendSnapshot', () => {
  test('a sample row becomes the chart row, readings, bands and oil changes in place', () => {
    const band = ['s1', 'Fe', 'rate', 6, 11.5, 4.1, 18.2, 24.9, 0.75, 'crew', 'from the crew’s other singles'];
    const parsed = parseTrendSnapshot(
      snapshot({
        1: [sample('s1')],
        2: [
          ['s1', 'Fe', 14.2, null],
          ['s1', 'Si', 1, '<'],
        ],
        4: [band],
        5: [['2026-01-05', 300, '15W-50']],
      }),
    );
    expect(parsed.machine).toEqual({ id: 'm-1', name: 'Trail 450', meter: 'km', oilCapacityL: 1.6 });
    expect(parsed.samples).toEqual([
      {
        id: 's1',
        bottleCode: 'BTL-s1',
        drawnOn: '2026-03-01',
        odometerStored: 1200,
        distanceOnOilStored: 900,
        grade: '10W-40',
        topUpL: 0.2,
        oilVolumeL: 1.4,
        inBaseline: true,
        baselineNote: null,
        readings: { Fe: { value: 14.2, qualifier: null }, Si: { value: 1, qualifier: '<' } },
        bands: {
          Fe: {
            basis: 'rate',
            n: 6,
            mean: 11.5,
            lower: 4.1,
            watchAbove: 18.2,
            actFrom: 24.9,
            toReported: 0.75,
            source: 'crew',
            sourceLabel: 'from the crew’s other singles',
          },
        },
        levels: {},
      },
    ]);
    expect(parsed.changes).toEqual([{ changedOn: '2026-01-05', odometerStored: 300, grade: '15W-50' }]);
  });

  // Same rules as the chart had before: the oil poured at the change, else the machine's capacity; an empty note
  // falls back to break-in or the plain exclusion.
  test.each([
    ['oil volume from the oil change', { 10: 2.1 }, { oilVolumeL: 2.1 }],
    ['oil volume from the machine when the change has none', { 10: null }, { oilVolumeL: 1.6 }],
    ['in the baseline: no note even if one is stored', { 7: true, 8: 'old note' }, { baselineNote: null }],
    ['kept out with a reason', { 7: false, 8: 'Drawn after a top-up' }, { baselineNote: 'Drawn after a top-up' }],
    ['kept out, break-in, empty note', { 7: false, 8: '', 9: true }, { baselineNote: 'Break-in oil.' }],
    ['kept out, no note', { 7: false, 8: null, 9: false }, { baselineNote: 'Kept out of the baseline.' }],
    ['no distance on oil', { 4: null }, { distanceOnOilStored: null }],
  ] as const)('%s', (_, over, expected) => {
    const [row] = parseTrendSnapshot(snapshot({ 1: [sample('s1', over)] })).samples;
    expect(row).toMatchObject(expected);
  });

  test('the machine without a capacity leaves the volume unknown', () => {
    const [row] = parseTrendSnapshot(snapshot({ 0: ['m-1', 'X', 'h', null], 1: [sample('s1', { 10: null })] })).samples;
    expect(row!.oilVolumeL).toBeNull();
  });

  test('each element keeps its worst finding level, in any order of rows', () => {
    const findings = [
      ['s1', 'Fe', 'watch'],
      ['s1', 'Fe', 'act'],
      ['s1', 'Fe', 'steady'],
      ['s1', 'Al', 'steady'],
      ['s1', 'Si', 'watch'],
    ];
    for (const rows of [findings, [...findings].reverse()]) {
      const [row] = parseTrendSnapshot(snapshot({ 1: [sample('s1')], 3: rows })).samples;
      expect(row!.levels).toEqual({ Fe: 'act', Si: 'watch' });
    }
  });

  test('rows of unknown elements or of samples not in the list are left out; sample order is kept', () => {
    const parsed = parseTrendSnapshot(
      snapshot({
        1: [sample('s2'), sample('s1')],
        2: [
          ['s1', 'Unobtainium', 3, null],
          ['s9', 'Fe', 3, null],
          ['s2', 'Cu', 5, null],
        ],
        3: [['s9', 'Fe', 'act']],
        4: [['s9', 'Fe', 'ppm', 3, 1, 0, 2, 3, 1, 'own', null]],
      }),
    );
    expect(parsed.samples.map((s) => s.id)).toEqual(['s2', 's1']);
    expect(parsed.samples[0]!.readings).toEqual({ Cu: { value: 5, qualifier: null } });
    expect(parsed.samples[1]!.readings).toEqual({});
    expect(parsed.samples.every((s) => Object.keys(s.levels).length === 0 && Object.keys(s.bands).length === 0)).toBe(
      true,
    );
  });

  test.each([
    ['not JSON', '{'],
    ['an object', '{"machine":1}'],
    ['five parts', JSON.stringify([MACHINE, [], [], [], []])],
    ['a part that is not a list', JSON.stringify([MACHINE, [], 'readings', [], [], []])],
  ])('%s is refused', (_, text) => {
    expect(() => parseTrendSnapshot(text)).toThrow();
  });
});
