import { describe, expect, test } from 'vitest';
import {
  INVITATION_PENDING_DAYS,
  SHIPPED_OVERDUE_DAYS,
  addDays,
  buildSampleDueKey,
  checkInvitationPending,
  checkShippedOverdue,
  deriveSampleTarget,
} from '~/lib/reminders/reminder-rules';

// The 21 and 7 days are product rules, no published source.
describe('reminder thresholds', () => {
  test("are the issue's 21 and 7 days", () => {
    expect(SHIPPED_OVERDUE_DAYS).toBe(21);
    expect(INVITATION_PENDING_DAYS).toBe(7);
  });

  test.each([
    ['2026-03-01', '2026-03-21', false, 20],
    ['2026-03-01', '2026-03-22', true, 21],
    ['2026-03-01', '2026-04-30', true, 60],
    // Across a month end and a leap day (2028 is a leap year).
    ['2028-02-10', '2028-03-02', true, 21],
    ['2028-02-10', '2028-03-01', false, 20],
  ])('shipped %s, today %s: overdue %s after %i days', (shipped, today, overdue, days) => {
    expect(checkShippedOverdue(shipped, today, SHIPPED_OVERDUE_DAYS)).toEqual({ overdue, daysWaiting: days });
  });

  const made = new Date('2026-03-01T10:00:00Z');
  test.each([
    ['6 days 23 hours', '2026-03-08T09:59:59Z', false, 6],
    ['exactly 7 days', '2026-03-08T10:00:00Z', true, 7],
    ['30 days', '2026-03-31T10:00:00Z', true, 30],
    ['31 days (beyond the horizon)', '2026-04-01T10:00:00Z', false, 31],
  ])('an invitation after %s: pending %s', (_name, now, pending, days) => {
    expect(checkInvitationPending(made, new Date(now), INVITATION_PENDING_DAYS, 30)).toEqual({
      pending,
      daysWaiting: days,
    });
  });
});

describe('deriveSampleTarget', () => {
  const none = {
    nextSampleOn: null,
    nextSampleOdometer: null,
    lastChangeOn: null,
    lastChangeOdometer: null,
    maxIntervalDays: null,
    maxIntervalDistance: null,
  };
  test.each([
    [
      'the interval call wins',
      {
        ...none,
        nextSampleOn: '2026-06-01',
        nextSampleOdometer: 4000,
        lastChangeOn: '2026-01-01',
        lastChangeOdometer: 1000,
        maxIntervalDays: 365,
        maxIntervalDistance: 6000,
      },
      { nextSampleOn: '2026-06-01', nextSampleOdometer: 4000, source: 'call' },
    ],
    [
      'a call with only an odometer',
      { ...none, nextSampleOdometer: 4000 },
      { nextSampleOn: null, nextSampleOdometer: 4000, source: 'call' },
    ],
    [
      "the manual's interval from the last oil change",
      {
        ...none,
        lastChangeOn: '2026-01-01',
        lastChangeOdometer: 1000,
        maxIntervalDays: 180,
        maxIntervalDistance: 5000,
      },
      { nextSampleOn: '2026-06-30', nextSampleOdometer: 6000, source: 'manufacturer' },
    ],
    [
      'only a distance interval',
      { ...none, lastChangeOn: '2026-01-01', lastChangeOdometer: 1000, maxIntervalDistance: 5000 },
      { nextSampleOn: null, nextSampleOdometer: 6000, source: 'manufacturer' },
    ],
    ['nothing to go on', none, null],
  ])('%s', (_name, input, expected) => {
    expect(deriveSampleTarget(input)).toEqual(expected);
  });
});

describe('keys', () => {
  test.each([
    [{ nextSampleOn: '2026-06-01', nextSampleOdometer: null }, 'reminder:sample-due:m1:2026-06-01:u1'],
    [{ nextSampleOn: null, nextSampleOdometer: 4000.4 }, 'reminder:sample-due:m1:4000u:u1'],
    [{ nextSampleOn: '2026-06-01', nextSampleOdometer: 4000 }, 'reminder:sample-due:m1:2026-06-01+4000u:u1'],
  ])('sample due %j → %s', (target, key) => {
    expect(buildSampleDueKey('m1', target, 'u1')).toBe(key);
  });

  test.each([
    ['2026-01-31', 1, '2026-02-01'],
    ['2028-02-28', 1, '2028-02-29'],
    ['2026-03-22', -21, '2026-03-01'],
  ])('addDays(%s, %i) = %s', (d, n, out) => {
    expect(addDays(d, n)).toBe(out);
  });
});
