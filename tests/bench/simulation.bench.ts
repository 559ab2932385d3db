/**
 * The decision engine's false-alarm and detection rates on seeded simulated engines (the noise model is written
 * down in tests/unit/analysis/simulated-machines.ts): 300 stable machines × 12 samples, 300 with iron wear doubled
 * from sample 8, 300 with aluminium wear tripled. The same figures the simulation test asserts; printed here so
 * `npm run bench` shows them beside the timings. Run: node --import tsx tests/bench/simulation.bench.ts
 */
import { performance } from 'node:perf_hooks';
import { judgeHistory, SIMULATED_RATES } from '~/lib/analysis/index';
import { runSimulation } from '../unit/analysis/simulated-machines';

const t0 = performance.now();
const figures = runSimulation((m) => judgeHistory(m), SIMULATED_RATES.machines);
const ms = performance.now() - t0;
console.log(
  JSON.stringify({
    bench: 'simulation',
    ...figures,
    budget: {
      stableAnyShortenPercentMax: 10,
      stableAnyActPercentMax: 5,
      ironDetectedPercentMin: 80,
      aluminiumDetectedPercentMin: 80,
    },
    withinBudget:
      figures.stableAnyShortenPercent <= 10 &&
      figures.stableAnyActPercent <= 5 &&
      figures.ironDetectedPercent >= 80 &&
      figures.aluminiumDetectedPercent >= 80,
    machinesJudged: 3 * figures.machines,
    ms: Math.round(ms),
    node: process.version,
  }),
);
