import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { decodeLabFile, MAX_LAB_FILE_BYTES, parseLabCsv, type LabCsvResult } from '~/lib/lab-csv/lab-csv';

const FIXTURES = fileURLToPath(new URL('../../fixtures/lab-csv/', import.meta.url));

function readBytes(name: string): Uint8Array {
  return new Uint8Array(readFileSync(`${FIXTURES}${name}`));
}

function readFixture(name: string): LabCsvResult {
  const decoded = decodeLabFile(readBytes(name));
  if ('error' in decoded) throw new Error(`${name} did not decode: ${decoded.error.code}`);
  return parseLabCsv(decoded.text);
}

const errorsOf = (result: LabCsvResult) =>
  result.errors.filter((e) => e.severity === 'error').map(({ code, row, column }) => ({ code, row, column }));

describe('decodeLabFile rejects what is not a lab CSV', () => {
  test.each([
    { fixture: 'bad-empty.csv', code: 'empty-file', says: 'empty' },
    { fixture: 'bad-binary-nul.bin', code: 'binary-file', says: 'binary' },
    { fixture: 'bad-image.png', code: 'image-file', says: 'PNG image' },
    { fixture: 'bad-photo.jpg', code: 'image-file', says: 'JPEG image' },
    { fixture: 'bad-spreadsheet.xlsx', code: 'not-csv-file', says: 'spreadsheet' },
  ])('$fixture → $code', ({ fixture, code, says }) => {
    const result = decodeLabFile(readBytes(fixture));
    expect(result).toHaveProperty('error.code', code);
    expect('error' in result && result.error.message).toContain(says);
  });

  test('a file over MAX_LAB_FILE_BYTES (5 MiB) is refused before decoding', () => {
    expect(MAX_LAB_FILE_BYTES).toBe(5 * 1024 * 1024);
    const tooBig = new Uint8Array(MAX_LAB_FILE_BYTES + 1).fill(0x41);
    const result = decodeLabFile(tooBig);
    expect(result).toHaveProperty('error.code', 'file-too-large');
    expect('error' in result && result.error.message).toContain('5 MiB');
    const justFits = new Uint8Array(MAX_LAB_FILE_BYTES).fill(0x41);
    expect(decodeLabFile(justFits)).toHaveProperty('encoding', 'utf-8');
  });

  test.each([
    { name: 'C0 control byte', bytes: [0x42, 0x6f, 0x01, 0x0a] },
    { name: 'DEL byte', bytes: [0x42, 0x7f, 0x0a] },
    { name: 'UTF-8 BOM then invalid UTF-8', bytes: [0xef, 0xbb, 0xbf, 0x42, 0xff, 0xfe, 0x0a] },
  ])('$name → binary-file', ({ bytes }) => {
    expect(decodeLabFile(new Uint8Array(bytes))).toHaveProperty('error.code', 'binary-file');
  });
});

describe('decodeLabFile decodes text', () => {
  test.each([
    { fixture: 'good-crlf-bom.csv', encoding: 'utf-8', contains: 'Bottle,Fe,Al' },
    { fixture: 'good-comma-symbols.csv', encoding: 'utf-8', contains: 'SW-2001' },
    // Windows-1252 / Latin-1: 0xB5 is µ and 0xB0 is ° (ISO/IEC 8859-1 code chart).
    { fixture: 'latin1-micro-degree.csv', encoding: 'windows-1252', contains: 'Fe µg/g;Visc 40 °C' },
    { fixture: 'utf16le-bom.csv', encoding: 'utf-16le', contains: 'Visc 40 °C' },
  ])('$fixture is $encoding', ({ fixture, encoding, contains }) => {
    const result = decodeLabFile(readBytes(fixture));
    expect(result).toHaveProperty('encoding', encoding);
    if ('error' in result) throw new Error('unexpected error');
    expect(result.text).toContain(contains);
    expect(result.text.charCodeAt(0)).not.toBe(0xfeff);
  });

  test.each([
    { encoding: 'utf-16le', bom: false },
    { encoding: 'utf-16be', bom: false },
  ] as const)('$encoding without a BOM is recognised by its NUL pattern', ({ encoding }) => {
    const text = 'Bottle,Fe\nSW-1,5\n';
    const bytes = new Uint8Array(text.length * 2);
    for (let i = 0; i < text.length; i += 1) bytes[i * 2 + (encoding === 'utf-16le' ? 0 : 1)] = text.charCodeAt(i);
    expect(decodeLabFile(bytes)).toEqual({ text, encoding });
  });

  test('UTF-16 big-endian with BOM', () => {
    const text = 'Bottle,Fe\nSW-1,5\n';
    const bytes = new Uint8Array(2 + text.length * 2);
    bytes.set([0xfe, 0xff]);
    for (let i = 0; i < text.length; i += 1) bytes[3 + i * 2] = text.charCodeAt(i);
    expect(decodeLabFile(bytes)).toEqual({ text, encoding: 'utf-16be' });
  });
});

describe('parseLabCsv: bad input gets an exact code, and the message names the line and column', () => {
  test.each([
    { fixture: 'bad-whitespace-only.csv', errors: [{ code: 'empty-file', row: null, column: null }] },
    { fixture: 'bad-header-only.csv', errors: [{ code: 'no-data-rows', row: 1, column: null }] },
    { fixture: 'bad-no-bottle-column.csv', errors: [{ code: 'no-bottle-column', row: 1, column: null }] },
    {
      fixture: 'bad-ragged-rows.csv',
      errors: [
        { code: 'ragged-row', row: 3, column: 'Si' },
        { code: 'ragged-row', row: 4, column: 'Si' },
      ],
    },
    { fixture: 'bad-duplicate-bottle.csv', errors: [{ code: 'duplicate-bottle-code', row: 4, column: 'Bottle' }] },
    { fixture: 'bad-duplicate-column.csv', errors: [{ code: 'duplicate-column', row: 1, column: 'iron ppm' }] },
    {
      fixture: 'bad-negative-values.csv',
      errors: [
        { code: 'negative-value', row: 2, column: 'Al' },
        { code: 'negative-value', row: 3, column: 'Fe' },
      ],
    },
    {
      fixture: 'bad-text-in-numeric.csv',
      errors: [
        { code: 'not-a-number', row: 2, column: 'Fe' },
        { code: 'not-a-number', row: 3, column: 'TBN' },
      ],
    },
    {
      fixture: 'bad-formula-cells.csv',
      errors: [
        { code: 'formula-like-cell', row: 2, column: 'Fe' },
        { code: 'formula-like-cell', row: 2, column: 'Al' },
        { code: 'formula-like-cell', row: 2, column: 'Cu' },
        { code: 'formula-like-cell', row: 2, column: 'Si' },
        { code: 'formula-like-cell', row: 3, column: 'Bottle' },
      ],
    },
    {
      fixture: 'bad-huge-numbers.csv',
      errors: [
        { code: 'impossible-value', row: 2, column: 'Fe' },
        { code: 'impossible-value', row: 3, column: 'Water %' },
        { code: 'impossible-value', row: 4, column: 'TBN' },
      ],
    },
    {
      fixture: 'bad-ambiguous-dates.csv',
      errors: [
        { code: 'ambiguous-date', row: 2, column: 'Sampled' },
        { code: 'ambiguous-date', row: 3, column: 'Sampled' },
        { code: 'ambiguous-date', row: 2, column: 'Reported' },
      ],
    },
    {
      fixture: 'bad-invalid-dates.csv',
      errors: [
        { code: 'invalid-date', row: 2, column: 'Sampled' },
        { code: 'invalid-date', row: 3, column: 'Sampled' },
        { code: 'invalid-date', row: 4, column: 'Sampled' },
      ],
    },
    { fixture: 'bad-unterminated-quote.csv', errors: [{ code: 'malformed-csv', row: 2, column: null }] },
    {
      fixture: 'bad-decimal-comma-in-comma-file.csv',
      errors: [
        { code: 'unclear-number', row: 2, column: 'KV100' },
        { code: 'ragged-row', row: 3, column: 'KV100' },
      ],
    },
    { fixture: 'bad-missing-bottle-code.csv', errors: [{ code: 'missing-bottle-code', row: 2, column: 'Bottle' }] },
    { fixture: 'bad-saybolt-out-of-range.csv', errors: [{ code: 'out-of-range', row: 2, column: 'Visc 210F SUS' }] },
  ])('$fixture', ({ fixture, errors }) => {
    const result = readFixture(fixture);
    expect(errorsOf(result)).toEqual(errors);
    for (const issue of result.errors) {
      if (issue.row !== null) expect(issue.message).toContain(`Line ${issue.row}`);
      if (issue.column !== null) expect(issue.message).toContain(`column "${issue.column}"`);
    }
  });

  test('an empty string is an empty file', () => {
    expect(errorsOf(parseLabCsv(''))).toEqual([{ code: 'empty-file', row: null, column: null }]);
  });

  test('formula-like cells are quoted as text in the message and never become readings', () => {
    const result = readFixture('bad-formula-cells.csv');
    const messages = result.errors.map((e) => e.message).join('\n');
    expect(messages).toContain('"=1+1"');
    expect(messages).toContain('"@SUM(A1)"');
    expect(result.rows).toHaveLength(1);
    expect(result.rows[0]?.readings).toEqual({});
    // The row whose bottle code is a formula is left out altogether.
    expect(result.rows.map((r) => r.bottle.raw)).toEqual(['SW-6701']);
  });

  test('a repeated bottle code names the line where it was first used; codes match after normalising', () => {
    const result = readFixture('bad-duplicate-bottle.csv');
    expect(result.errors[0]?.message).toContain('line 2');
    expect(result.rows.map((r) => r.bottle.normalised)).toEqual(['SW6401', 'SW6402', 'SW6401']);
  });

  test('ragged rows are left out; a trailing empty cell is tolerated', () => {
    const result = readFixture('bad-ragged-rows.csv');
    expect(result.rows.map((r) => r.line)).toEqual([2, 5]);
  });

  test('no bottle column: the message lists the columns found', () => {
    const result = readFixture('bad-no-bottle-column.csv');
    expect(result.errors.find((e) => e.code === 'no-bottle-column')?.message).toContain('"Machine", "Fe", "Al"');
    expect(result.rows).toEqual([]);
  });
});

describe('parseLabCsv: good layouts', () => {
  test.each([
    {
      fixture: 'good-comma-symbols.csv',
      delimiter: ',',
      decimalMark: '.',
      rowCount: 3,
      first: {
        line: 2,
        bottle: { raw: 'SW-2001', normalised: 'SW2001' },
        sampled: '2026-02-10',
        reported: '2026-02-17',
      },
      readings: {
        Fe: { value: 34 },
        Al: { value: 5 },
        Cr: { value: 1 },
        Cu: { value: 12 },
        Pb: { value: 2 },
        Sn: { value: 1, qualifier: '<' },
        Si: { value: 9 },
        Na: { value: 3 },
        K: { value: 1, qualifier: '<' },
        B: { value: 41 },
        Mo: { value: 62 },
        Zn: { value: 1010 },
        P: { value: 930 },
        Ca: { value: 2350 },
        Mg: { value: 18 },
        KV40: { value: 92.1 },
        KV100: { value: 13.4 },
        VI: { value: 146 },
        TBN: { value: 7.8 },
      },
    },
    {
      fixture: 'good-semicolon-names-decimal-comma.csv',
      delimiter: ';',
      decimalMark: ',',
      rowCount: 2,
      first: { line: 2, bottle: { raw: 'SW-3101', normalised: 'SW3101' }, sampled: '2026-02-03' },
      readings: {
        Fe: { value: 22.5 },
        Al: { value: 4.1 },
        Si: { value: 7 },
        Na: { value: 2 },
        K: { value: 1 },
        Ca: { value: 1234.5 },
        Zn: { value: 1012 },
        KV100: { value: 13.1 },
        FUEL: { value: 0.8 },
        WATER: { value: 0.05 },
      },
    },
    {
      fixture: 'good-name-with-symbol.csv',
      delimiter: ',',
      decimalMark: '.',
      rowCount: 2,
      first: { line: 2, bottle: { raw: 'sw 5001', normalised: 'SW5001' }, sampled: '2026-01-05' },
      readings: {
        Fe: { value: 17 },
        Al: { value: 3 },
        Cu: { value: 22 },
        Si: { value: 6 },
        S: { value: 2400 },
        P: { value: 760 },
      },
    },
    {
      fixture: 'good-units-in-headers.csv',
      delimiter: ',',
      decimalMark: '.',
      rowCount: 1,
      first: { line: 2, bottle: { raw: 'SW-5101', normalised: 'SW5101' } },
      // Water 500 ppm = 0.05 %; flash 428 °F = (428 − 32) × 5/9 = 220 °C.
      readings: {
        Fe: { value: 28 },
        Al: { value: 4 },
        Cu: { value: 6 },
        Cr: { value: 1 },
        Ni: { value: 1, qualifier: '<' },
        KV40: { value: 91.5 },
        KV100: { value: 13 },
        WATER: { value: 0.05 },
        FLASH: { value: 220 },
        TBN: { value: 7.2 },
        TAN: { value: 2.1 },
      },
    },
    {
      fixture: 'good-crlf-bom.csv',
      delimiter: ',',
      decimalMark: '.',
      rowCount: 2,
      first: { line: 2, bottle: { raw: 'SW-5201', normalised: 'SW5201' } },
      readings: { Fe: { value: 10 }, Al: { value: 2 } },
    },
    {
      fixture: 'good-quoted-fields.csv',
      delimiter: ',',
      decimalMark: '.',
      rowCount: 2,
      first: { line: 2, bottle: { raw: 'SW-5301', normalised: 'SW5301' } },
      readings: { Ca: { value: 1234 }, Zn: { value: 1012.5 } },
    },
    {
      fixture: 'good-detection-limits.csv',
      delimiter: ',',
      decimalMark: '.',
      rowCount: 2,
      first: { line: 2, bottle: { raw: 'SW-5401', normalised: 'SW5401' } },
      readings: {
        Fe: { value: 1, qualifier: '<' },
        Al: { value: 0, qualifier: '<' },
        Cr: { value: 0, qualifier: '<' },
        Si: { value: 0.5, qualifier: '<' },
        Na: { value: 1000, qualifier: '>' },
        Ca: { value: 2, qualifier: '<' },
      },
    },
    {
      fixture: 'good-tab-decimal-comma.tsv',
      delimiter: '\t',
      decimalMark: ',',
      rowCount: 1,
      first: { line: 2, bottle: { raw: 'SW-6101', normalised: 'SW6101' } },
      readings: { Fe: { value: 12.5 }, Al: { value: 3 }, KV100: { value: 13.2 } },
    },
    {
      fixture: 'good-title-lines.csv',
      delimiter: ',',
      decimalMark: '.',
      rowCount: 1,
      first: { line: 5, bottle: { raw: 'SW-6001', normalised: 'SW6001' } },
      readings: { Fe: { value: 9 }, Al: { value: 2 } },
    },
    {
      fixture: 'latin1-micro-degree.csv',
      delimiter: ';',
      decimalMark: ',',
      rowCount: 1,
      first: { line: 2, bottle: { raw: 'SW-6201', normalised: 'SW6201' } },
      readings: { Fe: { value: 12 }, KV40: { value: 91.5 } },
    },
    {
      fixture: 'utf16le-bom.csv',
      delimiter: '\t',
      decimalMark: '.',
      rowCount: 1,
      first: { line: 2, bottle: { raw: 'SW-7501', normalised: 'SW7501' } },
      readings: { Fe: { value: 10 }, KV40: { value: 90.2 } },
    },
  ] as const)('$fixture', ({ fixture, delimiter, decimalMark, rowCount, first, readings }) => {
    const result = readFixture(fixture);
    expect(errorsOf(result)).toEqual([]);
    expect(result.delimiter).toBe(delimiter);
    expect(result.decimalMark).toBe(decimalMark);
    expect(result.rows).toHaveLength(rowCount);
    expect(result.rows[0]).toMatchObject(first);
    expect(result.rows[0]?.readings).toEqual(readings);
  });

  test('units row and Saybolt seconds at 210 °F become KV100 by ASTM D2161', () => {
    const result = readFixture('good-tab-units-row-saybolt.tsv');
    expect(errorsOf(result)).toEqual([]);
    expect(result.headerLine).toBe(2);
    expect(result.unitsLine).toBe(3);
    expect(result.columns.find((c) => c.header === 'Viscosity 210 °F')).toEqual({
      index: 6,
      header: 'Viscosity 210 °F',
      kind: 'measurand',
      code: 'KV100',
      unit: 'SUS',
      conversion: 'SUS210→KV100',
    });
    expect(result.columns.find((c) => c.header === 'Flash Point')).toMatchObject({
      code: 'FLASH',
      unit: '°F',
      conversion: '°F→°C',
    });
    const [first, second] = result.rows;
    // D2161 equation: 12.6 mm²/s → 68.669 SUS at 210 °F, and 10 mm²/s → 59.232 SUS at 210 °F (hand-computed).
    expect(first?.readings.SUS210).toEqual({ value: 68.67 });
    expect(first?.readings.KV100?.value).toBeCloseTo(12.6, 3);
    // 59.23 is 59.232 rounded by the lab, so it gives back 10 mm²/s to within 0.005.
    expect(second?.readings.KV100?.value).toBeCloseTo(10.0, 2);
    // 413.6 °F = (413.6 − 32) × 5/9 = 212 °C.
    expect(first?.readings.FLASH?.value).toBeCloseTo(212, 9);
    expect(first).toMatchObject({ line: 4, sampled: '2026-04-03' });
    expect(second).toMatchObject({ line: 5, sampled: '2026-05-02' });
    expect(result.errors.map((e) => e.code)).toEqual(['lines-skipped']);
  });

  test('a quoted cell spanning two lines keeps later line numbers true', () => {
    const result = readFixture('good-quoted-fields.csv');
    expect(result.rows.map((r) => r.line)).toEqual([2, 4]);
    expect(result.rows[0]?.other).toEqual({ Notes: 'dusty week, new air filter\nfitted after' });
    expect(result.rows[1]?.other).toEqual({ Notes: 'said "fine"' });
  });

  test.each([
    { fixture: 'good-dates-day-first.csv', dates: ['2026-04-03', '2026-04-13', '2026-04-04'] },
    { fixture: 'good-dates-month-first.csv', dates: ['2026-03-04', '2026-04-13'] },
  ])('$fixture: one unambiguous date settles the column', ({ fixture, dates }) => {
    const result = readFixture(fixture);
    expect(errorsOf(result)).toEqual([]);
    expect(result.rows.map((r) => r.sampled)).toEqual(dates);
  });

  test('glycol words read as 1 and 0; a blank glycol cell is missing', () => {
    const result = readFixture('good-glycol-words.csv');
    expect(errorsOf(result)).toEqual([]);
    expect(result.rows.map((r) => r.readings.GLYCOL?.value)).toEqual([0, 1, 1, 0, undefined]);
  });

  test('unknown columns are kept as text and reported, never dropped', () => {
    const result = readFixture('good-unknown-columns-kept.csv');
    expect(errorsOf(result)).toEqual([]);
    expect(result.errors.filter((e) => e.code === 'unknown-column').map((e) => e.column)).toEqual(['Lab No', 'Notes']);
    expect(result.rows[0]?.other).toEqual({ 'Lab No': 'L-778812', Notes: '=SUM(A1:A9)' });
    expect(result.errors.find((e) => e.code === 'formula-like-cell')).toMatchObject({
      severity: 'warning',
      row: 2,
      column: 'Notes',
    });
    expect(result.columns.map((c) => c.kind)).toEqual(['bottle', 'unknown', 'measurand', 'unknown']);
  });
});

describe('parseLabCsv: inline cases', () => {
  test.each([
    { name: 'mixed line endings', text: 'Bottle,Fe\r\nSW-1,1\nSW-2,2\rSW-3,3\n', lines: [2, 3, 4] },
    { name: 'blank lines between rows', text: 'Bottle,Fe\n\nSW-1,1\n,\nSW-2,2\n', lines: [3, 5] },
    { name: 'no final newline', text: 'Bottle,Fe\nSW-1,1', lines: [2] },
  ])('$name: line numbers follow the file', ({ text, lines }) => {
    const result = parseLabCsv(text);
    expect(errorsOf(result)).toEqual([]);
    expect(result.rows.map((r) => r.line)).toEqual(lines);
  });

  test.each([
    // The semicolon's count per line is steady; decimal commas' count is not, and they lose.
    { text: 'Bottle;Fe;Al;KV100\nSW-1;12,5;3;13,2\nSW-2;11;3,5;13\n', delimiter: ';' },
    { text: 'Bottle,Fe,Al\nSW-1,12.5,3\n', delimiter: ',' },
    { text: 'Bottle\tFe\tAl\nSW-1\t12.5\t3\n', delimiter: '\t' },
    { text: '"Bottle;code",Fe\nSW-1,2\n', delimiter: ',' },
  ] as const)('delimiter $delimiter detected', ({ text, delimiter }) => {
    expect(parseLabCsv(text).delimiter).toBe(delimiter);
  });

  test.each([
    { text: 'Bottle;Fe;KV100\nSW-1;12;13.2\n', mark: '.', kv100: 13.2 },
    { text: 'Bottle;Fe;Ca\nSW-1;12;1.234\n', mark: ',', kv100: undefined },
  ] as const)('semicolon file decimal mark $mark', ({ text, mark, kv100 }) => {
    const result = parseLabCsv(text);
    expect(result.decimalMark).toBe(mark);
    expect(result.rows[0]?.readings.KV100?.value).toBe(kv100);
  });

  test('a dotted thousand in a semicolon file stays a thousand', () => {
    expect(parseLabCsv('Bottle;Ca\nSW-1;1.234\n').rows[0]?.readings.Ca).toEqual({ value: 1234 });
  });

  test('a column mixing both date orders flags its ambiguous cells', () => {
    const result = parseLabCsv('Bottle,Sampled,Fe\nSW-1,13/04/2026,1\nSW-2,04/14/2026,1\nSW-3,05/06/2026,1\n');
    expect(errorsOf(result)).toEqual([{ code: 'ambiguous-date', row: 4, column: 'Sampled' }]);
    expect(result.errors[0]?.message).toContain('mixes both orders');
    expect(result.rows.map((r) => r.sampled)).toEqual(['2026-04-13', '2026-04-14', undefined]);
  });

  test.each([
    { dateOrder: 'dmy', sampled: '2026-04-03' },
    { dateOrder: 'mdy', sampled: '2026-03-04' },
  ] as const)('options.dateOrder $dateOrder settles 03/04/2026', ({ dateOrder, sampled }) => {
    const result = parseLabCsv('Bottle,Sampled,Fe\nSW-1,03/04/2026,1\n', { dateOrder });
    expect(errorsOf(result)).toEqual([]);
    expect(result.rows[0]?.sampled).toBe(sampled);
  });

  test('a lab profile mapping overrides recognition, by exact header or ignoring case', () => {
    const text = 'Machine,Date,Lab No,Visc hot,Notes\nSW-1,2026-04-03,L-1,59.23,ok\n';
    const result = parseLabCsv(text, {
      mapping: { Machine: 'bottle', date: 'sampled', ' LAB NO ': 'ignore', 'Visc hot': 'SUS210', Notes: 'ignore' },
    });
    expect(errorsOf(result)).toEqual([]);
    expect(result.errors).toEqual([]);
    expect(result.columns.map((c) => c.kind)).toEqual(['bottle', 'sampled', 'ignored', 'measurand', 'ignored']);
    expect(result.rows[0]).toMatchObject({
      bottle: { raw: 'SW-1', normalised: 'SW1' },
      sampled: '2026-04-03',
      other: {},
    });
    expect(result.rows[0]?.readings.KV100?.value).toBeCloseTo(10, 2);
  });

  test('a Saybolt column beside a measured KV100 keeps SUS210 only, without conversion', () => {
    const result = parseLabCsv('Bottle,KV100,SUS 210F\nSW-1,10.1,59.23\n');
    expect(result.columns[2]).toMatchObject({ code: 'SUS210', unit: 'SUS' });
    expect(result.columns[2]?.conversion).toBeUndefined();
    expect(result.rows[0]?.readings).toEqual({ KV100: { value: 10.1 }, SUS210: { value: 59.23 } });
  });

  test('element in % converts to ppm (1 % = 10,000 ppm)', () => {
    const result = parseLabCsv('Bottle,Sulfur %\nSW-1,0.25\n');
    expect(result.columns[1]).toMatchObject({ code: 'S', unit: '%', conversion: '%→ppm' });
    expect(result.rows[0]?.readings.S).toEqual({ value: 2500 });
  });

  test('an Excel "sep=;" first line names the delimiter and still counts as a line', () => {
    const result = parseLabCsv('sep=;\nBottle;Fe;Notes\nSW-1;12,5;a, b, c\n');
    expect(result.delimiter).toBe(';');
    expect(errorsOf(result)).toEqual([]);
    expect(result.rows[0]).toMatchObject({ line: 3, readings: { Fe: { value: 12.5 } }, other: { Notes: 'a, b, c' } });
  });

  test.each([
    { text: 'Bottle,Fe,\nSW-1,1,\n', warned: false },
    { text: 'Bottle,Fe,\nSW-1,1,x\n', warned: true },
  ])('a blank header is reported only when its column holds values ($text)', ({ text, warned }) => {
    const result = parseLabCsv(text);
    expect(result.errors.some((e) => e.code === 'unknown-column' && e.column === 'column 3')).toBe(warned);
    expect(result.rows[0]?.readings).toEqual({ Fe: { value: 1 } });
  });

  test('a mapped header counts when finding the header under a title line', () => {
    const result = parseLabCsv('Report\nProbe,Eisen\nSW-1,3\n', { mapping: { Probe: 'bottle', Eisen: 'Fe' } });
    expect(result.headerLine).toBe(2);
    expect(result.rows[0]).toMatchObject({ bottle: { normalised: 'SW1' }, readings: { Fe: { value: 3 } } });
  });

  test('a row with only blank readings is kept with a warning', () => {
    const result = parseLabCsv('Bottle,Fe,Al\nSW-1,,\n');
    expect(result.rows).toHaveLength(1);
    expect(result.errors).toEqual([expect.objectContaining({ severity: 'warning', code: 'no-readings', row: 2 })]);
  });

  test('an over-long bottle code is refused', () => {
    const result = parseLabCsv(`Bottle,Fe\n${'X'.repeat(65)},1\n`);
    expect(errorsOf(result)).toEqual([{ code: 'bottle-code-too-long', row: 2, column: 'Bottle' }]);
  });
});
