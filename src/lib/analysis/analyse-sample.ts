/** analyseSample: every rule over one sample against the machine's own history. */
import type { BaselineBand } from './baseline';
import { ELEMENT_CODES, getMeasurand, type MeasurandCode } from './measurands';
import { ADDITIVE_MISMATCH, BASELINE_JUMP, CLIMBING_TREND, resolveFixedLimits } from './rule-definitions';
import { FINDING_RULES, buildBaselineBands, readFiringValue, type RuleContext } from './rules';
import type { AnalyseInput, Finding, Level } from './types';
import { computeWearRate, type WearRate } from './wear-rate';

export interface SampleAnalysis {
  /** Watch and act findings, act first, then in rule order. */
  findings: Finding[];
  worst: Level;
  /** Level of every reading the sample carries: the worst finding naming it, else steady. */
  readingLevels: Partial<Record<MeasurandCode, Level>>;
  /** 'building' while the machine has fewer accepted samples than the baseline needs. */
  baselineStatus: 'building' | 'ready';
  /** Baseline bands (for the wear chart) of the wear metals and contaminants. */
  bands: Partial<Record<MeasurandCode, BaselineBand>>;
  /** ppm per 1,000 mi/km (or per 100 h) of every wear metal, top-up corrected where volumes are known. */
  wearRates: Partial<Record<MeasurandCode, WearRate>>;
  /** The usual cautions shown beside findings. */
  cautions: string[];
}

const LEVEL_RANK: Record<Level, number> = { steady: 0, watch: 1, act: 2 };

/** The more serious of two levels. */
export function pickWorseLevel(a: Level, b: Level): Level {
  return LEVEL_RANK[b] > LEVEL_RANK[a] ? b : a;
}

/** Advice wording shown with every analysis (PRODUCT.md: findings are advice). */
export const ANALYSIS_CAUTIONS: readonly string[] = [
  'Findings are advice from the oil, not a diagnosis: check with the service manual and, where work can hurt someone, a licensed mechanic.',
  'Hot oil burns: let the engine cool, wear gloves and eye protection, and take used oil to a collection point.',
];

// The longest look-back any rule needs: the analysis never reads further back, so its cost does not grow
// with the length of a machine's history.
const TAIL = Math.max(BASELINE_JUMP.params.window, CLIMBING_TREND.params.window, ADDITIVE_MISMATCH.params.lookBack);

/** Findings, worst level, bands and wear rates for one sample against the machine's previous accepted samples. */
export function analyseSample(input: AnalyseInput): SampleAnalysis {
  const history = input.history.length > TAIL ? input.history.slice(-TAIL) : input.history;
  const ctx: RuleContext = {
    machine: input.machine,
    sample: input.sample,
    history,
    limits: resolveFixedLimits(input.limits),
    bands: buildBaselineBands(history),
  };
  const findings: Finding[] = [];
  for (const rule of FINDING_RULES) findings.push(...rule(ctx));
  findings.sort((a, b) => LEVEL_RANK[b.level] - LEVEL_RANK[a.level]);

  let worst: Level = 'steady';
  const readingLevels: Partial<Record<MeasurandCode, Level>> = {};
  for (const code of Object.keys(input.sample.readings) as MeasurandCode[]) readingLevels[code] = 'steady';
  for (const f of findings) {
    worst = pickWorseLevel(worst, f.level);
    for (const code of f.measurands) readingLevels[code] = pickWorseLevel(readingLevels[code] ?? 'steady', f.level);
  }

  const wearRates: Partial<Record<MeasurandCode, WearRate>> = {};
  for (const code of ELEMENT_CODES) {
    if (getMeasurand(code).group !== 'wear') continue;
    const v = readFiringValue(input.sample, code);
    if (v === undefined) continue;
    const rate = computeWearRate(v, input.sample.distanceOnOil, input.machine.distanceUnit, input.sample);
    if (rate) wearRates[code] = rate;
  }

  return {
    findings,
    worst,
    readingLevels,
    baselineStatus: input.history.length >= BASELINE_JUMP.params.minSamples ? 'ready' : 'building',
    bands: ctx.bands,
    wearRates,
    cautions: [...ANALYSIS_CAUTIONS],
  };
}
