import { describe, expect, test } from 'vitest';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';
import { normaliseBottleCode } from '~/lib/samples/bottle-code';

// The reader, the forms and the import share one normal form, so a code the reader sees as new is never the
// same bottle as an earlier row for the import (it re-normalised and re-checked before).
describe('the lab file reader normalises bottle codes as the forms do', () => {
  test.each([
    ['SW-1', 'SW1'],
    ['sw 1', 'SW1'],
    ['SW.1', 'SW1'],
    ['SW_1', 'SW1'],
    ['SW/1', 'SW1'],
    ['SW\u20131', 'SW1'],
    ['SW\u22121', 'SW1'],
  ])('"%s" reads as %s', (raw, normalised) => {
    const result = parseLabCsv(`Bottle,Fe\n${raw},4\n`);
    expect(result.rows[0]?.bottle).toEqual({ raw, normalised });
    expect(normaliseBottleCode(raw)).toBe(normalised);
  });

  test.each([['SW.1'], ['SW_1'], ['SW/1'], ['sw1']])('"SW-1" then "%s" is the same bottle twice', (second) => {
    const result = parseLabCsv(`Bottle,Fe\nSW-1,4\n${second},5\n`);
    expect(result.errors).toContainEqual(expect.objectContaining({ code: 'duplicate-bottle-code', row: 3 }));
  });
});
