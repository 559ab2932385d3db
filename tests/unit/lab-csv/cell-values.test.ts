import { describe, expect, test } from 'vitest';
import { isRealDate, parseDateCell, parseGlycolCell, parseReadingCell } from '~/lib/lab-csv/cell-values';

describe('parseReadingCell', () => {
  test.each([
    // [cell, decimal mark, expected]
    ['12', '.', { status: 'ok', value: 12 }],
    ['12.5', '.', { status: 'ok', value: 12.5 }],
    [' 7 ', '.', { status: 'ok', value: 7 }],
    ['1,234', '.', { status: 'ok', value: 1234 }],
    ['1,234,567.5', '.', { status: 'ok', value: 1234567.5 }],
    ['1 234', '.', { status: 'ok', value: 1234 }],
    ['1.5e2', '.', { status: 'ok', value: 150 }],
    ['12,5', ',', { status: 'ok', value: 12.5 }],
    ['1.234,5', ',', { status: 'ok', value: 1234.5 }],
    ['1.234', ',', { status: 'ok', value: 1234 }],
    ['1\u00a0234,5', ',', { status: 'ok', value: 1234.5 }],
    ['<1', '.', { status: 'ok', value: 1, qualifier: '<' }],
    ['< 0,5', ',', { status: 'ok', value: 0.5, qualifier: '<' }],
    ['<=2', '.', { status: 'ok', value: 2, qualifier: '<' }],
    ['≤2', '.', { status: 'ok', value: 2, qualifier: '<' }],
    ['>1000', '.', { status: 'ok', value: 1000, qualifier: '>' }],
    ['>1,000', '.', { status: 'ok', value: 1000, qualifier: '>' }],
    ['ND', '.', { status: 'ok', value: 0, qualifier: '<', belowDetection: true }],
    ['n.d.', '.', { status: 'ok', value: 0, qualifier: '<', belowDetection: true }],
    ['N.D', '.', { status: 'ok', value: 0, qualifier: '<', belowDetection: true }],
    ['ND (<0.5)', '.', { status: 'ok', value: 0.5, qualifier: '<', belowDetection: true }],
    ['ND<1', '.', { status: 'ok', value: 1, qualifier: '<', belowDetection: true }],
    ['n.d. (0,2)', ',', { status: 'ok', value: 0.2, qualifier: '<', belowDetection: true }],
    ['', '.', { status: 'missing' }],
    ['  ', '.', { status: 'missing' }],
    ['-', '.', { status: 'missing' }],
    ['n/a', '.', { status: 'missing' }],
    ['-3', '.', { status: 'problem', problem: 'negative-value', detail: '-3' }],
    ['−3', '.', { status: 'problem', problem: 'negative-value', detail: '−3' }],
    ['<-1', '.', { status: 'problem', problem: 'negative-value', detail: '<-1' }],
    ['high', '.', { status: 'problem', problem: 'not-a-number', detail: 'high' }],
    ['12 ppm', '.', { status: 'problem', problem: 'not-a-number', detail: '12 ppm' }],
    ['12,5', '.', { status: 'problem', problem: 'unclear-number', detail: '12,5' }],
    ['12.5', ',', { status: 'problem', problem: 'unclear-number', detail: '12.5' }],
    ['=1+1', '.', { status: 'problem', problem: 'formula-like-cell', detail: '=1+1' }],
    ['@SUM(A1)', '.', { status: 'problem', problem: 'formula-like-cell', detail: '@SUM(A1)' }],
    ['-2+3', '.', { status: 'problem', problem: 'formula-like-cell', detail: '-2+3' }],
    ['<=1+1', '.', { status: 'problem', problem: 'not-a-number', detail: '<=1+1' }],
    ['< =1+1', '.', { status: 'problem', problem: 'formula-like-cell', detail: '< =1+1' }],
  ] as const)('%j with decimal mark %j', (cell, mark, expected) => {
    expect(parseReadingCell(cell, mark)).toEqual(expected);
  });
});

describe('parseGlycolCell', () => {
  test.each([
    ['positive', 1],
    ['Positive', 1],
    ['POS', 1],
    ['yes', 1],
    ['Y', 1],
    ['detected', 1],
    ['1', 1],
    ['negative', 0],
    ['NEG', 0],
    ['no', 0],
    ['not detected', 0],
    ['ND', 0],
    ['0', 0],
  ])('%j → %d', (cell, value) => {
    expect(parseGlycolCell(cell)).toEqual({ status: 'ok', value });
  });
  test.each([
    ['', 'missing'],
    ['maybe', 'problem'],
    ['=1', 'problem'],
  ])('%j → %s', (cell, status) => {
    expect(parseGlycolCell(cell).status).toBe(status);
  });
});

describe('parseDateCell', () => {
  test.each([
    ['2026-04-03', { kind: 'exact', year: 2026, month: 4, day: 3 }],
    ['2026/4/3', { kind: 'exact', year: 2026, month: 4, day: 3 }],
    ['2026-04-03T10:15:00Z', { kind: 'exact', year: 2026, month: 4, day: 3 }],
    ['2026-04-03 10:15', { kind: 'exact', year: 2026, month: 4, day: 3 }],
    ['3 Apr 2026', { kind: 'exact', year: 2026, month: 4, day: 3 }],
    ['3-Apr-2026', { kind: 'exact', year: 2026, month: 4, day: 3 }],
    ['April 3, 2026', { kind: 'exact', year: 2026, month: 4, day: 3 }],
    ['Apr 3rd 2026', { kind: 'exact', year: 2026, month: 4, day: 3 }],
    ['03/04/2026', { kind: 'numeric', first: 3, second: 4, year: 2026, dotted: false }],
    ['13-04-2026', { kind: 'numeric', first: 13, second: 4, year: 2026, dotted: false }],
    ['03.04.26', { kind: 'numeric', first: 3, second: 4, year: 2026, dotted: true }],
    ['', { kind: 'missing' }],
    ['2026-02-29', { kind: 'problem', problem: 'invalid-date', detail: '2026-02-29' }],
    ['2028-02-29', { kind: 'exact', year: 2028, month: 2, day: 29 }],
    ['31/02/2026', { kind: 'problem', problem: 'invalid-date', detail: '31/02/2026' }],
    ['13/13/2026', { kind: 'problem', problem: 'invalid-date', detail: '13/13/2026' }],
    ['30 Feb 2026', { kind: 'problem', problem: 'invalid-date', detail: '30 Feb 2026' }],
    ['soon', { kind: 'problem', problem: 'invalid-date', detail: 'soon' }],
    ['=NOW()', { kind: 'problem', problem: 'formula-like-cell', detail: '=NOW()' }],
  ])('%j', (cell, expected) => {
    expect(parseDateCell(cell)).toEqual(expected);
  });
});

describe('isRealDate', () => {
  // Reference: ECMAScript's Date, whose calendar is the proleptic Gregorian one (ECMA-262, "Days in Year" and
  // "Month from Time"): a day exists when Date.UTC gives it back unchanged. Every day of every month, 1900-2999.
  test('agrees with Date.UTC on every day of 1900-2999, leap years and their century rule included', () => {
    const disagreements: string[] = [];
    for (let year = 1900; year <= 2999; year += 1) {
      for (let month = 1; month <= 12; month += 1) {
        for (let day = 1; day <= 31; day += 1) {
          const back = new Date(Date.UTC(year, month - 1, day));
          const exists = back.getUTCMonth() === month - 1 && back.getUTCDate() === day;
          if (isRealDate(year, month, day) !== exists) disagreements.push(`${year}-${month}-${day}`);
        }
      }
    }
    expect(disagreements).toEqual([]);
  });

  test.each([
    [2000, 2, 29, true],
    [1900, 2, 29, false],
    [2100, 2, 29, false],
    [2024, 2, 29, true],
    [2026, 4, 31, false],
    [2026, 12, 31, true],
    [2026, 13, 1, false],
    [2026, 0, 1, false],
    [2026, 1, 0, false],
    [1899, 12, 31, false],
    [3000, 1, 1, false],
  ])('%i-%i-%i exists: %s', (year, month, day, exists) => {
    expect(isRealDate(year, month, day)).toBe(exists);
  });
});
