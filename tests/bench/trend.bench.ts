/**
 * Trend endpoint under load: GET /api/trends/[machineId] for a machine with 200 samples (30 readings each),
 * 20 concurrent clients on loopback for 10 s against the built server. Prints one JSON line (p50/p95/p99 in ms);
 * no assertion. Run: node --import tsx tests/bench/trend.bench.ts
 */
import { performance } from 'node:perf_hooks';
import { openBenchApp, quantile, seedBenchMachine } from './bench-app';

const SAMPLES = 200;
const CONCURRENCY = Number(process.env.BENCH_CONCURRENCY ?? 20);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);

const app = await openBenchApp('sumpwise_bench_trend');
try {
  const { cookie, machineId } = await seedBenchMachine(app.db, SAMPLES);
  const url = `${app.baseUrl}/api/trends/${machineId}?measurands=Fe,Al,Si&basis=ppm&x=odometer`;
  const first = await fetch(url, { headers: { cookie } });
  const body = (await first.json()) as { series?: { points: unknown[] }[] };
  if (first.status !== 200 || body.series?.[0]?.points.length !== SAMPLES) throw new Error(`warm-up answered ${first.status} with ${body.series?.[0]?.points.length} points`);
  const bytes = JSON.stringify(body).length;
  for (let i = 0; i < 20; i++) await (await fetch(url, { headers: { cookie } })).arrayBuffer();

  const latencies: number[] = [];
  let errors = 0;
  const end = performance.now() + SECONDS * 1000;
  const worker = async () => {
    while (performance.now() < end) {
      const t0 = performance.now();
      try {
        const res = await fetch(url, { headers: { cookie } });
        await res.arrayBuffer();
        if (res.status !== 200) errors++;
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
  console.log(JSON.stringify({
    samples: SAMPLES, measurands: 3, concurrency: CONCURRENCY, seconds: Math.round(elapsed * 10) / 10, requests: latencies.length, errors,
    requestsPerSecond: Math.round(latencies.length / elapsed), responseBytes: bytes,
    p50Ms: Math.round(quantile(latencies, 0.5) * 10) / 10, p95Ms: Math.round(quantile(latencies, 0.95) * 10) / 10,
    p99Ms: Math.round(quantile(latencies, 0.99) * 10) / 10, maxMs: Math.round(latencies.at(-1)! * 10) / 10,
  }));
} finally {
  await app.stop();
}
