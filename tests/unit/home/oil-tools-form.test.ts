import { describe, expect, test } from 'vitest';
import {
  checkGradeSuitsRiding,
  readNumber,
  runGradeOf,
  runSaybolt,
  runViscosityAt,
  runViscosityIndex,
} from '~/lib/oil-tools/oil-tools';

// The oil tools' form layer (src/lib/oil-tools/oil-tools.ts); the calculators themselves are checked against
// their standards in tests/unit/analysis/viscosity.test.ts. Here: reading fields, units and error placement.
const q = (o: Record<string, string>) => new URLSearchParams(o);

describe('readNumber', () => {
  test.each([
    ['13.5', 13.5],
    ['13,5', 13.5],
    [' 7 ', 7],
    ['', undefined],
    ['abc', 'invalid'],
    ['1e400', 'invalid'],
  ])('%j → %j', (raw, expected) => {
    expect(readNumber(q({ x: raw }), 'x')).toBe(expected);
  });
});

describe('viscosity index form', () => {
  test.each([
    // ASTM D2270 worked example (procedure A): KV40 73.3, KV100 8.86 → VI 92 (D2270 section 6 example, from memory).
    [
      { tool: 'vi', kv40: '73.3', kv100: '8.86' },
      { state: 'ok', value: { vi: 92, warning: null } },
    ],
    [
      { tool: 'vi', kv40: '', kv100: '8.86' },
      { state: 'error', fields: { kv40: 'Enter the viscosity at 40 °C.' } },
    ],
    [{ tool: 'sus', kv40: '1', kv100: '1' }, { state: 'idle' }],
  ])('%j', (params, expected) => {
    expect(runViscosityIndex(q(params))).toEqual(expected);
  });

  test('swapped viscosities (KV40 ≤ KV100) are refused on the KV40 field and nothing is computed', () => {
    const r = runViscosityIndex(q({ tool: 'vi', kv40: '8.86', kv100: '73.3' }));
    expect(r).toEqual({
      state: 'error',
      fields: { kv40: expect.stringMatching(/must be higher than the one at 100 °C/) },
    });
  });

  test('a VI above 400 is answered with a warning beside it', () => {
    const r = runViscosityIndex(q({ tool: 'vi', kv40: '12', kv100: '10' }));
    expect(r.state === 'ok' && r.value.vi).toBeGreaterThan(400);
    expect(r.state === 'ok' && r.value.warning).toMatch(/far above any engine oil/);
  });

  test('below 2.0 mm²/s at 100 °C the RangeError lands on the KV100 field', () => {
    const r = runViscosityIndex(q({ tool: 'vi', kv40: '5', kv100: '1.9' }));
    expect(r.state).toBe('error');
    if (r.state === 'error') expect(r.fields['kv100']).toMatch(/below 2\.0 mm²\/s/);
  });
});

describe('Saybolt and viscosity-at forms take the user’s temperature unit', () => {
  test.each([
    // 100 °C = 212 °F exactly (NIST SP 811 B.9: t/°F = 1.8 t/°C + 32).
    ['C', '100', 212],
    ['F', '210', 210],
  ] as const)('unit %s, entered %s → %d °F', (unit, temp, tempF) => {
    const r = runSaybolt(q({ tool: 'sus', kv: '10', temp }), unit);
    expect(r.state).toBe('ok');
    if (r.state === 'ok') expect(r.value.tempF).toBeCloseTo(tempF, 9);
  });

  test('a kinematic viscosity under D2161’s 1.8 mm²/s is refused on its field', () => {
    const r = runSaybolt(q({ tool: 'sus', kv: '1', temp: '100' }), 'C');
    expect(r.state === 'error' && r.fields['kv']).toMatch(/1\.8/);
  });

  test.each([
    // At the measured temperatures the Walther line passes through the measured points (ASTM D341 form).
    ['C', '40', 100],
    ['C', '100', 14],
    ['F', '212', 14],
  ] as const)('viscosityAt unit %s at %s → %d', (unit, temp, kv) => {
    const r = runViscosityAt(q({ tool: 'at', kv40: '100', kv100: '14', temp }), unit);
    expect(r.state).toBe('ok');
    if (r.state === 'ok') expect(r.value.kv).toBeCloseTo(kv, 6);
  });

  test('a result under 2.0 mm²/s is an error on the temperature field', () => {
    const r = runViscosityAt(q({ tool: 'at', kv40: '30', kv100: '5', temp: '250' }), 'C');
    expect(r.state === 'error' && r.fields['temp']).toMatch(/below 2\.0/);
  });
});

describe('grade of a measured viscosity', () => {
  test.each([
    // SAE J300 KV100 windows: 40 is 12.5 to <16.3 mm²/s, 30 is 9.3 to <12.5.
    ['14.2', '40'],
    ['12.5', '40'],
    ['12.49', '30'],
    ['30', null],
  ])('%s mm²/s → %j', (kv100, grade) => {
    expect(runGradeOf(q({ tool: 'grade', kv100 }))).toEqual({
      state: 'ok',
      value: { grades: grade ? [grade] : [], label: grade ?? '', overlap: null, kv100: Number(kv100) },
    });
  });
  test('7.0 mm²/s fits SAE 12, 16 and 20 (J300 windows overlap) and the answer says HTHS decides', () => {
    const r = runGradeOf(q({ tool: 'grade', kv100: '7.0' }));
    expect(r.state === 'ok' && r.value.grades).toEqual(['12', '16', '20']);
    expect(r.state === 'ok' && r.value.label).toBe('12, 16 or 20');
    // J300 minimum HTHS at 150 °C: 12 → 2.0, 16 → 2.3, 20 → 2.6 mPa·s (from memory of the table).
    expect(r.state === 'ok' && r.value.overlap).toMatch(
      /HTHS.*2\.0 mPa·s for SAE 12, 2\.3 mPa·s for SAE 16, 2\.6 mPa·s for SAE 20/,
    );
  });
  test('zero is refused', () => {
    expect(runGradeOf(q({ tool: 'grade', kv100: '0' })).state).toBe('error');
  });
});

describe('checkGradeSuitsRiding', () => {
  // An invented manual chart: 10W-40 from −10 to 35 °C, 15W-50 from 0 to 50 °C, 10W-40 again from 35 to 40.
  const chart = [
    { grade: '10W-40', minC: -10, maxC: 35 },
    { grade: '15W-50', minC: 0, maxC: 50 },
    { grade: '10W-40', minC: 35, maxC: 40 },
  ];
  test.each([
    ['10W-40', 0, 30, true, []],
    ['10w40', -10, 40, true, []],
    ['10W-40', 30, 45, false, [[40, 45]]],
    ['15W-50', -5, 20, false, [[-5, 0]]],
    ['20W-50', 10, 20, false, [[10, 20]]],
    ['10W-40', 20, 10, true, []],
    ['15W-50', 25, 25, true, []],
    ['15W-50', -5, -5, false, [[-5, -5]]],
  ] as const)('%s for %d to %d °C: suits %s, uncovered %j', (grade, lo, hi, suits, uncovered) => {
    const r = checkGradeSuitsRiding(chart, grade, lo, hi);
    expect(r.suits).toBe(suits);
    expect(r.uncovered).toEqual(uncovered);
  });

  test('rows with a gap between them leave the gap uncovered', () => {
    const gap = [
      { grade: '10W-30', minC: -20, maxC: 0 },
      { grade: '10W-30', minC: 10, maxC: 30 },
    ];
    expect(checkGradeSuitsRiding(gap, '10W-30', -5, 20).uncovered).toEqual([[0, 10]]);
  });
});
