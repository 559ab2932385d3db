import { describe, expect, test } from 'vitest';
import {
  expectedStartSize,
  forecastWearLimit,
  tCritical95,
  type WearForecast,
  type WearForecastInput,
} from '~/lib/analysis/wear-forecast';
import { describeForecast, isBrakePart } from '~/lib/wear-parts/forecast-words';

// Clutch friction plates: new 0.115–0.121 in, service limit 0.100 in, one reading of 0.110 in at 17,000 mi.
// Common practice for that engine, no published source. A micrometer reading to 0.001 in (common practice,
// no published source).
const CLUTCH: WearForecastInput = {
  newMin: 0.115,
  newMax: 0.121,
  serviceLimit: 0.1,
  limitDirection: 'min',
  fittedAt: 0,
  readings: [{ odometer: 17_000, value: 0.11 }],
  resolution: 0.001,
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
    const f = expectForecast(
      forecastWearLimit({
        ...CLUTCH,
        newMin: mm(0.115),
        newMax: mm(0.121),
        serviceLimit: mm(0.1),
        resolution: mm(0.001),
        readings: [{ odometer: 17_000, value: mm(0.11) }],
      }),
    );
    expect(f.limitAt).toBeCloseTo(38_250, 4);
  });
});

describe('forecastWearLimit: several readings', () => {
  test('three points in hand-worked numbers: fit, estimate, and no late edge with one degree of freedom', () => {
    // Points (0, 3.0 mid-range), (1000, 2.9), (2000, 2.7) mm; limit 2.0 mm. By hand: x̄ = 1000, Sxx = 2e6,
    // Sxy = −300, slope −1.5e-4 mm per unit, intercept 3.01667 → limit at (3.01667 − 2)/1.5e-4 = 6,777.8.
    // Residual s = 0.0408 (1 df), t = 12.706: the band widens at t·s/√Sxx = 3.7e-4 > 1.5e-4 per unit, so
    // its upper edge never reaches the limit.
    const f = expectForecast(
      forecastWearLimit({
        newMin: 2.95,
        newMax: 3.05,
        serviceLimit: 2.0,
        limitDirection: 'min',
        fittedAt: 0,
        resolution: 0.01,
        readings: [
          { odometer: 1000, value: 2.9 },
          { odometer: 2000, value: 2.7 },
        ],
      }),
    );
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
      readings: Array.from({ length: k }, (_, i) => ({
        odometer: 3000 * (i + 1),
        value: line(3000 * (i + 1)) + noise[i]!,
      })),
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
    const f = expectForecast(
      forecastWearLimit({
        newMin: 100,
        newMax: 100,
        serviceLimit: 103,
        limitDirection: 'max',
        fittedAt: 5000,
        resolution: 0.1,
        readings: [{ odometer: 10_000, value: 101 }],
      }),
    );
    // 1 unit per 5,000 → 3 units at 15,000 after fitting → 20,000.
    expect(f.limitAt).toBeCloseTo(20_000, 6);
  });
});

describe('forecastWearLimit: nothing to forecast', () => {
  test.each([
    { name: 'no readings', readings: [], status: 'no-readings' },
    { name: 'at the limit', readings: [{ odometer: 20_000, value: 0.1 }], status: 'past-limit' },
    { name: 'below the limit', readings: [{ odometer: 20_000, value: 0.098 }], status: 'past-limit' },
    {
      name: 'thicker than the middle of new',
      readings: [{ odometer: 5000, value: 0.12 }],
      status: 'no-measurable-wear',
    },
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
    { df: 1, t: 12.706 },
    { df: 2, t: 4.303 },
    { df: 5, t: 2.571 },
    { df: 10, t: 2.228 },
    { df: 30, t: 2.042 },
    { df: 45, t: 2.021 },
    { df: 500, t: 1.98 },
  ])('df $df → $t', ({ df, t }) => {
    expect(tCritical95(df)).toBe(t);
  });
});

// Unit pairs: NIST SP 811 B.8 gives 1 in = 25.4 mm and 1 mi = 1.609344 km exactly.
const IN_MM = 25.4;
const MI_KM = 1.609344;
/** The same input in millimetres and kilometres. */
function toMetric(input: WearForecastInput): WearForecastInput {
  return {
    ...input,
    newMin: input.newMin * IN_MM,
    newMax: input.newMax * IN_MM,
    serviceLimit: input.serviceLimit * IN_MM,
    resolution: input.resolution * IN_MM,
    fittedAt: input.fittedAt * MI_KM,
    readings: input.readings.map((r) => ({ odometer: r.odometer * MI_KM, value: r.value * IN_MM })),
  };
}
const UNITS = [
  { units: 'in/mi', convert: (i: WearForecastInput) => i, km: 1, meter: 'mi' as const },
  { units: 'mm/km', convert: toMetric, km: MI_KM, meter: 'km' as const },
];
const PACK: WearForecastInput = { ...CLUTCH, pieceCount: 8 };
const inch = (v: number) => `${v.toFixed(3)} in`;

describe('expectedStartSize: the expected worst of n new pieces, not the middle', () => {
  test.each([
    // Expected minimum of n uniform values on [a, b] is a + (b − a)/(n + 1) (order statistics of the uniform
    // distribution, any statistics textbook); the maximum mirrors it.
    { n: 1, dir: 'min' as const, expected: 0.118 },
    { n: 2, dir: 'min' as const, expected: 0.117 },
    { n: 8, dir: 'min' as const, expected: 0.115 + 0.006 / 9 },
    { n: 8, dir: 'max' as const, expected: 0.121 - 0.006 / 9 },
  ])('$n piece(s), towards $dir → $expected', ({ n, dir, expected }) => {
    expect(expectedStartSize(0.115, 0.121, dir, n)).toBeCloseTo(expected, 12);
  });
});

describe.each(UNITS)('forecastWearLimit in $units', ({ convert, km, meter }) => {
  test('an unworn 8-plate pack (thinnest plate inside the new range) has no measurable wear and no odometer', () => {
    for (const value of [0.116, 0.115, 0.1145]) {
      // 0.1145 in is below the new minimum of 0.115 in by less than the 0.001 in the tool reads.
      const f = forecastWearLimit(
        convert({
          ...PACK,
          readings: [
            { odometer: 9000, value },
            { odometer: 12_000, value },
          ],
        }),
      );
      expect(f.status).toBe('no-measurable-wear');
      const words = describeForecast(f, meter, { name: 'Clutch friction plates', limitDirection: 'min' });
      expect(words.headline).toBe('No measurable wear yet');
      expect(`${words.headline} ${words.detail}`).not.toMatch(/\d,\d{3} (mi|km)/);
    }
  });

  test('a single reading inside the new range gives no headline odometer', () => {
    const f = forecastWearLimit(convert({ ...PACK, readings: [{ odometer: 17_000, value: 0.117 }] }));
    expect(f).toEqual({ status: 'no-measurable-wear', readings: 1, reversals: [] });
  });

  test('a single worn reading of a pack starts from the expected thinnest plate: 47,000 mi, not 38,250', () => {
    // Start 0.115 + 0.006/9 in at 0; reading 0.110 in at 17,000 mi; limit 0.100 in.
    // By hand: 17,000 · (start − 0.100)/(start − 0.110) = 17,000 · 141/51 = 47,000 mi.
    const f = forecastWearLimit(convert(PACK));
    expect(f.status).toBe('forecast');
    if (f.status !== 'forecast') return;
    expect(f.limitAt / km).toBeCloseTo(47_000, 4);
    expect(f.start.value).toBeCloseTo(convert(PACK).newMin + (convert(PACK).newMax - convert(PACK).newMin) / 9, 12);
    expect(f.low).toBeLessThanOrEqual(f.limitAt);
    expect(f.high!).toBeGreaterThanOrEqual(f.limitAt);
  });

  test('the latest reading past the limit is reported as past it, with the first reading that was', () => {
    const f = forecastWearLimit(
      convert({
        ...PACK,
        readings: [
          { odometer: 20_000, value: 0.099 },
          { odometer: 22_000, value: 0.098 },
        ],
      }),
    );
    expect(f.status).toBe('past-limit');
    if (f.status !== 'past-limit') return;
    expect(f.firstPastAt / km).toBeCloseTo(20_000, 6);
    expect(f.odometer / km).toBeCloseTo(22_000, 6);
  });

  test('an earlier reading past the limit and a later one inside asks whether the part was replaced', () => {
    const f = forecastWearLimit(
      convert({
        ...PACK,
        readings: [
          { odometer: 20_000, value: 0.099 },
          { odometer: 24_000, value: 0.116 },
        ],
      }),
    );
    expect(f.status).toBe('back-from-limit');
    const words = describeForecast(f, meter, { name: 'Clutch friction plates', limitDirection: 'min' });
    expect(words.headline).toBe('Was the part replaced?');
    expect(words.detail).not.toMatch(/Service limit near/);
  });

  test('non-monotone readings: the plate that got thicker is called out, and the odometer stays inside its range', () => {
    // 0.112 → 0.114 in is 0.002 in thicker, more than the 0.001 in the micrometer reads.
    const f = forecastWearLimit(
      convert({
        ...PACK,
        readings: [
          { odometer: 5000, value: 0.112 },
          { odometer: 10_000, value: 0.114 },
          { odometer: 15_000, value: 0.108 },
        ],
      }),
    );
    expect(f.status).toBe('forecast');
    if (f.status !== 'forecast') return;
    expect(f.reversals).toHaveLength(1);
    expect(f.reversals[0]!.to.odometer / km).toBeCloseTo(10_000, 6);
    expect(f.low).toBeGreaterThanOrEqual(15_000 * km - 1e-6);
    expect(f.low).toBeLessThanOrEqual(f.limitAt);
    expect(f.limitAt).toBeLessThanOrEqual(f.high ?? Infinity);
    const words = describeForecast(f, meter, { name: 'Clutch friction plates', limitDirection: 'min' });
    expect(words.detail).toMatch(/thicker than the one at .* either the part was replaced .* or one reading slipped/);
    expect(words.tone).toBe('watch');
  });

  test('a step of exactly the resolution is not called out', () => {
    const f = forecastWearLimit(
      convert({
        ...PACK,
        readings: [
          { odometer: 5000, value: 0.111 },
          { odometer: 10_000, value: 0.112 },
          { odometer: 15_000, value: 0.108 },
        ],
      }),
    );
    expect(f.status === 'forecast' && f.reversals).toEqual([]);
  });

  test('readings that cross before the latest one never put the headline before the latest reading', () => {
    // The fitted line through (0, 0.118), (10,000, 0.101), (20,000, 0.109) meets 0.100 in before 20,000 mi,
    // but the 20,000 mi reading is still 0.009 in short of the limit.
    const f = forecastWearLimit(
      convert({
        ...CLUTCH,
        readings: [
          { odometer: 10_000, value: 0.101 },
          { odometer: 20_000, value: 0.109 },
        ],
      }),
    );
    expect(f.status).toBe('forecast');
    if (f.status !== 'forecast') return;
    expect(f.limitAt).toBeGreaterThanOrEqual(20_000 * km - 1e-6);
    expect(f.low).toBeLessThanOrEqual(f.limitAt);
    expect(f.reversals).toHaveLength(1);
  });
});

// A 520 drive chain measured over 20 links: 20 × 5/8 in pitch = 12.5 in new (ANSI B29.1 pitch of a 520
// chain, from memory); service limit 12.58 in (common practice for a service manual's 20-link limit, no
// published source). The length grows towards its limit: a maximum.
const CHAIN: WearForecastInput = {
  newMin: 12.5,
  newMax: 12.5,
  serviceLimit: 12.58,
  limitDirection: 'max',
  fittedAt: 1000,
  resolution: 0.001,
  readings: [
    { odometer: 6000, value: 12.52 },
    { odometer: 11_000, value: 12.54 },
  ],
};
const chainPart = { name: 'Drive chain (20 links)', limitDirection: 'max' as const };

describe.each(UNITS)('a chain (limit is a maximum) in $units', ({ convert, km, meter }) => {
  test('stretch forecasts where the length meets its maximum: 0.004 in per 1,000 mi → 21,000 mi', () => {
    // From 12.5 in at 1,000 mi by 0.02 in per 5,000 mi: 0.08 in to go takes 20,000 mi → 21,000 mi.
    const f = forecastWearLimit(convert(CHAIN));
    expect(f.status).toBe('forecast');
    if (f.status !== 'forecast') return;
    expect(f.limitAt / km).toBeCloseTo(21_000, 3);
    const words = describeForecast(f, meter, chainPart, inch);
    expect(words.detail).toMatch(/expected longest new piece/);
    expect(words.detail).not.toMatch(/thinn|thick/);
  });

  test('a new chain still at its new length has no measurable wear', () => {
    const f = forecastWearLimit(convert({ ...CHAIN, readings: [{ odometer: 3000, value: 12.5005 }] }));
    expect(f.status).toBe('no-measurable-wear');
  });

  test('a chain that got shorter is a replaced chain or a measuring slip', () => {
    const f = forecastWearLimit(
      convert({
        ...CHAIN,
        readings: [...CHAIN.readings, { odometer: 13_000, value: 12.53 }, { odometer: 16_000, value: 12.55 }],
      }),
    );
    expect(f.status === 'forecast' && f.reversals.length).toBe(1);
    expect(describeForecast(f, meter, chainPart, inch).detail).toMatch(/is shorter than the one at/);
  });

  test('a chain past its maximum is past the limit, worded for a part that grows', () => {
    const f = forecastWearLimit(convert({ ...CHAIN, readings: [{ odometer: 20_000, value: 12.6 }] }));
    expect(f.status).toBe('past-limit');
    const words = describeForecast(f, meter, chainPart, inch);
    expect(words.detail).toMatch(/at or above the service limit/);
    expect(words.detail).not.toMatch(/do not ride/i);
  });
});

describe('brake parts past the limit get a firm sentence', () => {
  const past: WearForecast = { status: 'past-limit', odometer: 21_000, value: 0.06, firstPastAt: 21_000 };
  test.each([
    { name: 'Front brake pads', brake: true },
    { name: 'Rear brake disc', brake: true },
    { name: 'Brake shoes', brake: true },
    { name: 'Pads (front caliper)', brake: true },
    { name: 'Clutch friction plates', brake: false },
    { name: 'Drive chain', brake: false },
  ])('$name → brake: $brake', ({ name, brake }) => {
    expect(isBrakePart(name)).toBe(brake);
    const words = describeForecast(past, 'mi', { name, limitDirection: 'min' }, inch);
    expect(/do not ride until it is replaced/i.test(words.detail)).toBe(brake);
    expect(words.tone).toBe('act');
    if (brake) expect(words.detail).toMatch(/service manual.*licensed mechanic/);
  });
});

describe('forecast words in both units', () => {
  test('odometers carry the machine’s unit', () => {
    const f = forecastWearLimit(PACK);
    expect(describeForecast(f, 'mi', { name: 'Clutch', limitDirection: 'min' }).headline).toBe(
      'Service limit near 47,000 mi',
    );
    const m = forecastWearLimit(toMetric(PACK));
    // 47,000 mi × 1.609344 = 75,639 km (NIST SP 811 B.8).
    expect(describeForecast(m, 'km', { name: 'Clutch', limitDirection: 'min' }).headline).toBe(
      'Service limit near 75,639 km',
    );
  });
});

describe('forecast invariants over many invented readings (seeded)', () => {
  test('a forecast never starts before the latest reading and its headline lies inside its own range', () => {
    let seed = 12345;
    // A small linear congruential generator (Numerical Recipes constants) so the run is repeatable.
    const rand = () => (seed = (seed * 1664525 + 1013904223) % 2 ** 32) / 2 ** 32;
    let forecasts = 0;
    for (let k = 0; k < 500; k++) {
      const readings = Array.from({ length: 1 + Math.floor(rand() * 5) }, (_, i) => ({
        odometer: 2000 * (i + 1) + rand() * 1500,
        value: 0.101 + rand() * 0.02,
      }));
      const f = forecastWearLimit({ ...PACK, readings });
      if (f.status !== 'forecast') continue;
      forecasts += 1;
      const latest = Math.max(...readings.map((r) => r.odometer));
      expect(f.low).toBeGreaterThanOrEqual(latest);
      expect(f.limitAt).toBeGreaterThanOrEqual(f.low);
      expect(f.limitAt).toBeLessThanOrEqual(f.high ?? Infinity);
    }
    expect(forecasts).toBeGreaterThan(100);
  });
});
