/**
 * Spreadsheet lab report budget: a 2,000-row × 30-column .xlsx (typed numbers and dates) through
 * readLabFileBytes (archive checks, exceljs, one sheet to text) and then parseLabCsv. Prints JSON figures.
 * Run: npx tsx tests/bench/import-xlsx.bench.ts
 */
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import ExcelJS from 'exceljs';
import { ELEMENT_CODES } from '~/lib/analysis/measurands';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';
import { readLabFileBytes } from '~/lib/lab-csv/lab-xlsx';

const ROWS = 2_000;
const RUNS = 5;

async function buildWorkbook(): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Results');
  ws.addRow(['Bottle', 'Sampled', ...ELEMENT_CODES, 'KV40', 'KV100', 'VI', 'TBN', 'TAN', 'Fuel %']);
  for (let i = 0; i < ROWS; i += 1) {
    const values = ELEMENT_CODES.map((_, e) => ((i * 31 + e * 17) % 3000) / 10);
    ws.addRow([
      `SW-${String(i).padStart(5, '0')}`,
      new Date(Date.UTC(2026, i % 12, 1 + (i % 28))),
      ...values,
      98.5,
      13.2,
      140,
      7.1,
      2.2,
      0.6,
    ]);
  }
  return new Uint8Array(await wb.xlsx.writeBuffer());
}

const bytes = await buildWorkbook();
const runs: number[] = [];
let rows = 0;
for (let i = 0; i <= RUNS; i += 1) {
  const start = performance.now();
  const out = await readLabFileBytes(bytes);
  if ('error' in out) throw new Error(out.error.message);
  const parsed = parseLabCsv(out.text);
  rows = parsed.rows.length;
  if (i > 0) runs.push(performance.now() - start);
}
if (rows !== ROWS) throw new Error(`bench workbook misread: ${rows} rows`);
runs.sort((a, b) => a - b);
console.log(
  JSON.stringify({
    xlsx: {
      rows: ROWS,
      columns: 30,
      fileBytes: bytes.byteLength,
      runs: RUNS,
      medianMs: runs[Math.floor(runs.length / 2)],
      minMs: runs[0],
      msPer1000Rows: (runs[0] ?? 0) / (ROWS / 1000),
    },
    machine: { cpus: os.cpus().length, node: process.version },
  }),
);
