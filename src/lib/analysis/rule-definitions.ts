/**
 * RULE_DEFINITIONS: every rule's id, title, plain description, source and thresholds as data. The rule
 * functions read their constants from here and the rules page of the app renders the same array, so the
 * documentation cannot drift from what the code runs.
 */
import type { ElementCode } from './measurands';
import type { FixedLimits } from './types';

/**
 * Default fixed limits. Elements, KV100 ±15 %, fuel 5 % and water 0.1 % are the motor-oil warning limits
 * of the Petro-Canada Lubricants Handbook (2004). A crew lead can change each of them.
 */
export const DEFAULT_FIXED_LIMITS: Readonly<FixedLimits> = {
  Fe: 100,
  Cr: 10,
  Cu: 20,
  Sn: 10,
  Al: 20,
  Pb: 25,
  B: 20,
  Si: 20,
  kv100ChangePercent: 15,
  fuelPercent: 5,
  waterPercent: 0.1,
};

export const BASELINE_JUMP = {
  id: 'baseline-jump',
  kind: 'finding',
  title: 'Jump above the baseline band',
  description:
    "A wear metal or contaminant reading above this machine's own baseline band. The band comes from the machine's " +
    'previous accepted samples (the last `window` of them): watch above mean + watchSd × spread, act from mean + ' +
    'actSd × spread. The spread is the sample standard deviation, but never less than floorPpm or floorFraction of ' +
    'the mean, so a perfectly flat history cannot turn a 1 ppm change into an alarm. With fewer than minSamples ' +
    'previous samples the baseline is still building and only fixed limits apply. Readings are compared in ppm: ' +
    'a sample run much longer than usual can read high for that reason alone, which the sentence mentions.',
  source:
    "ASTM D7720 statistical approach (limits from the machine's own distribution); the multiples 2 and 3 and the " +
    'floor are Sumpwise choices.',
  params: {
    minSamples: 3,
    window: 10,
    watchSd: 2,
    actSd: 3,
    floorPpm: 2,
    floorFraction: 0.1,
    groups: ['wear', 'contaminant'],
  },
} as const;

export const CLIMBING_TREND = {
  id: 'climbing-trend',
  kind: 'finding',
  title: 'Climbing trend',
  description:
    'A wear metal or contaminant that keeps rising over recent samples. A least-squares line is fitted over the ' +
    'last `window` samples (this one included, at least minPoints); it is climbing when at least minRisingSteps ' +
    'steps went up and the fitted rise across the window is at least minRisePpm and watchRiseFraction of the fitted ' +
    'starting level; act when the rise is at least actMinRisePpm and actRiseFraction of the start (the level doubled). ' +
    'A reading lower than the one before is falling back, not climbing, and never fires this rule.',
  source: 'Sumpwise rule (common practice, no published source); slope by ordinary least squares, checked against NIST StRD Norris.',
  params: {
    window: 5,
    minPoints: 4,
    minRisingSteps: 3,
    minRisePpm: 3,
    actMinRisePpm: 6,
    baseFloorPpm: 2,
    watchRiseFraction: 0.5,
    actRiseFraction: 1.0,
    /** The newest reading must be at least the one before it. */
    lastStepMustNotFall: true,
    groups: ['wear', 'contaminant'],
  },
} as const;

export const FIXED_LIMIT = {
  id: 'fixed-limit',
  kind: 'finding',
  title: 'Fixed limit',
  description:
    'A reading at or above a fixed limit the crew lead can change: Fe, Cr, Cu, Sn, Al, Pb, B and Si in ppm, water ' +
    'in %, and KV100 more than kv100ChangePercent away from the same oil new (when the new-oil figure is known). ' +
    'At the limit: act. From watchFraction of the limit: watch, as an early warning. Many motorcycle oils carry ' +
    'boron as an additive; a lead should raise the boron limit to suit the oil the crew uses.',
  source:
    'Defaults: motor-oil warning limits, Petro-Canada Lubricants Handbook (2004). The watch fraction is a ' +
    'Sumpwise choice (no published source).',
  params: {
    defaults: DEFAULT_FIXED_LIMITS,
    elements: ['Fe', 'Cr', 'Cu', 'Sn', 'Al', 'Pb', 'B', 'Si'] as const satisfies readonly ElementCode[],
    watchFraction: 0.8,
  },
} as const;

export const VISCOSITY_GRADE = {
  id: 'viscosity-grade',
  kind: 'finding',
  title: 'Viscosity outside its SAE grade',
  description:
    'KV100 outside the SAE J300 window of the grade poured (for a multigrade, its high-temperature grade): watch. ' +
    'Thinning usually means fuel or shear (the gearbox shears the oil in most bikes); thickening, oxidation.',
  source: 'SAE J300 (2015 revision and later) KV100 windows.',
  params: { level: 'watch' },
} as const;

export const FUEL_DILUTION = {
  id: 'fuel-dilution',
  kind: 'finding',
  title: 'Fuel dilution',
  description:
    'Fuel in the oil above watchPercent: watch; at or above the fixed fuel limit (default 5 %): act. Short trips ' +
    'that never warm the oil are the usual cause.',
  source:
    'Watch above 2 %: common practice, no published source. Act at 5 %: Petro-Canada Lubricants Handbook (2004).',
  params: { watchPercent: 2 },
} as const;

export const COOLANT_MARKERS = {
  id: 'coolant-markers',
  kind: 'finding',
  title: 'Coolant markers',
  description:
    'Liquid-cooled engines only. Glycol present: act. Otherwise a marker (Na, K, B) counts as raised when it is above ' +
    "the machine's baseline band, or, while the baseline is building, at or above its marker level; two raised " +
    'markers: watch; two raised with one at the act edge of its band (or twice its marker level): act.',
  source: 'Marker levels are common practice, no published source; the boron level is the fixed B limit.',
  params: { markers: ['Na', 'K', 'B'] as const satisfies readonly ElementCode[], markerPpm: { Na: 50, K: 20 }, minRaised: 2 },
} as const;

export const DIRT = {
  id: 'dirt',
  kind: 'finding',
  title: 'Dirt getting in',
  description:
    'Silicon raised together with aluminium or iron raised, the usual sign of dirt past the air filter, intake boots ' +
    'or a leaking airbox. Raised means above the baseline band or at watchFraction of the fixed limit. Watch; act ' +
    'when silicon itself is at its fixed limit or the act edge of its band.',
  source: 'Common practice, no published source; silicon, aluminium and iron limits as in the fixed-limit rule.',
  params: { partners: ['Al', 'Fe'] as const satisfies readonly ElementCode[] },
} as const;

export const ADDITIVE_MISMATCH = {
  id: 'additive-mismatch',
  kind: 'finding',
  title: "Additives don't match the oil",
  description:
    'The additive elements of this sample compared with earlier samples of the same oil product (at least ' +
    'minEarlier of them, among the last lookBack samples). An element that moved by more than relativeChange of ' +
    'its earlier mean and at least absoluteChangePpm: watch, since a different or mixed oil changes the picture.',
  source: 'Common practice, no published source.',
  params: {
    elements: ['Zn', 'P', 'Ca', 'Mg', 'Mo', 'Ba'] as const satisfies readonly ElementCode[],
    minEarlier: 2,
    lookBack: 20,
    relativeChange: 0.25,
    absoluteChangePpm: 50,
  },
} as const;

export const INTERVAL_CALL = {
  id: 'interval-call',
  kind: 'interval-call',
  title: 'Interval call',
  description:
    'Any act finding: shorten the interval to actFactor of the distance this oil ran and take the next sample soon ' +
    '(after resampleFraction of that distance, at most resampleDays). A climbing trend at watch: shorten to ' +
    'climbingFactor. Other watch findings: hold. All steady, a ready baseline and the previous stretchSteadySamples − 1 ' +
    'samples steady as well: stretch by stretchFactor. Never beyond the manufacturer\'s longest interval; with none ' +
    'on file, never beyond the longest interval this machine has already run. Intervals are rounded down to ' +
    'roundTo (100 mi or km, 5 h).',
  source: 'Sumpwise rule (common practice, no published source).',
  params: {
    actFactor: 0.5,
    resampleFraction: 0.25,
    resampleDays: 30,
    climbingFactor: 0.75,
    stretchFactor: 1.2,
    stretchSteadySamples: 3,
    roundTo: { mi: 100, km: 100, h: 5 },
  },
} as const;

export type RuleDefinition =
  | typeof BASELINE_JUMP
  | typeof CLIMBING_TREND
  | typeof FIXED_LIMIT
  | typeof VISCOSITY_GRADE
  | typeof FUEL_DILUTION
  | typeof COOLANT_MARKERS
  | typeof DIRT
  | typeof ADDITIVE_MISMATCH
  | typeof INTERVAL_CALL;

/** Every rule in the order the rules page shows them; the interval call comes last. */
export const RULE_DEFINITIONS: readonly RuleDefinition[] = [
  BASELINE_JUMP,
  CLIMBING_TREND,
  FIXED_LIMIT,
  VISCOSITY_GRADE,
  FUEL_DILUTION,
  COOLANT_MARKERS,
  DIRT,
  ADDITIVE_MISMATCH,
  INTERVAL_CALL,
];

/** Look a rule definition up by its id. */
export function findRuleDefinition(id: string): RuleDefinition | undefined {
  return RULE_DEFINITIONS.find((r) => r.id === id);
}

/** Fixed limits with a lead's overrides applied over the handbook defaults (non-finite overrides ignored). */
export function resolveFixedLimits(overrides?: Partial<FixedLimits>): FixedLimits {
  const limits: FixedLimits = { ...DEFAULT_FIXED_LIMITS };
  if (overrides) {
    for (const key of Object.keys(limits) as (keyof FixedLimits)[]) {
      const v = overrides[key];
      if (typeof v === 'number' && Number.isFinite(v) && v > 0) limits[key] = v;
    }
  }
  return limits;
}
