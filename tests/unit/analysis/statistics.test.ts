import { describe, expect, test } from 'vitest';
import { predictionMultiple } from '~/lib/analysis/baseline';
import { studentTCdf, studentTQuantile } from '~/lib/analysis/statistics';

describe("Student's t quantiles", () => {
  test.each([
    // NIST/SEMATECH e-Handbook of Statistical Methods, table 1.3.6.7.2 (upper critical values of t).
    { p: 0.975, df: 10, t: 2.228 },
    { p: 0.99, df: 1, t: 31.821 },
    { p: 0.99, df: 3, t: 4.541 },
    { p: 0.99, df: 5, t: 3.365 },
    { p: 0.99, df: 10, t: 2.764 },
    { p: 0.999, df: 1, t: 318.313 },
    { p: 0.999, df: 5, t: 5.893 },
    { p: 0.999, df: 10, t: 4.144 },
    { p: 0.999, df: 100, t: 3.174 },
  ])('t($p; $df) = $t', ({ p, df, t }) => {
    expect(studentTQuantile(p, df)).toBeCloseTo(t, 2);
    expect(studentTCdf(t, df)).toBeCloseTo(p, 4);
  });

  test('refuses what it was not built for', () => {
    expect(() => studentTQuantile(0.3, 5)).toThrow(RangeError);
    expect(() => studentTQuantile(0.99, 0)).toThrow(RangeError);
  });

  test('the prediction multiple for a new reading after n = 5 is t(0.99; 4) · √1.2', () => {
    // t(0.99; 4) = 3.747 (NIST/SEMATECH table 1.3.6.7.2).
    expect(predictionMultiple(0.01, 5)).toBeCloseTo(3.747 * Math.sqrt(1.2), 2);
  });
});
