import { describe, expect, test } from 'vitest';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';
import { isFooterRow, isRepeatedHeader } from '~/lib/lab-csv/page-furniture';

describe('footers, repeated headers and blank separators', () => {
  // A report printed over two pages: header and units row again on page 2, blank lines, a page mark and a footer.
  const FILE = [
    'Sample ID\tDate Drawn\tIron (Fe)\tCopper (Cu)\tViscosity 40 °C',
    '\t\tppm\tppm\tcSt',
    'PF-1\t3-Apr-2026\t12\t3\t98.1',
    'PF-2\t4-Apr-2026\t14\t<1\t97.5',
    '',
    'Page 1 of 2',
    'Sample ID\tDate Drawn\tIron (Fe)\tCopper (Cu)\tViscosity 40 °C',
    '\t\tppm\tppm\tcSt',
    'PF-3\t5-Apr-2026\t9\t2\t101.2',
    '',
    'Report generated 2026-04-20 by the lab information system. Results relate only to the samples tested.',
  ].join('\n');

  test('are skipped, each kind with one note, and the bottles read as usual', () => {
    const result = parseLabCsv(FILE);
    expect(result.errors.filter((e) => e.severity === 'error')).toEqual([]);
    expect(result.rows.map((r) => [r.line, r.bottle.raw, r.readings.Fe?.value])).toEqual([
      [3, 'PF-1', 12],
      [4, 'PF-2', 14],
      [9, 'PF-3', 9],
    ]);
    const notes = result.errors.filter((e) => e.code === 'lines-skipped').map((e) => e.message);
    expect(notes).toEqual([
      'Line 7: the header row again (a page break); skipped, not read as a bottle.',
      'Lines 6, 11: a footer or note, not readings; skipped, not read as bottles.',
      'Lines 5, 10: blank, between rows of readings; skipped, not read as bottles.',
    ]);
  });

  test('a comma file with a footer split by its commas', () => {
    const result = parseLabCsv('Bottle,Fe,Cu,Si\nA-1,3,1,4\nPrinted 2026-04-20, page 1 of 1\n');
    expect(result.rows).toHaveLength(1);
    expect(result.errors.filter((e) => e.severity === 'error')).toEqual([]);
  });

  test('a bottle row with every reading blank is not a footer', () => {
    const result = parseLabCsv('Bottle,Fe,Cu,Si\nA-1,3,1,4\nA-2,,,\n');
    expect(result.rows.map((r) => r.bottle.raw)).toEqual(['A-1', 'A-2']);
    expect(result.errors.map((e) => e.code)).toEqual(['no-readings']);
  });

  test.each([
    [['Report generated 2026-04-20'], 6, true],
    [['Seite 2 von 3'], 6, true],
    [['Rapport généré le 20/04/2026'], 6, true],
    [['Results relate only to the samples tested'], 6, true],
    [['A-12'], 6, false],
    [['AB 12 34'], 6, false],
    [['A-1', '3'], 6, false],
    [['A-1', '3', '4'], 6, false],
  ])('isFooterRow(%j) = %s', (cells, width, expected) => {
    expect(isFooterRow(cells, width)).toBe(expected);
  });

  test.each([
    [['Bottle', 'Fe', 'Cu'], true],
    [['bottle ', 'FE', 'cu'], true],
    [['Bottle', 'Fe', ''], true],
    [['A-1', 'Fe', '3'], false],
  ])('isRepeatedHeader(%j) = %s', (cells, expected) => {
    expect(isRepeatedHeader(cells, ['Bottle', 'Fe', 'Cu'])).toBe(expected);
  });
});
