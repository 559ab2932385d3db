import { describe, expect, test } from 'vitest';
import { compactTrendResponse, expandTrendResponse } from '~/lib/trends/trend-compact';
import type { TrendPoint, TrendResponse } from '~/lib/trends/trend-types';

function point(i: number, over: Partial<TrendPoint> = {}): TrendPoint {
  const band =
    i >= 2
      ? {
          lower: 8.5,
          mean: 10.25,
          upper: 12,
          actFrom: 15.5,
          n: i,
          source: i < 3 ? ('crew' as const) : ('own' as const),
          sourceLabel: i < 3 ? 'from the crew’s other singles' : null,
        }
      : null;
  const value = 10 + i;
  return {
    sampleId: `s${i}`,
    bottleCode: `B${i}`,
    date: `2026-0${i + 1}-01`,
    odometer: 1000 * (i + 1),
    distanceOnOil: i === 0 ? null : 1000,
    grade: i === 4 ? null : '10W-40',
    value,
    reported: value,
    qualifier: i === 1 ? '<' : null,
    level: i === 4 ? 'act' : i === 3 ? 'watch' : 'steady',
    band,
    fromBaseline: band ? { delta: value - band.mean, spreads: (value - band.mean) / (band.upper - band.mean) } : null,
    inBaseline: i !== 2,
    baselineNote: i === 2 ? 'Break-in oil.' : null,
    ...over,
  };
}

const full: TrendResponse = {
  machine: { id: 'm1', name: 'Invented 450', meter: 'km' },
  basis: 'ppm',
  x: 'odometer',
  series: [
    {
      code: 'Fe',
      name: 'Iron',
      group: 'wear',
      unit: 'ppm',
      basis: 'ppm',
      points: [0, 1, 2, 3, 4].map((i) => point(i)),
    },
    // A series missing samples 1 and 3 keeps the others in their places.
    {
      code: 'Si',
      name: 'Silicon',
      group: 'contaminant',
      unit: 'ppm',
      basis: 'ppm',
      points: [0, 2, 4].map((i) => point(i, { value: 5 + i, reported: 5 + i, fromBaseline: null, band: null })),
    },
    { code: 'KV100', name: 'Viscosity at 100 °C', group: 'condition', unit: 'mm²/s', basis: 'ppm', points: [] },
  ],
  gradeChanges: [{ date: '2026-03-01', odometer: 3000, from: '10W-40', to: '15W-50' }],
  notes: [],
};

describe('compactTrendResponse / expandTrendResponse', () => {
  test('expanding the compact form gives back every point as the service shaped it', () => {
    expect(expandTrendResponse(compactTrendResponse(full))).toEqual(full);
  });

  test('the compact form names each sample once and carries numbers per series', () => {
    const c = compactTrendResponse(full);
    expect(c.samples.id).toEqual(['s0', 's1', 's2', 's3', 's4']);
    expect(c.series[1]!.value).toEqual([5, null, 7, null, 9]);
    expect(c.series[0]!.level).toEqual([0, 0, 0, 1, 2]);
    expect(c.series[0]!.qualifiers).toEqual([[1, '<']]);
    expect(c.series[0]!.sources).toEqual([
      { source: 'crew', sourceLabel: 'from the crew’s other singles' },
      { source: 'own', sourceLabel: null },
    ]);
    expect(c.series[0]!.band.source).toEqual([null, null, 0, 1, 1]);
    // In ppm the reported figure is the value: it is not sent twice.
    expect(c.series[0]!.reported).toBeUndefined();
    expect(JSON.stringify(c)).not.toMatch(/"steady"|"sampleId"/);
  });

  test('a rate series keeps the reported ppm beside the plotted rate', () => {
    const rate: TrendResponse = {
      ...full,
      basis: 'rate',
      series: [
        {
          ...full.series[0]!,
          basis: 'rate',
          unit: 'ppm per 1,000 km',
          points: full.series[0]!.points.map((p) => ({
            ...p,
            value: p.value / 2,
            fromBaseline: p.band
              ? {
                  delta: p.value / 2 - p.band.mean,
                  spreads: (p.value / 2 - p.band.mean) / (p.band.upper - p.band.mean),
                }
              : null,
          })),
        },
      ],
    };
    const c = compactTrendResponse(rate);
    expect(c.series[0]!.reported).toEqual([10, 11, 12, 13, 14]);
    expect(expandTrendResponse(c)).toEqual(rate);
  });

  test.each([
    [1 / 3, 0.333333],
    [16.594237284, 16.5942],
    [123456.789, 123457],
    [0, 0],
  ])('numbers go on the wire to six significant digits: %d → %d', (v, sent) => {
    const c = compactTrendResponse({
      ...full,
      series: [{ ...full.series[0]!, points: [point(0, { value: v, reported: v })] }],
    });
    expect(c.series[0]!.value).toEqual([sent]);
  });
});
