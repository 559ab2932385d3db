/**
 * Lab CSV reader budget: a 10,000-row × 30-column report, parsed by papaparse alone (the floor) and by
 * parseLabCsv (recognition, numbers, qualifiers, dates, bottle codes). Prints JSON figures.
 *
 * Each parser is timed in processes of its own, the two kinds started in turn, so that neither pays to collect the
 * other's garbage: timed taking turns in one process, the collector charged much of papaparse's 9 MB result to
 * the reader's runs. That figure is printed beside the limit, for reading.
 * Run: npx tsx tests/bench/import-parse.bench.ts
 */
import { spawnSync } from 'node:child_process';
import os from 'node:os';
import { performance, PerformanceObserver } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import Papa from 'papaparse';
import { ELEMENT_CODES } from '~/lib/analysis/measurands';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';

const ROWS = 10_000;
const RUNS = Number(process.env.BENCH_RUNS ?? 11);
/** Processes per parser and layout. */
const PROCESSES = Number(process.env.BENCH_PROCESSES ?? 5);

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

type Delimiter = ',' | ';';

/** 30 columns: bottle, sampled date, 22 elements, KV40, KV100, VI, TBN, TAN, fuel %. */
function generateReport(delimiter: Delimiter): string {
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

type Parser = 'papaparse' | 'reader';

/** The parser's run over `text`; the reader's checks that the file was read whole and clean. */
function parserOf(parser: Parser, text: string, delimiter: Delimiter): () => void {
  if (parser === 'papaparse') {
    return () => {
      Papa.parse<string[]>(text, { delimiter, newline: '\n' });
    };
  }
  return () => {
    const result = parseLabCsv(text);
    const errors = result.errors.filter((e) => e.severity === 'error').length;
    if (result.rows.length !== ROWS || errors !== 0) {
      throw new Error(`bench file misread: ${result.rows.length} rows, ${errors} errors`);
    }
  };
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

interface ProcessFigures {
  /** The first parse in the process: compiling and optimising included. */
  firstMs: number;
  medianMs: number;
  minMs: number;
  cpuMedianMs: number;
  /** Median time the collector paused the thread during a timed run (PerformanceObserver 'gc' entries). */
  gcMedianMs: number;
  peakRssMb: number;
}

/** Inside a process of one parser: a first run, then RUNS timed runs. */
async function timeInThisProcess(parser: Parser, delimiter: Delimiter): Promise<ProcessFigures> {
  const run = parserOf(parser, generateReport(delimiter), delimiter);
  const pauses: { start: number; duration: number }[] = [];
  const observer = new PerformanceObserver((list) => {
    for (const e of list.getEntries()) pauses.push({ start: e.startTime, duration: e.duration });
  });
  observer.observe({ entryTypes: ['gc'] });
  let start = performance.now();
  run();
  const firstMs = performance.now() - start;
  const spans: [number, number][] = [];
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < RUNS; i += 1) {
    const cpuStart = process.cpuUsage();
    start = performance.now();
    run();
    const end = performance.now();
    const used = process.cpuUsage(cpuStart);
    spans.push([start, end]);
    wall.push(end - start);
    cpu.push((used.user + used.system) / 1000);
  }
  // 'gc' entries arrive after the pause, on a later turn of the event loop.
  await new Promise((resolve) => setTimeout(resolve, 50));
  observer.disconnect();
  const gc = spans.map(([from, to]) =>
    pauses.filter((p) => p.start >= from && p.start < to).reduce((sum, p) => sum + p.duration, 0),
  );
  return {
    firstMs,
    medianMs: median(wall),
    minMs: Math.min(...wall),
    cpuMedianMs: median(cpu),
    gcMedianMs: median(gc),
    // maxRSS is in kibibytes (Node.js process.resourceUsage()).
    peakRssMb: process.resourceUsage().maxRSS / 1024,
  };
}

const ROLE_PARSER = 'READER_BENCH_PARSER';
const ROLE_LAYOUT = 'READER_BENCH_LAYOUT';

/** One process of one parser over one layout, started from this file. */
function timeInOwnProcess(parser: Parser, delimiter: Delimiter): ProcessFigures {
  const child = spawnSync(process.execPath, ['--import', 'tsx', fileURLToPath(import.meta.url)], {
    encoding: 'utf8',
    env: { ...process.env, [ROLE_PARSER]: parser, [ROLE_LAYOUT]: delimiter },
    maxBuffer: 1 << 20,
  });
  if (child.status !== 0) throw new Error(`${parser} process failed: ${String(child.stderr).trim().slice(-400)}`);
  return JSON.parse(String(child.stdout).trim().split('\n').pop() ?? '') as ProcessFigures;
}

const rounded = (v: number): number => Number(v.toFixed(1));

const role = process.env[ROLE_PARSER];
if (role === 'papaparse' || role === 'reader') {
  const layout = process.env[ROLE_LAYOUT] === ';' ? ';' : ',';
  console.log(JSON.stringify(await timeInThisProcess(role, layout)));
  process.exit(0);
}

const figures: Record<string, unknown> = { rows: ROWS, columns: 30, runs: RUNS, processes: PROCESSES };
let peakRssMb = 0;
for (const delimiter of [',', ';'] as const) {
  const text = generateReport(delimiter);
  const own: Record<Parser, ProcessFigures[]> = { papaparse: [], reader: [] };
  for (let p = 0; p < PROCESSES; p += 1) {
    // Started in turn, one then the other, so that other work on a shared machine weighs on both alike.
    const order: Parser[] = p % 2 === 0 ? ['papaparse', 'reader'] : ['reader', 'papaparse'];
    for (const parser of order) own[parser].push(timeInOwnProcess(parser, delimiter));
  }
  // Each figure: the median over the processes of each process's own figure.
  const over = (parser: Parser, key: keyof ProcessFigures): number => median(own[parser].map((f) => f[key]));
  peakRssMb = Math.max(peakRssMb, ...own.papaparse.map((f) => f.peakRssMb), ...own.reader.map((f) => f.peakRssMb));
  const [papaTurns, readerTurns] = timeAlternating([
    parserOf('papaparse', text, delimiter),
    parserOf('reader', text, delimiter),
  ]) as [Timing, Timing];
  figures[delimiter === ',' ? 'comma' : 'semicolonDecimalComma'] = {
    fileBytes: Buffer.byteLength(text),
    papaparseMs: rounded(over('papaparse', 'medianMs')),
    parseLabCsvMs: rounded(over('reader', 'medianMs')),
    ratio: Number((over('reader', 'medianMs') / over('papaparse', 'medianMs')).toFixed(2)),
    papaparseMinMs: rounded(over('papaparse', 'minMs')),
    parseLabCsvMinMs: rounded(over('reader', 'minMs')),
    papaparseCpuMs: rounded(over('papaparse', 'cpuMedianMs')),
    parseLabCsvCpuMs: rounded(over('reader', 'cpuMedianMs')),
    ratioOfCpu: Number((over('reader', 'cpuMedianMs') / over('papaparse', 'cpuMedianMs')).toFixed(2)),
    papaparseGcMs: rounded(over('papaparse', 'gcMedianMs')),
    parseLabCsvGcMs: rounded(over('reader', 'gcMedianMs')),
    papaparseFirstMs: rounded(over('papaparse', 'firstMs')),
    parseLabCsvFirstMs: rounded(over('reader', 'firstMs')),
    ratioOfFirst: Number((over('reader', 'firstMs') / over('papaparse', 'firstMs')).toFixed(2)),
    takingTurns: {
      papaparseMs: rounded(papaTurns.median),
      parseLabCsvMs: rounded(readerTurns.median),
      ratio: Number((readerTurns.median / papaTurns.median).toFixed(2)),
    },
  };
}
// The limit: the reader within 2 × papaparse on the same text (median of the runs, both layouts).
const TARGET_RATIO = 2;
const layoutName = (layout: 'comma' | 'semicolonDecimalComma'): string =>
  layout === 'comma' ? 'comma' : 'semicolon and decimal comma';
interface LayoutFigures {
  papaparseMs: number;
  parseLabCsvMs: number;
  ratio: number;
  takingTurns: { papaparseMs: number; parseLabCsvMs: number; ratio: number };
}
figures.summary = (['comma', 'semicolonDecimalComma'] as const).flatMap((layout) => {
  const f = figures[layout] as LayoutFigures;
  const what = `lab CSV reader, ${ROWS.toLocaleString('en-US')} rows × 30 columns, ${layoutName(layout)}`;
  return [
    {
      what: `${what}, each in processes of its own`,
      result: `${f.parseLabCsvMs} ms`,
      floor: `papaparse ${f.papaparseMs} ms`,
      ratio: f.ratio,
      limit: `≤ ${TARGET_RATIO} ×`,
      ok: f.ratio <= TARGET_RATIO,
    },
    {
      what: `${what}, the two taking turns in one process (for reading)`,
      result: `${f.takingTurns.parseLabCsvMs} ms`,
      floor: `papaparse ${f.takingTurns.papaparseMs} ms`,
      ratio: f.takingTurns.ratio,
      limit: '—',
      ok: null,
    },
  ];
});
figures.peakRssMb = rounded(peakRssMb);
figures.node = process.version;
// Other work on the machine inflates the timings; the load average says how busy it was.
figures.loadAverage1m = Number(os.loadavg()[0]?.toFixed(2));
console.log(JSON.stringify(figures, null, 2));
