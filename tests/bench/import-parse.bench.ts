/**
 * Lab CSV reader budget: a 10,000-row × 30-column report, parsed by papaparse alone (the floor) and by
 * parseLabCsv (recognition, numbers, qualifiers, dates, bottle codes). Prints JSON figures.
 * Run: npx tsx tests/bench/import-parse.bench.ts
 */
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import Papa from 'papaparse';
import { ELEMENT_CODES } from '~/lib/analysis/measurands';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';

const ROWS = 10_000;
const RUNS = Number(process.env.BENCH_RUNS ?? 11);

/** Deterministic pseudo-random numbers (mulberry32), so every run parses the same file. */
function createRandom(seed: number): () => number {
  let a = seed;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** 30 columns: bottle, sampled date, 22 elements, KV40, KV100, VI, TBN, TAN, fuel %. */
function generateReport(delimiter: ',' | ';'): string {
  const random = createRandom(20260402);
  const decimal = (v: number): string => (delimiter === ';' ? String(v).replace('.', ',') : String(v));
  const header = ['Bottle', 'Sampled', ...ELEMENT_CODES, 'KV40', 'KV100', 'VI', 'TBN', 'TAN', 'Fuel %'];
  const lines = [header.join(delimiter)];
  for (let i = 0; i < ROWS; i += 1) {
    const day = 1 + (i % 28);
    const month = 1 + (i % 12);
    const cells = [
      `SW-${String(i).padStart(5, '0')}`,
      `2026-${String(month).padStart(2, '0')}-${String(day).padStart(2, '0')}`,
    ];
    for (let e = 0; e < ELEMENT_CODES.length; e += 1) {
      const r = random();
      cells.push(r < 0.1 ? '<1' : r < 0.13 ? 'ND' : decimal(Math.round(r * 3000) / 10));
    }
    cells.push(decimal(Math.round((60 + random() * 60) * 10) / 10), decimal(Math.round((8 + random() * 8) * 10) / 10));
    cells.push(
      String(Math.round(120 + random() * 40)),
      decimal(Math.round(random() * 100) / 10),
      decimal(Math.round(random() * 40) / 10),
    );
    cells.push(decimal(Math.round(random() * 50) / 10));
    lines.push(cells.join(delimiter));
  }
  return `${lines.join('\n')}\n`;
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)] ?? Number.NaN;
}

interface Timing {
  median: number;
  min: number;
  /** Median CPU time of the process (user + system, so the collector's helper threads count too), in ms. */
  cpuMedian: number;
}

/**
 * Median and fastest of RUNS timed runs of each function after one warm-up, the two taking turns run by run so
 * that other work on a shared machine weighs on both alike; the fastest shows the cost with least noise.
 */
function timeAlternating(fns: readonly (() => void)[]): Timing[] {
  for (const fn of fns) fn();
  const wall = fns.map(() => [] as number[]);
  const cpu = fns.map(() => [] as number[]);
  for (let i = 0; i < RUNS; i += 1) {
    fns.forEach((fn, f) => {
      const cpuStart = process.cpuUsage();
      const start = performance.now();
      fn();
      wall[f]!.push(performance.now() - start);
      const used = process.cpuUsage(cpuStart);
      cpu[f]!.push((used.user + used.system) / 1000);
    });
  }
  return fns.map((_, f) => ({ median: median(wall[f]!), min: Math.min(...wall[f]!), cpuMedian: median(cpu[f]!) }));
}

const figures: Record<string, unknown> = { rows: ROWS, columns: 30, runs: RUNS };
for (const delimiter of [',', ';'] as const) {
  const text = generateReport(delimiter);
  let rowsRead = 0;
  let errors = 0;
  const [papaMs, readerMs] = timeAlternating([
    () => {
      Papa.parse<string[]>(text, { delimiter, newline: '\n' });
    },
    () => {
      const result = parseLabCsv(text);
      rowsRead = result.rows.length;
      errors = result.errors.filter((e) => e.severity === 'error').length;
    },
  ]) as [Timing, Timing];
  if (rowsRead !== ROWS || errors !== 0) throw new Error(`bench file misread: ${rowsRead} rows, ${errors} errors`);
  figures[delimiter === ',' ? 'comma' : 'semicolonDecimalComma'] = {
    fileBytes: Buffer.byteLength(text),
    papaparseMs: Number(papaMs.median.toFixed(1)),
    parseLabCsvMs: Number(readerMs.median.toFixed(1)),
    ratio: Number((readerMs.median / papaMs.median).toFixed(2)),
    papaparseMinMs: Number(papaMs.min.toFixed(1)),
    parseLabCsvMinMs: Number(readerMs.min.toFixed(1)),
    ratioOfMin: Number((readerMs.min / papaMs.min).toFixed(2)),
    papaparseCpuMs: Number(papaMs.cpuMedian.toFixed(1)),
    parseLabCsvCpuMs: Number(readerMs.cpuMedian.toFixed(1)),
    ratioOfCpu: Number((readerMs.cpuMedian / papaMs.cpuMedian).toFixed(2)),
  };
}
// The limit: the reader within 2 × papaparse on the same text (median of the runs, both layouts).
const TARGET_RATIO = 2;
figures.summary = (['comma', 'semicolonDecimalComma'] as const).map((layout) => {
  const f = figures[layout] as { papaparseMs: number; parseLabCsvMs: number; ratio: number };
  return {
    what: `lab CSV reader, ${ROWS.toLocaleString('en-US')} rows × 30 columns, ${layout === 'comma' ? 'comma' : 'semicolon and decimal comma'}`,
    result: `${f.parseLabCsvMs} ms`,
    floor: `papaparse ${f.papaparseMs} ms`,
    ratio: f.ratio,
    limit: `≤ ${TARGET_RATIO} ×`,
    ok: f.ratio <= TARGET_RATIO,
  };
});
// maxRSS is in kibibytes (Node.js process.resourceUsage()).
figures.peakRssMb = Number((process.resourceUsage().maxRSS / 1024).toFixed(1));
figures.node = process.version;
// Other work on the machine inflates the timings; the load average says how busy it was.
figures.loadAverage1m = Number(os.loadavg()[0]?.toFixed(2));
console.log(JSON.stringify(figures, null, 2));
