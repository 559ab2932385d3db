import { describe, expect, test } from 'vitest';
import {
  buildExportFileName,
  buildReadingsCsv,
  formatCsvField,
  formatCsvLine,
  type ExportReading,
} from '~/lib/exports/readings-csv';
import { KM_PER_MI } from '~/lib/units/units';

describe('formatCsvField', () => {
  test.each([
    // Formula starts are neutralised with a leading ' (OWASP "CSV Injection").
    ['=HYPERLINK("x")', `"'=HYPERLINK(""x"")"`],
    ['+cmd', "'+cmd"],
    ['-2+3', "'-2+3"],
    ['@SUM(A1)', "'@SUM(A1)"],
    ['\tTAB', "'\tTAB"],
    // Plain numbers in text stay numbers; ordinary text is left alone.
    ['-3', '-3'],
    ['+2.5', '+2.5'],
    ['10W-40', '10W-40'],
    // RFC 4180: fields with comma, quote or line break are quoted, quotes doubled.
    ['Trail, 450', '"Trail, 450"'],
    ['say "hi"', '"say ""hi"""'],
    ['two\nlines', '"two\nlines"'],
    [12.5, '12.5'],
    [null, ''],
  ] as const)('%j → %j', (input, expected) => {
    expect(formatCsvField(input)).toBe(expected);
  });

  test('a line ends in CRLF (RFC 4180)', () => {
    expect(formatCsvLine(['a', 1, null])).toBe('a,1,\r\n');
  });
});

describe('buildReadingsCsv', () => {
  const base: ExportReading = {
    machineName: 'Ridge 450',
    meter: 'km',
    bottleCode: 'SW-0001',
    drawnOn: '2026-03-01',
    odometerStored: 12000,
    distanceOnOilStored: 1500,
    grade: '10W-40',
    oilProduct: 'Shop oil',
    state: 'reviewed',
    measurand: 'Fe',
    qualifier: null,
    value: 42,
    unit: 'ppm',
    level: 'steady',
  };
  test.each([
    ['km machine', base, 'Ridge 450,SW-0001,2026-03-01,12000,km,1500,10W-40,Shop oil,reviewed,Fe,,42,ppm,steady'],
    // A mile machine stores km; the export shows its own unit (1 mi = 1.609344 km, NIST SP 811).
    [
      'mi machine',
      { ...base, meter: 'mi' as const, odometerStored: 1000 * KM_PER_MI, distanceOnOilStored: 500 * KM_PER_MI },
      'Ridge 450,SW-0001,2026-03-01,1000,mi,500,10W-40,Shop oil,reviewed,Fe,,42,ppm,steady',
    ],
    [
      'hour meter keeps one decimal',
      { ...base, meter: 'h' as const, odometerStored: 123.44, distanceOnOilStored: null },
      'Ridge 450,SW-0001,2026-03-01,123.4,h,,10W-40,Shop oil,reviewed,Fe,,42,ppm,steady',
    ],
    [
      'below detection',
      { ...base, measurand: 'Cr', qualifier: '<' as const, value: 1 },
      'Ridge 450,SW-0001,2026-03-01,12000,km,1500,10W-40,Shop oil,reviewed,Cr,<,1,ppm,steady',
    ],
    [
      'a hostile product name',
      { ...base, oilProduct: '=cmd|"/c calc"!A1' },
      `Ridge 450,SW-0001,2026-03-01,12000,km,1500,10W-40,"'=cmd|""/c calc""!A1",reviewed,Fe,,42,ppm,steady`,
    ],
  ])('%s', (_n, row, line) => {
    const csv = buildReadingsCsv([row]);
    const lines = csv.split('\r\n');
    expect(lines[0]).toBe(
      'machine,bottle_code,drawn_on,odometer,meter,distance_on_oil,sae_grade,oil_product,state,measurand,qualifier,value,unit,level',
    );
    expect(lines[1]).toBe(line);
    expect(lines).toHaveLength(3);
  });

  test.each([
    ['Ridge 450', '2026-03-01', 'sumpwise-ridge-450-2026-03-01.csv'],
    ['"; rm -rf', '2026-03-01', 'sumpwise-rm-rf-2026-03-01.csv'],
    ['***', '2026-03-01', 'sumpwise-readings-2026-03-01.csv'],
  ])('file name of %j', (scope, day, name) => {
    expect(buildExportFileName(scope, day)).toBe(name);
  });
});
