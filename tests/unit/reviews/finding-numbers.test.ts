import { describe, expect, test } from 'vitest';
import { RULE_DEFINITIONS, type RuleId } from '~/lib/analysis';
import {
  describeBandInPpm,
  describeFindingNumbers,
  formatMeasurandFigure,
  listFindingMeasurands,
  roundFigure,
  type FindingNumbersInput,
} from '~/lib/reviews/finding-numbers';
import { glossaryFor } from '~/lib/reviews/glossary';

// Invented demo figures throughout, with the parameter names each rule in src/lib/analysis/rules.ts stores.
const KM = { distanceUnit: 'km', distanceOnOil: 3000 } as const;

const FIXTURES: Record<RuleId, FindingNumbersInput> = {
  'baseline-jump': {
    ruleId: 'baseline-jump',
    measurand: 'Fe',
    numbers: {
      value: 29.4,
      reported: 88.2,
      mean: 22.1,
      sd: 1.83,
      spread: 2.2,
      watchAbove: 26.7,
      actFrom: 30.9,
      n: 6,
      perDistance: 1000,
    },
  },
  'climbing-trend': {
    ruleId: 'climbing-trend',
    measurand: 'Al',
    numbers: { value: 9.6, slopePerDistance: 0.000412, rise: 89.6123, fittedStart: 4.12, points: 5, slopeT: 4.37 },
  },
  'fixed-limit': { ruleId: 'fixed-limit', measurand: 'Si', numbers: { value: 41.2, limit: 50, watchFrom: 37.5 } },
  'viscosity-grade': {
    ruleId: 'viscosity-grade',
    measurand: 'KV100',
    numbers: { value: 8.94, windowMin: 12.5, windowMax: 16.3, lowerGradeMin: 9.3 },
  },
  'viscosity-change': {
    ruleId: 'viscosity-change',
    measurand: 'KV100',
    numbers: { value: 11.9, newOil: 14.02, changePercent: 15.1212, limit: 15, fromNewOilReference: 1 },
  },
  'fuel-dilution': { ruleId: 'fuel-dilution', measurand: 'FUEL', numbers: { value: 3.46, watchAbove: 2, limit: 5 } },
  'flash-point': { ruleId: 'flash-point', measurand: 'FLASH', numbers: { value: 181.3, reference: 222 } },
  'condition-trend': {
    ruleId: 'condition-trend',
    measurand: 'KV100',
    numbers: { value: 12.1, fittedStart: 14.06, change: 1.9555, points: 4 },
  },
  'coolant-markers': {
    ruleId: 'coolant-markers',
    measurand: 'Na',
    numbers: { Na: 41.3, NaOwn: 6.2, K: 19.7, KOwn: 1.5, B: 88.1, BOwn: 60.4, raised: 3 },
  },
  dirt: { ruleId: 'dirt', measurand: 'Si', numbers: { Si: 38.2, Al: 14.9, siRise: 24.6, alRise: 8.1, ratio: 3.037 } },
  'additive-mismatch': {
    ruleId: 'additive-mismatch',
    measurand: 'Zn',
    numbers: { earlierSamples: 3, Zn: 812.4, ZnEarlierMean: 1204.6, Ca: 2410, CaEarlierMean: 1802.2 },
  },
  'clutch-friction': {
    ruleId: 'clutch-friction',
    measurand: 'Mo',
    numbers: { value: 412.7, watchFrom: 100, fromNewOilReference: 0 },
  },
};

const ALL_KEYS = [...new Set(Object.values(FIXTURES).flatMap((f) => Object.keys(f.numbers)))];
// Keys that are also words or element symbols a rider reads (Na, Si …) may appear; the rest never.
const PARAMETER_KEYS = ALL_KEYS.filter(
  (k) =>
    !/^[A-Z][a-z]?$/.test(k) &&
    k !== 'value' &&
    k !== 'limit' &&
    k !== 'change' &&
    k !== 'points' &&
    k !== 'reference' &&
    k !== 'raised' &&
    k !== 'ratio' &&
    k !== 'mean' &&
    k !== 'reported',
);

describe('describeFindingNumbers', () => {
  test('every rule of the engine that makes findings has a fixture here', () => {
    // The other definitions describe the leaching exception, the crew reference and the interval call: they store no finding.
    const withoutFixture = RULE_DEFINITIONS.map((r) => r.id).filter((id) => !(id in FIXTURES));
    expect(withoutFixture.sort()).toEqual(['copper-leaching', 'crew-reference', 'interval-call']);
  });

  test.each(Object.values(FIXTURES))('$ruleId: sentences, no camelCase and no parameter name', (f) => {
    for (const ctx of [
      KM,
      { distanceUnit: 'h', distanceOnOil: 40 } as const,
      { distanceUnit: 'mi', distanceOnOil: null } as const,
    ]) {
      const lines = describeFindingNumbers(f, ctx);
      expect(lines.length).toBeGreaterThan(0);
      const text = lines.join(' ');
      expect(text).not.toMatch(/[a-z][A-Z]/);
      for (const key of PARAMETER_KEYS) expect(text).not.toMatch(new RegExp(`\\b${key}\\b`));
      expect(text).not.toMatch(/NaN|undefined|Infinity/);
      // No raw float of the stored numbers reaches the text unrounded.
      for (const v of Object.values(f.numbers))
        if (typeof v === 'number' && !Number.isInteger(v * 10)) expect(text).not.toContain(String(v));
      for (const line of lines) expect(line).toMatch(/^[A-Z].*\.$/);
    }
  });

  test.each([
    ['baseline-jump', 'Usual 22 ppm per 1,000 km, band up to 27, act from 31; this one 29.'],
    ['baseline-jump', 'Judged per distance: the lab reported 88 ppm, divided by the distance this oil had run.'],
    [
      'baseline-jump',
      'The band comes from 6 earlier samples of this engine, which vary by about 1.8 either side of usual (one standard deviation).',
    ],
    ['climbing-trend', 'Up about 90 over that stretch, about 0.41 more every 1,000 km on the odometer.'],
    ['fixed-limit', 'This one 41 ppm; worth watching from 38, fixed limit 50 ppm.'],
    ['viscosity-grade', 'The next thinner grade starts at 9.3 mm²/s.'],
    ['viscosity-change', 'KV100 11.9 mm²/s against 14.0 mm²/s as poured (from the new-oil reference).'],
    ['fuel-dilution', 'Fuel 3.5 % of the oil; worth watching above 2 %, act from 5 %.'],
    ['coolant-markers', "Potassium 20 ppm, this oil's own level 1.5 ppm."],
    ['dirt', 'Silicon rose about 3 times as much as aluminium, the proportion of dust.'],
    ['additive-mismatch', 'Zinc 812 ppm, against 1,205 ppm before.'],
    ['clutch-friction', 'Molybdenum 413 ppm; friction modifiers are worth a look from 100 ppm.'],
  ] as const)('%s reads "%s"', (rule, line) => {
    expect(describeFindingNumbers(FIXTURES[rule], KM)).toContain(line);
  });

  test('the climbing rate is in ppm per 1,000 km when the element is judged per distance, ppm when not', () => {
    expect(describeFindingNumbers(FIXTURES['climbing-trend'], KM)[0]).toContain('starts at 4.1 ppm per 1,000 km');
    expect(describeFindingNumbers(FIXTURES['climbing-trend'], { distanceUnit: 'h', distanceOnOil: 40 })[0]).toContain(
      'ppm per 100 h',
    );
    expect(describeFindingNumbers({ ...FIXTURES['climbing-trend'], measurand: 'K' }, KM)[0]).toContain(
      'starts at 4.1 ppm;',
    );
    expect(
      describeFindingNumbers(FIXTURES['climbing-trend'], { distanceUnit: 'km', distanceOnOil: null })[0],
    ).toContain('starts at 4.1 ppm;');
    // A line fitted through low early readings may start below zero: no reading can.
    const steep = {
      ...FIXTURES['climbing-trend'],
      measurand: 'Na',
      numbers: { ...FIXTURES['climbing-trend'].numbers, fittedStart: -12.3 },
    };
    expect(describeFindingNumbers(steep, KM)[0]).toBe(
      'The line through the last 5 samples starts at about 0 ppm; this one 9.6.',
    );
  });

  test('glycol speaks alone; an unknown rule falls back to measurand names only', () => {
    expect(
      describeFindingNumbers({ ruleId: 'coolant-markers', measurand: 'GLYCOL', numbers: { glycol: 1 } }, KM),
    ).toEqual(['The lab found glycol, the main ingredient of coolant.']);
    expect(
      describeFindingNumbers(
        { ruleId: 'not-a-rule', measurand: 'Fe', numbers: { value: 12.34, someThing: 3, Cu: 4.44 } },
        KM,
      ),
    ).toEqual(['This one 12 ppm.', 'Copper 4.4 ppm.']);
    expect(describeFindingNumbers({ ruleId: 'fixed-limit', measurand: 'Fe', numbers: {} }, KM)).toEqual([]);
  });
});

describe('figures', () => {
  test.each([
    [0, '0'],
    [0.0412, '0.041'],
    [1.83, '1.8'],
    [9.96, '10'],
    [22.1, '22'],
    [89.6123, '90'],
    [1204.6, '1,205'],
    [-3.46, '-3.5'],
    [Number.NaN, '—'],
  ])('roundFigure(%s) = %s', (v, out) => expect(roundFigure(v)).toBe(out));

  test.each([
    ['Fe', 22.14, '22 ppm'],
    ['KV100', 14, '14.0 mm²/s'],
    ['FUEL', 3.46, '3.5 %'],
    ['VI', 151.2, '151'],
    ['TBN', 7.25, '7.3 mg KOH/g'],
    ['FLASH', 210.4, '210 °C'],
  ])('formatMeasurandFigure(%s, %s) = %s', (code, v, out) => expect(formatMeasurandFigure(code, v)).toBe(out));

  test('a band in words', () => {
    expect(describeBandInPpm({ mean: 20.04, watchAbove: 31.2, actFrom: 43.49, n: 4, perDistance: true })).toBe(
      'usual 20 ppm, band up to 31, act from 43 · from 4 samples (judged per distance)',
    );
    expect(describeBandInPpm({ mean: 6, watchAbove: 9.44, actFrom: 12, n: 1, perDistance: false })).toBe(
      'usual 6 ppm, band up to 9.4, act from 12 · from 1 sample',
    );
  });

  test('the measurands of a finding: its own first, then those its numbers name', () => {
    expect(listFindingMeasurands(FIXTURES['coolant-markers'])).toEqual(['Na', 'K', 'B']);
    expect(listFindingMeasurands(FIXTURES.dirt)).toEqual(['Si', 'Al']);
    expect(listFindingMeasurands({ ruleId: 'coolant-markers', measurand: 'GLYCOL', numbers: { glycol: 1 } })).toEqual([
      'GLYCOL',
    ]);
    expect(listFindingMeasurands({ ruleId: 'x', measurand: null, numbers: {} })).toEqual([]);
  });
});

describe('glossaryFor', () => {
  test.each([
    [['Fe', 'Al'], false, []],
    [['Fe', 'KV100'], false, ['KV40 / KV100']],
    [['VI', 'TAN', 'KV40', 'OXI'], true, ['KV40 / KV100', 'VI', 'TBN / TAN', 'abs/cm', '<']],
  ] as const)('%j (below detection: %s) explains %j', (codes, below, terms) => {
    const entries = glossaryFor(codes, below);
    expect(entries.map((e) => e.term)).toEqual(terms);
    for (const e of entries) expect(`${e.long} ${e.plain}`).not.toMatch(/[a-z][A-Z]/);
  });
});
