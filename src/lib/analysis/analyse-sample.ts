/** analyseSample: every rule over one sample against the machine's own in-control history. */
import { byLevelWorstFirst, pickWorseLevel } from '../levels';
import { ELEMENT_CODES, getMeasurand, type MeasurandCode } from './measurands';
import {
  ADDITIVE_MISMATCH,
  BASELINE_JUMP,
  CLIMBING_TREND,
  CONDITION_TREND,
  FIXED_LIMIT,
  resolveFixedLimits,
} from './rule-definitions';
import { formatFigure } from './figures';
import { FINDING_RULES, buildBaselineBands, readFiringValue, type MeasurandBand, type RuleContext } from './rules';
import type { AnalyseInput, Finding, Level, SamplePoint } from './types';
import { computeWearRate, type WearRate } from './wear-rate';

export interface SampleAnalysis {
  /** Watch and act findings, act first, then in rule order. */
  findings: Finding[];
  worst: Level;
  /** Level of every reading the sample carries: the worst finding naming it, else steady. */
  readingLevels: Partial<Record<MeasurandCode, Level>>;
  /** 'ready' when iron and aluminium (those the sample carries) had ready bands of this machine's own. */
  baselineStatus: 'building' | 'ready';
  /** Set when any band came from the crew's other machines of the same engine (the own baseline still building). */
  crewReference?: { label: string; machines: number } | undefined;
  /** The baseline bands the rules used (the wear chart draws these same bands). */
  bands: Partial<Record<MeasurandCode, MeasurandBand>>;
  /** ppm per 1,000 mi/km (or per 100 h) of every wear metal, top-up corrected where volumes are known. */
  wearRates: Partial<Record<MeasurandCode, WearRate>>;
  /** Plain remarks that are not findings (copper read as leaching, and the like). */
  notes: string[];
  /** The usual cautions shown beside findings. */
  cautions: string[];
}

// One level ranking for the engine, the screens and the SQL: the levels module's.
export { pickWorseLevel };

/** Advice wording shown with every analysis (PRODUCT.md: findings are advice). */
export const ANALYSIS_CAUTIONS: readonly string[] = [
  'Findings are advice from the oil, not a diagnosis: check with the service manual and, where work can hurt someone, a licensed mechanic.',
  'Hot oil burns: let the engine cool, wear gloves and eye protection, and take used oil to a collection point.',
];

// The longest look-back any rule needs, with room for samples kept out of the baseline: the analysis never
// reads further back, so its cost does not grow with the length of a machine's history.
export const HISTORY_TAIL = Math.max(
  3 * BASELINE_JUMP.params.window,
  CLIMBING_TREND.params.window,
  CONDITION_TREND.params.window,
  ADDITIVE_MISMATCH.params.lookBack,
);

const NO_EXCLUSIONS: ReadonlyMap<string, ReadonlySet<MeasurandCode>> = new Map();

function oilStart(s: SamplePoint): number {
  return s.odometer - s.distanceOnOil;
}

/**
 * Copper that fell since the previous oil change, with lead and tin not raised, is leaching from coolers and
 * new parts rather than wear (common practice, no published source).
 */
function isCopperLeaching(ctx: RuleContext, findings: readonly Finding[]): { from: number; to: number } | undefined {
  const cu = readFiringValue(ctx.sample, 'Cu');
  if (cu === undefined || !Number.isFinite(oilStart(ctx.sample))) return undefined;
  const previous = [...ctx.history]
    .reverse()
    .find((s) => Number.isFinite(oilStart(s)) && oilStart(s) < oilStart(ctx.sample) - 1 && s.readings.Cu);
  const before = previous ? readFiringValue(previous, 'Cu') : undefined;
  if (before === undefined || !(cu < before)) return undefined;
  const bearingsRaised = findings.some((f) => f.measurands.includes('Pb') || f.measurands.includes('Sn'));
  const overlayNear = (['Pb', 'Sn'] as const).some((c) => {
    const v = readFiringValue(ctx.sample, c);
    return v !== undefined && v >= FIXED_LIMIT.params.watchFraction * ctx.limits[c];
  });
  return bearingsRaised || overlayNear ? undefined : { from: before, to: cu };
}

/** Findings, worst level, bands and wear rates for one sample against the machine's previous samples. */
export function analyseSample(input: AnalyseInput): SampleAnalysis {
  const history = input.history.length > HISTORY_TAIL ? input.history.slice(-HISTORY_TAIL) : input.history;
  const base = {
    machine: input.machine,
    sample: input.sample,
    history,
    outOfBaseline: input.outOfBaseline ?? NO_EXCLUSIONS,
  };
  const ctx: RuleContext = {
    ...base,
    limits: resolveFixedLimits(input.limits),
    bands: buildBaselineBands(base),
    earlier: [],
  };
  let findings: Finding[] = [];
  // One context for every rule, its `earlier` pointed at the findings so far (a copy of the context per rule
  // was a measurable share of a replay's garbage).
  for (const rule of FINDING_RULES) {
    ctx.earlier = findings;
    findings.push(...rule(ctx));
  }

  const notes: string[] = [];
  const leaching = isCopperLeaching(ctx, findings);
  if (leaching && findings.some((f) => f.measurands[0] === 'Cu')) {
    findings = findings.filter(
      (f) => !(f.measurands[0] === 'Cu' && ['baseline-jump', 'climbing-trend', 'fixed-limit'].includes(f.ruleId)),
    );
    notes.push(
      `Copper fell from ${formatFigure(leaching.from)} to ${formatFigure(leaching.to)} ppm since the last oil change, with lead and tin quiet: ` +
        'that reads as copper leaching from the oil cooler or new parts (usual on a new or rebuilt engine), not wear.',
    );
  }
  findings.sort((a, b) => byLevelWorstFirst(a.level, b.level));

  let worst: Level = 'steady';
  const readingLevels: Partial<Record<MeasurandCode, Level>> = {};
  for (const code of Object.keys(input.sample.readings) as MeasurandCode[]) readingLevels[code] = 'steady';
  for (const f of findings) {
    worst = pickWorseLevel(worst, f.level);
    for (const code of f.measurands) {
      readingLevels[code] = pickWorseLevel(readingLevels[code] ?? 'steady', f.levels?.[code] ?? f.level);
    }
  }

  const wearRates: Partial<Record<MeasurandCode, WearRate>> = {};
  for (const code of ELEMENT_CODES) {
    if (getMeasurand(code).group !== 'wear') continue;
    const v = readFiringValue(input.sample, code);
    if (v === undefined) continue;
    const rate = computeWearRate(v, input.sample.distanceOnOil, input.machine.distanceUnit, input.sample);
    if (rate) wearRates[code] = rate;
  }

  const wearBands = (['Fe', 'Al'] as const).map((c) => ctx.bands[c]).filter((b) => b !== undefined);
  // Only the machine's own bands make a ready baseline: a crew reference judges findings but never earns a stretch.
  const ready = wearBands.length > 0 && wearBands.every((b) => b.status === 'ready' && b.source === 'own');
  const crewBands = Object.values(ctx.bands).filter((b) => b.source === 'crew' && b.crew);
  const crewReference =
    crewBands.length > 0
      ? { label: crewBands[0]!.crew!.label, machines: Math.max(...crewBands.map((b) => b.crew!.machines)) }
      : undefined;
  return {
    findings,
    worst,
    readingLevels,
    baselineStatus: ready ? 'ready' : 'building',
    ...(crewReference ? { crewReference } : {}),
    bands: ctx.bands,
    wearRates,
    notes,
    cautions: [...ANALYSIS_CAUTIONS],
  };
}
