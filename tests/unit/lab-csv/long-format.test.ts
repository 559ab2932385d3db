import { describe, expect, test } from 'vitest';
import { parseLabCsv, type LabCsvResult } from '~/lib/lab-csv/lab-csv';

const errors = (r: LabCsvResult) => r.errors.filter((e) => e.severity === 'error');

describe('one row per test is pivoted into one row per bottle', () => {
  // Two bottles interleaved, qualifiers, a unit per row, °F flash point, water in ppm and an element in %.
  const FILE = [
    'Bottle,Sampled,Test,Result,Unit',
    'LF-1,2026-03-02,Iron,14,ppm',
    'LF-2,2026-03-09,Iron,21,ppm',
    'LF-1,2026-03-02,Aluminium,<1,ppm',
    'LF-2,2026-03-09,Aluminium,ND,ppm',
    'LF-1,2026-03-02,Silicon,0.0012,%',
    'LF-2,2026-03-09,Silicon,0.0009,%',
    'LF-1,2026-03-02,Water,500,ppm',
    'LF-1,2026-03-02,Flash point,410,°F',
    'LF-2,2026-03-09,Viscosity 100 °C,12.4,cSt',
    'LF-2,2026-03-09,Glycol,negative,',
  ].join('\n');

  test('readings per bottle, with qualifiers and unit conversions', () => {
    const result = parseLabCsv(FILE);
    expect(result.layout).toBe('long');
    expect(errors(result)).toEqual([]);
    expect(result.rows.map((r) => [r.line, r.bottle.raw, r.sampled])).toEqual([
      [2, 'LF-1', '2026-03-02'],
      [3, 'LF-2', '2026-03-09'],
    ]);
    const [a, b] = result.rows;
    expect(a?.readings.Fe).toEqual({ value: 14 });
    expect(a?.readings.Al).toEqual({ value: 1, qualifier: '<' });
    // 0.0012 % = 12 ppm (1 % = 10,000 mg/kg, mass fraction).
    expect(a?.readings.Si?.value).toBeCloseTo(12, 9);
    // 500 ppm of water = 0.05 %.
    expect(a?.readings.WATER?.value).toBeCloseTo(0.05, 12);
    // 410 °F = (410 − 32) × 5/9 = 210 °C.
    expect(a?.readings.FLASH?.value).toBeCloseTo(210, 9);
    expect(b?.readings).toMatchObject({
      Fe: { value: 21 },
      Al: { value: 0, qualifier: '<' },
      KV100: { value: 12.4 },
      GLYCOL: { value: 0 },
    });
    expect(b?.readings.Si?.value).toBeCloseTo(9, 9);
  });

  test('German headers and test names, semicolons and decimal commas', () => {
    const result = parseLabCsv(
      'Probe;Parameter;Ergebnis;Einheit\nD-1;Eisen;12,5;mg/kg\nD-1;Kupfer;3;mg/kg\nD-1;Viskosität 40 °C;98,2;mm²/s\n',
    );
    expect(errors(result)).toEqual([]);
    expect(result.rows[0]?.readings).toEqual({ Fe: { value: 12.5 }, Cu: { value: 3 }, KV40: { value: 98.2 } });
  });

  test('a file without a unit column reads units from the test names', () => {
    const result = parseLabCsv('Sample ID\tElement\tValue\nT-9\tFe ppm\t7\nT-9\tTBN\t8.1\n');
    expect(result.rows[0]?.readings).toEqual({ Fe: { value: 7 }, TBN: { value: 8.1 } });
  });

  test('an unknown test name is reported like an unknown column, with its line', () => {
    const result = parseLabCsv('Bottle,Test,Result\nU-1,Iron,4\nU-1,Soot index,17\n');
    expect(result.rows[0]?.readings).toEqual({ Fe: { value: 4 } });
    expect(result.rows[0]?.other).toEqual({ 'Soot index': '17' });
    expect(result.errors).toContainEqual(
      expect.objectContaining({
        severity: 'warning',
        code: 'unknown-column',
        row: 3,
        column: 'Soot index',
        message:
          'Line 3: the test "Soot index" was not recognised. Its results are kept as text and not read as readings; a lab profile can map it.',
      }),
    );
  });

  test('a lab profile maps a test name', () => {
    const result = parseLabCsv('Bottle,Test,Result\nU-1,Ferrum total,4\n', { mapping: { 'Ferrum total': 'Fe' } });
    expect(result.rows[0]?.readings).toEqual({ Fe: { value: 4 } });
  });

  test('a cell problem names the line the result came from', () => {
    const result = parseLabCsv('Bottle,Test,Result\nC-1,Iron,4\nC-2,Iron,5\nC-1,Copper,lots\n');
    expect(errors(result)).toEqual([
      expect.objectContaining({
        code: 'not-a-number',
        row: 2,
        column: 'Copper',
        message: expect.stringMatching(/^Line 4, test "Copper": "lots" is not a number/),
      }),
    ]);
  });

  test('every repeat of a doubled test is reported, and no value is kept for it', () => {
    const result = parseLabCsv('Bottle,Test,Result\nB-1,Iron,4\nB-1,Iron,5\nB-1,iron,6\nB-1,Copper,1\n');
    expect(errors(result).map((e) => e.message.slice(0, 7))).toEqual(['Line 3:', 'Line 4:']);
    expect(result.rows[0]?.readings).toEqual({ Cu: { value: 1 } });
  });

  test('a wide file is never taken for one row per test', () => {
    expect(parseLabCsv('Bottle,Fe,Test,Result\nW-1,3,x,y\n').layout).toBe('wide');
  });
});

describe('bad one-row-per-test files get clear errors', () => {
  test.each([
    {
      what: 'a bottle with the same test twice',
      file: 'Bottle,Test,Result\nB-1,Iron,4\nB-1,Copper,2\nB-1,Iron,5\n',
      code: 'duplicate-test',
      row: 2,
      says: 'Line 4: bottle "B-1" has "Iron" again (also on line 2). One bottle gets one result per test',
    },
    {
      what: 'the same test three times (each repeat reported)',
      file: 'Bottle,Test,Result\nB-1,Iron,4\nB-1,Iron,5\nB-1,iron,6\n',
      code: 'duplicate-test',
      row: 2,
      says: 'Line 3: bottle "B-1" has "Iron" again (also on line 2)',
    },
    {
      what: 'mixed units for one test',
      file: 'Bottle,Test,Result,Unit\nM-1,Iron,4,ppm\nM-2,Iron,0.1,%\n',
      code: 'mixed-units',
      row: 3,
      says: 'Line 3: "Iron" is given in "%" here but in "ppm" on line 2',
    },
    {
      what: 'a unit the reader does not know',
      file: 'Bottle,Test,Result,Unit\nM-1,Iron,4,mg/L\n',
      code: 'unknown-unit',
      row: 2,
      says: 'the unit "mg/L" of "Iron" is not one Sumpwise reads',
    },
    {
      what: 'an empty result cell',
      file: 'Bottle,Test,Result\nE-1,Iron,\nE-1,Copper,3\n',
      code: 'missing-result',
      row: 2,
      says: 'names the test "Iron" but its result is blank',
    },
    {
      what: 'a blank test name',
      file: 'Bottle,Test,Result\nE-1,,4\n',
      code: 'missing-test',
      row: 2,
      says: 'the test name is blank, so the result "4" for bottle "E-1" cannot be placed',
    },
    {
      what: 'a blank bottle code',
      file: 'Bottle,Test,Result\n,Iron,4\nE-2,Iron,5\n',
      code: 'missing-bottle-code',
      row: 2,
      says: 'Line 2: the bottle code is blank, so this result ("Iron") cannot be matched to a sample.',
    },
    {
      what: 'a negative result',
      file: 'Bottle,Test,Result\nN-1,Iron,-4\n',
      code: 'negative-value',
      row: 2,
      says: 'Line 2, test "Iron": "-4" is negative',
    },
    {
      what: 'a formula in a result',
      file: 'Bottle,Test,Result\nN-1,Iron,=1+1\n',
      code: 'formula-like-cell',
      row: 2,
      says: 'Line 2, test "Iron": "=1+1" starts like a spreadsheet formula',
    },
    {
      what: 'text in a result',
      file: 'Bottle,Test,Result\nN-1,Copper,high\n',
      code: 'not-a-number',
      row: 2,
      says: 'Line 2, test "Copper": "high" is not a number',
    },
    {
      what: 'an impossible value',
      file: 'Bottle,Test,Result,Unit\nN-1,Iron,200,%\n',
      code: 'impossible-value',
      row: 2,
      says: 'is impossible for iron (Fe)',
    },
    {
      what: 'a decimal comma in a comma file',
      file: 'Bottle,Test,Result\nN-1,Iron,"4,5"\n',
      code: 'unclear-number',
      row: 2,
      says: 'Line 2, test "Iron": "4,5" has a comma inside a number',
    },
    {
      what: 'two tests meaning the same',
      file: 'Bottle,Test,Result\nD-1,Iron,4\nD-1,Fe,5\n',
      code: 'duplicate-column',
      row: 1,
      says: 'reads as iron (Fe), like column "Iron"',
    },
  ])('$what', ({ file, code, row, says }) => {
    const result = parseLabCsv(file);
    const found = result.errors.find((e) => e.code === code);
    expect(found, JSON.stringify(result.errors)).toBeDefined();
    expect(found).toMatchObject({ severity: 'error', row });
    expect(found?.message).toContain(says);
  });
});
