import { describe, expect, test } from 'vitest';
import { computeWearRate, findRateBasis } from '~/lib/analysis/wear-rate';

describe('computeWearRate', () => {
  test.each([
    // Arithmetic of the definition: ppm per 1,000 mi or km, per 100 h.
    { ppm: 30, distance: 3000, unit: 'km', rate: 10, per: 1000 },
    { ppm: 30, distance: 1500, unit: 'mi', rate: 20, per: 1000 },
    { ppm: 12, distance: 40, unit: 'h', rate: 30, per: 100 },
  ] as const)('$ppm ppm over $distance $unit is $rate per $per', ({ ppm, distance, unit, rate, per }) => {
    const r = computeWearRate(ppm, distance, unit);
    expect(r?.rate).toBeCloseTo(rate, 12);
    expect(r?.per).toBe(per);
    expect(r?.topUpCorrected).toBe(false);
    expect(findRateBasis(unit)).toBe(per);
  });

  test('top-up correction: 0.5 l added to a 2 l fill scales ppm by 2.5 / 2 (documented approximation)', () => {
    const r = computeWearRate(40, 4000, 'km', { topUpVolume: 0.5, oilVolume: 2 });
    expect(r?.correctedPpm).toBeCloseTo(50, 12);
    expect(r?.rate).toBeCloseTo(12.5, 12);
    expect(r?.topUpCorrected).toBe(true);
  });

  test('no correction without the fill volume, and no rate without distance', () => {
    expect(computeWearRate(40, 4000, 'km', { topUpVolume: 0.5 })?.correctedPpm).toBe(40);
    expect(computeWearRate(40, 0, 'km')).toBeNull();
    expect(computeWearRate(Number.NaN, 100, 'km')).toBeNull();
  });
});
