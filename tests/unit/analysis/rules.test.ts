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
  test('holds every rule once, with the thresholds the issue asks for', () => {
    const ids = RULE_DEFINITIONS.map((r) => r.id);
    expect(new Set(ids).size).toBe(ids.length);
    expect(ids).toEqual([
      'baseline-jump', 'climbing-trend', 'fixed-limit', 'viscosity-grade', 'fuel-dilution',
      'coolant-markers', 'dirt', 'additive-mismatch', 'interval-call',
    ]);
    // ASTM D7720 approach with Sumpwise multiples: watch above mean + 2 sd, act from mean + 3 sd.
    expect(BASELINE_JUMP.params).toMatchObject({ watchSd: 2, actSd: 3, minSamples: 3 });
    for (const r of RULE_DEFINITIONS) {
      expect(r.description.length).toBeGreaterThan(40);
      expect(r.source.length).toBeGreaterThan(10);
    }
  });

  test('default fixed limits are the Petro-Canada Lubricants Handbook (2004) motor-oil warning limits', () => {
    // Petro-Canada Lubricants Handbook (2004): Fe 100, Cr 10, Cu 20, Sn 10, Al 20, Pb 25, B 20, Si 20 ppm;
    // KV100 ±15 % of new oil; fuel 5 %; water 0.1 %.
    expect(DEFAULT_FIXED_LIMITS).toEqual({
      Fe: 100, Cr: 10, Cu: 20, Sn: 10, Al: 20, Pb: 25, B: 20, Si: 20, kv100ChangePercent: 15, fuelPercent: 5, waterPercent: 0.1,
    });
  });
});

describe('baseline-jump', () => {
  const flatFe = [{ Fe: 20 }, { Fe: 22 }, { Fe: 21 }, { Fe: 19 }, { Fe: 20 }];
  // Mean 20.4, sd 1.14 floored to 2.04 (10 % of the mean): watch above 24.48, act from 26.52.
  test.each([
    { fe: 24, expected: [] },
    { fe: 25, expected: ['Fe:watch'] },
    { fe: 26.5, expected: ['Fe:watch'] },
    { fe: 26.6, expected: ['Fe:act'] },
    { fe: 60, expected: ['Fe:act'] },
  ])('Fe $fe after a steady 20 ppm history gives $expected', ({ fe, expected }) => {
    expect(levelsOf('baseline-jump', flatFe, { Fe: fe })).toEqual(expected);
  });

  test('a perfectly flat history does not alarm on a 1 ppm change (spread floor)', () => {
    expect(levelsOf('baseline-jump', [{ Cu: 3 }, { Cu: 3 }, { Cu: 3 }, { Cu: 3 }], { Cu: 4 })).toEqual([]);
    expect(levelsOf('baseline-jump', [{ Cu: 3 }, { Cu: 3 }, { Cu: 3 }, { Cu: 3 }], { Cu: 8 })).toEqual(['Cu:watch']);
  });

  test('with fewer than three previous samples the baseline is building and it stays silent', () => {
    expect(levelsOf('baseline-jump', [{ Fe: 5 }, { Fe: 5 }], { Fe: 90 })).toEqual([]);
    const analysis = analyseSample({ machine: AIR_SINGLE, history: makeHistory([{ Fe: 5 }, { Fe: 5 }]), sample: makeSample(2, { Fe: 90 }) });
    expect(analysis.baselineStatus).toBe('building');
    expect(analysis.bands.Fe).toEqual({ status: 'building', n: 2, needed: 3 });
  });

  test('a below-detection reading never fires', () => {
    const history = makeHistory([{ Fe: 2 }, { Fe: 2 }, { Fe: 2 }]);
    const sample = makeSample(3, {});
    sample.readings.Fe = { value: 50, qualifier: '<' };
    expect(analyseSample({ machine: AIR_SINGLE, history, sample }).findings).toEqual([]);
  });
});

describe('climbing-trend', () => {
  test.each([
    // Fitted rise over the window against max(3 ppm, 50 % / 100 % of the fitted start).
    { history: [{ Al: 10 }, { Al: 11 }, { Al: 12 }, { Al: 13 }], current: 14, expected: [] },
    { history: [{ Al: 10 }, { Al: 12 }, { Al: 14 }, { Al: 16 }], current: 18, expected: ['Al:watch'] },
    { history: [{ Al: 5 }, { Al: 7 }, { Al: 9 }, { Al: 11 }], current: 13, expected: ['Al:act'] },
    { history: [{ Al: 5 }, { Al: 12 }, { Al: 6 }, { Al: 13 }], current: 7, expected: [] },
    { history: [{ Al: 5 }, { Al: 7 }], current: 13, expected: [] },
    // A spike falling back (the dusty-week silicon story): 3 rising steps and an upward fit, but the newest
    // reading is below the one before, so nothing is climbing now.
    { history: [{ Al: 7 }, { Al: 8 }, { Al: 9 }, { Al: 48 }], current: 13, expected: [] },
    { history: [{ Al: 7 }, { Al: 8 }, { Al: 9 }, { Al: 48 }], current: 48, expected: ['Al:act'] },
  ])('Al $history.length samples then $current gives $expected', ({ history, current, expected }) => {
    expect(levelsOf('climbing-trend', history, { Al: current })).toEqual(expected);
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
    { code: 'B', limit: 20 },
    { code: 'Si', limit: 20 },
    { code: 'WATER', limit: 0.1 },
  ] as const)('$code: act at $limit, watch from 80 %', ({ code, limit }) => {
    expect(levelsOf('fixed-limit', [], { [code]: limit })).toEqual([`${code}:act`]);
    expect(levelsOf('fixed-limit', [], { [code]: limit * 0.8 })).toEqual([`${code}:watch`]);
    expect(levelsOf('fixed-limit', [], { [code]: limit * 0.79 })).toEqual([]);
  });

  test('a lead can raise a limit', () => {
    expect(levelsOf('fixed-limit', [], { Fe: 100 }, { limits: { Fe: 150 } })).toEqual([]);
    expect(levelsOf('fixed-limit', [], { B: 60 }, { limits: { B: 200 } })).toEqual([]);
  });

  test.each([
    // KV100 ±15 % of the same oil new (Petro-Canada Lubricants Handbook, 2004); watch from 12 %.
    { kv: 14.0, expected: [] },
    { kv: 12.2, expected: ['KV100:watch'] },
    { kv: 11.9, expected: ['KV100:act'] },
    { kv: 16.2, expected: ['KV100:act'] },
  ])('KV100 $kv against 14.0 new gives $expected', ({ kv, expected }) => {
    expect(levelsOf('fixed-limit', [], { KV100: kv }, { extra: { newOilKv100: 14.0 } })).toEqual(expected);
  });
});

describe('viscosity-grade', () => {
  test.each([
    // SAE J300 (2015+): a 40 grade holds 12.5 to under 16.3 mm²/s.
    { grade: '10W-40', kv: 14, expected: [] },
    { grade: '10W-40', kv: 12.4, expected: ['KV100:watch'] },
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

describe('coolant-markers', () => {
  test.each([
    // Marker levels while building (common practice, no published source): Na 50, K 20, B the fixed B limit.
    { machine: LIQUID_TWIN, readings: { Na: 60, K: 25 }, expected: ['Na+K:watch'] },
    { machine: LIQUID_TWIN, readings: { Na: 120, K: 25 }, expected: ['Na+K:act'] },
    { machine: LIQUID_TWIN, readings: { Na: 60 }, expected: [] },
    { machine: LIQUID_TWIN, readings: { K: 25, B: 30 }, expected: ['K+B:watch'] },
    { machine: LIQUID_TWIN, readings: { GLYCOL: 1 }, expected: ['GLYCOL:act'] },
    { machine: AIR_SINGLE, readings: { Na: 120, K: 45, GLYCOL: 1 }, expected: [] },
  ] as const)('$readings on $machine.cooling gives $expected', ({ machine, readings, expected }) => {
    expect(levelsOf('coolant-markers', [], readings, { machine })).toEqual(expected);
  });

  test('with a ready baseline the markers are judged against the band, not the marker levels', () => {
    const history = [{ Na: 80, K: 2 }, { Na: 82, K: 3 }, { Na: 78, K: 2 }];
    // Na 85 stays in its band (an oil that carries sodium), K 12 is out of its band: one marker only.
    expect(levelsOf('coolant-markers', history, { Na: 85, K: 12 }, { machine: LIQUID_TWIN })).toEqual([]);
    expect(levelsOf('coolant-markers', history, { Na: 110, K: 12 }, { machine: LIQUID_TWIN })).toEqual(['Na+K:act']);
  });
});

describe('dirt', () => {
  test.each([
    { readings: { Si: 17, Al: 17 }, expected: ['Si+Al:watch'] },
    { readings: { Si: 25, Fe: 85 }, expected: ['Si+Fe:act'] },
    { readings: { Si: 25 }, expected: [] },
    { readings: { Si: 10, Al: 19 }, expected: [] },
  ] as const)('$readings gives $expected', ({ readings, expected }) => {
    expect(levelsOf('dirt', [], readings)).toEqual(expected);
  });
});

describe('additive-mismatch', () => {
  const sameOil = [{ Zn: 1000, P: 900, Ca: 2000 }, { Zn: 1010, P: 910, Ca: 1980 }, { Zn: 990, P: 905, Ca: 2010 }];
  test.each([
    { current: { Zn: 1005, P: 880, Ca: 1950 }, extra: {}, expected: [] },
    { current: { Zn: 700, P: 650, Ca: 2000 }, extra: {}, expected: ['Zn+P:watch'] },
    { current: { Zn: 700, P: 650, Ca: 2000 }, extra: { oilProduct: 'Other Oil 15W-50' }, expected: [] },
    { current: { Zn: 700, P: 650, Ca: 2000 }, extra: { oilProduct: '  valley trail   10w-40 ' }, expected: ['Zn+P:watch'] },
  ])('$current ($extra) gives $expected', ({ current, extra, expected }) => {
    expect(levelsOf('additive-mismatch', sameOil, current, { extra })).toEqual(expected);
  });
});

describe('analyseSample result', () => {
  test('levels every reading, lists act first and carries wear rates and cautions', () => {
    const history = makeHistory([{ Fe: 20 }, { Fe: 21 }, { Fe: 20 }]);
    const sample = makeSample(3, { Fe: 40, Cu: 3, FUEL: 3 }, { topUpVolume: 0.3, oilVolume: 3 });
    const a = analyseSample({ machine: AIR_SINGLE, history, sample });
    expect(a.worst).toBe('act');
    expect(a.findings[0]?.level).toBe('act');
    expect(a.readingLevels).toEqual({ Fe: 'act', Cu: 'steady', FUEL: 'watch' });
    expect(a.wearRates.Fe?.rate).toBeCloseTo((40 * 1.1 * 1000) / 3000, 9);
    expect(a.findings.every((f) => f.sentence.length > 20 && Object.keys(f.numbers).length > 0)).toBe(true);
    expect(a.cautions.join(' ')).toMatch(/licensed mechanic/);
  });
});
