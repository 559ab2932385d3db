import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { parseReadingCell } from '~/lib/lab-csv/cell-values';
import {
  isBareNotDetected,
  parsePlainNumber,
  plainKeyValue,
  plainNumberKey,
  readIsoDay,
} from '~/lib/lab-csv/plain-cells';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';

// The reference for every plain cell is JavaScript's own Number() (ECMA-262, StringToNumber), on the cell written
// with a point; NaN means "not plain: the full reader decides".
describe('parsePlainNumber', () => {
  test.each([
    // [cell, decimal mark, expected]
    ['12', '.', 12],
    ['0', '.', 0],
    ['007', '.', 7],
    ['12.5', '.', 12.5],
    ['0.1', '.', 0.1],
    ['299.9', '.', 299.9],
    ['12,5', ',', 12.5],
    ['0,05', ',', 0.05],
    ['123456789012345', '.', 123456789012345],
    // More digits than a double holds exactly: handed to Number() itself.
    ['1234567890123456789', '.', 1234567890123456789],
    ['0.12345678901234567', '.', 0.12345678901234567],
    // Not plain: the full reader reads (or rejects) these.
    ['<1', '.', Number.NaN],
    ['1,5', '.', Number.NaN],
    ['1.5', ',', Number.NaN],
    ['1e3', '.', Number.NaN],
    [' 12 ', '.', Number.NaN],
    ['', '.', Number.NaN],
    ['-', '.', Number.NaN],
    ['-3', '.', Number.NaN],
    ['+3', '.', Number.NaN],
    ['ND', '.', Number.NaN],
    ['.5', '.', Number.NaN],
    ['5.', '.', Number.NaN],
    ['1.2.3', '.', Number.NaN],
    ['1,234', '.', Number.NaN],
    ['1 234', '.', Number.NaN],
    ['Infinity', '.', Number.NaN],
    ['0x10', '.', Number.NaN],
    ['１２', '.', Number.NaN],
  ] as const)('%j with mark %s → %d', (cell, mark, expected) => {
    expect(parsePlainNumber(cell, mark)).toBe(expected);
  });

  test.each([
    ['<1', 1, 1],
    ['>1000', 1, 1000],
    ['<0.5', 1, 0.5],
    ['<', 1, Number.NaN],
  ] as const)('%j read from position %d → %d', (cell, from, expected) => {
    expect(parsePlainNumber(cell, '.', from)).toBe(expected);
  });

  test('agrees with Number() and parseFloat() on every plain decimal, with either mark', () => {
    const plain = fc.tuple(
      fc.stringMatching(/^\d{1,12}$/),
      fc.option(fc.stringMatching(/^\d{1,8}$/), { nil: undefined }),
    );
    fc.assert(
      fc.property(plain, ([whole, fraction]) => {
        const pointed = fraction === undefined ? whole : `${whole}.${fraction}`;
        expect(parsePlainNumber(pointed, '.')).toBe(Number(pointed));
        expect(parsePlainNumber(pointed, '.')).toBe(Number.parseFloat(pointed));
        expect(parsePlainNumber(pointed.replace('.', ','), ',')).toBe(Number(pointed));
      }),
      { numRuns: 2000 },
    );
  });

  test('gives the value the full cell reader gives, whenever it reads a cell at all', () => {
    const cells = fc.oneof(fc.stringMatching(/^[\d.,]{1,10}$/), fc.string({ maxLength: 8 }));
    fc.assert(
      fc.property(cells, fc.constantFrom('.', ',') as fc.Arbitrary<'.' | ','>, (cell, mark) => {
        const fast = parsePlainNumber(cell, mark);
        if (Number.isNaN(fast)) return;
        expect(parseReadingCell(cell, mark)).toEqual({ status: 'ok', value: fast });
      }),
      { numRuns: 2000 },
    );
  });
});

// The key is parsePlainNumber's twin: where it answers, its value is the same number; a key of -1 leaves the cell
// to parsePlainNumber.
describe('plainNumberKey', () => {
  test.each([
    // [cell, mark, from, end, key or -1]
    ['12', '.', 0, 2, 12 * 16],
    ['12.0', '.', 0, 4, 120 * 16 + 1],
    ['12,05', ',', 0, 5, 1205 * 16 + 2],
    ['<1', '.', 1, 2, 16],
    ['x,12.5,y', '.', 2, 6, 125 * 16 + 1],
    ['12.', '.', 0, 3, -1],
    ['.5', '.', 0, 2, -1],
    ['1e3', '.', 0, 3, -1],
    ['', '.', 0, 0, -1],
    ['16777216', '.', 0, 8, -1], // 2^24: past the key's integer range, read by parsePlainNumber
    ['0000000000000001', '.', 0, 16, -1], // 16 digits: parsePlainNumber hands these to Number()
  ] as const)('%j (%s, %i–%i) → %i', (cell, mark, from, end, key) => {
    expect(plainNumberKey(cell, mark, from, end)).toBe(key);
    if (key >= 0) expect(plainKeyValue(key)).toBe(parsePlainNumber(cell, mark, from, end));
  });

  test('answers with the value of parsePlainNumber for every plain decimal', () => {
    const plain = fc.tuple(
      fc.stringMatching(/^\d{1,8}$/),
      fc.option(fc.stringMatching(/^\d{1,7}$/), { nil: undefined }),
    );
    fc.assert(
      fc.property(plain, fc.constantFrom('.', ',') as fc.Arbitrary<'.' | ','>, ([whole, fraction], mark) => {
        const cell = fraction === undefined ? whole : `${whole}${mark}${fraction}`;
        const key = plainNumberKey(cell, mark);
        if (key === -1) expect(Number(`${whole}${fraction ?? ''}`)).toBeGreaterThanOrEqual(2 ** 24);
        else expect(plainKeyValue(key)).toBe(parsePlainNumber(cell, mark));
      }),
      { numRuns: 2000 },
    );
  });
});

describe('isBareNotDetected', () => {
  test.each([
    ['ND', true],
    ['nd', true],
    ['Nd', true],
    ['N.D.', false],
    ['ND<1', false],
    [' ND', false],
    ['', false],
  ] as const)('%j → %s', (cell, expected) => {
    expect(isBareNotDetected(cell)).toBe(expected);
    // Whatever the fast check accepts, the full reader reads as 0 below detection.
    if (expected)
      expect(parseReadingCell(cell, '.')).toEqual({ status: 'ok', value: 0, qualifier: '<', belowDetection: true });
  });
});

describe('readIsoDay', () => {
  test.each([
    ['2026-04-03', '2026-04-03'],
    ['2024-02-29', '2024-02-29'],
    // Gregorian calendar: 2026 is not a leap year, 1900 was not one either.
    ['2026-02-29', null],
    ['1900-02-29', null],
    ['2026-13-01', null],
    ['2026-00-10', null],
    ['2026-04-31', null],
    ['1899-12-31', null],
    ['2026-4-3', null],
    ['2026/04/03', null],
    [' 2026-04-03', null],
    ['2026-04-03T10:00', null],
    ['03-04-2026', null],
    ['2026-O4-03', null],
    ['', null],
  ] as const)('%j → %s', (cell, expected) => {
    expect(readIsoDay(cell)).toBe(expected);
  });
});

describe('the reader with its fast paths', () => {
  // Each cell of the fast path beside its twin written so that only the full reader can read it.
  test.each([
    ['12.5', ' 12.5 ', { value: 12.5 }],
    ['<1', '< 1', { value: 1, qualifier: '<' }],
    ['>1000', '> 1000', { value: 1000, qualifier: '>' }],
    ['ND', 'n.d.', { value: 0, qualifier: '<' }],
    ['0', '0.0', { value: 0 }],
  ] as const)('%j reads as %j does', (fast, slow, expected) => {
    const result = parseLabCsv(`Bottle,Sampled,Fe,Al\nA1,2026-04-03,${fast},${slow}\n`);
    expect(result.errors).toEqual([]);
    expect(result.rows[0]?.readings).toEqual({ Fe: expected, Al: expected });
    expect(result.rows[0]?.sampled).toBe('2026-04-03');
  });

  test('a plain value over the physical bound still gets its message', () => {
    const result = parseLabCsv('Bottle,Fe\nA1,2000000\n');
    expect(result.errors.map((e) => e.code)).toEqual(['impossible-value']);
  });
});
