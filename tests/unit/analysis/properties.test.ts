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
const SOME_CODES: MeasurandCode[] = ['Fe', 'Al', 'Cu', 'Si', 'Na', 'K', 'B', 'Zn', 'P', 'KV100', 'FUEL', 'WATER'];

const readingsArb = fc.dictionary(
  fc.constantFrom(...SOME_CODES, ...UP_CODES),
  fc.record({ value: fc.double({ min: 0, max: 300, noNaN: true }) }),
  { maxKeys: 10 },
) as fc.Arbitrary<SamplePoint['readings']>;

const machineArb: fc.Arbitrary<MachineProfile> = fc.record({
  cooling: fc.constantFrom('air', 'oil', 'liquid'),
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

const scenarioArb = fc.record({
  machine: machineArb,
  historyReadings: fc.array(readingsArb, { maxLength: 12 }),
  current: readingsArb,
  interval: fc.integer({ min: 10, max: 12000 }),
  product: fc.constantFrom('Valley Trail 10W-40', 'Ridge Synth 15W-50'),
});

describe('properties (fast-check)', () => {
  test('raising one reading whose concern is a rise never lowers its level', () => {
    fc.assert(
      fc.property(scenarioArb, fc.constantFrom(...UP_CODES), fc.double({ min: 0.001, max: 500, noNaN: true }), (s, code, delta) => {
        const history = s.historyReadings.map((r, i) => buildSample(i, r, s.interval, s.product));
        const base = s.current[code]?.value ?? 0;
        const before = buildSample(history.length, { ...s.current, [code]: { value: base } }, s.interval, s.product);
        const after = buildSample(history.length, { ...s.current, [code]: { value: base + delta } }, s.interval, s.product);
        const lb = analyseSample({ machine: s.machine, history, sample: before }).readingLevels[code] ?? 'steady';
        const la = analyseSample({ machine: s.machine, history, sample: after }).readingLevels[code] ?? 'steady';
        expect(RANK[la]).toBeGreaterThanOrEqual(RANK[lb]);
      }),
      { numRuns: 400 },
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
