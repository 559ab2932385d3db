import { describe, expect, test } from 'vitest';
import { computeBaseline, computeBaselineBand, computeTrendFit } from '~/lib/analysis/baseline';
import { LEW, LOTTERY, MAVRO, MICHELSO, NORRIS_XY, NUMACC1, NUMACC2, NUMACC3, NUMACC4 } from './nist-strd-data';

/** Log relative error in digits, the accuracy measure NIST StRD uses. */
function digitsOfAgreement(computed: number, certified: number): number {
  if (computed === certified) return 15;
  return -Math.log10(Math.abs(computed - certified) / Math.abs(certified));
}

describe('computeBaseline against NIST StRD univariate summary statistics', () => {
  test.each([
    // NIST StRD certified values (mean, sample standard deviation).
    // `digits` is the agreement required of the sd. NumAcc3 and NumAcc4 are NIST's hard cases: 1000000.1
    // and 10000000.1 are not exact in binary floating point, which caps agreement near 9 and 8 digits.
    { name: 'NumAcc1', data: NUMACC1, n: 3, mean: 10000002, sd: 1, digits: 14 },
    { name: 'NumAcc2', data: NUMACC2, n: 1001, mean: 1.2, sd: 0.1, digits: 14 },
    { name: 'NumAcc3', data: NUMACC3, n: 1001, mean: 1000000.2, sd: 0.1, digits: 9 },
    { name: 'NumAcc4', data: NUMACC4, n: 1001, mean: 10000000.2, sd: 0.1, digits: 8 },
    // NIST StRD certified values, from memory; each was reproduced to 13+ digits by exact rational
    // arithmetic over the embedded data before being written here.
    { name: 'Lew', data: LEW, n: 200, mean: -177.435, sd: 277.332168044316, digits: 14 },
    { name: 'Lottery', data: LOTTERY, n: 218, mean: 518.95871559633, sd: 291.699727470969, digits: 14 },
    { name: 'Mavro', data: MAVRO, n: 50, mean: 2.001856, sd: 0.000429123454003053, digits: 12 },
    { name: 'Michelso', data: MICHELSO, n: 100, mean: 299.8524, sd: 0.0790105478190518, digits: 13 },
  ])('$name: mean $mean, sd $sd', ({ data, n, mean, sd, digits }) => {
    const b = computeBaseline(data);
    expect(b.n).toBe(n);
    expect(digitsOfAgreement(b.mean, mean)).toBeGreaterThanOrEqual(13);
    expect(digitsOfAgreement(b.sd, sd)).toBeGreaterThanOrEqual(digits);
  });

  test('min and max of a small set, and NaN spread for a single value', () => {
    expect(computeBaseline([4, 9, 1])).toMatchObject({ n: 3, mean: 14 / 3, min: 1, max: 9 });
    const one = computeBaseline([7]);
    expect(one.n).toBe(1);
    expect(one.mean).toBe(7);
    expect(Number.isNaN(one.sd)).toBe(true);
  });
});

describe('computeTrendFit against NIST StRD linear regression', () => {
  test('Norris: certified slope and intercept', () => {
    // NIST StRD Norris certified values: slope 1.00211681802045, intercept -0.262323073774029.
    const fit = computeTrendFit(NORRIS_XY);
    expect(fit.n).toBe(36);
    expect(digitsOfAgreement(fit.slope, 1.00211681802045)).toBeGreaterThanOrEqual(12);
    expect(digitsOfAgreement(fit.intercept, -0.262323073774029)).toBeGreaterThanOrEqual(9);
    // NIST StRD Norris certified R-squared 0.999993745883712.
    expect(digitsOfAgreement(fit.r2, 0.999993745883712)).toBeGreaterThanOrEqual(10);
  });
});

describe('computeBaselineBand (prediction limits for small n)', () => {
  // Check values: t quantiles from the NIST/SEMATECH e-Handbook of Statistical Methods, table 1.3.6.7.2
  // (upper critical values of Student's t): t(0.99; 3) = 4.541, t(0.999; 3) = 10.215.
  const settings = {
    minSamples: 3,
    window: 10,
    watchAlpha: 0.01,
    actAlpha: 0.001,
    floorAt: (level: number) => Math.hypot(0.5, 0.12 * level),
  };

  test.each([
    { previous: [], n: 0 },
    { previous: [5], n: 1 },
    { previous: [5, 6], n: 2 },
  ])('is "building" with $n previous samples', ({ previous, n }) => {
    expect(computeBaselineBand(previous, settings)).toEqual({ status: 'building', n, needed: 3 });
  });

  test('watch above mean + t(0.99; n−1) · s · √(1 + 1/n), act from the same with t(0.999; n−1)', () => {
    const band = computeBaselineBand([10, 20, 30, 20], settings);
    if (band.status !== 'ready') throw new Error('expected a ready band');
    const sd = Math.sqrt(200 / 3);
    expect(band.mean).toBe(20);
    expect(band.sd).toBeCloseTo(sd, 12);
    expect(band.floored).toBe(false);
    expect(band.watchMultiple).toBeCloseTo(4.541 * Math.sqrt(1.25), 3);
    expect(band.watchAbove).toBeCloseTo(20 + 4.541 * Math.sqrt(1.25) * sd, 2);
    expect(band.actFrom).toBeCloseTo(20 + 10.215 * Math.sqrt(1.25) * sd, 2);
    expect(band.lower).toBe(0);
  });

  test('the multiples shrink as the baseline grows (the estimate of s firms up)', () => {
    const small = computeBaselineBand([10, 11, 9, 10], settings);
    const large = computeBaselineBand([10, 11, 9, 10, 10, 11, 9, 10, 10, 11], settings);
    if (small.status !== 'ready' || large.status !== 'ready') throw new Error('expected ready bands');
    expect(large.watchMultiple).toBeLessThan(small.watchMultiple);
    expect(large.actMultiple).toBeLessThan(small.actMultiple);
  });

  test('a perfectly flat history gets the lab-scatter floor, so a 1 ppm change stays inside the band', () => {
    const band = computeBaselineBand([4, 4, 4, 4], settings);
    if (band.status !== 'ready') throw new Error('expected a ready band');
    expect(band.sd).toBe(0);
    expect(band.spread).toBeCloseTo(Math.hypot(0.5, 0.48), 12);
    expect(band.floored).toBe(true);
    expect(5).toBeLessThan(band.watchAbove);
  });

  test('the floor scales with the level (12 % of 60 ppm, with the 0.5 ppm resolution term)', () => {
    const band = computeBaselineBand([60, 60, 60], settings);
    if (band.status !== 'ready') throw new Error('expected a ready band');
    expect(band.spread).toBeCloseTo(Math.hypot(0.5, 7.2), 12);
  });

  test('only the last `window` samples count', () => {
    const band = computeBaselineBand([1000, 1000, 10, 10, 10], { ...settings, window: 3 });
    if (band.status !== 'ready') throw new Error('expected a ready band');
    expect(band.mean).toBe(10);
    expect(band.n).toBe(3);
  });
});

describe('computeTrendFit slope standard error', () => {
  test('matches the textbook formula on a small set', () => {
    // y = 1, 3, 2, 5 at x = 0..3: slope 1.1, intercept 1.1, SSE 2.7, Sxx 5 (worked by hand); se = √(SSE/(n−2)/Sxx).
    const fit = computeTrendFit([
      [0, 1],
      [1, 3],
      [2, 2],
      [3, 5],
    ]);
    expect(fit.slope).toBeCloseTo(1.1, 12);
    expect(fit.slopeSe).toBeCloseTo(Math.sqrt(2.7 / 2 / 5), 12);
  });
});
