/**
 * Trend endpoint under load: GET /api/trends/[machineId] for a machine with 200 samples (30 readings each), three
 * elements, 20 concurrent clients on loopback for 10 s against the built server, beside its floor measured in the
 * same run: GET /api/health (one cheap database round trip) at the same concurrency. Also the size of one answer
 * as sent with gzip accepted, and the same clients against a second server that keeps no built answers. Prints JSON
 * with a summary (limits: trend p95 within 3 × health p95, answer under 40 KB); no assertion.
 * Run: node --import tsx tests/bench/trend.bench.ts
 */
import { performance } from 'node:perf_hooks';
import { freePort } from '../../scripts/lib/processes';
import { openBenchApp, quantile, seedBenchMachine } from './bench-app';

const SAMPLES = 200;
const CONCURRENCY = Number(process.env.BENCH_CONCURRENCY ?? 20);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
/** Limits of this benchmark. */
const TARGET_P95_RATIO = 3;
const TARGET_BYTES = 40 * 1024;

const r1 = (v: number) => Math.round(v * 10) / 10;

/** CONCURRENCY clients asking `url` for SECONDS: latencies (ms) and errors. */
async function hammer(url: string, headers: Record<string, string>, expectedStatus = 200) {
  const latencies: number[] = [];
  let errors = 0;
  const end = performance.now() + SECONDS * 1000;
  const worker = async () => {
    while (performance.now() < end) {
      const t0 = performance.now();
      try {
        const res = await fetch(url, { headers });
        await res.arrayBuffer();
        if (res.status !== expectedStatus) errors++;
      } catch {
        errors++;
      }
      latencies.push(performance.now() - t0);
    }
  };
  const started = performance.now();
  await Promise.all(Array.from({ length: CONCURRENCY }, worker));
  const elapsed = (performance.now() - started) / 1000;
  latencies.sort((a, b) => a - b);
  return {
    requests: latencies.length,
    errors,
    requestsPerSecond: Math.round(latencies.length / elapsed),
    p50Ms: r1(quantile(latencies, 0.5)),
    p95Ms: r1(quantile(latencies, 0.95)),
    p99Ms: r1(quantile(latencies, 0.99)),
    maxMs: r1(latencies.at(-1)!),
  };
}

const app = await openBenchApp('sumpwise_bench_trend');
try {
  const { cookie, machineId } = await seedBenchMachine(app.db, SAMPLES);
  const url = `${app.baseUrl}/api/trends/${machineId}?measurands=Fe,Al,Si&basis=ppm&x=odometer`;
  // What a browser sends: gzip accepted. fetch unpacks the body; content-length is the size on the wire.
  const headers = { cookie, 'accept-encoding': 'gzip, deflate, br' };
  const first = await fetch(url, { headers });
  const sentBytes = Number(first.headers.get('content-length'));
  const text = await first.text();
  const body = JSON.parse(text) as { samples?: { id: unknown[] } };
  if (first.status !== 200 || body.samples?.id.length !== SAMPLES)
    throw new Error(`warm-up answered ${first.status} with ${body.samples?.id.length} samples`);
  const etag = first.headers.get('etag') ?? '';
  const revalidated = await fetch(url, { headers: { ...headers, 'if-none-match': etag } });
  await revalidated.arrayBuffer();
  for (let i = 0; i < 20; i++) await (await fetch(url, { headers })).arrayBuffer();

  // The floor first, then the trend, each on a warm server.
  const health = await hammer(`${app.baseUrl}/api/health`, {});
  const trend = await hammer(url, headers);
  // A chart whose machine has not changed: the browser revalidates with its tag and gets 304 without the answer
  // being built (one fingerprint query instead of the chart's queries).
  const unchanged = await hammer(url, { ...headers, 'if-none-match': etag }, 304);
  const p95Ratio = Math.round((trend.p95Ms / health.p95Ms) * 100) / 100;

  // The app keeps each built answer by its tag (CHART_CACHE_MB), so the hammering above measures the fingerprint
  // query and a kept answer. The same clients against a second server over the same database that keeps nothing
  // show what building every answer costs (the first view after new results, or a store too small).
  let nothingKept: Awaited<ReturnType<typeof hammer>> | null = null;
  if (app.startAnotherServer) {
    const other = await app.startAnotherServer(await freePort(), 1, { CHART_CACHE_MB: '0' });
    try {
      const otherUrl = url.replace(app.baseUrl, other.baseUrl);
      for (let i = 0; i < 20; i++) await (await fetch(otherUrl, { headers })).arrayBuffer();
      nothingKept = await hammer(otherUrl, headers);
    } finally {
      await other.stop();
    }
  }
  console.log(
    JSON.stringify({
      samples: SAMPLES,
      measurands: 3,
      concurrency: CONCURRENCY,
      seconds: SECONDS,
      trend,
      unchanged,
      health,
      nothingKept,
      response: {
        sentBytes,
        encoding: first.headers.get('content-encoding'),
        jsonBytes: Buffer.byteLength(text),
        unchangedAnswers: revalidated.status,
      },
      p95RatioToHealth: p95Ratio,
      summary: [
        {
          what: `trend endpoint, 200 samples × 3 elements, ${CONCURRENCY} clients`,
          result: `p95 ${trend.p95Ms} ms (${trend.requestsPerSecond} req/s, ${trend.errors} errors), built answers kept by tag`,
          floor: `GET /api/health p95 ${health.p95Ms} ms`,
          ratio: p95Ratio,
          limit: `≤ ${TARGET_P95_RATIO} ×`,
          ok: p95Ratio <= TARGET_P95_RATIO && trend.errors === 0,
        },
        ...(nothingKept
          ? [
              {
                what: `trend endpoint, every answer built (CHART_CACHE_MB=0), ${CONCURRENCY} clients`,
                result: `p95 ${nothingKept.p95Ms} ms (${nothingKept.requestsPerSecond} req/s, ${nothingKept.errors} errors)`,
                floor: `GET /api/health p95 ${health.p95Ms} ms`,
                ratio: Math.round((nothingKept.p95Ms / health.p95Ms) * 100) / 100,
                limit: 'for reading (the limit is the row above)',
                ok: null,
              },
            ]
          : []),
        {
          what: `trend endpoint revalidated, unchanged machine (304), ${CONCURRENCY} clients`,
          result: `p95 ${unchanged.p95Ms} ms (${unchanged.requestsPerSecond} req/s, ${unchanged.errors} not 304)`,
          floor: `GET /api/health p95 ${health.p95Ms} ms`,
          ratio: Math.round((unchanged.p95Ms / health.p95Ms) * 100) / 100,
          limit: `≤ ${TARGET_P95_RATIO} ×`,
          ok: unchanged.p95Ms / health.p95Ms <= TARGET_P95_RATIO && unchanged.errors === 0,
        },
        {
          what: 'trend answer as sent (gzip accepted)',
          result: `${(sentBytes / 1024).toFixed(1)} KB (${(Buffer.byteLength(text) / 1024).toFixed(1)} KB of JSON); unchanged: ${revalidated.status}`,
          floor: '—',
          ratio: null,
          limit: '< 40 KB',
          ok: sentBytes < TARGET_BYTES && revalidated.status === 304,
        },
      ],
    }),
  );
} finally {
  await app.stop();
}
