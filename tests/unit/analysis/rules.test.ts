import { describe, expect, test } from 'vitest';
import { analyseSample } from '~/lib/analysis/analyse-sample';
import type { MeasurandCode } from '~/lib/analysis/measurands';
import { DEFAULT_FIXED_LIMITS, RULE_DEFINITIONS, BASELINE_JUMP } from '~/lib/analysis/rule-definitions';
import type { FixedLimits, MachineProfile, RuleId, SamplePoint } from '~/lib/analysis/types';
import { AIR_SINGLE, LIQUID_TWIN, makeHistory, makeSample } from './sample-builder';

type Readings = Partial<Record<MeasurandCode, number>>;

function levelsOf(
  rule: RuleId,
  historySets: Readings[],
  current: Readings,
  opts: { machine?: MachineProfile; extra?: Partial<SamplePoint>; limits?: Partial<FixedLimits> } = {},
) {
  const history = makeHistory(historySets);
  const sample = makeSample(historySets.length, current, opts.extra ?? {});
  const analysis = analyseSample({ machine: opts.machine ?? AIR_SINGLE, history, sample, limits: opts.limits });
  return analysis.findings.filter((f) => f.ruleId === rule).map((f) => `${f.measurands.join('+')}:${f.level}`);
}

describe('RULE_DEFINITIONS', () => {
  test('holds every rule once, with the thresholds the issues ask for', () => {
    const ids = RULE_DEFINITIONS.map((r) => r.id);
    expect(new Set(ids).size).toBe(ids.length);
    expect(ids).toEqual([
      'baseline-jump',
      'climbing-trend',
      'fixed-limit',
      'viscosity-grade',
      'viscosity-change',
      'fuel-dilution',
      'flash-point',
      'condition-trend',
      'coolant-markers',
      'dirt',
      'additive-mismatch',
      'clutch-friction',
      'copper-leaching',
      'crew-reference',
      'interval-call',
    ]);
    // Prediction limits designed for 1 % (watch) and 0.05 % (act) false alarms per in-control reading.
    expect(BASELINE_JUMP.params).toMatchObject({ watchAlpha: 0.01, actAlpha: 0.0005, minSamples: 4 });
    for (const r of RULE_DEFINITIONS) {
      expect(r.description.length).toBeGreaterThan(40);
      expect(r.source.length).toBeGreaterThan(10);
    }
  });

  test('default fixed limits are the Petro-Canada Lubricants Handbook (2004) motor-oil warning limits', () => {
    // Petro-Canada Lubricants Handbook (2004): Fe 100, Cr 10, Cu 20, Sn 10, Al 20, Pb 25, B 20, Si 20 ppm;
    // KV100 ±15 % of new oil; fuel 5 %; water 0.1 %.
    expect(DEFAULT_FIXED_LIMITS).toEqual({
      Fe: 100,
      Cr: 10,
      Cu: 20,
      Sn: 10,
      Al: 20,
      Pb: 25,
      B: 20,
      Si: 20,
      kv100ChangePercent: 15,
      fuelPercent: 5,
      waterPercent: 0.1,
    });
  });
});

describe('baseline-jump (per distance, prediction limits)', () => {
  // Every sample ran 3,000 km, so rates are ppm / 3 per 1,000 km. History 20, 22, 21, 19, 20 ppm: mean 6.8 per
  // 1,000 km, sd 0.380 below the lab-scatter floor √(0.5² + (0.12 · 20.4)²) / 3 = 0.8329. Watch edge:
  // 6.8 + t(0.99; 4) · 0.8329 · √1.2 with t(0.99; 4) = 3.747 (NIST/SEMATECH e-Handbook table 1.3.6.7.2) = 10.219
  // per 1,000 km = 30.66 ppm. Act edge: t(0.9995; 4) = 8.610 (computed, see statistics.test.ts) → 43.97 ppm.
  const flatFe = [{ Fe: 20 }, { Fe: 22 }, { Fe: 21 }, { Fe: 19 }, { Fe: 20 }];
  test.each([
    { fe: 30, expected: [] },
    { fe: 31, expected: ['Fe:watch'] },
    { fe: 43.5, expected: ['Fe:watch'] },
    { fe: 44.5, expected: ['Fe:act'] },
  ])('Fe $fe after a steady 20 ppm history gives $expected', ({ fe, expected }) => {
    expect(levelsOf('baseline-jump', flatFe, { Fe: fe })).toEqual(expected);
  });

  test('the band edges are the prediction limits', () => {
    const a = analyseSample({ machine: AIR_SINGLE, history: makeHistory(flatFe), sample: makeSample(5, { Fe: 20 }) });
    const band = a.bands.Fe!;
    if (band.status !== 'ready') throw new Error('expected a ready band');
    expect(band.basis).toBe('rate');
    expect(band.mean).toBeCloseTo(6.8, 9);
    expect(band.floored).toBe(true);
    expect(band.spread).toBeCloseTo(Math.hypot(0.5, 0.12 * 20.4) / 3, 9);
    expect(band.watchAbove).toBeCloseTo(6.8 + 3.747 * band.spread * Math.sqrt(1.2), 2);
    expect(band.watchAbove * band.toReported).toBeCloseTo(30.66, 1);
  });

  test('a longer run at the same wear is not a jump, and a short run with tripled wear is', () => {
    // 20 ppm after 3,000 km each time; now 40 ppm after 6,000 km (same rate) and 30 ppm after 1,500 km (3 ×).
    const history = makeHistory([{ Fe: 20 }, { Fe: 20 }, { Fe: 21 }, { Fe: 19 }, { Fe: 20 }]);
    const long = makeSample(5, { Fe: 40 }, { distanceOnOil: 6000, odometer: 21000 });
    const short = makeSample(5, { Fe: 30 }, { distanceOnOil: 1500, odometer: 16500 });
    expect(analyseSample({ machine: AIR_SINGLE, history, sample: long }).findings).toEqual([]);
    expect(
      analyseSample({ machine: AIR_SINGLE, history, sample: short }).findings.map((f) => `${f.ruleId}:${f.level}`),
    ).toContain('baseline-jump:act');
  });

  test('a perfectly flat history does not alarm on a 1 ppm change (lab-scatter floor)', () => {
    expect(levelsOf('baseline-jump', [{ Cu: 3 }, { Cu: 3 }, { Cu: 3 }, { Cu: 3 }], { Cu: 4 })).toEqual([]);
    expect(levelsOf('baseline-jump', [{ Cu: 3 }, { Cu: 3 }, { Cu: 3 }, { Cu: 3 }], { Cu: 9 })).toEqual(['Cu:watch']);
  });

  test('with fewer than four in-control samples the baseline is building and it stays silent', () => {
    expect(levelsOf('baseline-jump', [{ Fe: 5 }, { Fe: 5 }, { Fe: 5 }], { Fe: 90 })).toEqual([]);
    const analysis = analyseSample({
      machine: AIR_SINGLE,
      history: makeHistory([{ Fe: 5 }, { Fe: 5 }, { Fe: 5 }]),
      sample: makeSample(3, { Fe: 90 }),
    });
    expect(analysis.baselineStatus).toBe('building');
    expect(analysis.bands.Fe).toMatchObject({ status: 'building', n: 3, needed: 4 });
  });

  test('a below-detection reading never fires', () => {
    const history = makeHistory([{ Fe: 2 }, { Fe: 2 }, { Fe: 2 }, { Fe: 2 }]);
    const sample = makeSample(4, {});
    sample.readings.Fe = { value: 50, qualifier: '<' };
    expect(analyseSample({ machine: AIR_SINGLE, history, sample }).findings).toEqual([]);
  });

  test("boron on an air-cooled engine is the oil's own additive: at most watch, and never a coolant sentence", () => {
    const history = [{ B: 40 }, { B: 42 }, { B: 38 }, { B: 41 }];
    const a = analyseSample({ machine: AIR_SINGLE, history: makeHistory(history), sample: makeSample(4, { B: 140 }) });
    // The band and the additive rule both read it as an oil mix-up, at watch.
    expect(a.findings.map((f) => `${f.ruleId}:${f.level}`)).toEqual(['baseline-jump:watch', 'additive-mismatch:watch']);
    expect(a.findings[0]!.sentence).toMatch(/different or mixed oil/);
    expect(a.findings[0]!.sentence).not.toMatch(/coolant in the oil/i);
  });
});

describe('climbing-trend (against the odometer, beyond lab scatter)', () => {
  test.each([
    // Small steady rises inside lab scatter: nothing.
    { history: [{ Al: 10 }, { Al: 10 }, { Al: 11 }, { Al: 11 }], current: 12, expected: [] },
    // A clean climb to 1.8 × the start: watch (a doubling with a sharp slope: act).
    { history: [{ Al: 10 }, { Al: 12 }, { Al: 14 }, { Al: 16 }], current: 18, expected: ['Al:watch'] },
    { history: [{ Al: 5 }, { Al: 7 }, { Al: 9 }, { Al: 11 }], current: 13, expected: ['Al:act'] },
    // Zig-zag: no significant slope.
    { history: [{ Al: 5 }, { Al: 12 }, { Al: 6 }, { Al: 13 }], current: 7, expected: [] },
    { history: [{ Al: 5 }, { Al: 7 }], current: 13, expected: [] },
    // A spike falling back (the dusty-week silicon story): the newest reading is below the one before.
    { history: [{ Al: 7 }, { Al: 8 }, { Al: 9 }, { Al: 48 }], current: 13, expected: [] },
  ])('Al $history.length samples then $current gives $expected', ({ history, current, expected }) => {
    expect(levelsOf('climbing-trend', history, { Al: current })).toEqual(expected);
  });

  test('one jump does not fire both the jump rule and the trend', () => {
    const history = [{ Fe: 20 }, { Fe: 21 }, { Fe: 19 }, { Fe: 20 }, { Fe: 20 }];
    const a = analyseSample({ machine: AIR_SINGLE, history: makeHistory(history), sample: makeSample(5, { Fe: 60 }) });
    expect(a.findings.map((f) => f.ruleId)).toEqual(['baseline-jump']);
  });

  test('lengthening intervals at constant wear is not a climb (rates, not ppm)', () => {
    const samples = [3000, 3400, 3800, 4200, 4600].map((d, i) =>
      makeSample(i, { Fe: (20 * d) / 3000 }, { distanceOnOil: d, odometer: 10000 + i * 5000 }),
    );
    const a = analyseSample({ machine: AIR_SINGLE, history: samples.slice(0, -1), sample: samples.at(-1)! });
    expect(a.findings).toEqual([]);
  });
});

describe('fixed-limit', () => {
  test.each([
    // Petro-Canada Lubricants Handbook (2004) limits; watch from 80 % (Sumpwise early warning).
    { code: 'Fe', limit: 100 },
    { code: 'Cr', limit: 10 },
    { code: 'Cu', limit: 20 },
    { code: 'Sn', limit: 10 },
    { code: 'Al', limit: 20 },
    { code: 'Pb', limit: 25 },
    { code: 'Si', limit: 20 },
    { code: 'WATER', limit: 0.1 },
  ] as const)('$code: act at $limit, watch from 80 %', ({ code, limit }) => {
    expect(levelsOf('fixed-limit', [], { [code]: limit })).toEqual([`${code}:act`]);
    expect(levelsOf('fixed-limit', [], { [code]: limit * 0.8 })).toEqual([`${code}:watch`]);
    expect(levelsOf('fixed-limit', [], { [code]: limit * 0.79 })).toEqual([]);
  });

  test('boron has no fixed limit: a borate oil at 120 ppm raises nothing on its own', () => {
    expect(levelsOf('fixed-limit', [], { B: 120 })).toEqual([]);
  });

  test('a lead can raise a limit', () => {
    expect(levelsOf('fixed-limit', [], { Fe: 100 }, { limits: { Fe: 150 } })).toEqual([]);
  });
});

describe('viscosity-change (against the oil as poured)', () => {
  test.each([
    // ±15 %: Petro-Canada Lubricants Handbook (2004); act from 25 % thinner (Sumpwise choice).
    { kv: 14.0, expected: [] },
    { kv: 12.0, expected: [] },
    { kv: 11.9, expected: ['KV100:watch'] },
    { kv: 16.2, expected: ['KV100:watch'] },
    { kv: 10.5, expected: ['KV100:act'] },
  ])('KV100 $kv against 14.0 from the data sheet gives $expected', ({ kv, expected }) => {
    expect(
      levelsOf(
        'viscosity-change',
        [],
        { KV100: kv },
        { extra: { newOil: { source: 'data-sheet', readings: { KV100: { value: 14.0 } } } } },
      ),
    ).toEqual(expected);
  });

  test('the older newOilKv100 still serves, and without either the first samples of that oil do and the sentence says so', () => {
    expect(levelsOf('viscosity-change', [], { KV100: 11.9 }, { extra: { newOilKv100: 14 } })).toEqual(['KV100:watch']);
    const history = makeHistory([{ KV100: 14.1 }, { KV100: 13.9 }, { KV100: 14.0 }]);
    const a = analyseSample({ machine: AIR_SINGLE, history, sample: makeSample(3, { KV100: 11.5 }) });
    const f = a.findings.find((x) => x.ruleId === 'viscosity-change')!;
    expect(f.level).toBe('watch');
    expect(f.sentence).toMatch(/first 3 samples of this oil \(no new-oil reference is recorded\)/);
  });
});

describe('viscosity-grade', () => {
  test.each([
    // SAE J300 (2015+): a 40 grade holds 12.5 to under 16.3 mm²/s.
    { grade: '10W-40', kv: 14, expected: [] },
    { grade: '10W-40', kv: 12.4, expected: ['KV100:watch'] },
    // Below the SAE 30 window (9.3 mm²/s) too: a thinned 10W-40 acts.
    { grade: '10W-40', kv: 9.0, expected: ['KV100:act'] },
    { grade: '10W-40', kv: 16.3, expected: ['KV100:watch'] },
    { grade: '20W-50', kv: 16.3, expected: [] },
    { grade: 'house blend', kv: 3, expected: [] },
  ])('$grade with KV100 $kv gives $expected', ({ grade, kv, expected }) => {
    expect(levelsOf('viscosity-grade', [], { KV100: kv }, { extra: { grade } })).toEqual(expected);
  });
});

describe('fuel-dilution', () => {
  test.each([
    // Above 2 %: common practice, no published source; 5 %: Petro-Canada Lubricants Handbook (2004).
    { fuel: 1.5, expected: [] },
    { fuel: 2.0, expected: [] },
    { fuel: 2.1, expected: ['FUEL:watch'] },
    { fuel: 4.9, expected: ['FUEL:watch'] },
    { fuel: 5.0, expected: ['FUEL:act'] },
  ])('fuel $fuel % gives $expected', ({ fuel, expected }) => {
    expect(levelsOf('fuel-dilution', [], { FUEL: fuel })).toEqual(expected);
  });
});

describe("coolant-markers (liquid-cooled, against the oil's own level)", () => {
  test.each([
    // Rises over the oil's own level (common practice, no published source): Na 25, K 10, B 15; K alone 20.
    { machine: LIQUID_TWIN, readings: { Na: 40, K: 15 }, expected: ['Na+K:watch'] },
    { machine: LIQUID_TWIN, readings: { Na: 70, K: 15 }, expected: ['Na+K:act'] },
    { machine: LIQUID_TWIN, readings: { Na: 60 }, expected: [] },
    // Potassium alone at 20 ppm or more is at least watch; with water in the oil, act.
    { machine: LIQUID_TWIN, readings: { K: 40 }, expected: ['K:watch'] },
    { machine: LIQUID_TWIN, readings: { K: 25, WATER: 0.1 }, expected: ['K+WATER:act'] },
    { machine: LIQUID_TWIN, readings: { K: 12 }, expected: [] },
    { machine: LIQUID_TWIN, readings: { GLYCOL: 1 }, expected: ['GLYCOL:act'] },
    { machine: AIR_SINGLE, readings: { Na: 120, K: 45, GLYCOL: 1 }, expected: [] },
  ] as const)('$readings on $machine.cooling gives $expected', ({ machine, readings, expected }) => {
    const history = [
      { Na: 4, K: 0.5, B: 3 },
      { Na: 4, K: 0.5, B: 3 },
    ];
    expect(levelsOf('coolant-markers', history, readings, { machine })).toEqual(expected);
  });

  test('a borate oil on the liquid-cooled twin is its own level, not coolant; potassium rising with it is', () => {
    const borate = [
      { Na: 5, K: 1, B: 120 },
      { Na: 6, K: 1, B: 118 },
      { Na: 5, K: 1, B: 122 },
      { Na: 5, K: 1, B: 119 },
    ];
    expect(levelsOf('coolant-markers', borate, { Na: 6, K: 1, B: 125 }, { machine: LIQUID_TWIN })).toEqual([]);
    expect(levelsOf('coolant-markers', borate, { Na: 6, K: 24, B: 125 }, { machine: LIQUID_TWIN })).toEqual([
      'K:watch',
    ]);
    expect(levelsOf('coolant-markers', borate, { Na: 40, K: 24, B: 125 }, { machine: LIQUID_TWIN })).toEqual([
      'Na+K:act',
    ]);
  });

  test("a recorded new-oil reference sets the oil's own level", () => {
    const newOil = { source: 'lab' as const, readings: { B: { value: 150 }, Na: { value: 80 } } };
    expect(levelsOf('coolant-markers', [], { B: 155, Na: 85 }, { machine: LIQUID_TWIN, extra: { newOil } })).toEqual(
      [],
    );
    expect(levelsOf('coolant-markers', [], { B: 172, Na: 110 }, { machine: LIQUID_TWIN, extra: { newOil } })).toEqual([
      'Na+B:watch',
    ]);
  });
});

describe('dirt (silicon and aluminium in the proportion of dust)', () => {
  const usual = [
    { Si: 8, Al: 4 },
    { Si: 9, Al: 4 },
    { Si: 8, Al: 5 },
    { Si: 9, Al: 4 },
  ];
  test.each([
    // Si up 40, Al up 5 over usual: 8 to 1, dust; Si at its fixed limit → act.
    { readings: { Si: 48, Al: 9 }, expected: ['Si+Al:act'] },
    // Si up 8.5 and Al up 4.75 over their bands' means, both above the band: 1.8 to 1 → watch.
    { readings: { Si: 17, Al: 9 }, expected: ['Si+Al:watch'] },
    // Silicon alone (sealant, antifoam): not dirt.
    { readings: { Si: 25, Al: 4 }, expected: [] },
    // Aluminium up far more than silicon: not dust (piston wear is another rule's job).
    { readings: { Si: 17, Al: 16 }, expected: [] },
  ] as const)('$readings gives $expected', ({ readings, expected }) => {
    expect(levelsOf('dirt', usual, readings)).toEqual(expected);
  });

  // Silicon at its fixed limit sets the finding's level; aluminium is marked only as far as its own figures go, so
  // raising aluminium (which at 34 ppm tips the ratio below the dust range and ends the finding) never lowers it.
  test.each([
    { Al: 6, Si: 'act', Al_: 'steady' },
    { Al: 9, Si: 'act', Al_: 'watch' },
    { Al: 20, Si: 'act', Al_: 'act' },
    { Al: 34, Si: 'act', Al_: 'act' },
  ] as const)('silicon 48 ppm with aluminium $Al ppm marks aluminium $Al_', ({ Al, Si, Al_ }) => {
    const sample = makeSample(usual.length, { Si: 48, Al }, {});
    const { readingLevels } = analyseSample({ machine: AIR_SINGLE, history: makeHistory(usual), sample });
    expect([readingLevels.Si, readingLevels.Al]).toEqual([Si, Al_]);
  });
});

describe('additive-mismatch', () => {
  const sameOil = [
    { Zn: 1000, P: 900, Ca: 2000 },
    { Zn: 1010, P: 910, Ca: 1980 },
    { Zn: 990, P: 905, Ca: 2010 },
  ];
  test.each([
    { current: { Zn: 1005, P: 880, Ca: 1950 }, extra: {}, expected: [] },
    { current: { Zn: 600, P: 550, Ca: 2000 }, extra: {}, expected: ['Zn+P:watch'] },
    { current: { Zn: 600, P: 550, Ca: 2000 }, extra: { oilProduct: 'Other Oil 15W-50' }, expected: [] },
    {
      current: { Zn: 600, P: 550, Ca: 2000 },
      extra: { oilProduct: '  valley trail   10w-40 ' },
      expected: ['Zn+P:watch'],
    },
  ])('$current ($extra) gives $expected', ({ current, extra, expected }) => {
    expect(levelsOf('additive-mismatch', sameOil, current, { extra })).toEqual(expected);
  });

  test('a new-oil reference is the level to match when recorded', () => {
    const newOil = { source: 'lab' as const, readings: { Zn: { value: 1600 }, P: { value: 1500 } } };
    const f = analyseSample({
      machine: AIR_SINGLE,
      history: makeHistory(sameOil),
      sample: makeSample(3, { Zn: 1000, P: 900 }, { newOil }),
    }).findings;
    expect(f.map((x) => `${x.ruleId}:${x.measurands.join('+')}`)).toEqual(['additive-mismatch:Zn+P']);
    expect(f[0]!.sentence).toMatch(/new-oil reference/);
  });
});

describe('analyseSample result', () => {
  test('levels every reading, lists act first and carries wear rates and cautions', () => {
    const history = makeHistory([{ Fe: 20 }, { Fe: 21 }, { Fe: 20 }, { Fe: 20 }]);
    const sample = makeSample(4, { Fe: 60, Cu: 3, FUEL: 3 }, { topUpVolume: 0.3, oilVolume: 3 });
    const a = analyseSample({ machine: AIR_SINGLE, history, sample });
    expect(a.worst).toBe('act');
    expect(a.findings[0]?.level).toBe('act');
    expect(a.readingLevels).toEqual({ Fe: 'act', Cu: 'steady', FUEL: 'watch' });
    // Mass-balance top-up factor (0.1 / (1 − e^−0.1)) = 1.050833 (see wear-rate.test.ts).
    expect(a.wearRates.Fe?.rate).toBeCloseTo((60 * (0.1 / -Math.expm1(-0.1)) * 1000) / 3000, 9);
    expect(a.findings.every((f) => f.sentence.length > 20 && Object.keys(f.numbers).length > 0)).toBe(true);
    expect(a.cautions.join(' ')).toMatch(/licensed mechanic/);
  });
});
