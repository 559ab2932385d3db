import { describe, expect, test } from 'vitest';
import { forecastWearLimit, tCritical95, type WearForecastInput } from '~/lib/analysis/wear-forecast';

// Clutch friction plates: new 0.115–0.121 in, service limit 0.100 in, one reading of 0.110 in at 17,000 mi.
// Common practice for that engine, no published source. A micrometer reading to 0.001 in (common practice,
// no published source).
const CLUTCH: WearForecastInput = {
  newMin: 0.115, newMax: 0.121, serviceLimit: 0.1, limitDirection: 'min', fittedAt: 0,
  readings: [{ odometer: 17_000, value: 0.11 }], resolution: 0.001,
};

function expectForecast(f: ReturnType<typeof forecastWearLimit>) {
  if (f.status !== 'forecast') throw new Error(`expected a forecast, got ${f.status}`);
  return f;
}

describe('forecastWearLimit: clutch plates with one reading', () => {
  test('the line from the middle of the new range through the reading meets the limit at 38,250 mi', () => {
    // From 0.118 in at 0 mi (middle of 0.115–0.121) to 0.110 in at 17,000 mi: 0.008 in per 17,000 mi; the
    // remaining 0.010 in takes 21,250 mi more → 38,250 mi. (The "near 42,500 mi" is the corner that
    // starts at 0.115 in and reads 0.109 in; it lies inside the range below.)
    const f = expectForecast(forecastWearLimit(CLUTCH));
    expect(f.limitAt).toBeCloseTo(38_250, 6);
    expect(f.ratePer1000).toBeCloseTo(0.008 / 17, 12);
    expect(f.method).toBe('resolution-corners');
  });

  test.each([
    // Corners by hand: 17,000 · (start − 0.100)/(start − reading).
    { edge: 'low', expected: 29_750 }, // start 0.121, reading 0.109: 17,000 · 0.021/0.012
    { edge: 'high', expected: 63_750 }, // start 0.115, reading 0.111: 17,000 · 0.015/0.004
  ])('range $edge edge is $expected mi', ({ edge, expected }) => {
    const f = expectForecast(forecastWearLimit(CLUTCH));
    expect(edge === 'low' ? f.low : f.high).toBeCloseTo(expected, 6);
  });

  test('one reading gives a wide range, and the issue’s 42,500 mi lies inside it', () => {
    const f = expectForecast(forecastWearLimit(CLUTCH));
    expect(f.sureness).toBe('wide');
    expect(f.low).toBeLessThan(42_500);
    expect(f.high!).toBeGreaterThan(42_500);
  });

  test('the same part in millimetres gives the same odometer', () => {
    const mm = (v: number) => v * 25.4; // NIST SP 811 B.8: 1 in = 25.4 mm exactly
    const f = expectForecast(forecastWearLimit({
      ...CLUTCH, newMin: mm(0.115), newMax: mm(0.121), serviceLimit: mm(0.1), resolution: mm(0.001),
      readings: [{ odometer: 17_000, value: mm(0.11) }],
    }));
    expect(f.limitAt).toBeCloseTo(38_250, 4);
  });
});

describe('forecastWearLimit: several readings', () => {
  test('three points in hand-worked numbers: fit, estimate, and no late edge with one degree of freedom', () => {
    // Points (0, 3.0 mid-range), (1000, 2.9), (2000, 2.7) mm; limit 2.0 mm. By hand: x̄ = 1000, Sxx = 2e6,
    // Sxy = −300, slope −1.5e-4 mm per unit, intercept 3.01667 → limit at (3.01667 − 2)/1.5e-4 = 6,777.8.
    // Residual s = 0.0408 (1 df), t = 12.706: the band widens at t·s/√Sxx = 3.7e-4 > 1.5e-4 per unit, so
    // its upper edge never reaches the limit.
    const f = expectForecast(forecastWearLimit({
      newMin: 2.95, newMax: 3.05, serviceLimit: 2.0, limitDirection: 'min', fittedAt: 0, resolution: 0.01,
      readings: [{ odometer: 1000, value: 2.9 }, { odometer: 2000, value: 2.7 }],
    }));
    expect(f.limitAt).toBeCloseTo(6777.78, 1);
    expect(f.method).toBe('prediction-interval');
    expect(f.high).toBeNull();
    expect(f.sureness).toBe('wide');
    expect(f.low).toBeGreaterThanOrEqual(2000);
  });

  test('more readings along the same wear narrow the range', () => {
    const line = (x: number) => 0.118 - (0.008 / 17_000) * x;
    const noise = [0.0004, -0.0003, 0.0002, -0.0004, 0.0003, -0.0002, 0.0001, -0.0001];
    const make = (k: number) => ({
      ...CLUTCH,
      readings: Array.from({ length: k }, (_, i) => ({ odometer: 3000 * (i + 1), value: line(3000 * (i + 1)) + noise[i]! })),
    });
    const few = expectForecast(forecastWearLimit(make(3)));
    const many = expectForecast(forecastWearLimit(make(8)));
    expect(many.limitAt).toBeGreaterThan(32_000);
    expect(many.limitAt).toBeLessThan(45_000);
    expect(many.high).not.toBeNull();
    const width = (f: typeof few) => (f.high ?? Infinity) - f.low;
    expect(width(many)).toBeLessThan(width(few));
    expect(many.low).toBeLessThan(many.limitAt);
    expect(many.high!).toBeGreaterThan(many.limitAt);
  });

  test('a part that grows towards a maximum (direction max) forecasts the same way', () => {
    const f = expectForecast(forecastWearLimit({
      newMin: 100, newMax: 100, serviceLimit: 103, limitDirection: 'max', fittedAt: 5000, resolution: 0.1,
      readings: [{ odometer: 10_000, value: 101 }],
    }));
    // 1 unit per 5,000 → 3 units at 15,000 after fitting → 20,000.
    expect(f.limitAt).toBeCloseTo(20_000, 6);
  });
});

describe('forecastWearLimit: nothing to forecast', () => {
  test.each([
    { name: 'no readings', readings: [], status: 'no-readings' },
    { name: 'at the limit', readings: [{ odometer: 20_000, value: 0.1 }], status: 'past-limit' },
    { name: 'below the limit', readings: [{ odometer: 20_000, value: 0.098 }], status: 'past-limit' },
    { name: 'thicker than the middle of new', readings: [{ odometer: 5000, value: 0.12 }], status: 'no-wear-trend' },
  ])('$name → $status', ({ readings, status }) => {
    expect(forecastWearLimit({ ...CLUTCH, readings }).status).toBe(status);
  });

  test('bad settings are refused', () => {
    expect(() => forecastWearLimit({ ...CLUTCH, newMin: 0.2, newMax: 0.1 })).toThrow(RangeError);
    expect(() => forecastWearLimit({ ...CLUTCH, resolution: 0 })).toThrow(RangeError);
  });
});

describe('tCritical95', () => {
  test.each([
    // NIST/SEMATECH e-Handbook 1.3.6.7.2, upper 0.025 critical values (from memory of the table).
    { df: 1, t: 12.706 }, { df: 2, t: 4.303 }, { df: 5, t: 2.571 }, { df: 10, t: 2.228 }, { df: 30, t: 2.042 },
    { df: 45, t: 2.021 }, { df: 500, t: 1.98 },
  ])('df $df → $t', ({ df, t }) => {
    expect(tCritical95(df)).toBe(t);
  });
});
