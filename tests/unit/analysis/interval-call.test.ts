import { describe, expect, test } from 'vitest';
import { makeIntervalCall } from '~/lib/analysis/interval-call';
import type { MeasurandCode } from '~/lib/analysis/measurands';
import type { MachineProfile } from '~/lib/analysis/types';
import { AIR_SINGLE, makeHistory, makeSample } from './sample-builder';

const steadySet: Partial<Record<MeasurandCode, number>> = { Fe: 20, Al: 4, Cu: 3, Si: 6 };
const steadyHistory = makeHistory([steadySet, steadySet, steadySet, steadySet]);

function callFor(machine: MachineProfile, history = steadyHistory, readings = steadySet, interval = 3000) {
  return makeIntervalCall({ machine, history, sample: makeSample(history.length, readings, { distanceOnOil: interval }) });
}

describe('makeIntervalCall', () => {
  test('an act finding shortens to half and asks for a sample soon (after a quarter, within 30 days)', () => {
    const c = callFor(AIR_SINGLE, steadyHistory, { ...steadySet, Fe: 120 });
    expect(c.call).toBe('shorten');
    expect(c.nextIntervalDistance).toBe(1500);
    // Sample 4 sits at odometer 15000; 3000 × 0.25 = 750, rounded down to 700.
    expect(c.nextSampleDue.distance).toBe(15000 + 700);
    // Pace 12000 km over 240 days = 50 km a day, so 700 km is 14 days after 2023-10-27.
    expect(c.nextSampleDue.date).toBe('2023-11-10');
    expect(c.basis.ruleIds).toContain('fixed-limit');
    expect(c.reasons[0]).toMatch(/act finding/);
  });

  test('a climbing trend at watch shortens to 75 %', () => {
    const history = makeHistory([{ Al: 10 }, { Al: 12 }, { Al: 14 }, { Al: 16 }]);
    const c = callFor(AIR_SINGLE, history, { Al: 18 });
    expect(c.basis.worst).toBe('watch');
    expect(c.call).toBe('shorten');
    expect(c.nextIntervalDistance).toBe(2200);
  });

  test.each([
    // [distance run on this oil, manufacturer maximum, expected call]
    [2950, 6000, 'hold'], // not a multiple of the 100 rounding step, well inside the maximum: still hold
    [4820, 10000, 'hold'],
    [6400, 6000, 'shorten'], // beyond the maximum: bring it back within it
  ] as const)('a steady-but-building run of %d against a maximum of %d gives %s', (run, max, expected) => {
    const history = makeHistory([steadySet]);
    const c = makeIntervalCall({ machine: { ...AIR_SINGLE, maxIntervalDistance: max }, history, sample: makeSample(1, steadySet, { distanceOnOil: run }) });
    expect(c.call).toBe(expected);
    expect(c.nextIntervalDistance).toBeLessThanOrEqual(max);
    if (expected === 'shorten') expect(c.reasons.at(-1)).toMatch(new RegExp(`ran ${run} km, beyond the longest allowed ${max} km`));
  });

  test('other watch findings hold', () => {
    const c = callFor(AIR_SINGLE, steadyHistory, { ...steadySet, FUEL: 3 });
    expect(c.call).toBe('hold');
    expect(c.nextIntervalDistance).toBe(3000);
    expect(c.nextSampleDue.distance).toBe(15000 + 3000);
  });

  test('all steady while the baseline is building holds', () => {
    const c = callFor(AIR_SINGLE, steadyHistory.slice(0, 2));
    expect(c.call).toBe('hold');
    expect(c.reasons[0]).toMatch(/building/);
  });

  test.each([
    { max: 6000, call: 'stretch', next: 3600 },
    { max: 3300, call: 'stretch', next: 3300 },
    { max: 3000, call: 'hold', next: 3000 },
    { max: 2500, call: 'shorten', next: 2500 },
  ])('steady run with manufacturer maximum $max: $call to $next', ({ max, call, next }) => {
    const c = callFor({ ...AIR_SINGLE, maxIntervalDistance: max });
    expect(c.call).toBe(call);
    expect(c.nextIntervalDistance).toBe(next);
    expect(c.nextIntervalDistance).toBeLessThanOrEqual(max);
  });

  test('without a manufacturer maximum it never goes beyond the longest interval already run', () => {
    const machine: MachineProfile = { cooling: 'air', distanceUnit: 'km' };
    const c = callFor(machine);
    expect(c.call).toBe('hold');
    expect(c.basis.ceilingSource).toBe('machine-history');
    expect(c.nextIntervalDistance).toBe(3000);
  });

  test('a steady sample after a non-steady one holds rather than stretching', () => {
    const history = makeHistory([steadySet, steadySet, steadySet, { ...steadySet, FUEL: 3 }]);
    expect(callFor(AIR_SINGLE, history).call).toBe('hold');
  });

  test('levels the caller already knows for earlier samples are used instead of re-analysing them', () => {
    const sample = makeSample(4, steadySet);
    const machine = AIR_SINGLE;
    expect(makeIntervalCall({ machine, history: steadyHistory, sample, previousWorst: ['steady', 'steady'] }).call).toBe('stretch');
    expect(makeIntervalCall({ machine, history: steadyHistory, sample, previousWorst: ['watch', 'steady'] }).call).toBe('hold');
  });

  test('hour-meter machines round to 5 h', () => {
    const machine: MachineProfile = { cooling: 'liquid', distanceUnit: 'h', maxIntervalDistance: 100 };
    const history = makeHistory([steadySet, steadySet, steadySet, steadySet], {}, 37);
    const c = makeIntervalCall({ machine, history, sample: makeSample(4, steadySet, {}, 37) });
    expect(c.call).toBe('stretch');
    expect(c.nextIntervalDistance).toBe(40); // 37 × 1.2 = 44.4, rounded down to 40
  });

  test('the calendar limit caps the due date', () => {
    const machine: MachineProfile = { ...AIR_SINGLE, maxIntervalDays: 30 };
    const c = callFor(machine);
    // Sample 4 is dated 2023-10-27; at 50 km a day 3000 km is 60 days, so the 30-day limit wins.
    expect(c.nextSampleDue.date).toBe('2023-11-26');
    expect(c.reasons.join(' ')).toMatch(/calendar limit/);
  });

  test('refuses a call with no interval to go on', () => {
    const machine: MachineProfile = { cooling: 'air', distanceUnit: 'km' };
    expect(() => makeIntervalCall({ machine, history: [], sample: makeSample(0, steadySet, { distanceOnOil: 0 }) })).toThrow(RangeError);
  });
});
