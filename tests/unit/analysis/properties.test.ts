import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { analyseSample } from '~/lib/analysis/analyse-sample';
import { computeBaseline, computeBaselineBand } from '~/lib/analysis/baseline';
import { replayHistory } from '~/lib/analysis/interval-call';
import { judgeHistory } from '~/lib/analysis/judge-history';
import { MEASURANDS, type MeasurandCode } from '~/lib/analysis/measurands';
import type { Level, MachineProfile, SamplePoint } from '~/lib/analysis/types';

const RANK: Record<Level, number> = { steady: 0, watch: 1, act: 2 };
// Measurands whose concern is a rise (wear, contaminants, fuel, water, glycol, insolubles, TAN).
const UP_CODES = MEASURANDS.filter((m) => m.concern === 'up').map((m) => m.code);

// Clustered ranges so bands, trends and limits are actually crossed: most readings present, most values small.
const RANGES: [MeasurandCode, number, number][] = [
  ['Fe', 0, 120],
  ['Al', 0, 30],
  ['Cu', 0, 30],
  ['Cr', 0, 12],
  ['Pb', 0, 30],
  ['Sn', 0, 12],
  ['Si', 0, 30],
  ['Na', 0, 80],
  ['K', 0, 30],
  ['B', 0, 30],
  ['Zn', 500, 1500],
  ['P', 500, 1300],
  ['KV100', 8, 18],
  ['FUEL', 0, 7],
  ['WATER', 0, 0.15],
  ['GLYCOL', 0, 1],
  ['INSOL', 0, 2],
  ['TAN', 0, 5],
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
const basesArb = fc.tuple(...RANGES.map(([, min, max]) => fc.option(uniform(min, max), { nil: undefined, freq: 6 })));

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
          const before = buildSample(
            history.length,
            { ...s.current, [code]: { value: beforeValue } },
            s.interval,
            s.product,
          );
          const after = buildSample(
            history.length,
            { ...s.current, [code]: { value: afterValue } },
            s.interval,
            s.product,
          );
          const lb = analyseSample({ machine: s.machine, history, sample: before }).readingLevels[code] ?? 'steady';
          const la = analyseSample({ machine: s.machine, history, sample: after }).readingLevels[code] ?? 'steady';
          expect(RANK[la]).toBeGreaterThanOrEqual(RANK[lb]);
        },
      ),
      { numRuns: 1500 },
    );
  }, 60_000);

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
          const settings = {
            minSamples: 3,
            window: 10,
            watchAlpha: 0.01,
            actAlpha: 0.0005,
            floorAt: (level: number) => 0.1 * level,
          };
          const band = computeBaselineBand(values, settings);
          const scaledBand = computeBaselineBand(
            values.map((v) => v * k),
            settings,
          );
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
  }, 60_000);

  test("the interval call never exceeds the manufacturer's interval, in distance or in days", () => {
    fc.assert(
      fc.property(scenarioArb, (s) => {
        const history = s.historyReadings.map((r, i) => buildSample(i, r, s.interval, s.product));
        const sample = buildSample(history.length, s.current, s.interval, s.product);
        const last = replayHistory({ machine: s.machine, samples: [...history, sample] }).at(-1)!;
        const c = last.call;
        const max = s.machine.maxIntervalDistance;
        if (max !== undefined) {
          expect(c.nextIntervalDistance!).toBeLessThanOrEqual(max);
          expect(c.nextSampleDue.distance! - sample.odometer).toBeLessThanOrEqual(max);
        }
        expect(c.nextIntervalDistance).toBeGreaterThan(0);
        if (s.machine.maxIntervalDays !== undefined && c.nextSampleDue.date) {
          const days = (Date.parse(c.nextSampleDue.date) - Date.parse(sample.takenAt)) / 86_400_000;
          expect(days).toBeLessThanOrEqual(s.machine.maxIntervalDays);
        }
        if (last.analysis.worst === 'act') expect(['shorten', 'fix-first']).toContain(c.call);
        if (c.call === 'stretch') expect(last.analysis.worst).toBe('steady');
      }),
      { numRuns: 300 },
    );
  }, 60_000);

  // Whole histories with varying intervals and slow labs, judged as production judges them.
  const historyArb = basesArb.chain((bases) =>
    fc.record({
      machine: machineArb,
      readings: fc.array(readingsAround(bases), { minLength: 1, maxLength: 14 }),
      intervals: fc.array(fc.integer({ min: 10, max: 12000 }), { minLength: 14, maxLength: 14 }),
      labDays: fc.array(fc.integer({ min: -5, max: 120 }), { minLength: 14, maxLength: 14 }),
      product: fc.constantFrom('Valley Trail 10W-40', 'Ridge Synth 15W-50'),
    }),
  );
  function buildHistory(h: {
    readings: SamplePoint['readings'][];
    intervals: number[];
    labDays: number[];
    product: string;
  }): SamplePoint[] {
    let odometer = 0;
    return h.readings.map((readings, i) => {
      odometer += h.intervals[i]!;
      const takenAt = new Date(Date.UTC(2022, 0, 1) + i * 45 * 86_400_000).toISOString().slice(0, 10);
      const resultsOn = new Date(Date.parse(takenAt) + h.labDays[i]! * 86_400_000).toISOString().slice(0, 10);
      return { ...buildSample(i, readings, h.intervals[i]!, h.product), odometer, takenAt, resultsOn };
    });
  }

  test("a stretch never goes beyond the manufacturer's interval", () => {
    fc.assert(
      fc.property(historyArb, (h) => {
        for (const r of replayHistory({ machine: h.machine, samples: buildHistory(h) })) {
          if (r.call.call !== 'stretch') continue;
          if (h.machine.maxIntervalDistance !== undefined)
            expect(r.call.nextIntervalDistance!).toBeLessThanOrEqual(h.machine.maxIntervalDistance);
          expect(r.call.nextIntervalDistance!).toBeLessThanOrEqual(r.call.basis.ceiling!);
        }
      }),
      { numRuns: 200 },
    );
  }, 60_000);

  test('a hold never shortens the regular interval', () => {
    fc.assert(
      fc.property(historyArb, (h) => {
        for (const r of replayHistory({ machine: h.machine, samples: buildHistory(h) })) {
          if (r.call.call !== 'hold' || r.call.basis.regularInterval === null) continue;
          expect(r.call.nextIntervalDistance!).toBeGreaterThanOrEqual(r.call.basis.regularInterval);
        }
      }),
      { numRuns: 200 },
    );
  }, 60_000);

  test('"next sample by" is never before the results arrived (nor before the draw)', () => {
    fc.assert(
      fc.property(historyArb, (h) => {
        const samples = buildHistory(h);
        replayHistory({ machine: h.machine, samples }).forEach((r, i) => {
          const due = r.call.nextSampleDue.date;
          if (!due) return;
          expect(due >= samples[i]!.takenAt).toBe(true);
          expect(due >= samples[i]!.resultsOn!).toBe(true);
        });
      }),
      { numRuns: 200 },
    );
  }, 60_000);

  test('judgeHistory answers what replayHistory stores, sample by sample', () => {
    fc.assert(
      fc.property(historyArb, (h) => {
        const samples = buildHistory(h);
        const judged = judgeHistory({ machine: h.machine, samples });
        const replayed = replayHistory({ machine: h.machine, samples });
        expect(judged.map((j) => [j.sampleId, j.call, j.worst, j.nextIntervalDistance, j.findings.length])).toEqual(
          replayed.map((r) => [
            r.sampleId,
            r.call.call,
            r.analysis.worst,
            r.call.nextIntervalDistance,
            r.analysis.findings.length,
          ]),
        );
      }),
      { numRuns: 50 },
    );
  }, 60_000);
});
