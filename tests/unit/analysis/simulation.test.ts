/**
 * The false-alarm budget and the detection rates of the decision engine, proved on seeded simulated engines
 * (noise model in simulated-machines.ts), judged through judgeHistory exactly as production judges them.
 * Budget (set for the product, no published source): stable machines — at most 10 % with any shorten and 5 %
 * with any act finding over twelve samples; iron wear doubled from sample 8 — watch or worse on iron within two
 * samples in at least 80 % of machines; aluminium wear tripled — act on aluminium within two samples in 80 %.
 */
import { describe, expect, test } from 'vitest';
import { judgeHistory } from '~/lib/analysis/judge-history';
import { SIMULATED_RATES } from '~/lib/analysis/rule-definitions';
import {
  CHANGE_FROM_SAMPLE,
  SAMPLES_PER_MACHINE,
  makeRandom,
  runSimulation,
  simulateMachine,
} from './simulated-machines';

describe('simulated engines (seeded)', () => {
  const figures = runSimulation((m) => judgeHistory(m), SIMULATED_RATES.machines);

  test('stable engines: at most 10 % get any shorten and 5 % any act within twelve samples', () => {
    expect(figures.machines).toBeGreaterThanOrEqual(300);
    expect(figures.stableAnyShortenPercent).toBeLessThanOrEqual(10);
    expect(figures.stableAnyActPercent).toBeLessThanOrEqual(5);
  });

  test('iron wear doubled from sample 8: watch or worse on iron within two samples in at least 80 %', () => {
    expect(figures.ironDetectedPercent).toBeGreaterThanOrEqual(80);
  });

  test('aluminium wear tripled from sample 8: act on aluminium within two samples in at least 80 %', () => {
    expect(figures.aluminiumDetectedPercent).toBeGreaterThanOrEqual(80);
  });

  test('the rules page states the figures the engine really measures', () => {
    expect(figures).toEqual({
      machines: SIMULATED_RATES.machines,
      stableAnyShortenPercent: SIMULATED_RATES.stableAnyShortenPercent,
      stableAnyActPercent: SIMULATED_RATES.stableAnyActPercent,
      ironDetectedPercent: SIMULATED_RATES.ironDetectedPercent,
      aluminiumDetectedPercent: SIMULATED_RATES.aluminiumDetectedPercent,
    });
    expect(SIMULATED_RATES.samplesPerMachine).toBe(SAMPLES_PER_MACHINE);
  }, 60_000);
}, 120_000);

describe('the noise model itself', () => {
  test('is seeded: the same seed gives the same machine', () => {
    expect(simulateMachine(7, 'stable')).toEqual(simulateMachine(7, 'stable'));
    expect(makeRandom(1)()).toBe(makeRandom(1)());
  });

  test('intervals vary within ±15 % of the machine\'s nominal, and readings are whole ppm or "<1"', () => {
    const { samples } = simulateMachine(11, 'stable');
    const d = samples.map((s) => s.distanceOnOil);
    const mid = (Math.max(...d) + Math.min(...d)) / 2;
    for (const x of d) expect(Math.abs(x - mid) / mid).toBeLessThanOrEqual(0.16);
    for (const s of samples) {
      for (const code of ['Fe', 'Al', 'Cu', 'Sn', 'K'] as const) {
        const r = s.readings[code]!;
        expect(Number.isInteger(r.value)).toBe(true);
        if (r.qualifier === '<') expect(r.value).toBe(1);
        else expect(r.value).toBeGreaterThanOrEqual(1);
      }
    }
  });

  test('a wearing machine wears faster from sample 8 on, not before', () => {
    const stable = simulateMachine(21, 'stable');
    const wearing = simulateMachine(21, 'aluminium-x3');
    const mean = (m: typeof stable, from: number, to: number) =>
      m.samples.slice(from, to).reduce((a, s) => a + s.readings.Al!.value / s.distanceOnOil, 0) / (to - from);
    expect(mean(wearing, CHANGE_FROM_SAMPLE - 1, SAMPLES_PER_MACHINE)).toBeGreaterThan(
      2 * mean(stable, CHANGE_FROM_SAMPLE - 1, SAMPLES_PER_MACHINE),
    );
  });
});
