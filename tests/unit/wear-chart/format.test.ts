import { describe, expect, test } from 'vitest';
import { dateToX, formatDateTick, xToDate } from '~/components/wear-chart/format';

describe('the wear chart by date: x values and the words on its axis', () => {
  test.each([
    ['2026-11-03', '3 Nov 2026'],
    ['2024-02-29', '29 Feb 2024'],
    ['2026-01-01', '1 Jan 2026'],
    ['2026-12-31T00:00:00Z', '31 Dec 2026'],
  ])('%s → tick "%s", and back to the same ISO day', (iso, words) => {
    const x = dateToX(iso);
    expect(formatDateTick(x)).toBe(words);
    expect(xToDate(x)).toBe(iso.slice(0, 10));
  });

  test('a tick that is not a number has no words', () => {
    expect(formatDateTick(Number.NaN)).toBe('');
  });
});
