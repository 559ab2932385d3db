/**
 * The numbers behind a finding, as sentences a rider reads: rounded figures with their units, never the
 * engine's parameter names. One table entry per rule; a rule or a figure this table does not know is left out
 * (with a pointer to the rule's page), so no code name ever reaches the screen.
 */
import {
  BASELINE_BASIS,
  findRateBasis,
  getMeasurand,
  isMeasurandCode,
  type DistanceUnit,
  type MeasurandCode,
  type RuleId,
} from '../analysis';

/** A stored finding as the sample page reads it. */
export interface FindingNumbersInput {
  ruleId: string;
  /** The finding's main measurand (findings store only the first). */
  measurand: string | null;
  numbers: Record<string, unknown>;
}

export interface FindingNumbersContext {
  /** The machine's distance unit: miles, kilometres or engine hours. */
  distanceUnit: DistanceUnit;
  /** Distance the sampled oil had run; above zero the wear metals were judged per distance. */
  distanceOnOil: number | null;
}

/** Thousands separators from 1,000; whole numbers from 10; one decimal from 1; two significant digits below. */
export function roundFigure(v: number): string {
  if (!Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  if (a >= 10) return Math.round(v).toLocaleString('en-US');
  if (a >= 1) return String(Number(v.toFixed(1)));
  if (a === 0) return '0';
  return String(Number(v.toPrecision(2)));
}

/** A figure in its measurand's unit: viscosities keep one decimal, since a grade window is a few mm²/s wide. */
export function formatMeasurandFigure(code: string, v: number): string {
  const unit = isMeasurandCode(code) ? getMeasurand(code).unit : '';
  const figure = unit === 'mm²/s' ? (Number.isFinite(v) ? v.toFixed(1) : '—') : roundFigure(v);
  if (!unit || unit === 'present') return figure;
  return unit === '%' ? `${figure} %` : `${figure} ${unit}`;
}

/** "ppm per 1,000 km" (per 100 h on an hour meter), the unit a wear rate is judged in. */
export function rateUnitWords(unit: DistanceUnit): string {
  return unit === 'h' ? 'ppm per 100 h' : `ppm per 1,000 ${unit}`;
}

function nameOf(code: string): string {
  return isMeasurandCode(code) ? getMeasurand(code).name : 'The reading';
}

function num(numbers: Record<string, unknown>, key: string): number | undefined {
  const v = numbers[key];
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
}

/** Whether the rules judged this measurand per distance of oil use (same test as the engine's basis choice). */
function judgedAsRate(code: string, ctx: FindingNumbersContext): boolean {
  if (!isMeasurandCode(code) || (BASELINE_BASIS.ppm as readonly string[]).includes(code)) return false;
  if (!(BASELINE_BASIS.rate as readonly string[]).includes(code)) return false;
  return ctx.distanceOnOil !== null && ctx.distanceOnOil > 0;
}

/** A figure in the basis it was judged in: "29 ppm per 1,000 km" or "29 ppm". */
function inBasis(code: string, v: number, rate: boolean, ctx: FindingNumbersContext): string {
  return rate ? `${roundFigure(v)} ${rateUnitWords(ctx.distanceUnit)}` : formatMeasurandFigure(code, v);
}

function ownLevelSource(fromNewOilReference: number | undefined): string {
  return fromNewOilReference === 1 ? 'the new-oil reference' : 'the first samples of this oil';
}

type Describe = (code: string, n: Record<string, unknown>, ctx: FindingNumbersContext) => string[];

const DESCRIBE: Record<RuleId, Describe> = {
  'baseline-jump': (code, n, ctx) => {
    const rate = (num(n, 'perDistance') ?? 0) > 0;
    const value = num(n, 'value');
    const reported = num(n, 'reported');
    const mean = num(n, 'mean');
    const watch = num(n, 'watchAbove');
    const act = num(n, 'actFrom');
    const count = num(n, 'n');
    const sd = num(n, 'sd');
    const lines: string[] = [];
    if (mean !== undefined && watch !== undefined && value !== undefined) {
      lines.push(
        `Usual ${inBasis(code, mean, rate, ctx)}, band up to ${roundFigure(watch)}${act !== undefined ? `, act from ${roundFigure(act)}` : ''}; ` +
          `this one ${roundFigure(value)}.`,
      );
    }
    if (rate && reported !== undefined && ctx.distanceOnOil) {
      lines.push(
        `Judged per distance: the lab reported ${formatMeasurandFigure(code, reported)}, divided by the distance this oil had run.`,
      );
    }
    if (count !== undefined) {
      lines.push(
        `The band comes from ${roundFigure(count)} earlier ${count === 1 ? 'sample' : 'samples'} of this engine` +
          (sd !== undefined
            ? `, which vary by about ${roundFigure(sd)} either side of usual (one standard deviation).`
            : '.'),
      );
    }
    return lines;
  },
  'climbing-trend': (code, n, ctx) => {
    const rate = judgedAsRate(code, ctx);
    const value = num(n, 'value');
    const start = num(n, 'fittedStart');
    const rise = num(n, 'rise');
    const points = num(n, 'points');
    const slope = num(n, 'slopePerDistance');
    const stat = num(n, 'slopeT');
    const per = findRateBasis(ctx.distanceUnit);
    const lines: string[] = [];
    if (start !== undefined && value !== undefined) {
      // A steep line fitted through low early readings can start below zero; no reading can.
      lines.push(
        `The line through the last ${points !== undefined ? roundFigure(points) : 'few'} samples starts at ${start < 0 ? 'about ' : ''}${inBasis(code, Math.max(0, start), rate, ctx)}; this one ${roundFigure(value)}.`,
      );
    }
    if (rise !== undefined) {
      lines.push(
        `Up about ${roundFigure(rise)} over that stretch` +
          (slope !== undefined
            ? `, about ${roundFigure(slope * per)} more every ${per.toLocaleString('en-US')} ${ctx.distanceUnit} on the ${ctx.distanceUnit === 'h' ? 'hour meter' : 'odometer'}.`
            : '.'),
      );
    }
    if (stat !== undefined) {
      lines.push(
        stat >= 999
          ? 'The points lie on a straight rising line.'
          : `The climb stands about ${roundFigure(stat)} times clear of the lab's usual scatter.`,
      );
    }
    return lines;
  },
  'fixed-limit': (code, n) => {
    const value = num(n, 'value');
    const limit = num(n, 'limit');
    const from = num(n, 'watchFrom');
    if (value === undefined || limit === undefined) return [];
    return [
      `This one ${formatMeasurandFigure(code, value)}; worth watching from ${roundFigure(from ?? limit)}, fixed limit ${formatMeasurandFigure(code, limit)}.`,
    ];
  },
  'viscosity-grade': (_code, n) => {
    const value = num(n, 'value');
    const min = num(n, 'windowMin');
    const max = num(n, 'windowMax');
    const lowerMin = num(n, 'lowerGradeMin');
    const lines: string[] = [];
    if (value !== undefined && min !== undefined && max !== undefined) {
      lines.push(
        `KV100 ${formatMeasurandFigure('KV100', value)}; the grade poured spans ${min.toFixed(1)} to under ${max.toFixed(1)} mm²/s at 100 °C.`,
      );
    }
    if (lowerMin !== undefined) lines.push(`The next thinner grade starts at ${lowerMin.toFixed(1)} mm²/s.`);
    return lines;
  },
  'viscosity-change': (_code, n) => {
    const value = num(n, 'value');
    const poured = num(n, 'newOil');
    const change = num(n, 'changePercent');
    const limit = num(n, 'limit');
    if (value === undefined || poured === undefined) return [];
    return [
      `KV100 ${formatMeasurandFigure('KV100', value)} against ${formatMeasurandFigure('KV100', poured)} as poured (from ${ownLevelSource(num(n, 'fromNewOilReference'))}).`,
      ...(change !== undefined
        ? [
            `That is ${roundFigure(change)} % apart${limit !== undefined ? `; worth watching from ${roundFigure(limit)} % either way` : ''}.`,
          ]
        : []),
    ];
  },
  'fuel-dilution': (_code, n) => {
    const value = num(n, 'value');
    const watch = num(n, 'watchAbove');
    const limit = num(n, 'limit');
    if (value === undefined) return [];
    return [
      `Fuel ${roundFigure(value)} % of the oil; worth watching above ${roundFigure(watch ?? 2)} %${limit !== undefined ? `, act from ${roundFigure(limit)} %` : ''}.`,
    ];
  },
  'flash-point': (_code, n) => {
    const value = num(n, 'value');
    const ref = num(n, 'reference');
    if (value === undefined) return [];
    return [
      `Flash point ${roundFigure(value)} °C${ref !== undefined ? `, against ${roundFigure(ref)} °C for this oil as poured or in its first samples` : ''}.`,
    ];
  },
  'condition-trend': (code, n) => {
    const value = num(n, 'value');
    const start = num(n, 'fittedStart');
    const change = num(n, 'change');
    const points = num(n, 'points');
    if (value === undefined || start === undefined) return [];
    return [
      `The line through the last ${points !== undefined ? roundFigure(points) : 'few'} samples starts at ${start < 0 ? 'about ' : ''}${formatMeasurandFigure(code, Math.max(0, start))}; this one ${formatMeasurandFigure(code, value)}` +
        (change !== undefined ? `, a change of about ${formatMeasurandFigure(code, change)}.` : '.'),
    ];
  },
  'coolant-markers': (_code, n) => {
    if (num(n, 'glycol') !== undefined) return ['The lab found glycol, the main ingredient of coolant.'];
    const lines: string[] = [];
    for (const code of ['Na', 'K', 'B'] as const) {
      const v = num(n, code);
      if (v === undefined) continue;
      const own = num(n, `${code}Own`);
      lines.push(
        `${nameOf(code)} ${formatMeasurandFigure(code, v)}${own !== undefined ? `, this oil's own level ${formatMeasurandFigure(code, own)}` : ''}.`,
      );
    }
    const raised = num(n, 'raised');
    const count = ['No marker is', 'One marker is', 'Two markers are', 'All three markers are'];
    if (raised !== undefined)
      lines.push(`${count[raised] ?? `${roundFigure(raised)} markers are`} clearly above the oil's own level.`);
    return lines;
  },
  dirt: (_code, n) => {
    const si = num(n, 'Si');
    const al = num(n, 'Al');
    const siRise = num(n, 'siRise');
    const alRise = num(n, 'alRise');
    const ratio = num(n, 'ratio');
    const lines: string[] = [];
    if (si !== undefined && siRise !== undefined)
      lines.push(`Silicon ${formatMeasurandFigure('Si', si)}, up ${roundFigure(siRise)} on its usual level.`);
    if (al !== undefined && alRise !== undefined)
      lines.push(`Aluminium ${formatMeasurandFigure('Al', al)}, up ${roundFigure(alRise)} on its usual level.`);
    if (ratio !== undefined)
      lines.push(`Silicon rose about ${roundFigure(ratio)} times as much as aluminium, the proportion of dust.`);
    return lines;
  },
  'additive-mismatch': (_code, n) => {
    const lines: string[] = [];
    for (const [key, v] of Object.entries(n)) {
      if (!isMeasurandCode(key) || typeof v !== 'number') continue;
      const was = num(n, `${key}EarlierMean`);
      lines.push(
        `${nameOf(key)} ${formatMeasurandFigure(key, v)}${was !== undefined ? `, against ${formatMeasurandFigure(key, was)} before` : ''}.`,
      );
    }
    const earlier = num(n, 'earlierSamples');
    if (earlier !== undefined && earlier > 0)
      lines.push(
        `Compared with ${roundFigure(earlier)} earlier ${earlier === 1 ? 'sample' : 'samples'} of the same oil.`,
      );
    return lines;
  },
  'clutch-friction': (_code, n) => {
    const value = num(n, 'value');
    const from = num(n, 'watchFrom');
    if (value === undefined) return [];
    return [
      `Molybdenum ${formatMeasurandFigure('Mo', value)}${num(n, 'fromNewOilReference') === 1 ? ' in the oil as poured' : ''}` +
        `${from !== undefined ? `; friction modifiers are worth a look from ${roundFigure(from)} ppm` : ''}.`,
    ];
  },
};

/**
 * The numbers of one stored finding as short sentences. Unknown rules fall back to the measurand figures the
 * numbers name (Na, Si …) in words, and never print a parameter name.
 */
export function describeFindingNumbers(finding: FindingNumbersInput, ctx: FindingNumbersContext): string[] {
  const code = finding.measurand ?? '';
  const n = finding.numbers ?? {};
  const describe = (DESCRIBE as Record<string, Describe | undefined>)[finding.ruleId];
  if (describe) return describe(code, n, ctx);
  const lines: string[] = [];
  for (const [key, v] of Object.entries(n)) {
    if (isMeasurandCode(key) && typeof v === 'number') lines.push(`${nameOf(key)} ${formatMeasurandFigure(key, v)}.`);
  }
  const value = num(n, 'value');
  if (value !== undefined && isMeasurandCode(code)) lines.unshift(`This one ${formatMeasurandFigure(code, value)}.`);
  return lines;
}

/** A stored baseline band in reported ppm: "usual 22 ppm, band up to 27, act from 31 · from 6 samples". */
export function describeBandInPpm(band: {
  mean: number;
  watchAbove: number;
  actFrom: number;
  n: number;
  perDistance: boolean;
}): string {
  return (
    `usual ${roundFigure(band.mean)} ppm, band up to ${roundFigure(band.watchAbove)}, act from ${roundFigure(band.actFrom)} · ` +
    `from ${roundFigure(band.n)} ${band.n === 1 ? 'sample' : 'samples'}${band.perDistance ? ' (judged per distance)' : ''}`
  );
}

/** The measurand codes a finding is about, main one first: its own, then any the numbers name (Na, K, B …). */
export function listFindingMeasurands(finding: FindingNumbersInput): MeasurandCode[] {
  const codes: MeasurandCode[] = [];
  if (finding.measurand && isMeasurandCode(finding.measurand)) codes.push(finding.measurand);
  for (const key of Object.keys(finding.numbers ?? {}))
    if (isMeasurandCode(key) && !codes.includes(key)) codes.push(key);
  return codes;
}
