import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { analyseSample } from '~/lib/analysis/analyse-sample';
import { computeBaseline, computeBaselineBand } from '~/lib/analysis/baseline';
import { makeIntervalCall } from '~/lib/analysis/interval-call';
import { MEASURANDS, type MeasurandCode } from '~/lib/analysis/measurands';
import type { Level, MachineProfile, SamplePoint } from '~/lib/analysis/types';

const RANK: Record<Level, number> = { steady: 0, watch: 1, act: 2 };
// Measurands whose concern is a rise (wear, contaminants, fuel, water, glycol, insolubles, TAN).
const UP_CODES = MEASURANDS.filter((m) => m.concern === 'up').map((m) => m.code);

// Clustered ranges so bands, trends and limits are actually crossed: most readings present, most values small.
const RANGES: [MeasurandCode, number, number][] = [
  ['Fe', 0, 120], ['Al', 0, 30], ['Cu', 0, 30], ['Cr', 0, 12], ['Pb', 0, 30], ['Sn', 0, 12], ['Si', 0, 30],
  ['Na', 0, 80], ['K', 0, 30], ['B', 0, 30], ['Zn', 500, 1500], ['P', 500, 1300], ['KV100', 8, 18],
  ['FUEL', 0, 7], ['WATER', 0, 0.15], ['GLYCOL', 0, 1], ['INSOL', 0, 2], ['TAN', 0, 5],
];
const RAISED_CODES = RANGES.map(([code]) => code).filter((code) => UP_CODES.includes(code));
// Uniform over [min, max]: fc.double leans towards the ends of its range, which would starve the middle.
function uniform(min: number, max: number): fc.Arbitrary<number> {
  return fc.integer({ min: 0, max: 10_000 }).map((i) => min + ((max - min) * i) / 10_000);
}

// A machine's readings scatter around its own level (±20 %), so bands and trends are really crossed.
function readingsAround(bases: (number | undefined)[]): fc.Arbitrary<SamplePoint['readings']> {
  return fc.tuple(...bases.map(() => uniform(0.8, 1.2))).map((factors) => {
    const readings: SamplePoint['readings'] = {};
    bases.forEach((base, i) => {
      if (base === undefined) return;
      const code = RANGES[i]![0];
      readings[code] = { value: code === 'GLYCOL' ? Math.round(base) : base * factors[i]! };
    });
    return readings;
  });
}
const basesArb = fc.tuple(
  ...RANGES.map(([, min, max]) => fc.option(uniform(min, max), { nil: undefined, freq: 6 })),
);

const machineArb: fc.Arbitrary<MachineProfile> = fc.record({
  cooling: fc.constantFrom('air', 'oil', 'liquid', 'liquid'),
  distanceUnit: fc.constantFrom('mi', 'km', 'h'),
  maxIntervalDistance: fc.option(fc.integer({ min: 20, max: 20000 }), { nil: undefined }),
  maxIntervalDays: fc.option(fc.integer({ min: 30, max: 730 }), { nil: undefined }),
});

function buildSample(i: number, readings: SamplePoint['readings'], interval: number, product: string): SamplePoint {
  return {
    id: `p${i}`,
    takenAt: new Date(Date.UTC(2022, 0, 1) + i * 45 * 86_400_000).toISOString().slice(0, 10),
    odometer: (i + 1) * interval,
    distanceOnOil: interval,
    grade: '10W-40',
    oilProduct: product,
    newOilKv100: 14,
    readings,
  };
}

const scenarioArb = basesArb.chain((bases) =>
  fc.record({
    machine: machineArb,
    historyReadings: fc.array(readingsAround(bases), { maxLength: 12 }),
    current: readingsAround(bases),
    interval: fc.integer({ min: 10, max: 12000 }),
    product: fc.constantFrom('Valley Trail 10W-40', 'Ridge Synth 15W-50'),
  }),
);

describe('properties (fast-check)', () => {
  test('raising one reading whose concern is a rise never lowers its level', () => {
    fc.assert(
      fc.property(
        scenarioArb,
        fc.constantFrom(...RAISED_CODES),
        // The reading before: either anywhere from 0 to twice the top of its range (limits), or 0.8 to 2
        // times the machine's usual level (band edges, trends); the raise is sized the same two ways.
        fc.boolean(),
        uniform(0, 2),
        uniform(0.0001, 1),
        (s, code, nearUsual, where, raise) => {
          const history = s.historyReadings.map((r, i) => buildSample(i, r, s.interval, s.product));
          const top = RANGES.find(([c]) => c === code)![2];
          const usual = s.current[code]?.value ?? top / 2;
          const beforeValue = nearUsual ? usual * (0.8 + 0.6 * where) : where * top;
          const afterValue = beforeValue + (nearUsual ? 0.5 * usual * raise : raise * top);
          const before = buildSample(history.length, { ...s.current, [code]: { value: beforeValue } }, s.interval, s.product);
          const after = buildSample(history.length, { ...s.current, [code]: { value: afterValue } }, s.interval, s.product);
          const lb = analyseSample({ machine: s.machine, history, sample: before }).readingLevels[code] ?? 'steady';
          const la = analyseSample({ machine: s.machine, history, sample: after }).readingLevels[code] ?? 'steady';
          expect(RANK[la]).toBeGreaterThanOrEqual(RANK[lb]);
        },
      ),
      { numRuns: 1500 },
    );
  });

  test('scaling a whole history scales the baseline', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e4, max: 1e4, noNaN: true }), { minLength: 3, maxLength: 40 }),
        fc.double({ min: 0.01, max: 1000, noNaN: true }),
        (values, k) => {
          const b = computeBaseline(values);
          const scaled = computeBaseline(values.map((v) => v * k));
          // Rounding error is relative to the size of the values, not of the mean (which may cancel to near 0).
          const scale = 1e-9 * Math.max(1, ...values.map((v) => Math.abs(v * k)));
          expect(Math.abs(scaled.mean - b.mean * k)).toBeLessThanOrEqual(scale);
          expect(Math.abs(scaled.sd - b.sd * k)).toBeLessThanOrEqual(scale);
          const settings = { minSamples: 3, window: 10, watchSd: 2, actSd: 3, floorAbsolute: 0, floorFraction: 0.1 };
          const band = computeBaselineBand(values, settings);
          const scaledBand = computeBaselineBand(values.map((v) => v * k), settings);
          if (band.status === 'ready' && scaledBand.status === 'ready') {
            const tol = 1e-8 * Math.max(1, ...values.map((v) => Math.abs(v * k)));
            expect(Math.abs(scaledBand.watchAbove - band.watchAbove * k)).toBeLessThanOrEqual(tol);
            expect(Math.abs(scaledBand.actFrom - band.actFrom * k)).toBeLessThanOrEqual(tol);
          } else {
            expect(scaledBand.status).toBe(band.status);
          }
        },
      ),
      { numRuns: 300 },
    );
  });

  test("the interval call never exceeds the manufacturer's interval, in distance or in days", () => {
    fc.assert(
      fc.property(scenarioArb, (s) => {
        const history = s.historyReadings.map((r, i) => buildSample(i, r, s.interval, s.product));
        const sample = buildSample(history.length, s.current, s.interval, s.product);
        const c = makeIntervalCall({ machine: s.machine, history, sample });
        const max = s.machine.maxIntervalDistance;
        if (max !== undefined) {
          expect(c.nextIntervalDistance).toBeLessThanOrEqual(max);
          expect(c.nextSampleDue.distance - sample.odometer).toBeLessThanOrEqual(max);
        }
        expect(c.nextIntervalDistance).toBeGreaterThan(0);
        if (s.machine.maxIntervalDays !== undefined && c.nextSampleDue.date) {
          const days = (Date.parse(c.nextSampleDue.date) - Date.parse(sample.takenAt)) / 86_400_000;
          expect(days).toBeLessThanOrEqual(s.machine.maxIntervalDays);
        }
        const worst = analyseSample({ machine: s.machine, history, sample }).worst;
        if (worst === 'act') expect(c.call).toBe('shorten');
        if (c.call === 'stretch') expect(worst).toBe('steady');
      }),
      { numRuns: 300 },
    );
  });
});
