/**
 * The finding rules. Each is a named pure function of a RuleContext returning findings with level, rule id,
 * the numbers behind it and a sentence. Thresholds come from rule-definitions.ts (RULE_DEFINITIONS).
 */
import { formatFigure } from './figures';
import { computeBaselineBand, computeTrendFit, type BaselineBand } from './baseline';
import { MEASURAND_CODES, getMeasurand, type MeasurandCode } from './measurands';
import {
  ADDITIVE_MISMATCH,
  BASELINE_BASIS,
  BASELINE_JUMP,
  BORON_AND_COOLANT,
  CLIMBING_TREND,
  CLUTCH_FRICTION,
  CONDITION_TREND,
  CREW_REFERENCE,
  DIRT,
  FIXED_LIMIT,
  FLASH_POINT,
  FUEL_DILUTION,
  VISCOSITY_CHANGE,
  LAB_SCATTER,
  labScatterAt,
} from './rule-definitions';
import { probit } from 'simple-statistics';
import { studentTQuantile } from './statistics';
import type { Finding, FixedLimits, MachineProfile, Reading, SamplePoint } from './types';
import { SAE_J300_GRADES, findGradeWindow } from './viscosity';
import { computeTopUpFactor, findRateBasis } from './wear-rate';

/** How a measurand is judged: as a wear rate per distance of oil use, or in ppm. */
export type JudgeBasis = 'rate' | 'ppm';

/** A baseline band as a rule used it: its basis, the samples it came from, and how to draw it in ppm. */
export type MeasurandBand = BaselineBand & {
  basis: JudgeBasis;
  /** The in-control samples the band was computed from, oldest first. */
  sampleIds: string[];
  /** Multiply a band figure by this to get ppm as reported at this sample (1 on a ppm basis). */
  toReported: number;
  /** Whose samples: this machine's own, or the crew's other machines of the same engine while its own builds. */
  source: 'own' | 'crew';
  /** For a crew band: its label ("from the crew's other …") and how many other machines it pooled. */
  crew?: { label: string; machines: number } | undefined;
};

export interface RuleContext {
  machine: MachineProfile;
  sample: SamplePoint;
  /** The most recent previous samples, oldest first (the engine passes only the tail it needs). */
  history: readonly SamplePoint[];
  limits: FixedLimits;
  /** Baseline bands of the measurands the baseline rules watch, from the in-control part of `history`. */
  bands: Partial<Record<MeasurandCode, MeasurandBand>>;
  /** Measurands of earlier samples kept out of the baseline (act on them). */
  outOfBaseline: ReadonlyMap<string, ReadonlySet<MeasurandCode>>;
  /** Findings of the rules that ran before (so the trend rule can skip a reading the jump rule took). */
  earlier: readonly Finding[];
}

/** A reading as the rules may fire on it: missing or below detection ('<') gives undefined. */
export function readFiringValue(sample: SamplePoint, code: MeasurandCode): number | undefined {
  const r = sample.readings[code];
  if (!r || !Number.isFinite(r.value) || r.qualifier === '<') return undefined;
  return r.value;
}

/**
 * A reading as a level or a baseline counts it: below detection ('<') counts as half the detection limit (a
 * common convention for censored lab data, no published source), above range as the reported figure.
 */
export function countReadingValue(r: Reading): number {
  return r.qualifier === '<' ? r.value / 2 : r.value;
}

/** A sample's reading as baselines use it (see countReadingValue); missing or not a number gives undefined. */
export function readBaselineValue(sample: SamplePoint, code: MeasurandCode): number | undefined {
  const r = sample.readings[code];
  if (!r || !Number.isFinite(r.value)) return undefined;
  return countReadingValue(r);
}

function describe(code: MeasurandCode, value: number): string {
  const m = getMeasurand(code);
  const unit = m.unit === 'ppm' ? ' ppm' : m.unit === '%' ? ' %' : m.unit ? ` ${m.unit}` : '';
  return `${m.name} at ${formatFigure(value)}${unit}`;
}

function pointsTo(code: MeasurandCode, machine?: MachineProfile): string {
  if (code === 'B' && machine && machine.cooling !== 'liquid') {
    return 'Boron usually points to: the oil itself (many motorcycle oils carry borate); on an engine without coolant it is never a coolant sign, so a change means a different or mixed oil.';
  }
  return `${getMeasurand(code).name} usually points to: ${getMeasurand(code).pointsTo}`;
}

function normaliseProduct(product: string | undefined): string {
  return (product ?? '').trim().toLowerCase().replace(/\s+/g, ' ');
}

// Each sample's product, normalised once: the baseline and trend rules compare it for every earlier sample.
const PRODUCT_OF = new WeakMap<SamplePoint, string>();
function productOf(s: SamplePoint): string {
  let p = PRODUCT_OF.get(s);
  if (p === undefined) {
    p = normaliseProduct(s.oilProduct);
    PRODUCT_OF.set(s, p);
  }
  return p;
}

/** True when two samples carry the same oil product (an unknown product matches anything). */
export function isSameProduct(a: SamplePoint, b: SamplePoint): boolean {
  const pa = productOf(a);
  const pb = productOf(b);
  return !pa || !pb || pa === pb;
}

// Looked up for every measurand of every sample in a replay: sets, built once.
const PPM_BASIS: ReadonlySet<string> = new Set(BASELINE_BASIS.ppm);
const ADDITIVE_SENSITIVE: ReadonlySet<string> = new Set(BASELINE_BASIS.additiveSensitive);

/** The basis a measurand is judged on for this sample: a rate when the oil's distance is known. */
export function findJudgeBasis(code: MeasurandCode, sample: SamplePoint): JudgeBasis {
  if (PPM_BASIS.has(code)) return 'ppm';
  return Number.isFinite(sample.distanceOnOil) && sample.distanceOnOil > 0 ? 'rate' : 'ppm';
}

/** ppm → the judged figure: ppm per 1,000 mi/km (or 100 h) of oil use, top-up corrected, or ppm itself. */
function toBasis(ppm: number, sample: SamplePoint, basis: JudgeBasis, machine: MachineProfile): number | undefined {
  if (basis === 'ppm') return ppm;
  const d = sample.distanceOnOil;
  if (!Number.isFinite(d) || d <= 0) return undefined;
  return (ppm * computeTopUpFactor(sample.topUpVolume, sample.oilVolume) * findRateBasis(machine.distanceUnit)) / d;
}

/** The factor from the judged basis back to reported ppm at a sample. */
function basisToReported(sample: SamplePoint, basis: JudgeBasis, machine: MachineProfile): number {
  if (basis === 'ppm') return 1;
  return (
    sample.distanceOnOil /
    findRateBasis(machine.distanceUnit) /
    computeTopUpFactor(sample.topUpVolume, sample.oilVolume)
  );
}

/** A reading in the judged basis: `firing` for the sample being judged, else as baselines and trends use it. */
export function readJudgedValue(
  sample: SamplePoint,
  code: MeasurandCode,
  basis: JudgeBasis,
  machine: MachineProfile,
  firing: boolean,
): number | undefined {
  const v = firing ? readFiringValue(sample, code) : readBaselineValue(sample, code);
  return v === undefined ? undefined : toBasis(v, sample, basis, machine);
}

// Earlier samples' readings in a judged basis, computed once per sample: a replay reads each of them again for
// every later sample's bands and trends. Keyed by sample, then basis and measurand (the machine never changes
// within a replay; a different machine object starts a new entry). Plain per-basis maps, so a look-up builds no key.
interface JudgedValues {
  machine: MachineProfile;
  rate: Map<MeasurandCode, number | undefined>;
  ppm: Map<MeasurandCode, number | undefined>;
}
const JUDGED_OF = new WeakMap<SamplePoint, JudgedValues>();
function judgedValuesOf(s: SamplePoint, machine: MachineProfile): JudgedValues {
  let entry = JUDGED_OF.get(s);
  if (!entry || entry.machine !== machine) {
    entry = { machine, rate: new Map(), ppm: new Map() };
    JUDGED_OF.set(s, entry);
  }
  return entry;
}
function readJudgedFrom(
  entry: JudgedValues,
  s: SamplePoint,
  code: MeasurandCode,
  basis: JudgeBasis,
): number | undefined {
  const values = basis === 'rate' ? entry.rate : entry.ppm;
  const known = values.get(code);
  if (known !== undefined || values.has(code)) return known;
  const v = readJudgedValue(s, code, basis, entry.machine, false);
  values.set(code, v);
  return v;
}
function readEarlierValue(
  s: SamplePoint,
  code: MeasurandCode,
  basis: JudgeBasis,
  machine: MachineProfile,
): number | undefined {
  return readJudgedFrom(judgedValuesOf(s, machine), s, code, basis);
}

/** True when an earlier sample may join a trend for `code` (not taken out by a mechanic; same oil for additives). */
function isTrendPoint(ctx: Pick<RuleContext, 'sample'>, s: SamplePoint, code: MeasurandCode): boolean {
  if (s.baselineExcluded) return false;
  return !(ADDITIVE_SENSITIVE.has(code) || getMeasurand(code).group === 'condition') || isSameProduct(s, ctx.sample);
}

// The measurands that get a baseline band (the groups the baseline rule watches), decided once per code.
const BANDED_CODES: ReadonlySet<string> = new Set(
  MEASURAND_CODES.filter((code) =>
    (BASELINE_JUMP.params.groups as readonly string[]).includes(getMeasurand(code).group),
  ),
);

/**
 * The baseline band of every wear metal and contaminant the sample carries, each from the previous in-control
 * samples on the measurand's own basis. The wear chart draws these same bands.
 */
export function buildBaselineBands(
  ctx: Pick<RuleContext, 'machine' | 'sample' | 'history' | 'outOfBaseline'>,
): Partial<Record<MeasurandCode, MeasurandBand>> {
  const p = BASELINE_JUMP.params;
  const per = findRateBasis(ctx.machine.distanceUnit);
  const settings = { minSamples: p.minSamples, window: p.window, watchAlpha: p.watchAlpha, actAlpha: p.actAlpha };
  const bands: Partial<Record<MeasurandCode, MeasurandBand>> = {};
  // Whether each earlier sample may serve as a baseline (not taken out by a mechanic, not act on the measurand,
  // the same oil for additive-sensitive ones): looked up once per sample rather than once per measurand.
  const n = ctx.history.length;
  const entries: JudgedValues[] = new Array(n);
  const usable: boolean[] = new Array(n);
  const sameProduct: boolean[] = new Array(n);
  const actedOn: (ReadonlySet<MeasurandCode> | undefined)[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const s = ctx.history[i]!;
    entries[i] = judgedValuesOf(s, ctx.machine);
    usable[i] = !s.baselineExcluded;
    sameProduct[i] = isSameProduct(s, ctx.sample);
    actedOn[i] = ctx.outOfBaseline.size > 0 ? ctx.outOfBaseline.get(s.id) : undefined;
  }
  for (const code of Object.keys(ctx.sample.readings) as MeasurandCode[]) {
    if (!BANDED_CODES.has(code)) continue;
    const basis = findJudgeBasis(code, ctx.sample);
    const additive = ADDITIVE_SENSITIVE.has(code);
    const values: number[] = [];
    const ids: string[] = [];
    const distances: number[] = [];
    // Newest first while collecting (push, not unshift), turned oldest first once at the end.
    for (let i = n - 1; i >= 0 && values.length < p.window; i--) {
      const s = ctx.history[i]!;
      if (!usable[i] || actedOn[i]?.has(code) || (additive && !sameProduct[i])) continue;
      const v = readJudgedFrom(entries[i]!, s, code, basis);
      if (v === undefined || !Number.isFinite(v)) continue;
      values.push(v);
      ids.push(s.id);
      distances.push(s.distanceOnOil);
    }
    values.reverse();
    ids.reverse();
    const toReported = basisToReported(ctx.sample, basis, ctx.machine);
    // Settings and band written out as literals: object spread here (a 14-field band, 18 measurands, every
    // sample of a replay) took most of the band time and much of the garbage.
    const band = computeBaselineBand(values, {
      minSamples: settings.minSamples,
      window: settings.window,
      watchAlpha: settings.watchAlpha,
      actAlpha: settings.actAlpha,
      floorAt: rateFloor(basis, distances, per),
    });
    const crew = band.status === 'building' ? buildCrewBand(ctx, code, basis, settings, toReported) : undefined;
    // The band is this loop's own fresh object: adding the fields keeps their order and copies nothing.
    bands[code] = crew ?? Object.assign(band, { basis, sampleIds: ids, toReported, source: 'own' as const });
  }
  return bands;
}

/** The lab scatters in ppm; on a rate basis its scatter scales by per / distance like the readings do. */
function rateFloor(basis: JudgeBasis, distances: readonly number[], per: number): (level: number) => number {
  const meanDistance = distances.reduce((a, b) => a + b, 0) / Math.max(1, distances.length);
  return basis === 'ppm' || !(meanDistance > 0)
    ? labScatterAt
    : (level: number) => (labScatterAt((level * meanDistance) / per) * per) / meanDistance;
}

/**
 * The crew reference band of one measurand: the same band rules over the in-control samples of the crew's other
 * machines with this engine, drawn no later than this sample and at a similar oil age. Undefined without a crew
 * reference, or when fewer than CREW_REFERENCE.params.minMachines machines give a value.
 */
function buildCrewBand(
  ctx: Pick<RuleContext, 'machine' | 'sample'>,
  code: MeasurandCode,
  basis: JudgeBasis,
  settings: { minSamples: number; window: number; watchAlpha: number; actAlpha: number },
  toReported: number,
): MeasurandBand | undefined {
  const reference = ctx.machine.crewReference;
  if (!reference || reference.samples.length === 0) return undefined;
  const q = CREW_REFERENCE.params;
  const drawn = Date.parse(ctx.sample.takenAt);
  const age = ctx.sample.distanceOnOil;
  const values: number[] = [];
  const ids: string[] = [];
  const distances: number[] = [];
  const machines = new Set<string>();
  for (let i = reference.samples.length - 1; i >= 0 && values.length < settings.window; i--) {
    const s = reference.samples[i]!;
    if (s.baselineExcluded || s.outOfBaseline?.has(code)) continue;
    if (ADDITIVE_SENSITIVE.has(code) && !isSameProduct(s, ctx.sample)) continue;
    // Never a sample drawn after this one: a replay judges each sample as it was when its results arrived.
    if (Number.isFinite(drawn) && !(Date.parse(s.takenAt) <= drawn)) continue;
    if (Number.isFinite(age) && age > 0 && !(Math.abs(s.distanceOnOil - age) <= q.oilAgeFraction * age)) continue;
    const v = readEarlierValue(s, code, basis, ctx.machine);
    if (v === undefined || !Number.isFinite(v)) continue;
    values.unshift(v);
    ids.unshift(s.id);
    distances.push(s.distanceOnOil);
    machines.add(s.machineId);
  }
  if (machines.size < q.minMachines) return undefined;
  const band = computeBaselineBand(values, {
    ...settings,
    floorAt: rateFloor(basis, distances, findRateBasis(ctx.machine.distanceUnit)),
  });
  if (band.status !== 'ready') return undefined;
  return {
    ...band,
    basis,
    sampleIds: ids,
    toReported,
    source: 'crew',
    crew: { label: reference.label, machines: machines.size },
  };
}

/** "this machine's baseline band", or the crew reference band with its label. */
export function bandWords(band: Pick<MeasurandBand, 'source' | 'crew'>): string {
  return band.source === 'crew' && band.crew
    ? `the crew reference band (${band.crew.label})`
    : "this machine's baseline band";
}

function basisWords(basis: JudgeBasis, machine: MachineProfile): string {
  return basis === 'rate'
    ? machine.distanceUnit === 'h'
      ? ' ppm per 100 h'
      : ` ppm per 1,000 ${machine.distanceUnit}`
    : ' ppm';
}

function isBandAct(band: MeasurandBand & { status: 'ready' }, v: number): boolean {
  return v >= band.actFrom && v >= BASELINE_JUMP.params.actMinRatio * band.mean;
}

/** Rule baseline-jump: a wear metal or contaminant above the machine's own baseline band. */
export function findBaselineJumps(ctx: RuleContext): Finding[] {
  const findings: Finding[] = [];
  for (const [code, band] of Object.entries(ctx.bands) as [MeasurandCode, MeasurandBand][]) {
    if (band.status !== 'ready') continue;
    const v = readJudgedValue(ctx.sample, code, band.basis, ctx.machine, true);
    const reported = readFiringValue(ctx.sample, code);
    if (v === undefined || reported === undefined || v <= band.watchAbove) continue;
    // Boron on an engine without coolant is the oil's own additive: a change is an oil mix-up, never act.
    const oilOnly = code === 'B' && ctx.machine.cooling !== 'liquid';
    const level = !oilOnly && isBandAct(band, v) ? 'act' : 'watch';
    const unit = basisWords(band.basis, ctx.machine);
    const asRate =
      band.basis === 'rate'
        ? `${describe(code, reported)} after ${formatFigure(ctx.sample.distanceOnOil)} ${ctx.machine.distanceUnit} on the oil is ${formatFigure(v)}${unit}, `
        : `${describe(code, reported)} is `;
    findings.push({
      ruleId: 'baseline-jump',
      level,
      measurands: [code],
      numbers: {
        value: v,
        reported,
        mean: band.mean,
        sd: band.sd,
        spread: band.spread,
        watchAbove: band.watchAbove,
        actFrom: band.actFrom,
        n: band.n,
        perDistance: band.basis === 'rate' ? findRateBasis(ctx.machine.distanceUnit) : 0,
        ...(band.source === 'crew' && band.crew ? { crewMachines: band.crew.machines } : {}),
      },
      sentence:
        `${asRate}${level === 'act' ? 'well ' : ''}above ${bandWords(band)} ` +
        `(usually ${formatFigure(band.mean)}, band up to ${formatFigure(band.watchAbove)}${unit}). ${pointsTo(code, ctx.machine)}`,
    });
  }
  return findings;
}

function slopeStatistic(fit: { slope: number; slopeSe: number }): number {
  if (Number.isFinite(fit.slopeSe) && fit.slopeSe > 0) return fit.slope / fit.slopeSe;
  // A perfectly straight line: any real slope stands out.
  return fit.slope > 0 ? Infinity : fit.slope < 0 ? -Infinity : 0;
}

/** Rule climbing-trend: a slope against the odometer that stands out from lab scatter and keeps going up. */
export function findClimbingTrends(ctx: RuleContext): Finding[] {
  const p = CLIMBING_TREND.params;
  const findings: Finding[] = [];
  const jumped = new Set(ctx.earlier.filter((f) => f.ruleId === 'baseline-jump').map((f) => f.measurands[0]));
  for (const code of Object.keys(ctx.sample.readings) as MeasurandCode[]) {
    if (!(p.groups as readonly string[]).includes(getMeasurand(code).group)) continue;
    if (code === 'B' && ctx.machine.cooling !== 'liquid') continue;
    const basis = findJudgeBasis(code, ctx.sample);
    const current = readJudgedValue(ctx.sample, code, basis, ctx.machine, true);
    if (current === undefined) continue;
    const points: [number, number][] = [];
    for (let i = ctx.history.length - 1; i >= 0 && points.length < p.window - 1; i--) {
      const s = ctx.history[i]!;
      if (!isTrendPoint(ctx, s, code) || !Number.isFinite(s.odometer)) continue;
      const v = readEarlierValue(s, code, basis, ctx.machine);
      if (v !== undefined && Number.isFinite(v)) points.push([s.odometer, v]);
    }
    // Collected newest first (push, not unshift); the fit and the rules read them oldest first.
    points.reverse();
    points.push([ctx.sample.odometer, current]);
    if (points.length < p.minPoints) continue;
    // After a spike the next reading falls back: the line may still slope up, but nothing is climbing now.
    if (current < points[points.length - 2]![1]) continue;
    const xFirst = points[0]![0];
    const xLast = ctx.sample.odometer;
    if (!(xLast > xFirst)) continue;
    // One jump must not fire both rules: when this reading already fired the jump rule, the climb has to be
    // there without it (the earlier points rising on their own), else the jump alone made the slope. Then the
    // slope is only read up to the band's edge (so a bigger jump can never read better than a smaller one),
    // and speaks through the jump finding.
    let jumpAlone = false;
    const band = ctx.bands[code];
    if (jumped.has(code) && band?.status === 'ready') {
      const before = points.slice(0, -1);
      if (before.length < 3) jumpAlone = true;
      else {
        const earlier = computeTrendFit(before);
        const earlierStart = earlier.intercept + earlier.slope * before[0]![0];
        const earlierRise = earlier.slope * (before[before.length - 1]![0] - before[0]![0]);
        jumpAlone = !(earlierRise > 0) || !(earlierRise >= p.watchRiseFraction * Math.max(earlierStart, 0));
      }
      if (jumpAlone) points[points.length - 1] = [xLast, Math.min(current, band.watchAbove)];
    }
    const fit = computeTrendFit(points);
    const start = fit.intercept + fit.slope * xFirst;
    const rise = fit.slope * (xLast - xFirst);
    // The level before this reading (the mean of the earlier points): the rise and the scatter are judged
    // against it, so a higher newest reading can only make a climb more likely, never less.
    const base = Math.max(0, points.slice(0, -1).reduce((a, [, y]) => a + y, 0) / (points.length - 1));
    const per = findRateBasis(ctx.machine.distanceUnit);
    const inBasis = (ppmScatter: (ppm: number) => number) =>
      basis === 'rate'
        ? (ppmScatter((base * ctx.sample.distanceOnOil) / per) * per) / ctx.sample.distanceOnOil
        : ppmScatter(base);
    // The slope is tested against the lab's known scatter at the earlier level (not the scatter around this
    // handful of points, which a single high reading inflates): z = slope · √Sxx / σ, one-sided.
    const sigma = inBasis((ppm) => Math.hypot(LAB_SCATTER.absolutePpm, p.scatterRelative * ppm));
    const xbar = points.reduce((a, [x]) => a + x, 0) / points.length;
    const sxx = points.reduce((a, [x]) => a + (x - xbar) ** 2, 0);
    const stat = sigma > 0 ? (fit.slope * Math.sqrt(sxx)) / sigma : fit.slope > 0 ? Infinity : 0;
    // Twice the lab's scatter at the earlier level, in the judged basis: less than that is noise.
    const scatter = inBasis(labScatterAt);
    if (stat <= probit(1 - p.watchAlpha)) continue;
    if (rise < p.watchRiseFraction * base || rise <= 2 * scatter) continue;
    const level = rise >= p.actRiseFraction * base && stat > probit(1 - p.actAlpha) ? 'act' : 'watch';
    if (jumpAlone) {
      // The jump finding speaks for it, at no lower a level than the slope alone would have earned.
      const jump = ctx.earlier.find((f) => f.ruleId === 'baseline-jump' && f.measurands[0] === code);
      if (jump && level === 'act') jump.level = 'act';
      continue;
    }
    const unit = basisWords(basis, ctx.machine);
    findings.push({
      ruleId: 'climbing-trend',
      level,
      measurands: [code],
      numbers: {
        value: current,
        slopePerDistance: fit.slope,
        rise,
        fittedStart: start,
        points: points.length,
        slopeT: Number.isFinite(stat) ? stat : 999,
      },
      sentence:
        `${getMeasurand(code).name} has been climbing: up about ${formatFigure(rise)}${unit} over the last ${points.length} samples ` +
        `(${formatFigure(xLast - xFirst)} ${ctx.machine.distanceUnit})${level === 'act' ? ', roughly double where it started' : ''}. ${pointsTo(code, ctx.machine)}`,
    });
  }
  return findings;
}

/** Rule fixed-limit: elements and water against the lead's fixed limits. */
export function findFixedLimitBreaches(ctx: RuleContext): Finding[] {
  const p = FIXED_LIMIT.params;
  const findings: Finding[] = [];
  const check = (code: MeasurandCode, value: number, limit: number) => {
    if (value >= p.watchFraction * limit) {
      const level = value >= limit ? 'act' : 'watch';
      findings.push({
        ruleId: 'fixed-limit',
        level,
        measurands: [code],
        numbers: { value, limit, watchFrom: p.watchFraction * limit },
        sentence: `${describe(code, value)} ${level === 'act' ? 'is at or above' : 'is nearing'} the fixed limit of ${formatFigure(limit)}. ${pointsTo(code, ctx.machine)}`,
      });
    }
  };
  for (const code of p.elements) {
    const v = readFiringValue(ctx.sample, code);
    if (v !== undefined) check(code, v, ctx.limits[code]);
  }
  const water = readFiringValue(ctx.sample, 'WATER');
  if (water !== undefined) check('WATER', water, ctx.limits.waterPercent);
  return findings;
}

/** The oil's own level of a measurand: the new-oil reference, else the first earlier samples of the same oil. */
export function findOwnLevel(
  ctx: Pick<RuleContext, 'sample' | 'history'>,
  code: MeasurandCode,
  firstSamples = 3,
): { value: number; source: 'new-oil' | 'first-samples'; samples: number } | undefined {
  const fromNew = ctx.sample.newOil?.readings[code];
  if (fromNew && Number.isFinite(fromNew.value)) {
    return { value: countReadingValue(fromNew), source: 'new-oil', samples: 0 };
  }
  if (code === 'KV100' && ctx.sample.newOilKv100 !== undefined && ctx.sample.newOilKv100 > 0) {
    return { value: ctx.sample.newOilKv100, source: 'new-oil', samples: 0 };
  }
  const values: number[] = [];
  for (const s of ctx.history) {
    if (values.length >= firstSamples) break;
    if (s.baselineExcluded || !isSameProduct(s, ctx.sample) || !productOf(ctx.sample)) continue;
    const v = readBaselineValue(s, code);
    if (v !== undefined) values.push(v);
  }
  if (values.length === 0) return undefined;
  return { value: values.reduce((a, b) => a + b, 0) / values.length, source: 'first-samples', samples: values.length };
}

function ownLevelWords(own: { source: 'new-oil' | 'first-samples'; samples: number }): string {
  return own.source === 'new-oil'
    ? 'the new-oil reference'
    : `the first ${own.samples === 1 ? 'sample' : `${own.samples} samples`} of this oil (no new-oil reference is recorded)`;
}

/** Rule viscosity-grade: KV100 outside the SAE J300 window of the grade poured; below the next lower grade: act. */
export function findViscosityOutsideGrade(ctx: RuleContext): Finding[] {
  const kv = readFiringValue(ctx.sample, 'KV100');
  const grade = ctx.sample.grade;
  if (kv === undefined || !grade) return [];
  const w = findGradeWindow(grade);
  if (!w || (kv >= w.min && kv < w.max)) return [];
  const thin = kv < w.min;
  const lower = thin ? SAE_J300_GRADES.find((g) => g.max === w.min) : undefined;
  const level = lower && kv < lower.min ? 'act' : 'watch';
  return [
    {
      ruleId: 'viscosity-grade',
      level,
      measurands: ['KV100'],
      numbers: { value: kv, windowMin: w.min, windowMax: w.max, ...(lower ? { lowerGradeMin: lower.min } : {}) },
      sentence:
        `${describe('KV100', kv)} is ${thin ? 'below' : 'above'} the SAE J300 window of the ${w.grade} poured ` +
        `(${formatFigure(w.min)} to under ${formatFigure(w.max)} mm²/s)` +
        (level === 'act'
          ? ` and below the SAE ${lower!.grade} window too: the oil no longer protects like the grade you chose. `
          : `: the oil has ${thin ? 'thinned' : 'thickened'} out of its grade. `) +
        `${thin ? 'Fuel dilution or gearbox shear are the usual causes.' : 'Oxidation or a long interval are the usual causes.'}`,
    },
  ];
}

/** Rule viscosity-change: KV100 against the same oil new (or its first samples): ±15 % watch, 25 % thinner act. */
export function findViscosityChange(ctx: RuleContext): Finding[] {
  const kv = readFiringValue(ctx.sample, 'KV100');
  if (kv === undefined) return [];
  const own = findOwnLevel(ctx, 'KV100', VISCOSITY_CHANGE.params.refSamples);
  if (!own || !(own.value > 0)) return [];
  // Rounded to 1e-9 so a change of exactly the limit (11.9 against 14.0 is 15 %) counts as reaching it.
  const changePercent = Math.round((Math.abs(kv - own.value) / own.value) * 100 * 1e9) / 1e9;
  const limit = ctx.limits.kv100ChangePercent;
  if (changePercent < limit) return [];
  const level = kv < own.value && changePercent >= VISCOSITY_CHANGE.params.actThinPercent ? 'act' : 'watch';
  return [
    {
      ruleId: 'viscosity-change',
      level,
      measurands: ['KV100'],
      numbers: {
        value: kv,
        newOil: own.value,
        changePercent,
        limit,
        fromNewOilReference: own.source === 'new-oil' ? 1 : 0,
      },
      sentence:
        `${describe('KV100', kv)} is ${formatFigure(changePercent)} % ${kv < own.value ? 'thinner' : 'thicker'} than the oil as poured ` +
        `(${formatFigure(own.value)} mm²/s, from ${ownLevelWords(own)}). ${pointsTo('KV100')}`,
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

/** Rule flash-point: without a fuel figure, a low flash point is the fuel sign. */
export function findLowFlashPoint(ctx: RuleContext): Finding[] {
  const p = FLASH_POINT.params;
  const flash = readFiringValue(ctx.sample, 'FLASH');
  if (flash === undefined || ctx.sample.readings.FUEL !== undefined) return [];
  const own = findOwnLevel(ctx, 'FLASH', p.refSamples);
  let level: 'watch' | 'act' | undefined;
  if (own) {
    const drop = own.value - flash;
    level = drop >= p.actDropC ? 'act' : drop >= p.watchDropC ? 'watch' : undefined;
  } else {
    level = flash < p.actBelowC ? 'act' : flash < p.watchBelowC ? 'watch' : undefined;
  }
  if (!level) return [];
  return [
    {
      ruleId: 'flash-point',
      level,
      measurands: ['FLASH'],
      numbers: { value: flash, ...(own ? { reference: own.value } : {}) },
      sentence:
        `${describe('FLASH', flash)} is ${own ? `${formatFigure(own.value - flash)} °C below ${ownLevelWords(own)}` : 'low for an engine oil'}, ` +
        'and the lab gave no fuel figure: fuel in the oil is the usual cause. Short trips that never warm the oil, or rich running, are worth checking.',
    },
  ];
}

/** Rule condition-trend: KV100 falling, fuel or water rising over recent samples, beyond their scatter. */
export function findConditionTrends(ctx: RuleContext): Finding[] {
  const p = CONDITION_TREND.params;
  const findings: Finding[] = [];
  const series = (code: MeasurandCode): [number, number][] | undefined => {
    const current = readFiringValue(ctx.sample, code);
    if (current === undefined) return undefined;
    const points: [number, number][] = [];
    for (let i = ctx.history.length - 1; i >= 0 && points.length < p.window - 1; i--) {
      const s = ctx.history[i]!;
      if (!isTrendPoint(ctx, s, code)) continue;
      const v = readBaselineValue(s, code);
      if (v !== undefined && Number.isFinite(s.odometer)) points.unshift([s.odometer, v]);
    }
    points.push([ctx.sample.odometer, current]);
    return points.length >= p.minPoints && ctx.sample.odometer > points[0]![0] ? points : undefined;
  };
  const tCrit = (n: number) => studentTQuantile(1 - p.alpha, n - 2);
  const check = (
    code: 'KV100' | 'FUEL' | 'WATER',
    direction: 1 | -1,
    enough: (start: number, change: number) => boolean,
    words: string,
  ) => {
    const points = series(code);
    if (!points) return;
    const last = points[points.length - 1]![1];
    if (direction * (last - points[points.length - 2]![1]) < 0) return;
    const fit = computeTrendFit(points);
    const stat = direction * slopeStatistic(fit);
    const span = points[points.length - 1]![0] - points[0]![0];
    const start = fit.intercept + fit.slope * points[0]![0];
    const change = direction * fit.slope * span;
    if (stat <= tCrit(points.length) || !enough(start, change)) return;
    findings.push({
      ruleId: 'condition-trend',
      level: 'watch',
      measurands: [code],
      numbers: { value: last, fittedStart: start, change, points: points.length },
      sentence: `${getMeasurand(code).name} has been ${direction > 0 ? 'rising' : 'falling'} over the last ${points.length} samples (${direction > 0 ? 'up' : 'down'} about ${formatFigure(change)} ${getMeasurand(code).unit}). ${words}`,
    });
  };
  check(
    'KV100',
    -1,
    (start, change) => start > 0 && (100 * change) / start >= p.kv100DropPercent,
    'Gearbox shear in a shared sump, or fuel building up, thins the oil slowly: consider a shear-stable oil or a shorter interval.',
  );
  check(
    'FUEL',
    1,
    (_s, change) => change >= p.fuelRisePoints,
    'Fuel building up over a season of short trips: a longer ride that gets the oil fully hot usually helps.',
  );
  check(
    'WATER',
    1,
    (_s, change) => change >= p.waterRisePoints,
    'Water building up: condensation from short trips or washing, or coolant on a liquid-cooled engine.',
  );
  return findings;
}

/** Rule coolant-markers (liquid-cooled only): Na, K, B against the oil's own level, potassium alone, glycol. */
export function findCoolantMarkers(ctx: RuleContext): Finding[] {
  if (ctx.machine.cooling !== 'liquid') return [];
  const p = BORON_AND_COOLANT.params;
  const glycol = readFiringValue(ctx.sample, 'GLYCOL');
  if (glycol !== undefined && glycol > 0) {
    return [
      {
        ruleId: 'coolant-markers',
        level: 'act',
        measurands: ['GLYCOL', ...(['Na', 'K', 'B'] as const).filter((c) => ctx.sample.readings[c] !== undefined)],
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
  let kRise = 0;
  for (const code of p.markers) {
    const v = readFiringValue(ctx.sample, code);
    if (v === undefined) continue;
    numbers[code] = v;
    const band = ctx.bands[code];
    const own =
      ctx.sample.newOil?.readings[code] !== undefined
        ? findOwnLevel(ctx, code)?.value
        : band && band.status === 'ready'
          ? band.mean
          : (findOwnLevel(ctx, code)?.value ?? (code === 'K' ? 0 : undefined));
    if (own === undefined) continue;
    numbers[`${code}Own`] = own;
    const rise = v - own;
    if (code === 'K') kRise = rise;
    const step = p.markerRisePpm[code];
    if (rise >= step) raised.push(code);
    // Twice its rise, or at the act edge of the machine's own band: high.
    if (rise >= 2 * step || (rise >= step && band?.status === 'ready' && v >= band.actFrom)) high = true;
  }
  const water = readFiringValue(ctx.sample, 'WATER');
  const wet = water !== undefined && water >= FIXED_LIMIT.params.watchFraction * ctx.limits.waterPercent;
  const potassiumAlone = kRise >= p.potassiumWatchPpm;
  if (raised.length < p.minRaised && !potassiumAlone) return [];
  const level = (raised.length >= p.minRaised && high) || (potassiumAlone && wet) ? 'act' : 'watch';
  const codes = raised.length > 0 ? raised : (['K'] as MeasurandCode[]);
  const names = codes.map((c) => getMeasurand(c).name.toLowerCase()).join(' and ');
  return [
    {
      ruleId: 'coolant-markers',
      level,
      measurands: wet ? [...codes, 'WATER'] : codes,
      numbers: { ...numbers, raised: raised.length },
      sentence:
        (raised.length >= p.minRaised
          ? `Coolant markers are up together (${names}) above this oil's own level. `
          : `Potassium is ${formatFigure(kRise)} ppm above this oil's own level${wet ? ', with water in the oil' : ''}. `) +
        'In a liquid-cooled engine that usually means coolant reaching the oil: head gasket, water pump seal or oil cooler. ' +
        'Check the coolant level when the engine is cold, and fix the leak before trusting the oil.',
    },
  ];
}

function isRaised(ctx: RuleContext, code: 'Si' | 'Al', reported: number): { raised: boolean; atAct: boolean } {
  const band = ctx.bands[code];
  const limit = ctx.limits[code];
  const v = band ? readJudgedValue(ctx.sample, code, band.basis, ctx.machine, true) : undefined;
  const ready = band !== undefined && band.status === 'ready' && v !== undefined;
  const raised = (ready && v > band.watchAbove) || reported >= FIXED_LIMIT.params.watchFraction * limit;
  const atAct = (ready && isBandAct(band, v)) || reported >= limit;
  return { raised, atAct };
}

/** The usual ppm of an element at this sample: the band mean in reported ppm, else the oil's own level. */
function usualPpm(ctx: RuleContext, code: 'Si' | 'Al'): number | undefined {
  const band = ctx.bands[code];
  if (band && band.status === 'ready') return band.mean * band.toReported;
  return findOwnLevel(ctx, code)?.value;
}

/** Rule dirt: silicon and aluminium rising together in the proportion of dust. */
export function findDirtEntry(ctx: RuleContext): Finding[] {
  const si = readFiringValue(ctx.sample, 'Si');
  const al = readFiringValue(ctx.sample, 'Al');
  if (si === undefined || al === undefined) return [];
  const siState = isRaised(ctx, 'Si', si);
  const alState = isRaised(ctx, 'Al', al);
  if (!siState.raised || !alState.raised) return [];
  const siUsual = usualPpm(ctx, 'Si');
  const alUsual = usualPpm(ctx, 'Al');
  if (siUsual === undefined || alUsual === undefined) return [];
  const siRise = si - siUsual;
  const alRise = al - alUsual;
  if (!(siRise > 0) || !(alRise > 0)) return [];
  const ratio = siRise / alRise;
  if (ratio < DIRT.params.minRatio || ratio > DIRT.params.maxRatio) return [];
  return [
    {
      ruleId: 'dirt',
      level: siState.atAct ? 'act' : 'watch',
      measurands: ['Si', 'Al'],
      // Silicon sets the level; aluminium is marked by its own figures, so more aluminium (which can tip the ratio
      // out of the dust range) never reads as less concern for it.
      ...(siState.atAct && !alState.atAct ? { levels: { Al: 'watch' as const } } : {}),
      numbers: { Si: si, Al: al, siRise, alRise, ratio },
      sentence:
        `Silicon is up ${formatFigure(siRise)} ppm and aluminium ${formatFigure(alRise)} ppm over their usual levels, about ${formatFigure(ratio)} to 1, ` +
        'the proportion of dust: dirt is probably getting in. Check the air filter, its seal and the intake boots and clamps before the next ride.',
    },
  ];
}

/** Rule additive-mismatch: additive elements that moved away from the oil's own levels. */
export function findAdditiveMismatch(ctx: RuleContext): Finding[] {
  const p = ADDITIVE_MISMATCH.params;
  const product = productOf(ctx.sample);
  const reference = ctx.sample.newOil;
  if (!product && !reference) return [];
  const earlier = product
    ? ctx.history.slice(-p.lookBack).filter((s) => !s.baselineExcluded && productOf(s) === product)
    : [];
  const moved: MeasurandCode[] = [];
  const numbers: Record<string, number> = { earlierSamples: earlier.length };
  let usedReference = false;
  for (const code of p.elements) {
    const v = readBaselineValue(ctx.sample, code);
    if (v === undefined) continue;
    const ref = reference?.readings[code];
    let m: number;
    if (ref && Number.isFinite(ref.value)) {
      m = countReadingValue(ref);
      usedReference = true;
    } else {
      const values = earlier.map((s) => readBaselineValue(s, code)).filter((x): x is number => x !== undefined);
      if (values.length < p.minEarlier) continue;
      m = values.reduce((a, b) => a + b, 0) / values.length;
    }
    const change = Math.abs(v - m);
    if (change >= p.absoluteChangePpm && change > p.relativeChange * m) {
      moved.push(code);
      numbers[code] = v;
      numbers[`${code}EarlierMean`] = m;
    }
  }
  if (moved.length === 0) return [];
  const against = usedReference
    ? 'the new-oil reference of this oil'
    : `earlier samples of "${ctx.sample.oilProduct!.trim()}" (no new-oil reference is recorded)`;
  return [
    {
      ruleId: 'additive-mismatch',
      level: 'watch',
      measurands: moved,
      numbers,
      sentence:
        `The additive pattern (${moved.map((c) => getMeasurand(c).name.toLowerCase()).join(', ')}) does not match ${against}. ` +
        'A different or mixed oil, or a top-up with another oil, is the usual reason; check what went in.',
    },
  ];
}

/** Rule clutch-friction: a friction-modified oil in an engine whose wet clutch shares it. */
export function findClutchFriction(ctx: RuleContext): Finding[] {
  if (ctx.machine.sharedOil !== true) return [];
  const fromNew = ctx.sample.newOil?.readings.Mo;
  const mo = fromNew && fromNew.qualifier !== '<' ? fromNew.value : readFiringValue(ctx.sample, 'Mo');
  if (mo === undefined || mo < CLUTCH_FRICTION.params.watchMoPpm) return [];
  return [
    {
      ruleId: 'clutch-friction',
      level: 'watch',
      measurands: ['Mo'],
      numbers: { value: mo, watchFrom: CLUTCH_FRICTION.params.watchMoPpm, fromNewOilReference: fromNew ? 1 : 0 },
      sentence:
        `Molybdenum at ${formatFigure(mo)} ppm${fromNew ? ' in this oil as poured' : ''} points to a friction-modified oil. ` +
        "This engine's wet clutch runs in the same oil, and friction modifiers can make it slip: an oil rated for wet clutches " +
        '(see the service manual) is the usual choice.',
    },
  ];
}

/** Every finding rule, in RULE_DEFINITIONS order (the trend rule runs after the jump rule and sees its findings). */
export const FINDING_RULES: readonly ((ctx: RuleContext) => Finding[])[] = [
  findBaselineJumps,
  findClimbingTrends,
  findFixedLimitBreaches,
  findViscosityOutsideGrade,
  findViscosityChange,
  findFuelDilution,
  findLowFlashPoint,
  findConditionTrends,
  findCoolantMarkers,
  findDirtEntry,
  findAdditiveMismatch,
  findClutchFriction,
];
