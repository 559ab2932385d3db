import { readFileSync, readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { ELEMENT_CODES, type MeasurandCode } from '~/lib/analysis/measurands';
import { decodeLabFile, parseLabCsv, type LabReadings } from '~/lib/lab-csv/lab-csv';
import { formatLabCsv, LAB_CSV_LAYOUTS, type LabCsvLayout, type LabReportRow } from '~/lib/lab-csv/lab-csv-layouts';

const SAMPLE_LABS = fileURLToPath(new URL('../../../sample-data/labs/', import.meta.url));

/** How close a value must come back: exact, except where the layout writes another unit. */
function toleranceFor(layout: LabCsvLayout, code: MeasurandCode): number {
  if (layout === 'units-row-saybolt' && code === 'KV100') return 0.005; // SUS written to 0.01 s ≈ 0.002 mm²/s.
  if (layout === 'wide-symbols' && code === 'FLASH') return 0.03; // °F written to 0.1 °F = 0.056 °C.
  return 0;
}

function expectSameReadings(layout: LabCsvLayout, parsed: LabReadings, written: LabReadings): void {
  // The Saybolt layout carries no insolubles column.
  const writtenCodes = Object.keys(written)
    .filter((c) => !(layout === 'units-row-saybolt' && c === 'INSOL'))
    .sort();
  const parsedCodes = Object.keys(parsed)
    .filter((c) => !(layout === 'units-row-saybolt' && c === 'SUS210'))
    .sort();
  expect(parsedCodes).toEqual(writtenCodes);
  for (const code of writtenCodes as MeasurandCode[]) {
    const want = written[code];
    const got = parsed[code];
    expect(got?.qualifier).toBe(want?.qualifier);
    const tolerance = toleranceFor(layout, code);
    if (tolerance === 0) expect(got?.value).toBe(want?.value);
    else expect(Math.abs((got?.value ?? Number.NaN) - (want?.value ?? 0))).toBeLessThanOrEqual(tolerance);
  }
}

const EXAMPLE_ROWS: LabReportRow[] = [
  {
    bottle: 'SW-1041',
    sampled: '2026-03-04',
    reported: '2026-03-11',
    readings: {
      Fe: { value: 38 },
      Al: { value: 6.5 },
      Cr: { value: 1, qualifier: '<' },
      Si: { value: 0, qualifier: '<' },
      Na: { value: 1000, qualifier: '>' },
      Ca: { value: 2345.5 },
      Zn: { value: 123456.5 },
      KV40: { value: 88.4 },
      KV100: { value: 12.6 },
      VI: { value: 141 },
      TBN: { value: 7.2 },
      TAN: { value: 2.05 },
      FUEL: { value: 1.5 },
      WATER: { value: 0.05 },
      GLYCOL: { value: 0 },
      FLASH: { value: 212 },
      INSOL: { value: 0.4 },
    },
  },
  { bottle: 'SW-1042', sampled: '2026-04-03', readings: { Fe: { value: 41 }, GLYCOL: { value: 1 } } },
  { bottle: 'SW 1043', readings: { Mo: { value: 0.25 } } },
];

describe('formatLabCsv round-trips through parseLabCsv', () => {
  test.each(LAB_CSV_LAYOUTS)('%s: example rows', (layout) => {
    const result = parseLabCsv(formatLabCsv(layout, EXAMPLE_ROWS));
    expect(result.errors.filter((e) => e.severity === 'error')).toEqual([]);
    expect(result.rows.map((r) => r.bottle.raw)).toEqual(EXAMPLE_ROWS.map((r) => r.bottle));
    result.rows.forEach((row, i) => {
      const written = EXAMPLE_ROWS[i];
      if (!written) throw new Error('row count differs');
      expect(row.sampled).toBe(written.sampled);
      expect(row.reported).toBe(written.reported);
      expectSameReadings(layout, row.readings, written.readings);
    });
  });

  test.each([
    { layout: 'wide-symbols', delimiter: ',', decimalMark: '.', unitsLine: null, headerLine: 1 },
    { layout: 'semicolon-names', delimiter: ';', decimalMark: ',', unitsLine: null, headerLine: 1 },
    { layout: 'units-row-saybolt', delimiter: '\t', decimalMark: '.', unitsLine: 3, headerLine: 2 },
  ] as const)('$layout is written as its layout says', ({ layout, delimiter, decimalMark, unitsLine, headerLine }) => {
    const text = formatLabCsv(layout, EXAMPLE_ROWS);
    const result = parseLabCsv(text);
    expect(result).toMatchObject({ delimiter, decimalMark, unitsLine, headerLine });
    expect(result.columns.filter((c) => c.kind === 'unknown')).toEqual([]);
    if (layout === 'semicolon-names') expect(text).toContain(';2.345,5;');
    if (layout === 'semicolon-names') expect(text).toContain(';123.456,5;');
    if (layout === 'units-row-saybolt') {
      expect(result.columns.find((c) => c.conversion === 'SUS210→KV100')).toBeDefined();
      // ASTM D2161 equation: 12.6 mm²/s → 68.67 SUS at 210 °F.
      expect(text).toContain('\t68.67\t');
    }
  });

  const bottleCodes = fc.uniqueArray(fc.integer({ min: 0, max: 9999 }), { minLength: 1, maxLength: 12 });
  const isoDate = fc
    .date({ min: new Date('2015-01-01T00:00:00Z'), max: new Date('2035-12-31T00:00:00Z'), noInvalidDate: true })
    .map((d) => d.toISOString().slice(0, 10));
  const hundredths = (max: number) => fc.integer({ min: 0, max: max * 100 }).map((n) => n / 100);
  const qualified = (max: number) =>
    fc.oneof(
      hundredths(max).map((value) => ({ value })),
      hundredths(max).map((value) => ({ value, qualifier: '<' as const })),
      hundredths(max)
        .filter((v) => v > 0)
        .map((value) => ({ value, qualifier: '>' as const })),
    );
  const readingsArb: fc.Arbitrary<LabReadings> = fc.record(
    {
      ...Object.fromEntries(ELEMENT_CODES.map((code) => [code, qualified(50_000)])),
      KV40: hundredths(400)
        .filter((v) => v >= 2)
        .map((value) => ({ value })),
      KV100: hundredths(40)
        .filter((v) => v >= 2)
        .map((value) => ({ value })),
      VI: fc.integer({ min: 0, max: 300 }).map((value) => ({ value })),
      TBN: qualified(20),
      TAN: qualified(10),
      FUEL: qualified(20),
      WATER: qualified(5),
      INSOL: qualified(5),
      GLYCOL: fc.constantFrom({ value: 0 }, { value: 1 }),
      FLASH: fc.integer({ min: 1000, max: 3000 }).map((n) => ({ value: n / 10 })),
    },
    { requiredKeys: [] },
  ) as fc.Arbitrary<LabReadings>;

  test.each(LAB_CSV_LAYOUTS)('%s: generated rows (property)', (layout) => {
    fc.assert(
      fc.property(
        bottleCodes,
        fc.array(
          fc.record({
            sampled: fc.option(isoDate, { nil: undefined }),
            reported: fc.option(isoDate, { nil: undefined }),
            readings: readingsArb,
          }),
          { minLength: 12, maxLength: 12 },
        ),
        (codes, details) => {
          const rows: LabReportRow[] = codes.map((n, i) => {
            const d = details[i];
            const row: LabReportRow = { bottle: `SW-${String(n).padStart(4, '0')}`, readings: d?.readings ?? {} };
            if (d?.sampled !== undefined) row.sampled = d.sampled;
            if (d?.reported !== undefined) row.reported = d.reported;
            return row;
          });
          const result = parseLabCsv(formatLabCsv(layout, rows));
          expect(result.errors.filter((e) => e.severity === 'error')).toEqual([]);
          expect(result.rows).toHaveLength(rows.length);
          result.rows.forEach((parsed, i) => {
            const written = rows[i];
            expect(parsed.bottle.raw).toBe(written?.bottle);
            expect(parsed.sampled).toBe(written?.sampled);
            expect(parsed.reported).toBe(written?.reported);
            expectSameReadings(layout, parsed.readings, written?.readings ?? {});
          });
        },
      ),
      { numRuns: 60 },
    );
  });
});

describe('sample-data/labs: the demo lab reports read cleanly', () => {
  const files = readdirSync(SAMPLE_LABS)
    .filter((f) => /\.(csv|tsv)$/.test(f))
    .sort();

  test('there is one file per layout', () => {
    expect(files).toEqual(['cinderpass-fluid-works.tsv', 'hollow-creek-oil-lab.csv', 'thistlefen-tribology-bench.csv']);
  });

  test.each(files)('%s', (file) => {
    const decoded = decodeLabFile(new Uint8Array(readFileSync(`${SAMPLE_LABS}${file}`)));
    if ('error' in decoded) throw new Error(decoded.error.message);
    const result = parseLabCsv(decoded.text);
    expect(result.errors.filter((e) => e.severity === 'error')).toEqual([]);
    expect(result.rows.length).toBeGreaterThanOrEqual(2);
    expect(result.rows.every((r) => /^SW\d{4}$/.test(r.bottle.normalised) && r.sampled !== undefined)).toBe(true);
    expect(result.columns.filter((c) => c.kind === 'unknown')).toEqual([]);
  });
});
