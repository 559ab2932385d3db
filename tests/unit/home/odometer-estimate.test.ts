import { describe, expect, test } from 'vitest';
import {
  countDaysBetween,
  drainCardOdometerPrefill,
  estimateCurrentOdometer,
  findSampleDue,
} from '~/lib/home/odometer-estimate';

// Invented riding histories; expected values worked by hand (least-squares slope = Sxy / Sxx).

describe('estimateCurrentOdometer', () => {
  test.each([
    ['no history', [], '2026-06-01', null],
    // One reading: nothing to take a pace from, the last reading stands.
    [
      'one reading',
      [{ date: '2026-01-01', odometer: 5000 }],
      '2026-06-01',
      { odometer: 5000, pacePerDay: 0, basis: 'last-known' },
    ],
    // 10 km/day for 10 days, then 20 days since: 1100 + 200 = 1300.
    [
      'steady pace',
      [
        { date: '2026-01-01', odometer: 1000 },
        { date: '2026-01-11', odometer: 1100 },
      ],
      '2026-01-31',
      { odometer: 1300, pacePerDay: 10, basis: 'pace' },
    ],
    // Three points (days 0, 10, 20; km 0, 100, 400): slope = Sxy/Sxx = (−10·−166.7 + 0 + 10·233.3)/200 = 20 km/day; 10 days on: 400 + 200.
    [
      'least squares over three',
      [
        { date: '2026-01-01', odometer: 0 },
        { date: '2026-01-11', odometer: 100 },
        { date: '2026-01-21', odometer: 400 },
      ],
      '2026-01-31',
      { odometer: 600, pacePerDay: 20, basis: 'pace' },
    ],
    // A reading older than the look-back is left out: only the last two count (5 km/day), 10 days on.
    [
      'old readings dropped',
      [
        { date: '2020-01-01', odometer: 0 },
        { date: '2026-01-01', odometer: 9000 },
        { date: '2026-01-21', odometer: 9100 },
      ],
      '2026-01-31',
      { odometer: 9150, pacePerDay: 5, basis: 'pace' },
    ],
    // Two readings on one day: no pace.
    [
      'same day',
      [
        { date: '2026-01-01', odometer: 100 },
        { date: '2026-01-01', odometer: 120 },
      ],
      '2026-02-01',
      { odometer: 120, pacePerDay: 0, basis: 'last-known' },
    ],
    // A meter that reads lower later (typo, swapped clock): pace floored at 0, never below the last reading.
    [
      'meter ran back',
      [
        { date: '2026-01-01', odometer: 500 },
        { date: '2026-01-11', odometer: 400 },
      ],
      '2026-02-01',
      { odometer: 400, pacePerDay: 0, basis: 'last-known' },
    ],
    // today before the last reading (clock skew): no negative extrapolation.
    [
      'today before last',
      [
        { date: '2026-01-01', odometer: 0 },
        { date: '2026-01-11', odometer: 100 },
      ],
      '2026-01-05',
      { odometer: 100, pacePerDay: 10, basis: 'pace' },
    ],
    // Unsorted input and ISO timestamps are fine.
    [
      'unsorted',
      [
        { date: '2026-01-11T08:00:00Z', odometer: 1100 },
        { date: '2026-01-01', odometer: 1000 },
      ],
      '2026-01-21',
      { odometer: 1200, pacePerDay: 10, basis: 'pace' },
    ],
  ])('%s', (_name, points, today, expected) => {
    const got = estimateCurrentOdometer(points, today);
    if (expected === null) return expect(got).toBeNull();
    expect(got).not.toBeNull();
    expect(got!.odometer).toBeCloseTo(expected.odometer, 9);
    expect(got!.pacePerDay).toBeCloseTo(expected.pacePerDay, 9);
    expect(got!.basis).toBe(expected.basis);
  });
});

describe('findSampleDue', () => {
  const estimate = {
    odometer: 10_000,
    pacePerDay: 20,
    basis: 'pace' as const,
    lastDate: '2026-01-01',
    lastOdometer: 9000,
  };
  test.each([
    ['nothing to go by', {}, false, [], null, null],
    ['date passed', { nextSampleOn: '2026-03-01' }, true, ['date'], null, -31],
    ['date today counts as due', { nextSampleOn: '2026-04-01' }, true, ['date'], null, 0],
    ['date ahead', { nextSampleOn: '2026-04-11' }, false, [], null, 10],
    ['odometer passed by estimate', { nextSampleOdometer: 9800 }, true, ['odometer'], -200, null],
    ['odometer ahead', { nextSampleOdometer: 10_500 }, false, [], 500, null],
    ['both', { nextSampleOn: '2026-03-01', nextSampleOdometer: 9000 }, true, ['date', 'odometer'], -1000, -31],
  ])('%s', (_n, call, due, reasons, remaining, daysLeft) => {
    const got = findSampleDue({ today: '2026-04-01', estimate, ...call });
    expect(got).toEqual({ due, reasons, remaining, daysLeft });
  });

  test('an odometer target without an estimate is not due', () => {
    expect(findSampleDue({ today: '2026-04-01', estimate: null, nextSampleOdometer: 1 }).due).toBe(false);
  });

  test.each([
    ['2026-01-01', '2026-01-22', 21],
    ['2024-02-28', '2024-03-01', 2],
    ['2026-01-02', '2026-01-01', -1],
  ])('days from %s to %s: %i', (a, b, n) => {
    // 2024 is a leap year (Gregorian calendar rule), hence 2 days across the end of February.
    expect(countDaysBetween(a, b)).toBe(n);
  });
});

describe('drainCardOdometerPrefill (never the reading of an old oil change)', () => {
  const est = (odometer: number, basis: 'pace' | 'last-known') => ({
    odometer,
    pacePerDay: basis === 'pace' ? 20 : 0,
    basis,
    lastDate: '2026-11-01',
    lastOdometer: 12_000,
  });
  test.each([
    ['no history', null, null, null],
    ['only the oil change, no pace', est(12_000, 'last-known'), 12_000, null],
    ['a pace past the change', est(12_620.4, 'pace'), 12_000, 12_620],
    ['a pace that rounds onto the change', est(12_000.3, 'pace'), 12_000, null],
    ['a pace below a change logged later', est(11_800, 'pace'), 12_000, null],
    ['a pace and no oil change yet', est(4_321.6, 'pace'), null, 4_322],
  ])('%s', (_name, estimate, change, expected) => {
    expect(drainCardOdometerPrefill(estimate, change, '2026-12-01')).toBe(expected);
  });
  test.each([
    ['2027-01-30', 12_620],
    ['2027-01-31', null],
  ])('the last reading 1 Nov 2026 is recent riding on %s: %s', (today, expected) => {
    expect(drainCardOdometerPrefill(est(12_620, 'pace'), 12_000, today)).toBe(expected);
  });
});
