import { describe, expect, test } from 'vitest';
import {
  describeRateUnit,
  findGradeChanges,
  pickChartStart,
  shapeTrendSeries,
  trendQuerySchema,
  type TrendSampleRow,
} from '~/lib/trends/trends';
import { buildChartDatasets, buildGradeMarks } from '~/components/wear-chart/chart-data';
import { KM_PER_MI } from '~/lib/units/units';

// Invented demo figures throughout. The chart draws the bands the engine stored when it judged each sample
// (see replayHistory); these tests check the drawing of those stored bands in either basis.

function sample(i: number, over: Partial<TrendSampleRow> = {}): TrendSampleRow {
  return {
    id: `s${i}`,
    bottleCode: `B${i}`,
    drawnOn: `2026-0${i}-01`,
    odometerStored: 1000 * i,
    distanceOnOilStored: 1000,
    grade: '10W-40',
    topUpL: 0,
    oilVolumeL: 2,
    inBaseline: true,
    baselineNote: null,
    readings: {},
    levels: {},
    bands: {},
    ...over,
  };
}

describe('trendQuerySchema', () => {
  test.each([
    ['Fe,Al', { measurands: ['Fe', 'Al'], basis: 'ppm', x: 'odometer' }],
    ['Fe,Fe, Si', { measurands: ['Fe', 'Si'], basis: 'ppm', x: 'odometer' }],
    ['KV100', { measurands: ['KV100'], basis: 'ppm', x: 'odometer' }],
  ])('accepts %s', (measurands, expected) => {
    expect(trendQuerySchema.parse({ measurands })).toEqual(expected);
  });

  test.each([
    [{ measurands: '' }],
    [{ measurands: 'Fe,Xx' }],
    [{ measurands: 'fe' }],
    [{ measurands: 'Fe,Al,Cr,Cu,Pb,Sn,Ni,Ag,Ti' }],
    [{ measurands: 'Fe', basis: 'ppb' }],
    [{ measurands: 'Fe', x: 'hours' }],
  ])('refuses %j', (q) => {
    expect(trendQuerySchema.safeParse(q).success).toBe(false);
  });
});

describe('shapeTrendSeries', () => {
  // The engine's stored Fe band at sample 4: mean 10 per 1,000 km, watch above 14, act from 20, on a rate basis;
  // 1,000 km on the oil and no top-up, so one rate unit is one ppm at that sample (toReported 1).
  const stored = {
    basis: 'rate' as const,
    n: 3,
    mean: 10,
    lower: 6,
    watchAbove: 14,
    actFrom: 20,
    toReported: 1,
    source: 'own' as const,
    sourceLabel: null,
  };
  const flat = [10, 10, 10, 16].map((v, i) =>
    sample(i + 1, { readings: { Fe: { value: v, qualifier: null } }, bands: i === 3 ? { Fe: stored } : {} }),
  );

  test.each([
    // index, expected band (null while the engine stored none: building), delta
    [0, null, null],
    [2, null, null],
    // 16 − 10 = +6, one and a half times the band's upper half-width (4).
    [
      3,
      { lower: 6, mean: 10, upper: 14, actFrom: 20, n: 3, source: 'own', sourceLabel: null },
      { delta: 6, spreads: 1.5 },
    ],
  ])('point %i of a flat history carries band %j', (i, band, from) => {
    const [series] = shapeTrendSeries({ meter: 'km', samples: flat, measurands: ['Fe'], basis: 'ppm' });
    expect(series!.points[i]!.band).toEqual(band);
    expect(series!.points[i]!.fromBaseline).toEqual(from);
  });

  test('a rate band is drawn in ppm with the factor the engine used, and a ppm band as a rate', () => {
    const rows = [
      sample(1, {
        distanceOnOilStored: 2000,
        readings: { Fe: { value: 30, qualifier: null }, Na: { value: 8, qualifier: null } },
        bands: {
          Fe: { ...stored, toReported: 2 },
          Na: {
            basis: 'ppm',
            n: 4,
            mean: 5,
            lower: 2,
            watchAbove: 9,
            actFrom: 12,
            toReported: 1,
            source: 'crew',
            sourceLabel: "from the crew's other 450 cc liquid-cooled singles",
          },
        },
      }),
    ];
    const [fePpm, naRate] = [
      shapeTrendSeries({ meter: 'km', samples: rows, measurands: ['Fe'], basis: 'ppm' })[0]!,
      shapeTrendSeries({ meter: 'km', samples: rows, measurands: ['Na'], basis: 'rate' })[0]!,
    ];
    expect(fePpm.points[0]!.band).toEqual({
      lower: 12,
      mean: 20,
      upper: 28,
      actFrom: 40,
      n: 3,
      source: 'own',
      sourceLabel: null,
    });
    // 2,000 km on the oil: 1 ppm is 0.5 ppm per 1,000 km.
    // A crew reference band keeps its source and label for the chart's key.
    expect(naRate.points[0]!.band).toEqual({
      lower: 1,
      mean: 2.5,
      upper: 4.5,
      actFrom: 6,
      n: 4,
      source: 'crew',
      sourceLabel: "from the crew's other 450 cc liquid-cooled singles",
    });
  });

  test('samples outside the baseline are marked, with the reason', () => {
    const rows = [
      sample(1, { readings: { Fe: { value: 10, qualifier: null } } }),
      sample(2, {
        inBaseline: false,
        baselineNote: 'Bottle drawn after a top-up',
        readings: { Fe: { value: 90, qualifier: null } },
      }),
    ];
    const [series] = shapeTrendSeries({ meter: 'km', samples: rows, measurands: ['Fe'], basis: 'ppm' });
    expect(series!.points.map((p) => [p.inBaseline, p.baselineNote])).toEqual([
      [true, null],
      [false, 'Bottle drawn after a top-up'],
    ]);
  });

  test.each([
    // ppm 20 over 1,000 km → 20 per 1,000 km; 2 L fill with 0.5 L top-up → the engine's mass-balance factor
    // 0.25 / (1 − e^−0.25) = 1.1302 → 22.60 (see wear-rate.ts).
    ['km', 1000, 0, 20],
    ['km', 1000, 0.5, 20 * (0.25 / -Math.expm1(-0.25))],
    ['km', 500, 0, 40],
    // A mi machine stores km: 1,609.344 km on the oil is 1,000 mi → 20 per 1,000 mi (NIST SP 811 mile).
    ['mi', 1000 * KM_PER_MI, 0, 20],
  ] as const)('rate on a %s machine with %d stored on oil and top-up %d L is %d', (meter, dist, topUp, expected) => {
    const rows = [
      sample(1, { distanceOnOilStored: dist, topUpL: topUp, readings: { Fe: { value: 20, qualifier: null } } }),
    ];
    const [series] = shapeTrendSeries({ meter, samples: rows, measurands: ['Fe'], basis: 'rate' });
    expect(series!.points[0]!.value).toBeCloseTo(expected, 9);
    expect(series!.unit).toBe(describeRateUnit(meter));
  });

  test.each([
    ['a missing distance on oil drops the point from a rate series', { distanceOnOilStored: null }, 'Fe', 'rate', 0],
    ['a condition figure stays in its own unit under rate', {}, 'KV100', 'rate', 1],
    ['a missing reading is no point', {}, 'Al', 'ppm', 0],
  ] as const)('%s', (_name, over, code, basis, count) => {
    const rows = [
      sample(1, { ...over, readings: { Fe: { value: 20, qualifier: null }, KV100: { value: 13.1, qualifier: null } } }),
    ];
    const [series] = shapeTrendSeries({ meter: 'km', samples: rows, measurands: [code], basis });
    expect(series!.points).toHaveLength(count);
    if (code === 'KV100') expect(series!.basis).toBe('ppm');
  });

  test('keeps the lab qualifier and the stored level, and sorts by date', () => {
    const rows = [
      sample(2, { readings: { Cr: { value: 3, qualifier: null } }, levels: { Cr: 'watch' } }),
      sample(1, { readings: { Cr: { value: 1, qualifier: '<' } } }),
    ];
    const [series] = shapeTrendSeries({ meter: 'km', samples: rows, measurands: ['Cr'], basis: 'ppm' });
    expect(series!.points.map((p) => [p.bottleCode, p.qualifier, p.level])).toEqual([
      ['B1', '<', 'steady'],
      ['B2', null, 'watch'],
    ]);
  });
});

describe('findGradeChanges', () => {
  test.each([
    [['10W-40', '10W-40', '10w40'], []],
    [['10W-40', '15W-50', '15W-50'], [{ from: '10W-40', to: '15W-50', odometer: 2000 }]],
    [
      ['10W-40', '15W-50', '10W-40'],
      [
        { from: '10W-40', to: '15W-50', odometer: 2000 },
        { from: '15W-50', to: '10W-40', odometer: 3000 },
      ],
    ],
  ])('grades %j mark %j', (grades, expected) => {
    const changes = grades.map((grade, i) => ({
      changedOn: `2026-0${i + 1}-01`,
      odometerStored: 1000 * (i + 1),
      grade,
    }));
    expect(findGradeChanges(changes, 'km').map(({ from, to, odometer }) => ({ from, to, odometer }))).toEqual(expected);
  });
});

describe('buildChartDatasets', () => {
  const band = {
    basis: 'rate' as const,
    n: 3,
    mean: 10,
    lower: 6,
    watchAbove: 14,
    actFrom: 20,
    toReported: 1,
    source: 'own' as const,
    sourceLabel: null,
  };
  const rows = [10, 10, 10, 16].map((v, i) =>
    sample(i + 1, {
      readings: { Fe: { value: v, qualifier: null }, Al: { value: 2, qualifier: null } },
      levels: i === 3 ? { Fe: 'act' } : {},
      bands: i === 3 ? { Fe: band } : {},
    }),
  );
  const series = shapeTrendSeries({ meter: 'km', samples: rows, measurands: ['Fe', 'Al'], basis: 'ppm' });
  const response = {
    machine: { id: 'm', name: 'M', meter: 'km' as const },
    basis: 'ppm' as const,
    x: 'odometer' as const,
    series,
    notes: [],
    gradeChanges: [{ date: '2026-03-01', odometer: 3000, from: '10W-40', to: '15W-50' }],
  };

  test.each([
    [0, 'band-lower', 1, 6],
    [1, 'band-upper', 1, 14],
    [2, 'line', 4, 16],
    [5, 'line', 4, 2],
  ])('dataset %i is %s with %i points, last y %d', (i, kind, n, lastY) => {
    const ds = buildChartDatasets(response, ['#000', '#111'])[i]!;
    expect(ds.kind).toBe(kind);
    expect(ds.data).toHaveLength(n);
    expect(ds.data.at(-1)!.y).toBe(lastY);
  });

  test('line levels follow the points; colours repeat per series; x by date is epoch ms', () => {
    const ds = buildChartDatasets(response, ['#000', '#111']);
    expect(ds[2]!.levels).toEqual(['steady', 'steady', 'steady', 'act']);
    expect(ds[3]!.colour).toBe('#111');
    const byDate = buildChartDatasets({ ...response, x: 'date' }, ['#000']);
    expect(byDate[2]!.data[0]!.x).toBe(Date.UTC(2026, 0, 1));
    expect(buildGradeMarks(response)).toEqual([{ x: 3000, label: '10W-40 → 15W-50' }]);
  });
});

describe('pickChartStart', () => {
  // Invented findings with the parameter names the rules store.
  const coolant = {
    measurand: 'Na',
    level: 'act',
    ruleId: 'coolant-markers',
    numbers: { Na: 40, NaOwn: 6, K: 20, KOwn: 1, B: 90, BOwn: 60, raised: 3 },
  } as const;
  const climbAl = {
    measurand: 'Al',
    level: 'watch',
    ruleId: 'climbing-trend',
    numbers: { value: 9, rise: 4 },
  } as const;
  const dirt = {
    measurand: 'Si',
    level: 'watch',
    ruleId: 'dirt',
    numbers: { Si: 38, Al: 15, siRise: 24, alRise: 8, ratio: 3 },
  } as const;
  const fuel = {
    measurand: 'FUEL',
    level: 'act',
    ruleId: 'fuel-dilution',
    numbers: { value: 5.2, watchAbove: 2, limit: 5 },
  } as const;
  test.each([
    ['nothing flagged: the usual start', [], []],
    ['the coolant story', [coolant], ['Na', 'K', 'B']],
    ['act before watch, whatever the order stored', [climbAl, coolant], ['Na', 'K', 'B', 'Al']],
    ['each element once, at most five', [fuel, climbAl, dirt, coolant], ['FUEL', 'Na', 'K', 'B', 'Al']],
    ['dirt names both elements', [dirt], ['Si', 'Al']],
    ['a finding without a measurand adds nothing', [{ measurand: null, level: 'watch', ruleId: 'x', numbers: {} }], []],
  ] as const)('%s', (_name, findings, codes) => {
    expect(pickChartStart(findings)).toEqual(codes);
  });
});
