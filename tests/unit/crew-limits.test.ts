import { describe, expect, test } from 'vitest';
import { LIMIT_FIELDS, MAX_INPUT_LENGTH, formValuesFrom, parseLimitsForm } from '~/lib/crew-limits/crew-limits';
import { DEFAULT_FIXED_LIMITS, FIXED_LIMIT, FUEL_DILUTION, VISCOSITY_CHANGE } from '~/lib/analysis/rule-definitions';

const form = (entries: Record<string, string>) => new URLSearchParams(entries);

describe('LIMIT_FIELDS', () => {
  test('offers the limits the engine reads, and not boron', () => {
    expect(LIMIT_FIELDS.map((f) => f.measurand)).toEqual([...FIXED_LIMIT.params.elements, 'WATER', 'FUEL', 'KV100']);
    expect(LIMIT_FIELDS.some((f) => f.measurand === 'B')).toBe(false);
  });
  test('defaults and sources are the rule definitions’ own', () => {
    for (const f of LIMIT_FIELDS) expect(f.defaultValue).toBe(DEFAULT_FIXED_LIMITS[f.key]);
    expect(LIMIT_FIELDS.find((f) => f.measurand === 'FUEL')!.source).toBe(FUEL_DILUTION.source);
    expect(LIMIT_FIELDS.find((f) => f.measurand === 'KV100')!.source).toBe(VISCOSITY_CHANGE.source);
    expect(LIMIT_FIELDS.find((f) => f.measurand === 'Fe')!.source).toBe(FIXED_LIMIT.source);
  });
  test('every default lies inside its own accepted range', () => {
    for (const f of LIMIT_FIELDS) expect(f.defaultValue >= f.min && f.defaultValue <= f.max).toBe(true);
  });
});

describe('parseLimitsForm', () => {
  test.each([
    ['empty boxes mean the default', {}, { Fe: null, FUEL: null }],
    ['plain numbers', { Fe: '80', WATER: '0.2', FUEL: ' 4 ' }, { Fe: 80, WATER: 0.2, FUEL: 4 }],
    ['a decimal comma', { WATER: '0,05' }, { WATER: 0.05 }],
  ])('%s', (_n, entries, expected) => {
    const r = parseLimitsForm(form(entries));
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.values).toMatchObject(expected);
  });

  test.each([
    ['words', { Fe: 'lots' }, 'Fe', 'Numbers only, like 20 or 0.1.'],
    ['a negative figure', { Fe: '-5' }, 'Fe', 'Numbers only, like 20 or 0.1.'],
    ['an exponent', { Fe: '1e3' }, 'Fe', 'Numbers only, like 20 or 0.1.'],
    ['Infinity', { Si: 'Infinity' }, 'Si', 'Numbers only, like 20 or 0.1.'],
    ['below the range', { Fe: '0' }, 'Fe', 'Between 1 and 2000 ppm.'],
    ['above the range', { WATER: '50' }, 'WATER', 'Between 0.01 and 5 %.'],
    ['KV100 past the act tier', { KV100: '30' }, 'KV100', `Between 5 and ${VISCOSITY_CHANGE.params.actThinPercent} %.`],
    [
      'a 100 KB string',
      { Fe: '9'.repeat(100_000) },
      'Fe',
      `Too long: type a number of at most ${MAX_INPUT_LENGTH} characters.`,
    ],
  ])('refuses %s with a clear message', (_n, entries, field, message) => {
    const r = parseLimitsForm(form(entries));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.fields[field]).toBe(message);
      // The refused text is shown again, except a string too long to show.
      expect(r.raw[field]!.length).toBeLessThanOrEqual(MAX_INPUT_LENGTH);
    }
  });

  test('one bad field refuses the whole form', () => {
    const r = parseLimitsForm(form({ Fe: '80', Si: 'x' }));
    expect(r.ok).toBe(false);
  });
});

describe('formValuesFrom', () => {
  test('shows the crew’s figure, or an empty box for the default', () => {
    const v = formValuesFrom([
      { measurand: 'Fe', act_at: 80 },
      { measurand: 'B', act_at: 30 },
    ]);
    expect(v['Fe']).toBe('80');
    expect(v['Si']).toBe('');
    expect(v['B']).toBeUndefined();
  });
});
