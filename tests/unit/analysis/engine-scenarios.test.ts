/**
 * Scenario tests for the decision engine's trust problems and the oil's own signals, each on an invented
 * history judged through judgeHistory (the replay production runs). Sources of outside figures are named beside
 * them; the rest are Sumpwise rules (common practice, no published source).
 */
import { describe, expect, test } from 'vitest';
import { judgeHistory } from '~/lib/analysis/judge-history';
import { MEASURAND_CODES, getMeasurand, type MeasurandCode } from '~/lib/analysis/measurands';
import type { MachineProfile, SamplePoint } from '~/lib/analysis/types';
import { AIR_SINGLE, LIQUID_TWIN, makeHistory, makeSample } from './sample-builder';

type Readings = Partial<Record<MeasurandCode, number>>;
const base: Readings = {
  Fe: 20,
  Al: 4,
  Cu: 3,
  Si: 6,
  Na: 4,
  K: 1,
  B: 3,
  Zn: 1000,
  P: 900,
  Ca: 2000,
  KV100: 13.8,
  FUEL: 0.5,
  WATER: 0.02,
};
const tag = (j: ReturnType<typeof judgeHistory>[number]) =>
  j.findings.map((f) => `${f.ruleId}:${f.measurands.join('+')}:${f.level}`).sort();

describe('baselines come from in-control samples', () => {
  test("an act sample stays out of its measurand's band, so a repeat of the spike still reads act", () => {
    const sets = [...Array.from({ length: 5 }, () => base), { ...base, Al: 14 }, base, { ...base, Al: 14 }];
    const judged = judgeHistory({ machine: AIR_SINGLE, samples: makeHistory(sets) });
    expect(tag(judged[5]!)).toContain('baseline-jump:Al:act');
    expect(tag(judged[7]!)).toContain('baseline-jump:Al:act');
  });

  test('break-in oil and samples a mechanic took out never build the band', () => {
    const samples = makeHistory([{ ...base, Fe: 60 }, base, base, base, base, { ...base, Fe: 60 }]);
    samples[0] = { ...samples[0]!, baselineExcluded: { reason: 'Break-in oil after the rebuild', breakIn: true } };
    const judged = judgeHistory({ machine: AIR_SINGLE, samples });
    // With the break-in sample out, the band holds only the four 20 ppm samples: 60 ppm is past its act edge
    // (20 + t(0.9995; 3) · √1.25 · 2.45 ≈ 55 ppm). With it in, the band is far wider and 60 ppm reads nothing.
    expect(tag(judged[5]!)).toContain('baseline-jump:Fe:act');
    const withIt = judgeHistory({
      machine: AIR_SINGLE,
      samples: makeHistory([{ ...base, Fe: 60 }, base, base, base, base, { ...base, Fe: 60 }]),
    });
    expect(tag(withIt[5]!).some((t) => t.startsWith('baseline-jump:Fe'))).toBe(false);
  });

  test('additive baselines restart on a new oil product; wear bands carry on', () => {
    const newOil = 'Ridge Synth 15W-50';
    const samples = makeHistory([base, base, base, base, base]);
    samples.push(makeSample(5, { ...base, B: 60, Na: 30 }, { oilProduct: newOil }));
    const judged = judgeHistory({ machine: AIR_SINGLE, samples });
    // Boron and sodium have no band yet for the new oil (building), so its borate reads as nothing.
    expect(tag(judged[5]!).filter((t) => t.includes(':B:') || t.includes(':Na:'))).toEqual([]);
    expect(tag(judged[5]!)).toEqual([]);
  });
});

describe('stretch only on enough data, judged on a ready baseline', () => {
  test('the reason for a stretch is true: each of the three steady samples was judged on a ready band', () => {
    const judged = judgeHistory({ machine: AIR_SINGLE, samples: makeHistory(Array.from({ length: 8 }, () => base)) });
    // Bands are ready from sample 5 (four in-control before it): samples 5, 6, 7 steady → stretch at 7.
    expect(judged.map((j) => j.call)).toEqual(['hold', 'hold', 'hold', 'hold', 'hold', 'hold', 'stretch', 'stretch']);
  });
});

describe("the oil's own signals", () => {
  test('a borate oil on an air-cooled engine raises no coolant finding (common practice: borate additives)', () => {
    const borate = { ...base, B: 140 };
    const judged = judgeHistory({ machine: AIR_SINGLE, samples: makeHistory(Array.from({ length: 6 }, () => borate)) });
    expect(
      judged.flatMap((j) => j.findings).filter((f) => f.ruleId === 'coolant-markers' || f.measurands.includes('B')),
    ).toEqual([]);
    expect(judged.every((j) => j.call !== 'shorten' && j.call !== 'fix-first')).toBe(true);
  });

  test('switching to a borate oil is not read as coolant on an air-cooled engine', () => {
    const samples = makeHistory([base, base, base, base, base]);
    samples.push(makeSample(5, { ...base, B: 140 }, { oilProduct: 'Borate Trail 10W-40' }));
    const last = judgeHistory({ machine: AIR_SINGLE, samples }).at(-1)!;
    expect(last.findings.filter((f) => f.ruleId === 'coolant-markers')).toEqual([]);
    expect(last.worst).toBe('steady');
  });

  test('the same oil on a liquid-cooled engine with potassium rising does raise coolant (K ≥ 20 ppm, common practice)', () => {
    const borate = { ...base, B: 140 };
    const sets = [...Array.from({ length: 4 }, () => borate), { ...borate, K: 12 }, { ...borate, K: 24 }];
    const judged = judgeHistory({ machine: LIQUID_TWIN, samples: makeHistory(sets) });
    const last = judged.at(-1)!;
    expect(last.findings.some((f) => f.ruleId === 'coolant-markers' && f.measurands.includes('K'))).toBe(true);
    expect(last.findings.some((f) => f.ruleId === 'coolant-markers' && f.measurands.includes('B'))).toBe(false);
    expect(['fix-first', 'hold']).toContain(last.call);
  });

  test("potassium 40 ppm on a liquid-cooled engine's first sample is at least watch (common practice)", () => {
    const first = judgeHistory({ machine: LIQUID_TWIN, samples: [makeSample(0, { ...base, K: 40 })] })[0]!;
    expect(first.findings.find((f) => f.ruleId === 'coolant-markers')?.level).toBe('watch');
    expect(first.call).toBe('fix-first');
  });

  test('a thinned 10W-40 acts (SAE J300: below the SAE 30 window of 9.3 mm²/s)', () => {
    const samples = makeHistory([base, base, base, { ...base, KV100: 9.0 }]);
    const last = judgeHistory({ machine: AIR_SINGLE, samples }).at(-1)!;
    expect(last.findings.find((f) => f.ruleId === 'viscosity-grade')?.level).toBe('act');
    expect(last.call).toBe('shorten');
  });

  test('the ±15 % new-oil rule fires from a recorded new-oil sample (Petro-Canada Lubricants Handbook, 2004)', () => {
    const newOil = { source: 'lab' as const, readings: { KV100: { value: 15.0 } } };
    const samples = makeHistory([base, { ...base, KV100: 12.6 }], { newOil });
    const last = judgeHistory({ machine: AIR_SINGLE, samples }).at(-1)!;
    const f = last.findings.find((x) => x.ruleId === 'viscosity-change')!;
    expect(f.level).toBe('watch');
    expect(f.numbers.fromNewOilReference).toBe(1);
    expect(f.sentence).toMatch(/new-oil reference/);
  });

  test('a low flash point counts as fuel when the lab gave no fuel figure (common practice)', () => {
    const noFuel = { Fe: 20, Al: 4, KV100: 13.8, WATER: 0.02, FLASH: 215 };
    const samples = makeHistory([noFuel, noFuel, noFuel, { ...noFuel, FLASH: 185 }, { ...noFuel, FLASH: 165 }]);
    const judged = judgeHistory({ machine: AIR_SINGLE, samples });
    expect(judged[3]!.findings.find((f) => f.ruleId === 'flash-point')?.level).toBe('watch');
    expect(judged[4]!.findings.find((f) => f.ruleId === 'flash-point')?.level).toBe('act');
    expect(judged[4]!.findings.find((f) => f.ruleId === 'flash-point')?.sentence).toMatch(/fuel/);
    // With a fuel figure the fuel rule speaks instead.
    const withFuel = judgeHistory({ machine: AIR_SINGLE, samples: makeHistory([base, { ...base, FLASH: 165 }]) }).at(
      -1,
    )!;
    expect(withFuel.findings.some((f) => f.ruleId === 'flash-point')).toBe(false);
  });

  test('copper falling from one oil change to the next with lead and tin quiet is leaching, not wear (common practice)', () => {
    const newEngine = [
      { ...base, Cu: 60, Pb: 1, Sn: 1 },
      { ...base, Cu: 38, Pb: 1, Sn: 1 },
      { ...base, Cu: 22, Pb: 1, Sn: 1 },
    ];
    const judged = judgeHistory({ machine: AIR_SINGLE, samples: makeHistory(newEngine) });
    expect(judged[0]!.findings.some((f) => f.measurands[0] === 'Cu')).toBe(true);
    expect(judged[1]!.findings.filter((f) => f.measurands[0] === 'Cu')).toEqual([]);
    expect(judged[2]!.findings.filter((f) => f.measurands[0] === 'Cu')).toEqual([]);
    // With tin rising alongside, falling copper is still read as wear.
    const withTin = judgeHistory({
      machine: AIR_SINGLE,
      samples: makeHistory([newEngine[0]!, { ...newEngine[1]!, Sn: 9 }]),
    });
    expect(withTin[1]!.findings.some((f) => f.measurands[0] === 'Cu')).toBe(true);
  });

  test('a friction-modified oil in a shared wet clutch gets a plain sentence about clutch slip (common practice)', () => {
    const machine: MachineProfile = { ...AIR_SINGLE, sharedOil: true };
    const last = judgeHistory({ machine, samples: makeHistory([{ ...base, Mo: 450 }]) }).at(-1)!;
    const f = last.findings.find((x) => x.ruleId === 'clutch-friction')!;
    expect(f.level).toBe('watch');
    expect(f.sentence).toMatch(/clutch/);
    expect(f.sentence).toMatch(/slip/);
    // Not on an engine whose clutch is dry or has its own oil.
    expect(
      judgeHistory({ machine: { ...AIR_SINGLE, sharedOil: false }, samples: makeHistory([{ ...base, Mo: 450 }]) })[0]!
        .findings,
    ).toEqual([]);
  });

  test.each([
    ['KV100 falling (gearbox shear in a shared sump)', 'KV100', [14.0, 13.7, 13.3, 12.9, 12.6]],
    ['fuel building up over a season', 'FUEL', [0.5, 0.9, 1.3, 1.6, 1.9]],
    ['water building up', 'WATER', [0.01, 0.02, 0.04, 0.05, 0.07]],
  ] as const)('condition trend: %s is watched', (_name, code, values) => {
    const samples = makeHistory(values.map((v) => ({ ...base, [code]: v })));
    const last = judgeHistory({ machine: AIR_SINGLE, samples }).at(-1)!;
    expect(last.findings.find((f) => f.ruleId === 'condition-trend' && f.measurands[0] === code)?.level).toBe('watch');
  });

  test('oxidation and nitration are in the measurand catalogue (infrared, ASTM E2412)', () => {
    expect(MEASURAND_CODES).toContain('OXI');
    expect(MEASURAND_CODES).toContain('NIT');
    expect(getMeasurand('OXI')).toMatchObject({ group: 'condition', unit: 'abs/cm' });
  });

  test('dirt is silicon and aluminium rising in the proportion of dust; silicon alone is not', () => {
    const dusty = judgeHistory({
      machine: AIR_SINGLE,
      samples: makeHistory([base, base, base, base, { ...base, Si: 40, Al: 10 }]),
    }).at(-1)!;
    expect(dusty.findings.some((f) => f.ruleId === 'dirt')).toBe(true);
    expect(dusty.call).toBe('fix-first');
    const sealant = judgeHistory({
      machine: AIR_SINGLE,
      samples: makeHistory([base, base, base, base, { ...base, Si: 40 }]),
    }).at(-1)!;
    expect(sealant.findings.some((f) => f.ruleId === 'dirt')).toBe(false);
  });
});

describe('a sample point keeps its data as given', () => {
  test('judgeHistory returns one judgement per sample, oldest first, with the ids given', () => {
    const samples: SamplePoint[] = makeHistory([base, base, base]);
    expect(judgeHistory({ machine: AIR_SINGLE, samples }).map((j) => j.sampleId)).toEqual(['s0', 's1', 's2']);
  });
});
