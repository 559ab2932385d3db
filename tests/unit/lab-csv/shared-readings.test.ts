import { describe, expect, test } from 'vitest';
import { parseLabCsv, type LabReading } from '~/lib/lab-csv/lab-csv';

/**
 * The reader keeps one frozen reading per distinct value and qualifier of a file, found by a small-integer key of
 * the cell's digits (a typed table for small keys, a map past it). These cases check that the sharing never mixes
 * two values up: every cell reads as Number() reads it, however many cells come before it and in whatever order.
 */

/** A file with one iron column, the given cells in order, one bottle each. */
function ironColumn(cells: readonly string[], delimiter: ',' | ';' = ','): (LabReading | undefined)[] {
  const lines = [`Bottle${delimiter}Fe`, ...cells.map((cell, i) => `B-${i}${delimiter}${cell}`)];
  const result = parseLabCsv(`${lines.join('\n')}\n`);
  expect(result.errors.filter((e) => e.severity === 'error')).toEqual([]);
  return result.rows.map((row) => row.readings.Fe);
}

describe('shared readings never mix values up', () => {
  // Keys are digits × 16 + decimals, × 4 + qualifier: these cells sit at the first slots, around the table's doublings
  // (1,024 slots and up) and past the 2^20-slot table into the map (over 6,553.5 with one decimal).
  const cells = [
    '0',
    '<0',
    'ND',
    '1',
    '<1',
    '>1',
    '10',
    '1.0',
    '0.1',
    '0.10',
    '12',
    '1.2',
    '0.12',
    '120',
    '12.0',
    '15',
    '15.9',
    '16',
    '16.0',
    '63',
    '64',
    '255',
    '256',
    '1023',
    '1024',
    '2047.9',
    '2048',
    '6553',
    '6553.5',
    '6553.6',
    '7000.5',
    '<7000.5',
    '>7000.5',
    '65536',
    '99999.9',
    '123456',
  ];

  test.each([
    { order: 'as listed', cells },
    { order: 'reversed', cells: [...cells].reverse() },
    { order: 'twice over', cells: [...cells, ...[...cells].reverse()] },
  ])('every cell reads as Number() reads it ($order)', ({ cells: ordered }) => {
    const readings = ironColumn(ordered);
    expect(readings).toHaveLength(ordered.length);
    ordered.forEach((cell, i) => {
      const qualifier = cell.startsWith('<') || cell === 'ND' ? '<' : cell.startsWith('>') ? '>' : undefined;
      const value = cell === 'ND' ? 0 : Number(qualifier ? cell.slice(1) : cell);
      expect(readings[i], `cell ${cell}`).toEqual(qualifier ? { value, qualifier } : { value });
    });
  });

  test.each([
    { same: ['12', '12.0', '12.00'], delimiter: ',' as const },
    { same: ['12,5', '12,50'], delimiter: ';' as const },
    { same: ['<1', '<1.0'], delimiter: ',' as const },
    { same: ['7000.5', '7000.50'], delimiter: ',' as const },
  ])('$same share one frozen reading', ({ same, delimiter }) => {
    const readings = ironColumn(same, delimiter);
    for (const reading of readings) {
      expect(reading).toBe(readings[0]);
      expect(Object.isFrozen(reading)).toBe(true);
    }
  });

  test('equal values with different qualifiers are different readings', () => {
    const [plain, below, above] = ironColumn(['5', '<5', '>5']);
    expect(plain).toEqual({ value: 5 });
    expect(below).toEqual({ value: 5, qualifier: '<' });
    expect(above).toEqual({ value: 5, qualifier: '>' });
  });

  test('a second file starts with nothing from the first', () => {
    ironColumn(['3', '4.5', '<2']);
    expect(ironColumn(['4.5', '3', '<2', '2'])).toEqual([
      { value: 4.5 },
      { value: 3 },
      { value: 2, qualifier: '<' },
      { value: 2 },
    ]);
  });
});
