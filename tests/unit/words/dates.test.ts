import { describe, expect, test } from 'vitest';
import { formatDay, formatMoment, formatMomentDay, isTimeZone, timeZoneChoices } from '~/lib/words/dates';

// Offsets and change-over instants from the IANA tz database rules, from memory: the UK moves from GMT to BST at
// 01:00 UTC on the last Sunday of March (2026-03-29); the US eastern zone moves from EDT (UTC-4) back to EST (UTC-5)
// at 06:00 UTC on the first Sunday of November (2026-11-01); India has no daylight saving (UTC+5:30).
describe('formatMoment', () => {
  test.each([
    ['2026-12-02T14:05:00Z', 'UTC', '2 Dec 2026, 14:05'],
    ['2026-12-02T14:05:59Z', 'UTC', '2 Dec 2026, 14:05'],
    ['2026-03-29T00:30:00Z', 'Europe/London', '29 Mar 2026, 00:30'],
    ['2026-03-29T00:59:00Z', 'Europe/London', '29 Mar 2026, 00:59'],
    ['2026-03-29T01:00:00Z', 'Europe/London', '29 Mar 2026, 02:00'],
    ['2026-03-29T01:30:00Z', 'Europe/London', '29 Mar 2026, 02:30'],
    ['2026-11-01T05:30:00Z', 'America/New_York', '1 Nov 2026, 01:30'],
    ['2026-11-01T06:30:00Z', 'America/New_York', '1 Nov 2026, 01:30'],
    ['2026-11-01T03:59:00Z', 'America/New_York', '31 Oct 2026, 23:59'],
    ['2026-11-01T05:00:00Z', 'America/New_York', '1 Nov 2026, 01:00'],
    ['2026-12-31T23:00:00Z', 'Asia/Kolkata', '1 Jan 2027, 04:30'],
    ['2026-09-07T00:00:00Z', 'UTC', '7 Sep 2026, 00:00'],
    ['2026-12-02T14:05:00Z', null, '2 Dec 2026, 14:05'],
    ['2026-12-02T14:05:00Z', 'Mars/Olympus', '2 Dec 2026, 14:05'],
  ])('%s in %s → %s', (iso, zone, expected) => {
    expect(formatMoment(new Date(iso), zone)).toBe(expected);
  });
  test('an invalid date gives no text', () => expect(formatMoment(new Date('nonsense'), 'UTC')).toBe(''));
});

describe('formatMomentDay', () => {
  test.each([
    ['2026-11-01T03:59:00Z', 'America/New_York', '31 Oct 2026'],
    ['2026-11-01T03:59:00Z', 'UTC', '1 Nov 2026'],
    ['2026-12-31T23:00:00Z', 'Asia/Kolkata', '1 Jan 2027'],
  ])('%s in %s falls on %s', (iso, zone, expected) => expect(formatMomentDay(new Date(iso), zone)).toBe(expected));
});

describe('formatDay (a calendar date is never shifted by a zone)', () => {
  test.each([
    ['2026-12-02', '2 Dec 2026'],
    ['2026-01-01', '1 Jan 2026'],
    ['2026-03-29', '29 Mar 2026'],
    ['2026-09-30', '30 Sep 2026'],
    ['2026-12-31T00:00:00Z', '31 Dec 2026'],
    ['2026-13-01', '2026-13-01'],
    ['not a date', 'not a date'],
  ])('%s → %s', (iso, expected) => expect(formatDay(iso)).toBe(expected));
});

describe('isTimeZone', () => {
  test.each([
    ['Europe/London', true],
    ['America/New_York', true],
    ['UTC', true],
    ['Asia/Kolkata', true],
    ['Mars/Olympus', false],
    ['', false],
    ['Europe/London; drop table users', false],
    ['A'.repeat(100_000), false],
    [42, false],
    [null, false],
  ])('%s → %s', (name, ok) => expect(isTimeZone(name)).toBe(ok));
  test.each([
    ['Asia/Kolkata', 'UTC'],
    ['Europe/London', 'UTC'],
    [null, 'UTC'],
  ])('the list holds the current zone %s once, after %s', (current, first) => {
    const choices = timeZoneChoices(current);
    expect(choices[0]).toBe(first);
    if (current) expect(choices.filter((z) => z === current)).toEqual([current]);
    expect(new Set(choices).size).toBe(choices.length);
  });
  test('every choice offered is accepted, UTC first', () => {
    const choices = timeZoneChoices();
    expect(choices[0]).toBe('UTC');
    expect(choices).toContain('Europe/London');
    expect(choices.every(isTimeZone)).toBe(true);
  });
});
