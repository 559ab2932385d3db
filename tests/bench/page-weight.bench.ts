/**
 * JavaScript each page ships: fetches the built pages as a signed-in mechanic, collects the module scripts
 * and island component/renderer URLs from the HTML, follows their static imports inside dist/client/_astro,
 * and sums raw and gzip (level 9) sizes per page. Targets (reported, not asserted): pages without an
 * interactive view ship no framework JavaScript; the machine page under 200 KB compressed; the service worker
 * and offline code add at most 60 KB compressed to the drain card (against its weight before they existed).
 * Run: node --import tsx tests/bench/page-weight.bench.ts
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { openBenchApp, seedBenchMachine } from './bench-app';

const CLIENT = path.resolve(process.env.BENCH_CLIENT_DIR ?? 'dist/client');
const TARGET_MACHINE_KB = 200;
/** The drain card's compressed JavaScript before the offline side existed (this bench, 2026-12-02, same machine). */
const DRAIN_CARD_BEFORE_OFFLINE_KB = 72.8;
const TARGET_OFFLINE_ADDED_KB = 60;

/** Static and dynamic import specifiers of a built chunk ("./x.js" or "/_astro/x.js"). */
function importsOf(code: string): string[] {
  const out: string[] = [];
  for (const m of code.matchAll(/(?:import|export)\s*(?:[\w*{}\s,$]*from\s*)?["']([^"']+\.js)["']/g)) out.push(m[1]!);
  return out;
}

/** Every JS file a page loads up front: the closure of its scripts' static imports (dynamic imports are excluded). */
function closure(entries: string[]): Set<string> {
  const seen = new Set<string>();
  const stack = [...entries];
  while (stack.length) {
    const url = stack.pop()!;
    if (seen.has(url) || !url.startsWith('/_astro/')) continue;
    seen.add(url);
    const code = readFileSync(path.join(CLIENT, url), 'utf8');
    for (const spec of importsOf(code)) stack.push(path.posix.join(path.posix.dirname(url), spec));
  }
  return seen;
}

function entriesOf(html: string): string[] {
  const urls = new Set<string>();
  for (const m of html.matchAll(/<script[^>]*\ssrc="([^"]+)"/g)) urls.add(m[1]!);
  for (const m of html.matchAll(/(?:component-url|renderer-url|before-hydration-url)="([^"]+)"/g))
    if (m[1]) urls.add(m[1]);
  return [...urls];
}

const app = await openBenchApp('sumpwise_bench_pages');
try {
  const { cookie, machineId, sampleId } = await seedBenchMachine(app.db, 12);
  const pages: Record<string, string> = {
    home: '/',
    overview: '/overview',
    tools: '/tools',
    rules: '/rules',
    machine: `/machines/${machineId}`,
    history: `/machines/${machineId}/history`,
    sample: `/samples/${sampleId}`,
  };
  // The garage pages are the rider's: measured as a lead of the same crew (mechanics cannot open them).
  const garagePages: Record<string, string> = {
    drainCard: `/machines/${machineId}/drain-card`,
    oilChange: `/machines/${machineId}/oil-change`,
    outbox: '/outbox',
  };
  const result: Record<
    string,
    { status: number; files: number; islands: number; rawKB: number; gzipKB: number; react: boolean }
  > = {};
  for (const [name, p] of [...Object.entries(pages), ['promote', ''], ...Object.entries(garagePages)] as [
    string,
    string,
  ][]) {
    if (name === 'promote') {
      await app.db
        .updateTable('crew_members')
        .set({ role: 'lead' })
        .where(
          'crew_id',
          '=',
          (await app.db.selectFrom('machines').select('crew_id').where('id', '=', machineId).executeTakeFirstOrThrow())
            .crew_id,
        )
        .execute();
      continue;
    }
    const res = await fetch(`${app.baseUrl}${p}`, { headers: { cookie }, redirect: 'manual' });
    const html = await res.text();
    const files = closure(entriesOf(html));
    let raw = 0;
    let gz = 0;
    let react = false;
    // Inline scripts (Astro's island loader, for one) count too.
    for (const m of html.matchAll(/<script(?![^>]*\ssrc=)[^>]*>([\s\S]*?)<\/script>/g)) {
      if (/type="application\/(ld\+)?json"/.test(m[0])) continue;
      raw += Buffer.byteLength(m[1]!);
      gz += gzipSync(Buffer.from(m[1]!), { level: 9 }).length;
    }
    for (const f of files) {
      const buf = readFileSync(path.join(CLIENT, f));
      raw += buf.length;
      gz += gzipSync(buf, { level: 9 }).length;
      if (/react-dom|__SECRET_INTERNALS|createRoot/.test(buf.toString('utf8'))) react = true;
    }
    result[name] = {
      status: res.status,
      files: files.size,
      islands: (html.match(/<astro-island/g) ?? []).length,
      rawKB: Math.round(raw / 102.4) / 10,
      gzipKB: Math.round(gz / 102.4) / 10,
      react,
    };
  }
  const noFramework = Object.entries(result)
    .filter(([n]) => !['machine', 'sample', 'drainCard', 'oilChange', 'outbox'].includes(n))
    .every(([, r]) => !r.react);
  // The service worker is fetched once per install, not per page; reported beside the pages.
  const sw = (() => {
    try {
      return readFileSync(path.join(CLIENT, 'sw.js'));
    } catch {
      return null;
    }
  })();
  const serviceWorker = sw
    ? { rawKB: Math.round(sw.length / 102.4) / 10, gzipKB: Math.round(gzipSync(sw, { level: 9 }).length / 102.4) / 10 }
    : null;
  const offlineAddedKB =
    Math.round((result['drainCard']!.gzipKB - DRAIN_CARD_BEFORE_OFFLINE_KB + (serviceWorker?.gzipKB ?? 0)) * 10) / 10;
  console.log(
    JSON.stringify({
      pages: result,
      serviceWorker,
      targets: {
        machineUnderKB: TARGET_MACHINE_KB,
        machineMet: result['machine']!.gzipKB < TARGET_MACHINE_KB,
        staticPagesWithoutFramework: noFramework,
        offlineAddedToDrainCardKB: offlineAddedKB,
        offlineAddedUnderKB: TARGET_OFFLINE_ADDED_KB,
        offlineMet: offlineAddedKB <= TARGET_OFFLINE_ADDED_KB,
      },
    }),
  );
} finally {
  await app.stop();
}
