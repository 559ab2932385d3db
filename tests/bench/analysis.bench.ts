/**
 * Benchmark of the analysis engine: findings and the interval call for one machine with 500 samples of 30
 * measurands each (invented data from a seeded generator). Run: npx tsx tests/bench/analysis.bench.ts
 * Prints one JSON line of figures; the target (under 50 ms) is reported, not asserted.
 */
import { performance } from 'node:perf_hooks';
import {
  HISTORY_TAIL,
  analyseSample,
  decideIntervalCall,
  replayHistory,
  type PreviousJudgement,
  type MachineProfile,
  type MeasurandCode,
  type SamplePoint,
} from '~/lib/analysis/index';
// mulberry32, seeded, so every run measures the same invented history.
import { makeRandom } from '../unit/analysis/simulated-machines';
import { ELEMENT_CODES } from '~/lib/analysis/measurands';
import { TYPICAL_USED_OIL } from './typical-oil';

const SAMPLES = 500;
const CODES: MeasurandCode[] = [...ELEMENT_CODES, 'KV40', 'KV100', 'VI', 'SUS210', 'FLASH', 'FUEL', 'WATER', 'INSOL'];

function buildMachineHistory(): SamplePoint[] {
  const random = makeRandom(20240501);
  const samples: SamplePoint[] = [];
  for (let i = 0; i < SAMPLES; i++) {
    const readings: SamplePoint['readings'] = {};
    for (const code of CODES) {
      const typical = TYPICAL_USED_OIL[code]!;
      // ±15 % scatter, an occasional excursion so some rules fire.
      const excursion = random() < 0.03 ? 2.5 : 1;
      readings[code] = { value: Number((typical * excursion * (0.85 + 0.3 * random())).toFixed(3)) };
    }
    samples.push({
      id: `bench-${i}`,
      takenAt: new Date(Date.UTC(2010, 0, 1) + i * 20 * 86_400_000).toISOString().slice(0, 10),
      odometer: (i + 1) * 3000,
      distanceOnOil: 3000,
      topUpVolume: 0.2,
      oilVolume: 3,
      grade: '10W-40',
      oilProduct: i % 50 < 45 ? 'Valley Trail 10W-40' : 'Ridge Synth 15W-50',
      newOilKv100: 14.2,
      readings,
    });
  }
  return samples;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

const machine: MachineProfile = {
  cooling: 'liquid',
  distanceUnit: 'km',
  maxIntervalDistance: 6000,
  maxIntervalDays: 365,
};
const samples = buildMachineHistory();
const history = samples.slice(0, -1);
const sample = samples.at(-1)!;

// The judgements of the earlier samples, as the replay carries them forward.
const earlier = replayHistory({ machine, samples: history });
const previous: PreviousJudgement[] = earlier.map((r, i) => ({
  sampleId: r.sampleId,
  call: r.call.call,
  worst: r.analysis.worst,
  stretchReady: r.call.basis.stretchReady,
  nextIntervalDistance: r.call.nextIntervalDistance,
  distanceOnOil: history[i]!.distanceOnOil,
}));

// One step of the replay: the newest sample's findings and call, given the judgements before it.
function runLatest(): number {
  const analysis = analyseSample({ machine, history, sample });
  const call = decideIntervalCall({
    machine,
    history: history.slice(-HISTORY_TAIL),
    sample,
    analysis,
    previous: previous.slice(-HISTORY_TAIL),
  });
  return analysis.findings.length + call.reasons.length;
}

// Every sample judged against the samples before it: what the lab import and the recompute run per machine.
function runReplay(): number {
  return replayHistory({ machine, samples }).reduce((n, r) => n + r.analysis.findings.length, 0);
}

for (let i = 0; i < 20; i++) runLatest();
runReplay();

const latest: number[] = [];
for (let i = 0; i < 200; i++) {
  const t0 = performance.now();
  runLatest();
  latest.push(performance.now() - t0);
}
const replay: number[] = [];
let replayFindings = 0;
for (let i = 0; i < 5; i++) {
  const t0 = performance.now();
  replayFindings = runReplay();
  replay.push(performance.now() - t0);
}

const latestMedian = median(latest);
console.log(
  JSON.stringify({
    bench: 'analysis',
    samples: SAMPLES,
    measurands: CODES.length,
    latestSampleMs: Number(latestMedian.toFixed(3)),
    latestSampleMaxMs: Number(Math.max(...latest).toFixed(3)),
    replayAllSamplesMs: Number(median(replay).toFixed(1)),
    replayFindings,
    targetMs: 50,
    withinTarget: latestMedian < 50,
    node: process.version,
  }),
);
