import { describe, expect, test } from 'vitest';
import {
  CONDITION_CODES,
  ELEMENT_CODES,
  MEASURANDS,
  MEASURAND_CODES,
  getMeasurand,
  isMeasurandCode,
  listMeasurandsOfGroup,
} from '~/lib/analysis/measurands';

describe('measurand catalogue', () => {
  test('holds every element of ASTM D5185 exactly once', () => {
    // ASTM D5185 element list (as quoted in the issue): Al, Ba, B, Ca, Cr, Cu, Fe, Pb, Mg, Mn, Mo, Ni, P, K,
    // Si, Ag, Na, S, Sn, Ti, V, Zn.
    const d5185 = [
      'Al',
      'Ba',
      'B',
      'Ca',
      'Cr',
      'Cu',
      'Fe',
      'Pb',
      'Mg',
      'Mn',
      'Mo',
      'Ni',
      'P',
      'K',
      'Si',
      'Ag',
      'Na',
      'S',
      'Sn',
      'Ti',
      'V',
      'Zn',
    ];
    expect([...ELEMENT_CODES].sort()).toEqual([...d5185].sort());
  });

  test('has one entry per code, in MEASURAND_CODES order, each with a sentence', () => {
    expect(MEASURANDS.map((m) => m.code)).toEqual([...MEASURAND_CODES]);
    expect(MEASURAND_CODES).toHaveLength(ELEMENT_CODES.length + CONDITION_CODES.length);
    for (const m of MEASURANDS) {
      expect(m.name.length).toBeGreaterThan(2);
      expect(m.pointsTo).toMatch(/\.$/);
    }
  });

  test.each([
    // Groups as set out in shared/PRODUCT.md.
    { group: 'wear', codes: ['Fe', 'Al', 'Cr', 'Cu', 'Pb', 'Sn', 'Ni', 'Ag', 'Ti', 'V', 'Mn'] },
    { group: 'contaminant', codes: ['Si', 'Na', 'K', 'B'] },
    { group: 'additive', codes: ['Mo', 'Zn', 'P', 'Ca', 'Mg', 'Ba', 'S'] },
    { group: 'condition', codes: [...CONDITION_CODES] },
  ] as const)('group $group', ({ group, codes }) => {
    expect(listMeasurandsOfGroup(group)).toEqual(codes);
  });

  test.each([
    { code: 'Fe', unit: 'ppm', concern: 'up' },
    { code: 'KV100', unit: 'mm²/s', concern: 'both' },
    { code: 'TBN', unit: 'mg KOH/g', concern: 'down' },
    { code: 'FUEL', unit: '%', concern: 'up' },
    { code: 'FLASH', unit: '°C', concern: 'down' },
  ] as const)('$code in $unit, concern $concern', ({ code, unit, concern }) => {
    expect(getMeasurand(code)).toMatchObject({ code, unit, concern });
  });

  test.each([
    ['Fe', true],
    ['KV100', true],
    ['fe', false],
    ['Xx', false],
  ] as const)('isMeasurandCode(%s) is %s', (code, expected) => {
    expect(isMeasurandCode(code)).toBe(expected);
  });
});
