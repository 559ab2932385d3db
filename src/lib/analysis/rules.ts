/**
 * The finding rules. Each is a named pure function of a RuleContext returning findings with level, rule id,
 * the numbers behind it and a sentence. Thresholds come from rule-definitions.ts (RULE_DEFINITIONS).
 */
import { computeBaselineBand, computeTrendFit, type BaselineBand } from './baseline';
import { getMeasurand, type MeasurandCode } from './measurands';
import {
  ADDITIVE_MISMATCH,
  BASELINE_JUMP,
  CLIMBING_TREND,
  COOLANT_MARKERS,
  DIRT,
  FIXED_LIMIT,
  FUEL_DILUTION,
} from './rule-definitions';
import type { Finding, FixedLimits, MachineProfile, SamplePoint } from './types';
import { findGradeWindow } from './viscosity';

export interface RuleContext {
  machine: MachineProfile;
  sample: SamplePoint;
  /** The most recent previous accepted samples, oldest first (the engine passes only the tail it needs). */
  history: readonly SamplePoint[];
  limits: FixedLimits;
  /** Baseline bands of the measurands the baseline rules watch, from `history`. */
  bands: Partial<Record<MeasurandCode, BaselineBand>>;
}

/** A reading as the rules may fire on it: missing or below detection ('<') gives undefined. */
export function readFiringValue(sample: SamplePoint, code: MeasurandCode): number | undefined {
  const r = sample.readings[code];
  if (!r || !Number.isFinite(r.value) || r.qualifier === '<') return undefined;
  return r.value;
}

/**
 * A reading as baselines use it: below detection counts as half the detection limit (a common convention
 * for censored lab data), above range as the reported figure.
 */
export function readBaselineValue(sample: SamplePoint, code: MeasurandCode): number | undefined {
  const r = sample.readings[code];
  if (!r || !Number.isFinite(r.value)) return undefined;
  return r.qualifier === '<' ? r.value / 2 : r.value;
}

/** Round for a sentence: whole numbers from 100, one decimal from 10, two below. */
export function formatFigure(v: number): string {
  const digits = Math.abs(v) >= 100 ? 0 : Math.abs(v) >= 10 ? 1 : 2;
  return String(Number(v.toFixed(digits)));
}

function describe(code: MeasurandCode, value: number): string {
  const m = getMeasurand(code);
  const unit = m.unit === 'ppm' ? ' ppm' : m.unit === '%' ? ' %' : m.unit ? ` ${m.unit}` : '';
  return `${m.name} at ${formatFigure(value)}${unit}`;
}

function pointsTo(code: MeasurandCode): string {
  return `${getMeasurand(code).name} usually points to: ${getMeasurand(code).pointsTo}`;
}

/** Baseline bands of every measurand in the baseline rules' groups, from the history's readings. */
export function buildBaselineBands(history: readonly SamplePoint[]): Partial<Record<MeasurandCode, BaselineBand>> {
  const p = BASELINE_JUMP.params;
  const tail = history.slice(-p.window);
  const bands: Partial<Record<MeasurandCode, BaselineBand>> = {};
  const codes = new Set<MeasurandCode>();
  for (const s of tail) for (const code of Object.keys(s.readings) as MeasurandCode[]) codes.add(code);
  for (const code of codes) {
    if (!(p.groups as readonly string[]).includes(getMeasurand(code).group)) continue;
    const values: number[] = [];
    for (const s of tail) {
      const v = readBaselineValue(s, code);
      if (v !== undefined) values.push(v);
    }
    bands[code] = computeBaselineBand(values, {
      minSamples: p.minSamples,
      window: p.window,
      watchSd: p.watchSd,
      actSd: p.actSd,
      floorAbsolute: p.floorPpm,
      floorFraction: p.floorFraction,
    });
  }
  return bands;
}

function meanDistance(history: readonly SamplePoint[]): number {
  const d = history.map((s) => s.distanceOnOil).filter((x) => Number.isFinite(x) && x > 0);
  return d.length ? d.reduce((a, b) => a + b, 0) / d.length : NaN;
}

/** Rule baseline-jump: a wear metal or contaminant above the machine's own baseline band. */
export function findBaselineJumps(ctx: RuleContext): Finding[] {
  const findings: Finding[] = [];
  const usualDistance = meanDistance(ctx.history.slice(-BASELINE_JUMP.params.window));
  for (const [code, band] of Object.entries(ctx.bands) as [MeasurandCode, BaselineBand][]) {
    if (band.status !== 'ready') continue;
    const v = readFiringValue(ctx.sample, code);
    if (v === undefined || v <= band.watchAbove) continue;
    const level = v >= band.actFrom ? 'act' : 'watch';
    const longer =
      Number.isFinite(usualDistance) && ctx.sample.distanceOnOil > 1.25 * usualDistance
        ? ` This oil ran ${formatFigure(ctx.sample.distanceOnOil)} ${ctx.machine.distanceUnit} against a usual ${formatFigure(usualDistance)}, which alone raises readings.`
        : '';
    findings.push({
      ruleId: 'baseline-jump',
      level,
      measurands: [code],
      numbers: { value: v, mean: band.mean, sd: band.sd, spread: band.spread, watchAbove: band.watchAbove, actFrom: band.actFrom, n: band.n },
      sentence:
        `${describe(code, v)} is ${level === 'act' ? 'well ' : ''}above this machine's baseline band ` +
        `(usually ${formatFigure(band.mean)}, band up to ${formatFigure(band.watchAbove)}). ${pointsTo(code)}${longer}`,
    });
  }
  return findings;
}

/** Rule climbing-trend: a least-squares slope over recent samples that keeps going up. */
export function findClimbingTrends(ctx: RuleContext): Finding[] {
  const p = CLIMBING_TREND.params;
  const findings: Finding[] = [];
  for (const code of Object.keys(ctx.sample.readings) as MeasurandCode[]) {
    if (!(p.groups as readonly string[]).includes(getMeasurand(code).group)) continue;
    const current = readFiringValue(ctx.sample, code);
    if (current === undefined) continue;
    const ys: number[] = [];
    for (const s of ctx.history) {
      const v = readBaselineValue(s, code);
      if (v !== undefined) ys.push(v);
    }
    ys.push(current);
    const window = ys.slice(-p.window);
    if (window.length < p.minPoints) continue;
    // After a spike the next reading falls back: the line still slopes up, but nothing is climbing now.
    if (p.lastStepMustNotFall && window[window.length - 1]! < window[window.length - 2]!) continue;
    let risingSteps = 0;
    for (let i = 1; i < window.length; i++) if (window[i]! > window[i - 1]!) risingSteps++;
    if (risingSteps < p.minRisingSteps) continue;
    const fit = computeTrendFit(window.map((y, i) => [i, y] as const));
    const rise = fit.slope * (window.length - 1);
    // The fitted start, floored, so a climb from near zero is judged against a sensible level.
    const base = Math.max(fit.intercept, p.baseFloorPpm);
    const watchRise = Math.max(p.minRisePpm, p.watchRiseFraction * base);
    const actRise = Math.max(p.actMinRisePpm, p.actRiseFraction * base);
    if (rise < watchRise) continue;
    const level = rise >= actRise ? 'act' : 'watch';
    findings.push({
      ruleId: 'climbing-trend',
      level,
      measurands: [code],
      numbers: { value: current, slopePerSample: fit.slope, rise, fittedStart: fit.intercept, points: window.length, risingSteps },
      sentence:
        `${describe(code, current)} has been climbing: up about ${formatFigure(rise)} over the last ${window.length} samples` +
        `${level === 'act' ? ', roughly double where it started' : ''}. ${pointsTo(code)}`,
    });
  }
  return findings;
}

/** Rule fixed-limit: elements, water and KV100 change against the lead's fixed limits. */
export function findFixedLimitBreaches(ctx: RuleContext): Finding[] {
  const p = FIXED_LIMIT.params;
  const findings: Finding[] = [];
  const check = (code: MeasurandCode, value: number, limit: number, shown: string, sentenceTail: string) => {
    if (value >= limit || value >= p.watchFraction * limit) {
      const level = value >= limit ? 'act' : 'watch';
      findings.push({
        ruleId: 'fixed-limit',
        level,
        measurands: [code],
        numbers: { value, limit, watchFrom: p.watchFraction * limit },
        sentence: `${shown} ${level === 'act' ? 'is at or above' : 'is nearing'} the fixed limit of ${formatFigure(limit)}. ${sentenceTail}`,
      });
    }
  };
  for (const code of p.elements) {
    const v = readFiringValue(ctx.sample, code);
    if (v !== undefined) check(code, v, ctx.limits[code], describe(code, v), pointsTo(code));
  }
  const water = readFiringValue(ctx.sample, 'WATER');
  if (water !== undefined) check('WATER', water, ctx.limits.waterPercent, describe('WATER', water), pointsTo('WATER'));
  const kv = readFiringValue(ctx.sample, 'KV100');
  const kvNew = ctx.sample.newOilKv100;
  if (kv !== undefined && kvNew !== undefined && kvNew > 0) {
    // Rounded to 1e-9 so a change of exactly the limit (11.9 against 14.0 is 15 %) counts as reaching it.
    const changePercent = Math.round((Math.abs(kv - kvNew) / kvNew) * 100 * 1e9) / 1e9;
    const limit = ctx.limits.kv100ChangePercent;
    if (changePercent >= p.watchFraction * limit) {
      const level = changePercent >= limit ? 'act' : 'watch';
      findings.push({
        ruleId: 'fixed-limit',
        level,
        measurands: ['KV100'],
        numbers: { value: kv, newOil: kvNew, changePercent, limit },
        sentence:
          `${describe('KV100', kv)} is ${formatFigure(changePercent)} % ${kv < kvNew ? 'thinner' : 'thicker'} than the same oil new ` +
          `(${formatFigure(kvNew)} mm²/s); the fixed limit is ±${formatFigure(limit)} %. ${pointsTo('KV100')}`,
      });
    }
  }
  return findings;
}

/** Rule viscosity-grade: KV100 outside the SAE J300 window of the grade poured. */
export function findViscosityOutsideGrade(ctx: RuleContext): Finding[] {
  const kv = readFiringValue(ctx.sample, 'KV100');
  const grade = ctx.sample.grade;
  if (kv === undefined || !grade) return [];
  const w = findGradeWindow(grade);
  if (!w || (kv >= w.min && kv < w.max)) return [];
  const thin = kv < w.min;
  return [
    {
      ruleId: 'viscosity-grade',
      level: 'watch',
      measurands: ['KV100'],
      numbers: { value: kv, windowMin: w.min, windowMax: w.max },
      sentence:
        `${describe('KV100', kv)} is ${thin ? 'below' : 'above'} the SAE J300 window of the ${w.grade} poured ` +
        `(${formatFigure(w.min)} to under ${formatFigure(w.max)} mm²/s): the oil has ${thin ? 'thinned' : 'thickened'} out of its grade. ` +
        `${thin ? 'Fuel dilution or gearbox shear are the usual causes.' : 'Oxidation or a long interval are the usual causes.'}`,
    },
  ];
}

/** Rule fuel-dilution: fuel above 2 % is worth watching, at the fixed fuel limit act. */
export function findFuelDilution(ctx: RuleContext): Finding[] {
  const fuel = readFiringValue(ctx.sample, 'FUEL');
  const watchPercent = FUEL_DILUTION.params.watchPercent;
  if (fuel === undefined || fuel <= watchPercent) return [];
  const level = fuel >= ctx.limits.fuelPercent ? 'act' : 'watch';
  return [
    {
      ruleId: 'fuel-dilution',
      level,
      measurands: ['FUEL'],
      numbers: { value: fuel, watchAbove: watchPercent, limit: ctx.limits.fuelPercent },
      sentence:
        `${describe('FUEL', fuel)} is ${level === 'act' ? 'at or above the fixed limit' : 'above the 2 % worth watching'}. ` +
        'Short trips that never warm the oil are the usual cause; a longer ride that gets the oil fully hot, or a shorter interval, usually helps.',
    },
  ];
}

/** Rule coolant-markers: Na, K and B raised together, or glycol, in a liquid-cooled engine. */
export function findCoolantMarkers(ctx: RuleContext): Finding[] {
  if (ctx.machine.cooling !== 'liquid') return [];
  const p = COOLANT_MARKERS.params;
  const glycol = readFiringValue(ctx.sample, 'GLYCOL');
  if (glycol !== undefined && glycol > 0) {
    return [
      {
        ruleId: 'coolant-markers',
        level: 'act',
        measurands: ['GLYCOL'],
        numbers: { glycol },
        sentence:
          'The lab found glycol: coolant is reaching the oil. Head gasket, water pump seal or oil cooler are the usual places; ' +
          'coolant in oil wrecks bearings quickly, so have it checked before riding on.',
      },
    ];
  }
  const raised: MeasurandCode[] = [];
  let high = false;
  const numbers: Record<string, number> = {};
  for (const code of p.markers) {
    const v = readFiringValue(ctx.sample, code);
    if (v === undefined) continue;
    numbers[code] = v;
    const band = ctx.bands[code];
    let isRaised: boolean;
    let isHigh: boolean;
    if (band && band.status === 'ready') {
      isRaised = v > band.watchAbove;
      isHigh = v >= band.actFrom;
    } else {
      const level = code === 'B' ? ctx.limits.B : p.markerPpm[code];
      isRaised = v >= level;
      isHigh = v >= 2 * level;
    }
    if (isRaised) raised.push(code);
    if (isRaised && isHigh) high = true;
  }
  if (raised.length < p.minRaised) return [];
  const level = high ? 'act' : 'watch';
  const names = raised.map((c) => getMeasurand(c).name.toLowerCase()).join(' and ');
  return [
    {
      ruleId: 'coolant-markers',
      level,
      measurands: raised,
      numbers: { ...numbers, raised: raised.length },
      sentence:
        `Coolant markers are up together (${names}). In a liquid-cooled engine that usually means coolant reaching the oil: ` +
        'head gasket, water pump seal or oil cooler. Check the coolant level when the engine is cold.',
    },
  ];
}

function isElementRaised(ctx: RuleContext, code: 'Si' | 'Al' | 'Fe', v: number): { raised: boolean; atAct: boolean } {
  const band = ctx.bands[code];
  const limit = ctx.limits[code];
  const bandReady = band !== undefined && band.status === 'ready';
  const raised = (bandReady && v > band.watchAbove) || v >= FIXED_LIMIT.params.watchFraction * limit;
  const atAct = (bandReady && v >= band.actFrom) || v >= limit;
  return { raised, atAct };
}

/** Rule dirt: silicon raised together with aluminium or iron. */
export function findDirtEntry(ctx: RuleContext): Finding[] {
  const si = readFiringValue(ctx.sample, 'Si');
  if (si === undefined) return [];
  const siState = isElementRaised(ctx, 'Si', si);
  if (!siState.raised) return [];
  const partners = DIRT.params.partners.filter((code) => {
    const v = readFiringValue(ctx.sample, code);
    return v !== undefined && isElementRaised(ctx, code, v).raised;
  });
  if (partners.length === 0) return [];
  const numbers: Record<string, number> = { Si: si };
  for (const code of partners) numbers[code] = readFiringValue(ctx.sample, code)!;
  const level = siState.atAct ? 'act' : 'watch';
  return [
    {
      ruleId: 'dirt',
      level,
      measurands: ['Si', ...partners],
      numbers,
      sentence:
        `Silicon is up together with ${partners.map((c) => getMeasurand(c).name.toLowerCase()).join(' and ')}: dirt is probably getting in. ` +
        'Check the air filter, its seal and the intake boots and clamps.',
    },
  ];
}

function normaliseProduct(product: string | undefined): string {
  return (product ?? '').trim().toLowerCase().replace(/\s+/g, ' ');
}

/** Rule additive-mismatch: additive elements that moved away from earlier samples of the same oil. */
export function findAdditiveMismatch(ctx: RuleContext): Finding[] {
  const p = ADDITIVE_MISMATCH.params;
  const product = normaliseProduct(ctx.sample.oilProduct);
  if (!product) return [];
  const earlier = ctx.history.slice(-p.lookBack).filter((s) => normaliseProduct(s.oilProduct) === product);
  if (earlier.length < p.minEarlier) return [];
  const moved: MeasurandCode[] = [];
  const numbers: Record<string, number> = { earlierSamples: earlier.length };
  for (const code of p.elements) {
    const v = readBaselineValue(ctx.sample, code);
    if (v === undefined) continue;
    const values = earlier.map((s) => readBaselineValue(s, code)).filter((x): x is number => x !== undefined);
    if (values.length < p.minEarlier) continue;
    const m = values.reduce((a, b) => a + b, 0) / values.length;
    const change = Math.abs(v - m);
    if (change >= p.absoluteChangePpm && change > p.relativeChange * m) {
      moved.push(code);
      numbers[code] = v;
      numbers[`${code}EarlierMean`] = m;
    }
  }
  if (moved.length === 0) return [];
  return [
    {
      ruleId: 'additive-mismatch',
      level: 'watch',
      measurands: moved,
      numbers,
      sentence:
        `The additive pattern (${moved.map((c) => getMeasurand(c).name.toLowerCase()).join(', ')}) does not match earlier samples of ` +
        `"${ctx.sample.oilProduct!.trim()}". A different or mixed oil, or a top-up with another oil, is the usual reason; check what went in.`,
    },
  ];
}

/** Every finding rule, in RULE_DEFINITIONS order. */
export const FINDING_RULES: readonly ((ctx: RuleContext) => Finding[])[] = [
  findBaselineJumps,
  findClimbingTrends,
  findFixedLimitBreaches,
  findViscosityOutsideGrade,
  findFuelDilution,
  findCoolantMarkers,
  findDirtEntry,
  findAdditiveMismatch,
];
