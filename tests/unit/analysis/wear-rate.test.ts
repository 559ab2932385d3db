import { describe, expect, test } from 'vitest';
import { computeTopUpFactor, computeWearRate, findRateBasis } from '~/lib/analysis/wear-rate';

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

  test('worked example of the mass-balance top-up correction', () => {
    // A 3 L sump kept full with 0.6 L of top-up over the run, 30 ppm at the drain (worked by hand from the
    // derivation in wear-rate.ts): T/V = 0.2, factor = 0.2 / (1 − e^−0.2) = 0.2 / 0.1812692 = 1.1033311,
    // so the engine shed 33.10 ppm-of-sump of metal. The first-order form c · (1 + T/2V) gives 33.0; treating
    // the lost oil as if it carried the final 30 ppm (c · (1 + T/V)) would say 36.0, twice the correction.
    expect(computeTopUpFactor(0.6, 3)).toBeCloseTo(1.1033311, 7);
    const r = computeWearRate(30, 3000, 'km', { topUpVolume: 0.6, oilVolume: 3 });
    expect(r?.correctedPpm).toBeCloseTo(33.09993, 4);
    expect(r?.rate).toBeCloseTo(11.03331, 4);
    expect(r?.topUpCorrected).toBe(true);
    expect(r!.correctedPpm).toBeLessThan(30 * (1 + 0.6 / 3));
    expect(Math.abs(r!.correctedPpm - 30 * (1 + 0.6 / 6))).toBeLessThan(0.11);
  });

  test.each([
    { t: 0, v: 3, factor: 1 },
    { t: 0.3, v: 0, factor: 1 },
    { t: 1e-9, v: 3, factor: 1 },
  ])(
    'top-up factor with $t L on $v L is $factor (no correction without a top-up or a sump volume)',
    ({ t, v, factor }) => {
      expect(computeTopUpFactor(t, v)).toBeCloseTo(factor, 9);
    },
  );

  test('no correction without the fill volume, and no rate without distance', () => {
    expect(computeWearRate(40, 4000, 'km', { topUpVolume: 0.5 })?.correctedPpm).toBe(40);
    expect(computeWearRate(40, 0, 'km')).toBeNull();
    expect(computeWearRate(Number.NaN, 100, 'km')).toBeNull();
  });
});
