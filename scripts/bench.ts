// `npm run bench`: runs every benchmark under tests/bench/ (each a script printing a JSON object as its
// last line of output) one after another, and prints one table of every figure with the machine it ran on.
import { spawnSync } from 'node:child_process';
import { mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ROOT } from './lib/processes';

const dir = path.join(ROOT, 'tests/bench');
const only = process.argv.slice(2);
const files = readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts') && (only.length === 0 || only.some((o) => f.includes(o))))
  .sort();
const rows: [string, string, string][] = [];
/** One line per limit a benchmark checks: what, result, its floor measured in the same run, the ratio, the limit. */
interface SummaryRow {
  what: string;
  result: string;
  floor: string;
  ratio: number | null;
  limit: string;
  /** null: a figure shown for reading beside a limit's row, with no limit of its own. */
  ok: boolean | null;
}
const summary: [string, SummaryRow][] = [];
let failures = 0;

/** The last JSON object printed, on one line or pretty-printed over several (from a line starting with '{'). */
function lastJsonObject(stdout: string): Record<string, unknown> | undefined {
  const lines = stdout.trimEnd().split('\n');
  for (let i = lines.length - 1; i >= 0; i--) {
    if (!lines[i]!.startsWith('{')) continue;
    try {
      const value = JSON.parse(lines.slice(i).join('\n')) as unknown;
      if (value && typeof value === 'object' && !Array.isArray(value)) return value as Record<string, unknown>;
    } catch {
      /* not where the object starts: keep looking */
    }
  }
  return undefined;
}

function flatten(prefix: string, value: unknown, out: [string, string][]): void {
  if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
    for (const [k, v] of Object.entries(value)) flatten(prefix ? `${prefix}.${k}` : k, v, out);
  } else {
    out.push([prefix, typeof value === 'number' ? String(Math.round(value * 100) / 100) : JSON.stringify(value)]);
  }
}

for (const file of files) {
  const name = file.replace(/\.bench\.ts$/, '');
  process.stderr.write(`[bench] ${name}…\n`);
  const result = spawnSync(process.execPath, ['--expose-gc', '--import', 'tsx', path.join(dir, file)], {
    cwd: ROOT,
    encoding: 'utf8',
    env: { ...process.env, ASTRO_TELEMETRY_DISABLED: '1' },
    maxBuffer: 64 << 20,
    timeout: 15 * 60_000,
  });
  const json = lastJsonObject(String(result.stdout));
  if (result.status !== 0 || !json) {
    failures++;
    rows.push([
      name,
      'error',
      (String(result.stderr).trim().split('\n').pop() ?? `exit ${result.status}`).slice(0, 120),
    ]);
    continue;
  }
  if (Array.isArray(json.summary)) for (const row of json.summary as SummaryRow[]) summary.push([name, row]);
  const { summary: _summary, ...figures } = json;
  const flat: [string, string][] = [];
  flatten('', figures, flat);
  for (const [k, v] of flat) rows.push([name, k, v]);
}

const cpu = os.cpus()[0]?.model ?? 'unknown CPU';
const header = `Machine: ${os.cpus().length} × ${cpu}, ${(os.totalmem() / 2 ** 30).toFixed(0)} GiB, Node.js ${process.version}, ${new Date().toISOString().slice(0, 10)}`;
const summaryTable = [
  '| benchmark | what | result | floor in the same run | ratio | limit | |',
  '| --- | --- | --- | --- | --- | --- | --- |',
  ...summary.map(
    ([name, r]) =>
      `| ${name} | ${r.what} | ${r.result} | ${r.floor} | ${r.ratio === null ? '—' : `${r.ratio} ×`} | ${r.limit} | ${r.ok === null ? '' : r.ok ? '✔' : '✘'} |`,
  ),
].join('\n');
const detail = [
  '| benchmark | figure | value |',
  '| --- | --- | --- |',
  ...rows.map((r) => `| ${r.join(' | ')} |`),
].join('\n');
// The load average says how busy the machine was: other work on it inflates every timing.
const table = `${summaryTable}\n\nLoad average (1 min) at the end: ${os.loadavg()[0]!.toFixed(2)}\n\n${detail}`;
console.log(`${header}\n\n${table}`);
mkdirSync(path.join(ROOT, 'tests/bench/results'), { recursive: true });
writeFileSync(path.join(ROOT, 'tests/bench/results/latest.md'), `${header}\n\n${table}\n`);
process.exit(failures ? 1 : 0);
