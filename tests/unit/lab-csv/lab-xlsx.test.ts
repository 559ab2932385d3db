import { deflateRawSync } from 'node:zlib';
import ExcelJS from 'exceljs';
import { describe, expect, test } from 'vitest';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';
import { checkWorkbookArchive, formatSheetCell, formatSheetNumber, readLabFileBytes } from '~/lib/lab-csv/lab-xlsx';

type Rows = ExcelJS.CellValue[][];

/** A workbook built in the test (no binary fixture to trust): sheets of rows, optionally hidden. */
async function workbook(
  sheets: { name: string; rows: Rows; hidden?: boolean; numFmt?: Record<string, string> }[],
): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  for (const s of sheets) {
    const ws = wb.addWorksheet(s.name, s.hidden ? { state: 'hidden' } : {});
    for (const row of s.rows) ws.addRow(row);
    for (const [cell, fmt] of Object.entries(s.numFmt ?? {})) ws.getCell(cell).numFmt = fmt;
  }
  return new Uint8Array(await wb.xlsx.writeBuffer());
}

async function read(bytes: Uint8Array, sheetNames?: string[]) {
  const out = await readLabFileBytes(bytes, sheetNames ? { sheetNames } : {});
  if ('error' in out) throw new Error(out.error.message);
  return { ...out, parsed: parseLabCsv(out.text) };
}

const day = (y: number, m: number, d: number) => new Date(Date.UTC(y, m - 1, d));

describe('an .xlsx lab report', () => {
  test('with a title block above the header and typed dates reads to its readings', async () => {
    const bytes = await workbook([
      {
        name: 'Report',
        rows: [
          ['Cinderpass Fluid Works'],
          ['Used oil report', null, null, 'Printed', day(2026, 4, 20)],
          [],
          ['Sample ID', 'Date drawn', 'Date reported', 'Iron (Fe)', 'Copper (Cu)', 'Viscosity 100 °C', 'Fuel %'],
          ['XL-1', day(2026, 4, 3), day(2026, 4, 18), 12, 3.25, 13.4, 0.8],
          ['XL-2', day(2026, 4, 10), day(2026, 4, 18), '<1', 0, 12.95, null],
        ],
      },
    ]);
    const { parsed, sheet, format } = await read(bytes);
    expect([format, sheet]).toEqual(['xlsx', 'Report']);
    expect(parsed.headerLine).toBe(4);
    expect(parsed.errors.filter((e) => e.severity === 'error')).toEqual([]);
    expect(parsed.rows.map((r) => [r.line, r.bottle.raw, r.sampled, r.reported])).toEqual([
      [5, 'XL-1', '2026-04-03', '2026-04-18'],
      [6, 'XL-2', '2026-04-10', '2026-04-18'],
    ]);
    expect(parsed.rows[0]?.readings).toEqual({
      Fe: { value: 12 },
      Cu: { value: 3.25 },
      KV100: { value: 13.4 },
      FUEL: { value: 0.8 },
    });
    expect(parsed.rows[1]?.readings).toEqual({
      Fe: { value: 1, qualifier: '<' },
      Cu: { value: 0 },
      KV100: { value: 12.95 },
    });
    expect(parsed.errors.find((e) => e.code === 'lines-skipped')?.message).toContain('before the header row (line 4)');
  });

  test('a formula cell gives its cached result and is never evaluated', async () => {
    const bytes = await workbook([
      {
        name: 'S',
        rows: [
          ['Bottle', 'Fe', 'Al'],
          [
            'F-1',
            { formula: '1+1', result: 7 } as ExcelJS.CellValue,
            { formula: 'A1*1000', result: 2.5 } as ExcelJS.CellValue,
          ],
        ],
      },
    ]);
    const { parsed } = await read(bytes);
    // 7 and 2.5 are what the lab's spreadsheet stored; evaluating the formulas would give 2 and an error.
    expect(parsed.rows[0]?.readings).toEqual({ Fe: { value: 7 }, Al: { value: 2.5 } });
  });

  test('the sheet a lab profile names is read, else the first with a lab header', async () => {
    const bytes = await workbook([
      { name: 'Cover', rows: [['Report for the crew'], ['Lab notes only']] },
      {
        name: 'Hidden',
        rows: [
          ['Bottle', 'Fe'],
          ['H-1', 99],
        ],
        hidden: true,
      },
      {
        name: 'Summary',
        rows: [
          ['Bottle', 'Fe', 'Cu'],
          ['S-1', 4, 1],
        ],
      },
      {
        name: 'Raw data',
        rows: [
          ['Bottle', 'Fe', 'Cu', 'Si'],
          ['R-1', 5, 2, 9],
        ],
      },
    ]);
    expect((await read(bytes)).sheet).toBe('Summary');
    const chosen = await read(bytes, ['No such sheet', 'raw data']);
    expect(chosen.sheet).toBe('Raw data');
    expect(chosen.sheets).toEqual(['Cover', 'Hidden', 'Summary', 'Raw data']);
    expect(chosen.parsed.rows[0]?.readings).toEqual({ Fe: { value: 5 }, Cu: { value: 2 }, Si: { value: 9 } });
  });

  test('a one-row-per-test sheet is pivoted like a CSV', async () => {
    const bytes = await workbook([
      {
        name: 'Tests',
        rows: [
          ['Bottle', 'Sampled', 'Test', 'Result', 'Unit'],
          ['L-1', day(2026, 1, 5), 'Iron', 11, 'ppm'],
          ['L-1', day(2026, 1, 5), 'TBN', 7.9, 'mg KOH/g'],
        ],
      },
    ]);
    const { parsed } = await read(bytes);
    expect(parsed.layout).toBe('long');
    expect(parsed.rows[0]).toMatchObject({
      sampled: '2026-01-05',
      readings: { Fe: { value: 11 }, TBN: { value: 7.9 } },
    });
  });

  test.each([
    [12, '12'],
    [0.1 + 0.2, '0.3'],
    [1e-7, '0.0000001'],
    [123456789.123, '123456789.123'],
    [Number.NaN, '#NUM!'],
  ])('numbers as a spreadsheet shows them: %s → %s', (value, text) => {
    expect(formatSheetNumber(value)).toBe(text);
  });

  test.each([
    [null, ''],
    ['text', 'text'],
    [true, 'yes'],
    [false, 'no'],
    [day(2026, 2, 28), '2026-02-28'],
    [{ richText: [{ text: 'Fe ' }, { text: 'ppm' }] }, 'Fe ppm'],
    [{ error: '#N/A' }, '#N/A'],
    [{ text: 'link', hyperlink: 'https://lab.example' }, 'link'],
    [{ formula: 'SUM(A1:A2)' }, '=SUM(A1:A2)'],
    [{ formula: 'A1', result: { error: '#DIV/0!' } }, '#DIV/0!'],
  ])('cell %j → %j', (value, text) => {
    expect(formatSheetCell(value as ExcelJS.CellValue)).toBe(text);
  });
});

/** A tiny ZIP archive written by hand, so the archive checks can be fed exactly the lie they must catch. */
function zip(entries: { name: string; data: Buffer; declared?: number }[]): Uint8Array {
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;
  for (const e of entries) {
    const name = Buffer.from(e.name);
    const packed = deflateRawSync(e.data);
    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(20, 4);
    local.writeUInt16LE(8, 8);
    local.writeUInt32LE(packed.length, 18);
    local.writeUInt32LE(e.declared ?? e.data.length, 22);
    local.writeUInt16LE(name.length, 26);
    const central = Buffer.alloc(46);
    central.writeUInt32LE(0x02014b50, 0);
    central.writeUInt16LE(8, 10);
    central.writeUInt32LE(packed.length, 20);
    central.writeUInt32LE(e.declared ?? e.data.length, 24);
    central.writeUInt16LE(name.length, 28);
    central.writeUInt32LE(offset, 42);
    locals.push(local, name, packed);
    centrals.push(central, name);
    offset += 30 + name.length + packed.length;
  }
  const cd = Buffer.concat(centrals);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(entries.length, 8);
  end.writeUInt16LE(entries.length, 10);
  end.writeUInt32LE(cd.length, 12);
  end.writeUInt32LE(offset, 16);
  return new Uint8Array(Buffer.concat([...locals, cd, end]));
}

const PARTS = [
  { name: '[Content_Types].xml', data: Buffer.from('<Types/>') },
  { name: 'xl/workbook.xml', data: Buffer.from('<workbook/>') },
];

describe('bad spreadsheets get clear errors and are never unpacked blindly', () => {
  test.each([
    [
      'a truncated ZIP',
      new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0, 6, 0]),
      'not-csv-file',
      'its ZIP directory is missing',
    ],
    [
      'a ZIP that is no workbook',
      zip([{ name: 'notes.txt', data: Buffer.from('hello') }]),
      'not-csv-file',
      'it is a ZIP archive, not an .xlsx workbook',
    ],
    [
      'an OpenDocument spreadsheet',
      zip([
        { name: 'mimetype', data: Buffer.from('application/vnd.oasis.opendocument.spreadsheet') },
        { name: 'content.xml', data: Buffer.from('<x/>') },
      ]),
      'not-csv-file',
      'OpenDocument spreadsheet (.ods)',
    ],
    [
      'a part that unpacks larger than it says (a zip bomb)',
      zip([...PARTS, { name: 'xl/worksheets/sheet1.xml', data: Buffer.alloc(2_000_000, 'a'), declared: 1000 }]),
      'not-csv-file',
      'does not unpack to the size its directory states',
    ],
    [
      'parts declared over the unpacked limit',
      zip([...PARTS, { name: 'xl/big.xml', data: Buffer.from('x'), declared: 80 * 1024 * 1024 }]),
      'not-csv-file',
      'unpacks to more than 64 MiB',
    ],
    ['a workbook without sheets', zip(PARTS), 'empty-file', 'The spreadsheet has no sheets'],
    [
      'a workbook whose XML is broken',
      zip([
        { name: '[Content_Types].xml', data: Buffer.from('<Types') },
        { name: 'xl/workbook.xml', data: Buffer.from('<workbook><sheets><sheet') },
      ]),
      'not-csv-file',
      'This spreadsheet could not be read',
    ],
    [
      'an old .xls file',
      new Uint8Array([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1, 0, 0]),
      'not-csv-file',
      'old Excel (.xls)',
    ],
  ])('%s', async (_what, bytes, code, says) => {
    const out = await readLabFileBytes(bytes);
    expect('error' in out && out.error.code).toBe(code);
    expect('error' in out && out.error.message).toContain(says);
  });

  test('the archive check passes a real workbook', async () => {
    expect(
      checkWorkbookArchive(
        await workbook([
          {
            name: 'S',
            rows: [
              ['Bottle', 'Fe'],
              ['A', 1],
            ],
          },
        ]),
      ),
    ).toBeNull();
  });

  test.each([['an empty workbook', [{ name: 'Empty', rows: [] }], 'Every sheet of this spreadsheet is empty']])(
    '%s',
    async (_what, sheets, says) => {
      const out = await readLabFileBytes(await workbook(sheets as { name: string; rows: Rows }[]));
      expect('error' in out && out.error.message).toContain(says);
    },
  );

  test.each([
    {
      what: 'a formula without a cached result',
      rows: [
        ['Bottle', 'Fe'],
        ['B-1', { formula: 'A1+1' }],
      ],
      code: 'formula-like-cell',
      says: 'Line 2, column "Fe": "=A1+1" starts like a spreadsheet formula',
    },
    {
      what: 'an error cell',
      rows: [
        ['Bottle', 'Fe'],
        ['B-1', { error: '#DIV/0!' }],
      ],
      code: 'not-a-number',
      says: '"#DIV/0!" is not a number',
    },
    {
      what: 'a date where a number belongs',
      rows: [
        ['Bottle', 'Fe'],
        ['B-1', day(2026, 2, 1)],
      ],
      code: 'not-a-number',
      says: '"2026-02-01" is not a number',
    },
    {
      what: 'a number where a date belongs',
      rows: [
        ['Bottle', 'Sampled', 'Fe'],
        ['B-1', 46115, 3],
      ],
      code: 'invalid-date',
      says: '"46115" is not a date that exists',
    },
    {
      what: 'a negative reading',
      rows: [
        ['Bottle', 'Fe'],
        ['B-1', -3],
      ],
      code: 'negative-value',
      says: '"-3" is negative',
    },
    {
      what: 'text in a numeric cell',
      rows: [
        ['Bottle', 'Fe'],
        ['B-1', 'see remark'],
      ],
      code: 'not-a-number',
      says: '"see remark" is not a number',
    },
    {
      what: 'a blank bottle code',
      rows: [
        ['Bottle', 'Fe'],
        [null, 4],
      ],
      code: 'missing-bottle-code',
      says: 'the bottle code is blank',
    },
    {
      what: 'the same bottle twice',
      rows: [
        ['Bottle', 'Fe'],
        ['B-1', 4],
        ['B-1', 5],
      ],
      code: 'duplicate-bottle-code',
      says: 'was already used on line 2',
    },
    {
      what: 'no bottle column',
      rows: [
        ['Fe', 'Cu'],
        [4, 5],
      ],
      code: 'no-bottle-column',
      says: 'has no bottle code column',
    },
    {
      what: 'a header and no rows',
      rows: [['Bottle', 'Fe', 'Cu']],
      code: 'no-data-rows',
      says: 'no rows of readings follow it',
    },
    {
      what: 'two columns with one meaning',
      rows: [
        ['Bottle', 'Fe', 'Iron'],
        ['B-1', 4, 4],
      ],
      code: 'duplicate-column',
      says: 'reads as iron (Fe), like column "Fe"',
    },
    {
      what: 'an impossible share',
      rows: [
        ['Bottle', 'Water %'],
        ['B-1', 140],
      ],
      code: 'impossible-value',
      says: 'a share of the sample cannot exceed 100 %',
    },
    {
      what: 'a one-row-per-test sheet with a doubled test',
      rows: [
        ['Bottle', 'Test', 'Result'],
        ['B-1', 'Iron', 4],
        ['B-1', 'Iron', 5],
      ],
      code: 'duplicate-test',
      says: 'has "Iron" again (also on line 2)',
    },
    {
      what: 'a one-row-per-test sheet with an empty result',
      rows: [
        ['Bottle', 'Test', 'Result'],
        ['B-1', 'Iron', null],
        ['B-1', 'Copper', 1],
      ],
      code: 'missing-result',
      says: 'its result is blank',
    },
  ])('$what', async ({ rows, code, says }) => {
    const { parsed } = await read(await workbook([{ name: 'S', rows: rows as Rows }]));
    const found = parsed.errors.find((e) => e.code === code);
    expect(found, JSON.stringify(parsed.errors)).toMatchObject({ severity: 'error' });
    expect(found?.message).toContain(says);
  });
});
