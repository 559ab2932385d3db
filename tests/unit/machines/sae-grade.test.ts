import { describe, expect, test } from 'vitest';
import { parseSaeGrade } from '~/lib/oil-changes/sae-grade';

// Grade names from SAE J300 (winter grades 0W–25W, high-temperature grades 8–60), from memory of the
// standard's tables.
describe('parseSaeGrade accepts J300 names and spells them one way', () => {
  test.each([
    ['10W-40', '10W-40'],
    ['10w40', '10W-40'],
    ['SAE 15W-50', '15W-50'],
    ['20W-50', '20W-50'],
    ['15W-40', '15W-40'],
    ['0W-8', '0W-8'],
    ['5W-30', '5W-30'],
    ['25W-60', '25W-60'],
    ['30', '30'],
    ['60', '60'],
    ['8', '8'],
    ['10W', '10W'],
    ['0W', '0W'],
    ['10 W 40', '10W-40'],
    ['10W–40', '10W-40'],
  ])('%s → %s', (input, grade) => {
    expect(parseSaeGrade(input)).toEqual({ ok: true, grade });
  });
});

describe('parseSaeGrade refuses what is not a J300 grade', () => {
  test.each([
    ['', /Enter the SAE grade/],
    ['10W-45', /45 is not an SAE high-temperature grade/],
    ['12W-40', /12W is not an SAE winter grade/],
    ['25W-20', /second number must be higher/],
    ['20W-20', /second number must be higher/],
    ['70', /70 is not an SAE high-temperature grade/],
    ['0', /0 is not an SAE high-temperature grade/],
    ['ten-forty', /not an SAE grade name/],
    ['10W-40-50', /not an SAE grade name/],
    ['W40', /not an SAE grade name/],
  ])('"%s"', (input, message) => {
    const r = parseSaeGrade(input);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(message);
  });
});
