/**
 * Lab import budget: a 10,000-row × 30-column report imported end to end (store, preview with bottle matching,
 * one-transaction confirm with findings and interval calls) into a scratch database, beside its floor measured in
 * the same run: papaparse parsing the same file alone plus one COPY of the same readings into the readings table.
 * Target: the whole import within 2 × that floor, peak RSS under 250 MB. Prints JSON; no assertions.
 * Run: node --import tsx tests/bench/import.bench.ts (BENCH_KEEP_DB=1 keeps the scratch database afterwards, to look
 * at what the import stored).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import { sql } from 'kysely';
import Papa from 'papaparse';
import { ELEMENT_CODES } from '~/lib/analysis/measurands';
import { copyRows, type CopyValue } from '~/lib/db/copy';
import { createDb } from '~/lib/db/db';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';
import { normaliseBottleCode } from '~/lib/samples/bottle-code';
import { APP_NODE_FLAGS } from '../../scripts/lib/app-node-flags';
import { bundleForNode } from '../../scripts/lib/bundle-serve.mjs';
import { dropEmbeddedDatabase, ensureEmbeddedDatabase, migrateToLatest } from '../../scripts/lib/database';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const ROOT = path.resolve(HERE, '../..');
const ROWS = 10_000;

/** What import-run.ts prints. */
interface ImportRun {
  storeMs: number;
  previewMs: number;
  confirmMs: number;
  importId: string;
  samplesWritten: number;
  readingsWritten: number;
  findingsWritten: number;
  rssBeforeImportMb: number;
  peakRssMb: number;
  peakHeapMb: number;
}
const MACHINES = 20;
const DB_NAME = 'sumpwise_bench';
/** Limits of this benchmark: the whole import within 2 × its floor, the process under 250 MB at its peak. */
const TARGET_RATIO = 2;
const TARGET_RSS_MB = 250;

/** Deterministic pseudo-random numbers (mulberry32), so every run imports the same file. */
function createRandom(seed: number): () => number {
  let a = seed;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const code = (i: number) => `SW-${String(i).padStart(5, '0')}`;
const dayOf = (i: number) =>
  new Date(Date.UTC(2020, 0, 1) + Math.floor(i / MACHINES) * 86_400_000).toISOString().slice(0, 10);

/** 30 columns: bottle, sampled, reported, 22 elements, KV40, KV100, VI, TBN, fuel %. Invented values. */
function generateReport(): string {
  const random = createRandom(20261202);
  const header = ['Bottle', 'Sampled', 'Reported', ...ELEMENT_CODES, 'KV40', 'KV100', 'VI', 'TBN', 'Fuel %'];
  const lines = [header.join(',')];
  for (let i = 0; i < ROWS; i += 1) {
    const cells = [code(i), dayOf(i), dayOf(i + MACHINES * 7)];
    for (let e = 0; e < ELEMENT_CODES.length; e += 1) {
      const r = random();
      cells.push(r < 0.1 ? '<1' : String(Math.round(r * 600) / 10));
    }
    cells.push(String(Math.round((80 + random() * 20) * 10) / 10), String(Math.round((12 + random() * 2) * 10) / 10));
    cells.push(
      String(Math.round(140 + random() * 10)),
      String(Math.round(60 + random() * 20) / 10),
      String(Math.round(random() * 30) / 10),
    );
    lines.push(cells.join(','));
  }
  return `${lines.join('\n')}\n`;
}

/**
 * import-run.ts compiled to one JavaScript file (packages left to node_modules), as the built app runs its code:
 * run through tsx instead, the child would carry tsx's loader and transpiler (about 40 MB) in the figure.
 */
function compileImportRun(): string {
  const outfile = path.join(ROOT, 'node_modules/.cache/sumpwise-bench/import-run.mjs');
  bundleForNode(path.join(HERE, 'import-run.ts'), outfile);
  return outfile;
}

const ms = (from: number) => Math.round((performance.now() - from) * 10) / 10;

async function main(): Promise<void> {
  const url = ensureEmbeddedDatabase(DB_NAME);
  await migrateToLatest(url, false);
  const db = createDb(url, { max: 4 });
  try {
    const text = generateReport();
    const bytes = new TextEncoder().encode(text);

    // Scratch data: one crew, 20 machines, 10,000 registered samples (one per row).
    const user = await db
      .insertInto('users')
      .values({
        id: 'bench-user',
        email: 'bench@example.test',
        display_name: 'Bench',
        password_hash: 'x',
        email_verified_at: new Date(),
      } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    const crew = await db
      .insertInto('crews')
      .values({ name: 'Bench crew' } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    const machineIds: string[] = [];
    for (let m = 0; m < MACHINES; m += 1) {
      const row = await db
        .insertInto('machines')
        .values({
          crew_id: crew.id,
          owner_user_id: user.id,
          name: `Bench ${m}`,
          engine_layout: 'single',
          cooling: 'liquid',
          meter: 'km',
          recommended_grades: JSON.stringify([]),
          max_interval_distance: 6000,
        } as never)
        .returning('id')
        .executeTakeFirstOrThrow();
      machineIds.push(row.id);
    }
    await sql`
      insert into samples (crew_id, machine_id, bottle_code, bottle_code_norm, drawn_on, odometer, distance_on_oil, sae_grade, created_by, state)
      select ${crew.id}::uuid, (${sql.val(machineIds)}::uuid[])[(i % ${MACHINES}) + 1], c, n, d::date, 3000 * (i / ${MACHINES} + 1), 3000, '10W-40', ${user.id}, 'shipped'
      from unnest(${sql.val(Array.from({ length: ROWS }, (_, i) => i))}::int[], ${sql.val(Array.from({ length: ROWS }, (_, i) => code(i)))}::text[],
                  ${sql.val(Array.from({ length: ROWS }, (_, i) => normaliseBottleCode(code(i))))}::text[], ${sql.val(Array.from({ length: ROWS }, (_, i) => dayOf(i)))}::text[]) as t(i, c, n, d)`.execute(
      db,
    );

    // The import, phase by phase.
    // The import runs in a process of its own (import-run.ts), so its peak RSS is the import's and not this
    // process's, which holds the generated file, the migrations and the set-up.
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), 'sumpwise-bench-')), 'bench.csv');
    writeFileSync(file, bytes);
    // The app processes' V8 flags, plus any given for a look inside (BENCH_IMPORT_FLAGS="--trace-gc", with
    // BENCH_IMPORT_LOG naming a file for what the process prints).
    const extraFlags = (process.env.BENCH_IMPORT_FLAGS ?? '').split(' ').filter(Boolean);
    const child = spawnSync(process.execPath, [...APP_NODE_FLAGS, ...extraFlags, compileImportRun()], {
      encoding: 'utf8',
      env: { ...process.env, BENCH_DB_URL: url, BENCH_CREW_ID: crew.id, BENCH_USER_ID: user.id, BENCH_FILE: file },
      maxBuffer: 16 << 20,
    });
    rmSync(path.dirname(file), { recursive: true, force: true });
    if (process.env.BENCH_IMPORT_LOG) writeFileSync(process.env.BENCH_IMPORT_LOG, String(child.stdout));
    const lastLine =
      String(child.stdout)
        .trim()
        .split('\n')
        .findLast((l) => l.startsWith('{')) ?? '';
    if (child.status !== 0 || !lastLine.startsWith('{'))
      throw new Error(`the import process failed: ${String(child.stderr).trim().split('\n').slice(-3).join(' ')}`);
    const run = JSON.parse(lastLine) as ImportRun;
    const { storeMs, previewMs: previewMs, confirmMs } = run;
    const confirmed = { value: run };

    let papaMs = Infinity;
    for (let run = 0; run < 3; run += 1) {
      const t = performance.now();
      Papa.parse<string[]>(text, { skipEmptyLines: true });
      papaMs = Math.min(papaMs, ms(t));
    }
    // The reader alone, for scale.
    const readerStart = performance.now();
    const parsed = parseLabCsv(text);
    const readerMs = ms(readerStart);

    // Floor 2: the same readings with one COPY into the real readings table (its key, indexes and foreign keys),
    // the sample ids looked up beforehand; rolled back.
    const idOf = new Map(
      (await db.selectFrom('samples').select(['id', 'bottle_code_norm']).where('crew_id', '=', crew.id).execute()).map(
        (s) => [s.bottle_code_norm, s.id],
      ),
    );
    const importId = confirmed.value.importId;
    const copyMs = await db
      .transaction()
      .execute(async (trx) => {
        await sql`delete from readings`.execute(trx);
        const t = performance.now();
        function* rows(): Generator<CopyValue[]> {
          for (const r of parsed.rows) {
            const sampleId = idOf.get(r.bottle.normalised)!;
            for (const m in r.readings) {
              const v = r.readings[m as keyof typeof r.readings]!;
              yield [sampleId, m, v.value, v.qualifier ?? null, importId];
            }
          }
        }
        await copyRows(trx, 'readings', ['sample_id', 'measurand', 'value', 'qualifier', 'lab_import_id'], rows());
        const took = ms(t);
        throw Object.assign(new Error('rollback'), { took });
      })
      .catch((e: { took?: number }) => e.took ?? Number.NaN);

    const wholeMs = Math.round((storeMs + previewMs + confirmMs) * 10) / 10;
    const floorMs = Math.round((papaMs + copyMs) * 10) / 10;
    console.log(
      JSON.stringify(
        {
          file: { rows: ROWS, columns: parsed.columns.length, bytes: bytes.byteLength, machines: MACHINES },
          // The floor: papaparse alone + one COPY of the readings into the readings table (key, indexes, foreign keys).
          floor: { papaparseMs: papaMs, copyIntoReadingsMs: copyMs, totalMs: floorMs },
          import: {
            readerParseMs: readerMs,
            storeMs,
            // Preview = read the stored file, parse, match 10,000 bottle codes and decide every row (the validation).
            previewValidationMs: previewMs,
            // Confirm = the preview again under a row lock, then every write, findings and interval calls, in one transaction.
            confirmWriteMs: confirmMs,
            wholeMs,
            samplesWritten: confirmed.value.samplesWritten,
            readingsWritten: confirmed.value.readingsWritten,
            findingsWritten: confirmed.value.findingsWritten,
          },
          ratioToFloor: Math.round((wholeMs / floorMs) * 100) / 100,
          targetRatio: TARGET_RATIO,
          withinTarget: wholeMs / floorMs <= TARGET_RATIO && run.peakRssMb < TARGET_RSS_MB,
          memory: {
            measured: 'peak RSS of a process that only loads the import modules and imports the file',
            peakRssMb: run.peakRssMb,
            rssBeforeImportMb: run.rssBeforeImportMb,
            importGrowthMb: Math.round((run.peakRssMb - run.rssBeforeImportMb) * 10) / 10,
            peakHeapMb: run.peakHeapMb,
            nodeFlags: APP_NODE_FLAGS,
            targetMb: TARGET_RSS_MB,
          },
          summary: [
            {
              what: `lab import whole (store + preview + confirm), ${ROWS.toLocaleString('en-US')} rows × 30 columns`,
              result: `${(wholeMs / 1000).toFixed(1)} s (confirm ${(confirmMs / 1000).toFixed(1)} s)`,
              floor: `papaparse + COPY into readings ${(floorMs / 1000).toFixed(1)} s`,
              ratio: Math.round((wholeMs / floorMs) * 100) / 100,
              limit: `≤ ${TARGET_RATIO} ×`,
              ok: wholeMs / floorMs <= TARGET_RATIO,
            },
            {
              what: 'lab import, peak RSS of a process doing only the import',
              result: `${run.peakRssMb} MB (${run.rssBeforeImportMb} MB with its modules loaded, before the import)`,
              floor: '—',
              ratio: null,
              limit: `< ${TARGET_RSS_MB} MB`,
              ok: run.peakRssMb < TARGET_RSS_MB,
            },
          ],
          node: process.version,
        },
        null,
        2,
      ),
    );
  } finally {
    await db.destroy();
    if (!process.env.BENCH_KEEP_DB) dropEmbeddedDatabase(DB_NAME);
  }
}

await main();
