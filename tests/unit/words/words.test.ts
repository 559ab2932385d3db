import { describe, expect, test } from 'vitest';
import { describeCallAuthor, describeOverdue, formatCount, meterLabel, pluralise } from '~/lib/words/words';

describe('formatCount', () => {
  test.each([
    [0, 'sample', '0 samples'],
    [1, 'sample', '1 sample'],
    [2, 'sample', '2 samples'],
    [1, 'machine', '1 machine'],
    [12, 'finding', '12 findings'],
    [3, 'box', '3 boxes'],
    [2, 'entry', '2 entries'],
    [2, 'day', '2 days'],
    [1200, 'row', '1,200 rows'],
  ])('%d %s → %s', (n, noun, expected) => {
    expect(formatCount(n, noun)).toBe(expected);
  });
  test('pluralise keeps the singular for one', () => expect(pluralise('person', 1)).toBe('person'));
  test('pluralise knows irregular nouns', () => expect(pluralise('person', 4)).toBe('people'));
});

describe('meterLabel', () => {
  test.each([
    ['h', 'Hour meter'],
    ['mi', 'Odometer'],
    ['km', 'Odometer'],
  ] as const)('%s → %s', (meter, expected) => expect(meterLabel(meter)).toBe(expected));
});

describe('describeOverdue', () => {
  test.each([
    ['2026-12-02', '2026-12-02', 0, 'due today'],
    ['2026-12-01', '2026-12-02', 1, 'due 1 day ago'],
    ['2026-11-22', '2026-12-02', 10, 'due 10 days ago'],
    ['2026-10-14', '2026-12-02', 49, 'due 7 weeks ago'],
    ['2026-06-02', '2026-12-02', 183, 'due 6 months ago'],
  ])('%s seen on %s', (due, today, days, words) => {
    expect(describeOverdue(due, today)).toEqual({ days, words });
  });
  test('a date still ahead is not overdue', () => expect(describeOverdue('2026-12-09', '2026-12-02')).toBeNull());
  test('a malformed date is not overdue', () => expect(describeOverdue('not a date', '2026-12-02')).toBeNull());
});

describe('describeCallAuthor', () => {
  test.each([
    [{ source: 'engine' }, 'made by the rules'],
    [{ source: 'engine', role: 'lead' as const, name: 'Ada' }, 'made by the rules'],
    [{ source: 'confirmed', role: 'lead' as const, name: 'Ada' }, 'confirmed by Ada (lead)'],
    [{ source: 'confirmed', role: 'lead' as const }, 'confirmed by the lead'],
    [{ source: 'confirmed', role: 'mechanic' as const }, 'confirmed by a mechanic'],
    [{ source: 'override', role: 'mechanic' as const, name: 'Tam' }, 'changed by Tam (mechanic)'],
    [{ source: 'override', name: '  ' }, 'changed by a crew member'],
    [{ source: 'override', name: 'Tam' }, 'changed by Tam'],
  ])('%o → %s', (input, expected) => expect(describeCallAuthor(input)).toBe(expected));
});
