import { describe, expect, test } from 'vitest';
import { isFormulaLikeCell, neutraliseCsvCell } from '~/lib/lab-csv/csv-cell';

// Formula-start characters from OWASP "CSV Injection": = + - @ tab carriage return.
describe('neutraliseCsvCell', () => {
  test.each([
    ['=1+1', "'=1+1"],
    ["+cmd|' /C calc'!A0", "'+cmd|' /C calc'!A0"],
    ['-2+3', "'-2+3"],
    ['@SUM(A1)', "'@SUM(A1)"],
    ['\t=1', "'\t=1"],
    ['\r=1', "'\r=1"],
    ['＝1+1', "'＝1+1"],
    ['SW-1041', 'SW-1041'],
    ['Trail 450', 'Trail 450'],
    ['-3', '-3'],
    ['+2.5', '+2.5'],
    ['', ''],
  ])('%j → %j', (cell, expected) => {
    expect(neutraliseCsvCell(cell)).toBe(expected);
    expect(isFormulaLikeCell(cell)).toBe(expected !== cell);
  });
});
