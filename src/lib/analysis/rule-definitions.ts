/**
 * RULE_DEFINITIONS: every rule's id, title, plain description, source and thresholds as data. The rule
 * functions read their constants from here and the rules page of the app renders the same array, so the
 * documentation cannot drift from what the code runs.
 */
import type { ElementCode, MeasurandCode } from './measurands';
import type { FixedLimits } from './types';

/**
 * Default fixed limits. Elements, KV100 ±15 %, fuel 5 % and water 0.1 % are the motor-oil warning limits
 * of the Petro-Canada Lubricants Handbook (2004). A crew lead can change each of them. Boron stays here for
 * crews that set it, but it is no longer judged against a fixed limit: many motorcycle oils carry borate, so
 * boron is judged against the oil's own level (see BORON_AND_COOLANT).
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

/**
 * The lab's own scatter at a level, the least spread a baseline band may use: √(absolutePpm² + (relative · X)²).
 * Labs report whole ppm (a rounding scatter of about 0.3 ppm) and scatter more near detection, hence 0.5 ppm;
 * at ordinary levels ICP wear metals scatter by roughly 10–20 % between runs and labs, hence 12 % (common
 * practice, no published source: we do not quote ASTM D5185's precision table here).
 */
export const LAB_SCATTER = { absolutePpm: 0.5, relative: 0.12 } as const;

/** Which measurands the baseline rules judge, and on what basis. */
export const BASELINE_BASIS = {
  /** Judged as a wear rate (ppm per 1,000 mi/km or per 100 h of oil use, top-up corrected). */
  rate: [
    'Fe',
    'Al',
    'Cr',
    'Cu',
    'Pb',
    'Sn',
    'Ni',
    'Ag',
    'Ti',
    'V',
    'Mn',
    'Si',
  ] as const satisfies readonly ElementCode[],
  /** Judged in ppm against the oil's own level: these come mostly with the oil, not with the distance run. */
  ppm: ['Na', 'K', 'B'] as const satisfies readonly ElementCode[],
  /** Baselines of these restart when the oil product changes (they come with the oil's additives). */
  additiveSensitive: ['B', 'Na', 'Mo', 'Si', 'Zn', 'P', 'Ca', 'Mg'] as const satisfies readonly ElementCode[],
} as const;

export const BASELINE_JUMP = {
  id: 'baseline-jump',
  kind: 'finding',
  title: 'Jump above the baseline band',
  description:
    "A wear metal or contaminant above this machine's own baseline band. Wear metals and silicon are judged per distance: " +
    'ppm per 1,000 mi or km (per 100 h on an hour meter) of oil use, top-up corrected, so a long run at the same wear ' +
    'does not read high and a short run with fast wear does not hide. Sodium, potassium and boron come mostly with the ' +
    "oil, so they are judged in ppm against the oil's own level. The band comes from the machine's previous in-control " +
    'samples (the last `window`): a sample that was act on a measurand, break-in oil and samples a lead or mechanic took ' +
    'out stay out of it, and the additive-sensitive elements (B, Na, Mo, Si, Zn, P, Ca, Mg) start again when the oil ' +
    'product changes. The edges are prediction limits for one new reading: watch above mean + t(0.99; n−1) · s · √(1 + 1/n), ' +
    'act from mean + t(0.9995; n−1) · s · √(1 + 1/n) and at least actMinRatio times the mean. s is never taken below the ' +
    "lab's own scatter at that level (√(0.5² + (0.12 · mean)²) ppm). Designed false-alarm rate for one in-control " +
    'reading: 1 % watch, 0.05 % act. With fewer than minSamples in-control samples the band is still building and only ' +
    'fixed limits apply, or the crew reference (below) when the crew runs enough machines of the same engine.',
  source:
    "ASTM D7720 statistical approach (limits from the machine's own in-control history); prediction limits with " +
    "Student's t (any statistics text; quantiles checked against the NIST/SEMATECH e-Handbook table 1.3.6.7.2). The " +
    'false-alarm rates, actMinRatio and the lab-scatter floor are Sumpwise choices (no published source).',
  params: {
    minSamples: 4,
    window: 10,
    watchAlpha: 0.01,
    actAlpha: 0.0005,
    actMinRatio: 1.5,
    groups: ['wear', 'contaminant'],
  },
} as const;

export const CREW_REFERENCE = {
  id: 'crew-reference',
  kind: 'note',
  title: 'Crew reference while a baseline builds',
  description:
    "While a machine has fewer than BASELINE_JUMP's minSamples in-control samples of its own, its baseline bands come " +
    "from the crew's other machines with the same engine: the same layout, displacement within " +
    'displacementTolerance (5 %), the same cooling and the same shared-sump setting, on the same kind of meter. Only ' +
    "their in-control samples count (the same exclusions as a machine's own band: act readings, break-in oil, samples " +
    'taken out, and a different oil product for the additive-sensitive elements), drawn no later than the sample ' +
    'being judged and at a similar oil age (distance on oil within oilAgeFraction either way of this sample). The band ' +
    "is built with the same rules as the machine's own: wear metals and silicon as rates per distance, the last " +
    '`window` values, the same prediction-limit multiples and lab-scatter floor. It needs at least minMachines other ' +
    'machines in the band; with fewer there is no crew reference and only fixed limits apply. The band is labelled ' +
    '"from the crew\'s other <engine> machines" on the wear chart, the sample page and in the call\'s reasons, and it ' +
    "never leaves the crew. A stretch is never earned on a crew reference: only the machine's own ready iron and " +
    "aluminium baselines can count towards one. Once the machine's own band is ready it takes over. When an import " +
    "changes a machine, the crew's other machines of that engine still on a crew reference (at most " +
    'rejudgeUpToSamples samples) are judged again in the same transaction.',
  source:
    "Sumpwise rule (common practice, no published source): pooling sister engines' history is a usual way to start " +
    'a condition-monitoring baseline; the tolerances and counts are Sumpwise choices.',
  params: {
    minMachines: 3,
    displacementTolerance: 0.05,
    oilAgeFraction: 0.5,
    rejudgeUpToSamples: 8,
  },
} as const;

export const CLIMBING_TREND = {
  id: 'climbing-trend',
  kind: 'finding',
  title: 'Climbing trend',
  description:
    'A wear metal or contaminant that keeps rising, on the same basis as its band (rates per distance for wear metals ' +
    'and silicon), fitted by least squares against the odometer over the last `window` samples (this one included, at ' +
    'least minPoints). It needs more than lab scatter: the slope must stand out from what the lab alone scatters at ' +
    'the earlier level (σ = √(0.5² + (scatterRelative · level)²) ppm; one-sided z test of the slope at watchAlpha), the ' +
    'fitted rise across the window must be at least watchRiseFraction of the earlier level (the mean of the points ' +
    'before this one) and more than twice the lab scatter there, and the newest reading must not have fallen. Act ' +
    'when the level has doubled (actRiseFraction) and the slope test passes at actAlpha. One jump does not fire both ' +
    'rules: when the reading already fired the jump rule, the earlier points must be climbing on their own.',
  source:
    'Sumpwise rule (common practice, no published source); slope by ordinary least squares (checked against NIST StRD Norris), tested against the lab scatter the simulation assumes (15–20 %).',
  params: {
    window: 6,
    minPoints: 4,
    watchAlpha: 0.01,
    actAlpha: 0.001,
    watchRiseFraction: 0.5,
    actRiseFraction: 1.0,
    scatterRelative: 0.2,
    groups: ['wear', 'contaminant'],
  },
} as const;

export const FIXED_LIMIT = {
  id: 'fixed-limit',
  kind: 'finding',
  title: 'Alert limit',
  description:
    "A reading at or above one of the crew's alert limits (fixed figures the crew lead can change): Fe, Cr, Cu, Sn, Al, Pb and Si in ppm, and water in %. " +
    'At the limit: act. From watchFraction of the limit: watch, as an early warning. Boron has no fixed limit here: ' +
    "many motorcycle oils carry borate, so it is judged against the oil's own level.",
  source:
    'Defaults: motor-oil warning limits, Petro-Canada Lubricants Handbook (2004). The watch fraction is a ' +
    'Sumpwise choice (no published source).',
  params: {
    defaults: DEFAULT_FIXED_LIMITS,
    elements: ['Fe', 'Cr', 'Cu', 'Sn', 'Al', 'Pb', 'Si'] as const satisfies readonly ElementCode[],
    watchFraction: 0.8,
  },
} as const;

export const VISCOSITY_GRADE = {
  id: 'viscosity-grade',
  kind: 'finding',
  title: 'Viscosity outside its SAE grade',
  description:
    'KV100 outside the SAE J300 window of the grade poured (for a multigrade, its high-temperature grade): watch. ' +
    'Below the window of the next lower grade as well (a 10W-40 thinned to a 30 or less): act. Thinning usually means ' +
    'fuel or shear (the gearbox shears the oil in most bikes); thickening, oxidation.',
  source: 'SAE J300 (2015 revision and later) KV100 windows; the act tier is a Sumpwise choice (no published source).',
  params: { level: 'watch' },
} as const;

export const VISCOSITY_CHANGE = {
  id: 'viscosity-change',
  kind: 'finding',
  title: 'Viscosity changed from the oil as poured',
  description:
    'KV100 against the same oil new: the new-oil reference (a lab sample or the data sheet) when one is recorded, ' +
    'else the mean of the first refSamples samples of that oil product (the finding says which). A change of the ' +
    "lead's kv100ChangePercent (default 15 %) either way: watch. Thinner by actThinPercent or more: act.",
  source:
    '±15 %: Petro-Canada Lubricants Handbook (2004) motor-oil warning limit. The act tier at 25 % thinner is a Sumpwise ' +
    'choice (common practice, no published source).',
  params: { actThinPercent: 25, refSamples: 3 },
} as const;

export const FUEL_DILUTION = {
  id: 'fuel-dilution',
  kind: 'finding',
  title: 'Fuel dilution',
  description:
    'Fuel in the oil above watchPercent: watch; at or above the fixed fuel limit (default 5 %): act. Short trips ' +
    'that never warm the oil are the usual cause.',
  source: 'Watch above 2 %: common practice, no published source. Act at 5 %: Petro-Canada Lubricants Handbook (2004).',
  params: { watchPercent: 2 },
} as const;

export const FLASH_POINT = {
  id: 'flash-point',
  kind: 'finding',
  title: 'Low flash point (fuel sign)',
  description:
    'When the lab gave no fuel figure, a low flash point stands in for it: fuel lowers the flash point of engine oil. ' +
    'A drop of watchDropC from the oil as poured (new-oil reference, else the first samples of that oil), or below ' +
    'watchBelowC when neither is known: watch; a drop of actDropC or below actBelowC: act.',
  source: 'Common practice, no published source (fresh motorcycle oils flash around 210–240 °C, from memory).',
  params: { watchDropC: 25, actDropC: 45, watchBelowC: 185, actBelowC: 170, refSamples: 3 },
} as const;

export const CONDITION_TREND = {
  id: 'condition-trend',
  kind: 'finding',
  title: 'Oil condition trend',
  description:
    'Slow trends in the oil itself, fitted against the odometer over the last `window` samples (at least minPoints) ' +
    'with a one-sided t test of the slope at alpha: KV100 falling by at least kv100DropPercent of its fitted start ' +
    '(gearbox shear in a shared sump, or fuel), fuel rising by at least fuelRisePoints percentage points (fuel ' +
    'building up over a season of short trips), water rising by at least waterRisePoints. Watch.',
  source: 'Sumpwise rule (common practice, no published source).',
  params: { window: 6, minPoints: 4, alpha: 0.01, kv100DropPercent: 8, fuelRisePoints: 1, waterRisePoints: 0.05 },
} as const;

export const BORON_AND_COOLANT = {
  id: 'coolant-markers',
  kind: 'finding',
  title: 'Coolant markers',
  description:
    "Liquid-cooled engines only: sodium, potassium and boron judged against the oil's own level (the new-oil reference, " +
    'else the baseline or first samples of that oil product), so a borate oil is not read as coolant. Glycol present: ' +
    "act. Potassium alone at potassiumWatchPpm or more above the oil's own level: watch; with glycol or water at the " +
    "water watch level: act. A marker is raised at its markerRisePpm above the oil's own level; two raised: watch; two " +
    "raised with one at twice its rise (or at the act edge of its band): act. Coolant in the oil is not the oil's fault: the call is fix-first. On air- " +
    "and oil-cooled engines boron is never a coolant marker; a change from the oil's own level is an oil mix-up, " +
    'judged by the baseline band (watch at most).',
  source:
    'Potassium 20 ppm and the marker rises: common practice, no published source. Glycol as act: common practice.',
  params: {
    markers: ['Na', 'K', 'B'] as const satisfies readonly ElementCode[],
    markerRisePpm: { Na: 25, K: 10, B: 15 },
    potassiumWatchPpm: 20,
    minRaised: 2,
  },
} as const;

export const DIRT = {
  id: 'dirt',
  kind: 'finding',
  title: 'Dirt getting in',
  description:
    'Silicon and aluminium both up (above the baseline band or at watchFraction of the fixed limit), rising together ' +
    'in the proportion of dust: the rise of silicon over its usual level divided by the rise of aluminium between ' +
    'minRatio and maxRatio. Silicon up alone is more likely sealant or antifoam. Watch; act when silicon is at its ' +
    'fixed limit or the act edge of its band; the aluminium reading is marked only as far as its own figures go. ' +
    "Dirt is not the oil's fault: the call is fix-first (air filter, seal, intake boots).",
  source:
    'Common practice, no published source (road dust is mostly silica with some alumina; the ratio range is from memory).',
  params: { minRatio: 1.5, maxRatio: 15 },
} as const;

export const ADDITIVE_MISMATCH = {
  id: 'additive-mismatch',
  kind: 'finding',
  title: "Additives don't match the oil",
  description:
    "The additive elements of this sample against the oil's own levels: the new-oil reference when one is recorded, " +
    'else earlier samples of the same oil product (at least minEarlier of them, among the last lookBack samples). An ' +
    'element that moved by more than relativeChange of that level and at least absoluteChangePpm: watch, since a ' +
    'different or mixed oil changes the picture.',
  source: 'Common practice, no published source.',
  params: {
    elements: ['Zn', 'P', 'Ca', 'Mg', 'Mo', 'Ba', 'B'] as const satisfies readonly ElementCode[],
    minEarlier: 2,
    lookBack: 20,
    relativeChange: 0.35,
    absoluteChangePpm: 50,
  },
} as const;

export const CLUTCH_FRICTION = {
  id: 'clutch-friction',
  kind: 'finding',
  title: 'Friction modifier and a wet clutch',
  description:
    'Engines whose wet clutch shares the oil: molybdenum at watchMoPpm or more (in the new-oil reference, else in the ' +
    'sample) points to a friction-modified oil, which can make a wet clutch slip. Watch, with a plain sentence.',
  source: 'Common practice, no published source (motorcycle-rated oils keep friction modifiers low for wet clutches).',
  params: { watchMoPpm: 250 },
} as const;

export const COPPER_LEACHING = {
  id: 'copper-leaching',
  kind: 'note',
  title: 'Copper leaching',
  description:
    'Copper that falls from one oil change to the next, with lead and tin not raised, is read as leaching from ' +
    'coolers and new parts (common on new or rebuilt engines), not wear: its band, trend and fixed-limit findings ' +
    'are left out and the sample says why.',
  source: 'Common practice, no published source.',
  params: {},
} as const;

export const INTERVAL_CALL = {
  id: 'interval-call',
  kind: 'interval-call',
  title: 'Interval call',
  description:
    "Made on the machine's regular interval: the median of its last regularOf completed oil changes (the distance from " +
    "one oil change to the next), never the distance a mid-interval sample's oil ran. Fix-first when the cause is not " +
    'the oil (coolant markers, dirt): fix the cause and take the next sample soon (after resampleFraction of the ' +
    'regular interval, at most resampleDays), the interval unchanged. Any other act finding: shorten to actFactor of ' +
    'the regular interval and resample soon. A climbing trend at watch or other watch findings: hold, next sample at ' +
    'the same interval. Stretch by at most stretchFactor only on stretchSteadySamples steady samples in a row, each ' +
    "judged on this machine's own ready iron and aluminium band (never on a crew reference) with viscosity, fuel (or flash point) and water reported, with TBN not " +
    'below tbnMinFraction of new and TAN not up by tanMaxRise when reported, and never right after a shorten until a ' +
    'sample at the shortened interval confirms it; a stretch stands, but stretches no further, until a sample at the ' +
    "longer interval confirms it. Never beyond the manufacturer's longest interval; with none on " +
    'file, never beyond the longest interval this machine has run. "Next sample by" dates count from the later of the ' +
    'draw and the day the results arrived.',
  source: 'Sumpwise rule (common practice, no published source).',
  params: {
    regularOf: 3,
    actFactor: 0.5,
    resampleFraction: 0.25,
    resampleDays: 30,
    stretchFactor: 1.2,
    stretchSteadySamples: 3,
    tbnMinFraction: 0.5,
    tanMaxRise: 2,
    roundTo: { mi: 100, km: 100, h: 5 },
  },
} as const;

/**
 * What the seeded simulation (tests/unit/analysis/simulation.test.ts, noise model in simulated-machines.ts)
 * measured for this engine: 300 stable machines × 12 samples and 300 wearing ones of each kind. The test fails
 * when the engine and these stated figures part.
 */
export const SIMULATED_RATES = {
  machines: 300,
  samplesPerMachine: 12,
  stableAnyShortenPercent: 1,
  stableAnyActPercent: 1,
  ironDetectedPercent: 98.3,
  aluminiumDetectedPercent: 96,
  /** A new stable machine judged on a crew reference of four stable machines of its engine (300 crews), any shorten and any act over twelve samples. */
  crewNewAnyShortenPercent: 1.7,
  crewNewAnyActPercent: 1.7,
} as const;

export type RuleDefinition =
  | typeof BASELINE_JUMP
  | typeof CLIMBING_TREND
  | typeof FIXED_LIMIT
  | typeof VISCOSITY_GRADE
  | typeof VISCOSITY_CHANGE
  | typeof FUEL_DILUTION
  | typeof FLASH_POINT
  | typeof CONDITION_TREND
  | typeof BORON_AND_COOLANT
  | typeof DIRT
  | typeof ADDITIVE_MISMATCH
  | typeof CLUTCH_FRICTION
  | typeof COPPER_LEACHING
  | typeof CREW_REFERENCE
  | typeof INTERVAL_CALL;

/** Every rule in the order the rules page shows them; the interval call comes last. */
export const RULE_DEFINITIONS: readonly RuleDefinition[] = [
  BASELINE_JUMP,
  CLIMBING_TREND,
  FIXED_LIMIT,
  VISCOSITY_GRADE,
  VISCOSITY_CHANGE,
  FUEL_DILUTION,
  FLASH_POINT,
  CONDITION_TREND,
  BORON_AND_COOLANT,
  DIRT,
  ADDITIVE_MISMATCH,
  CLUTCH_FRICTION,
  COPPER_LEACHING,
  CREW_REFERENCE,
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

/** The lab's scatter (one standard deviation) at a level in ppm. */
export function labScatterAt(ppm: number): number {
  return Math.hypot(LAB_SCATTER.absolutePpm, LAB_SCATTER.relative * ppm);
}

/** True for measurands whose baseline restarts with a new oil product. */
export function isAdditiveSensitive(code: MeasurandCode): boolean {
  return (BASELINE_BASIS.additiveSensitive as readonly string[]).includes(code);
}
