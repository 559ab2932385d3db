import { describe, expect, test } from 'vitest';
import { findRegularInterval, makeIntervalCall } from '~/lib/analysis/interval-call';
import { judgeHistory } from '~/lib/analysis/judge-history';
import type { MeasurandCode } from '~/lib/analysis/measurands';
import type { MachineProfile } from '~/lib/analysis/types';
import { AIR_SINGLE, LIQUID_TWIN, makeHistory, makeSample } from './sample-builder';

// A steady sample that reports what a stretch needs: wear metals, viscosity, fuel and water.
const steadySet: Partial<Record<MeasurandCode, number>> = {
  Fe: 20,
  Al: 4,
  Cu: 3,
  Si: 6,
  KV100: 13.5,
  FUEL: 0.5,
  WATER: 0.02,
};
const steadyHistory = makeHistory(Array.from({ length: 6 }, () => steadySet));

function callFor(machine: MachineProfile, history = steadyHistory, readings = steadySet, extra = {}) {
  return makeIntervalCall({ machine, history, sample: makeSample(history.length, readings, extra) });
}

describe('makeIntervalCall', () => {
  test('an act finding shortens the regular interval to half and asks for a sample soon (after a quarter, within 30 days)', () => {
    const c = callFor(AIR_SINGLE, steadyHistory, { ...steadySet, Fe: 120 });
    expect(c.call).toBe('shorten');
    expect(c.basis.regularInterval).toBe(3000);
    expect(c.nextIntervalDistance).toBe(1500);
    // Sample 6 sits at odometer 21000; 3000 × 0.25 = 750, rounded down to 700.
    expect(c.nextSampleDue.distance).toBe(21000 + 700);
    // Pace 18000 km over 360 days = 50 km a day, so 700 km is 14 days after the draw on 2024-02-24.
    expect(c.nextSampleDue.date).toBe('2024-03-09');
    expect(c.basis.ruleIds).toContain('fixed-limit');
    expect(c.reasons[0]).toMatch(/act finding/);
  });

  test('a climbing trend at watch holds and asks for the next sample at the same interval', () => {
    const history = makeHistory([10, 12, 14, 16].map((al) => ({ ...steadySet, Al: al })));
    const c = callFor(AIR_SINGLE, history, { ...steadySet, Al: 18 });
    expect(c.basis.worst).toBe('watch');
    expect(c.basis.ruleIds).toContain('climbing-trend');
    expect(c.call).toBe('hold');
    expect(c.nextIntervalDistance).toBe(3000);
    expect(c.nextSampleDue.distance).toBe(15000 + 3000);
    expect(c.reasons[0]).toMatch(/same interval/);
  });

  test.each([
    ['coolant markers on the liquid-cooled twin', LIQUID_TWIN, { Na: 80, K: 30 }],
    ['glycol', LIQUID_TWIN, { GLYCOL: 1 }],
    ['dirt past the air filter', AIR_SINGLE, { Si: 48, Al: 12 }],
  ] as const)('%s: fix first, interval unchanged, resample soon', (_name, machine, readings) => {
    const c = callFor(machine, steadyHistory, { ...steadySet, ...readings });
    expect(c.call).toBe('fix-first');
    expect(c.nextIntervalDistance).toBe(3000);
    expect(c.nextSampleDue.distance).toBe(21000 + 700);
    expect(c.reasons[0]).toMatch(/fix the cause first/);
  });

  test('the interval is the regular one, never the oil age of a mid-interval sample', () => {
    // A third of the way into the oil, with a third of the usual ppm (the same wear rate).
    const third = { ...steadySet, Fe: 7, Al: 1.3, Cu: 1, Si: 2 };
    const c = callFor(AIR_SINGLE, steadyHistory, third, { distanceOnOil: 1000, odometer: 19000 });
    expect(c.basis.worst).toBe('steady');
    expect(c.basis.regularInterval).toBe(3000);
    expect(c.nextIntervalDistance).toBeGreaterThanOrEqual(3000);
  });

  test('the regular interval is the median of the last three completed oil changes', () => {
    const samples = [2000, 3000, 4000, 3500].map((d, i, all) =>
      makeSample(i, steadySet, { distanceOnOil: d, odometer: all.slice(0, i + 1).reduce((a, b) => a + b, 0) }),
    );
    // Oil starts at 0, 2000, 5000, 9000: completed oil changes 2000, 3000, 4000 → median of the last three 3000.
    expect(findRegularInterval(AIR_SINGLE, samples.slice(0, -1), samples.at(-1)!)).toEqual({
      value: 3000,
      source: 'completed-oil-changes',
    });
  });

  test('other watch findings hold', () => {
    const c = callFor(AIR_SINGLE, steadyHistory, { ...steadySet, FUEL: 3 });
    expect(c.call).toBe('hold');
    expect(c.nextIntervalDistance).toBe(3000);
  });

  test('all steady while the baseline is building holds, and says why', () => {
    const c = callFor(AIR_SINGLE, steadyHistory.slice(0, 2));
    expect(c.call).toBe('hold');
    expect(c.reasons[0]).toMatch(/baselines are still building/);
  });

  test.each([
    { max: 6000, call: 'stretch', next: 3600 },
    { max: 3300, call: 'stretch', next: 3300 },
    { max: 3000, call: 'hold', next: 3000 },
    { max: 2500, call: 'shorten', next: 2500 },
  ])('three steady samples on ready bands with manufacturer maximum $max: $call to $next', ({ max, call, next }) => {
    const c = callFor({ ...AIR_SINGLE, maxIntervalDistance: max });
    expect(c.call).toBe(call);
    expect(c.nextIntervalDistance).toBe(next);
    expect(c.nextIntervalDistance).toBeLessThanOrEqual(max);
  });

  test.each([
    ['iron alone', { Fe: 20 }, /no viscosity/],
    ['zinc alone', { Zn: 1000 }, /baselines are still building/],
    ['no water figure', { Fe: 20, Al: 4, KV100: 13.5, FUEL: 0.5 }, /no water figure/],
    ['no fuel or flash point', { Fe: 20, Al: 4, KV100: 13.5, WATER: 0.02 }, /no fuel figure or flash point/],
  ] as const)('thin data earns no stretch: %s', (_name, readings, why) => {
    const history = makeHistory(Array.from({ length: 6 }, () => readings));
    const c = callFor(AIR_SINGLE, history, readings);
    expect(c.call).toBe('hold');
    expect(c.reasons.join(' ')).toMatch(why);
  });

  test.each([
    ['TBN well below new', { TBN: 3 }, /TBN is down/],
    ['TAN up', { TAN: 4.5 }, /TAN is up/],
  ] as const)('%s blocks a stretch', (_name, worn, why) => {
    const newOil = { source: 'data-sheet' as const, readings: { TBN: { value: 8 }, TAN: { value: 2 } } };
    const history = makeHistory(
      Array.from({ length: 6 }, () => ({ ...steadySet, TBN: 7, TAN: 2.2 })),
      { newOil },
    );
    const c = makeIntervalCall({
      machine: AIR_SINGLE,
      history,
      sample: makeSample(6, { ...steadySet, TBN: 7, TAN: 2.2, ...worn }, { newOil }),
    });
    expect(c.call).toBe('hold');
    expect(c.reasons.join(' ')).toMatch(why);
  });

  test('without a manufacturer maximum it never goes beyond the longest interval already run', () => {
    const machine: MachineProfile = { cooling: 'air', distanceUnit: 'km' };
    const c = callFor(machine);
    expect(c.call).toBe('hold');
    expect(c.basis.ceilingSource).toBe('machine-history');
    expect(c.nextIntervalDistance).toBe(3000);
  });

  test('a steady sample after a non-steady one holds rather than stretching', () => {
    const history = makeHistory([steadySet, steadySet, steadySet, steadySet, steadySet, { ...steadySet, FUEL: 3 }]);
    expect(callFor(AIR_SINGLE, history).call).toBe('hold');
  });

  test('no stretch right after a shorten until a sample at the shortened interval confirms it', () => {
    // Sample 5 acts on iron (shorten to 1,500); the rider keeps running 3,000: steady, but no stretch.
    const sets = [
      ...Array.from({ length: 5 }, () => steadySet),
      { ...steadySet, Fe: 120 },
      steadySet,
      steadySet,
      steadySet,
    ];
    const judged = judgeHistory({ machine: AIR_SINGLE, samples: makeHistory(sets) });
    expect(judged[5]!.call).toBe('shorten');
    expect(judged.slice(6).map((j) => j.call)).toEqual(['hold', 'hold', 'hold']);
  });

  test('hour-meter machines round to 5 h', () => {
    const machine: MachineProfile = { cooling: 'liquid', distanceUnit: 'h', maxIntervalDistance: 100 };
    const history = makeHistory(
      Array.from({ length: 6 }, () => steadySet),
      {},
      37,
    );
    const c = makeIntervalCall({ machine, history, sample: makeSample(6, steadySet, {}, 37) });
    expect(c.call).toBe('stretch');
    expect(c.nextIntervalDistance).toBe(40); // 37 × 1.2 = 44.4, rounded down to 40
  });

  test('the calendar limit caps the due date', () => {
    const machine: MachineProfile = { ...AIR_SINGLE, maxIntervalDays: 30 };
    const c = callFor(machine, steadyHistory.slice(0, 4));
    // Sample 4 is dated 2023-10-27; at 50 km a day 3000 km is 60 days, so the 30-day limit wins.
    expect(c.nextSampleDue.date).toBe('2023-11-26');
    expect(c.reasons.join(' ')).toMatch(/calendar limit/);
  });

  test('"next sample by" counts from the day the results arrived when the lab was slow', () => {
    const c = callFor(AIR_SINGLE, steadyHistory, { ...steadySet, Fe: 120 }, { resultsOn: '2024-04-20' });
    // 14 days after the results, not after the draw (2024-02-24), so never already past.
    expect(c.nextSampleDue.date).toBe('2024-05-04');
    // Results that came back on the day still count from the draw.
    expect(
      callFor(AIR_SINGLE, steadyHistory, { ...steadySet, Fe: 120 }, { resultsOn: '2024-02-24' }).nextSampleDue.date,
    ).toBe('2024-03-09');
  });

  test('with no interval to go on it still answers, with no interval and a reason', () => {
    const machine: MachineProfile = { cooling: 'air', distanceUnit: 'km' };
    const c = makeIntervalCall({
      machine,
      history: [],
      sample: makeSample(0, steadySet, { distanceOnOil: Number.NaN }),
    });
    expect(c.call).toBe('hold');
    expect(c.nextIntervalDistance).toBeNull();
    expect(c.reasons.join(' ')).toMatch(/cannot be set yet/);
  });
});
