/**
 * The import half of tests/bench/import.bench.ts, run in a process of its own so that its memory is the import's:
 * this process loads the import's modules, reads the file, and does store + preview + confirm, nothing else. Its
 * peak RSS is the figure held to the limit; its RSS after loading the modules, before the import, is printed
 * beside it. Started by import.bench.ts with the database URL, crew, user and file path in its environment;
 * prints one JSON line.
 */
import { readFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import v8 from 'node:v8';
import { createDb } from '~/lib/db/db';
import { confirmLabImport, previewLabImport, storeLabFile } from '~/lib/lab-import/lab-import.service';

const need = (name: string): string => {
  const value = process.env[name];
  if (!value) throw new Error(`${name} is not set: this script is started by import.bench.ts`);
  return value;
};
const ms = (from: number) => Math.round((performance.now() - from) * 10) / 10;
const mb = (bytes: number) => Math.round((bytes / (1024 * 1024)) * 10) / 10;

const db = createDb(need('BENCH_DB_URL'), { max: 4 });
const crewId = need('BENCH_CREW_ID');
const userId = need('BENCH_USER_ID');
let peakHeap = 0;
// The heap's size alone, from V8 (about half a microsecond): process.memoryUsage() also reads the RSS from the
// system each time (about 9 µs here), and 200 calls a second showed up in the import's own CPU profile.
const sampler = setInterval(() => {
  peakHeap = Math.max(peakHeap, v8.getHeapStatistics().used_heap_size);
}, 5);
try {
  // One query first, so the pool and the driver are loaded before the figure "before the import" is taken.
  await db.selectFrom('crews').select('id').where('id', '=', crewId).executeTakeFirstOrThrow();
  const bytes = new Uint8Array(readFileSync(need('BENCH_FILE')));
  const rssBeforeImport = process.memoryUsage().rss;

  const storeStart = performance.now();
  const stored = await storeLabFile(db, { crewId, userId, fileName: 'bench.csv', bytes });
  const storeMs = ms(storeStart);
  if (!stored.ok) throw new Error(stored.message);
  const previewStart = performance.now();
  const clean = await previewLabImport(db, { crewId, labFileId: stored.value.labFileId }).then(
    (p) => p.ok && p.value.canConfirm,
  );
  const previewMs = ms(previewStart);
  if (!clean) throw new Error('the bench file should preview clean');
  const confirmStart = performance.now();
  const confirmed = await confirmLabImport(db, { crewId, userId, labFileId: stored.value.labFileId, decisions: {} });
  const confirmMs = ms(confirmStart);
  if (!confirmed.ok) throw new Error(confirmed.message);
  // maxRSS is in kibibytes (Node.js process.resourceUsage()).
  const peakRss = process.resourceUsage().maxRSS * 1024;
  console.log(
    JSON.stringify({
      storeMs,
      previewMs,
      confirmMs,
      importId: confirmed.value.importId,
      samplesWritten: confirmed.value.samplesWritten,
      readingsWritten: confirmed.value.readingsWritten,
      findingsWritten: confirmed.value.findingsWritten,
      rssBeforeImportMb: mb(rssBeforeImport),
      peakRssMb: mb(peakRss),
      peakHeapMb: mb(peakHeap),
    }),
  );
} finally {
  clearInterval(sampler);
  await db.destroy();
}
