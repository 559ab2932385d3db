/**
 * The oil tools' form handling: reads GET parameters, runs the analysis engine's calculators and turns their
 * RangeErrors into messages beside the field. Pure: no database, no Astro.
 */
import {
  explainUnusualViscosityIndex,
  findGradeWindow,
  SAE_J300_MIN_HTHS,
  saeGradesOf,
  sayboltSeconds,
  viscosityAt,
  viscosityIndex,
  type SaeHighTempGrade,
} from '~/lib/analysis';
import type { RecommendedGrade } from '~/lib/db/database';
import { fromCelsius, toCelsius, type TemperatureUnit } from '~/lib/units/units';

export type ToolResult<T> =
  { state: 'idle' } | { state: 'ok'; value: T } | { state: 'error'; fields: Record<string, string>; message?: string };

/** A number from a form field: '' is missing; a decimal comma is accepted. */
export function readNumber(params: URLSearchParams, name: string): number | undefined | 'invalid' {
  const raw = (params.get(name) ?? '').trim().replace(',', '.');
  if (raw === '') return undefined;
  const n = Number(raw);
  return Number.isFinite(n) ? n : 'invalid';
}

function needNumbers(
  params: URLSearchParams,
  names: Record<string, string>,
): { values: Record<string, number> } | { fields: Record<string, string> } {
  const values: Record<string, number> = {};
  const fields: Record<string, string> = {};
  for (const [name, label] of Object.entries(names)) {
    const v = readNumber(params, name);
    if (v === undefined) fields[name] = `Enter ${label}.`;
    else if (v === 'invalid') fields[name] = `Enter ${label} as a number, such as 13.5.`;
    else values[name] = v;
  }
  return Object.keys(fields).length ? { fields } : { values };
}

function rangeError(e: unknown, field: string): ToolResult<never> {
  if (e instanceof RangeError) return { state: 'error', fields: { [field]: e.message } };
  throw e;
}

/** Viscosity index (ASTM D2270) from KV40 and KV100 in mm²/s. */
export function runViscosityIndex(params: URLSearchParams): ToolResult<{ vi: number; warning: string | null }> {
  if (params.get('tool') !== 'vi') return { state: 'idle' };
  const r = needNumbers(params, { kv40: 'the viscosity at 40 °C', kv100: 'the viscosity at 100 °C' });
  if ('fields' in r) return { state: 'error', fields: r.fields };
  try {
    const vi = viscosityIndex(r.values['kv40']!, r.values['kv100']!);
    return { state: 'ok', value: { vi, warning: explainUnusualViscosityIndex(vi) } };
  } catch (e) {
    return rangeError(e, r.values['kv100']! < 2 ? 'kv100' : 'kv40');
  }
}

/** Saybolt Universal Seconds (ASTM D2161) of a kinematic viscosity at a temperature in the user's unit. */
export function runSaybolt(params: URLSearchParams, unit: TemperatureUnit): ToolResult<{ sus: number; tempF: number }> {
  if (params.get('tool') !== 'sus') return { state: 'idle' };
  const r = needNumbers(params, { kv: 'the kinematic viscosity', temp: 'the temperature' });
  if ('fields' in r) return { state: 'error', fields: r.fields };
  const tempF = fromCelsius(toCelsius(r.values['temp']!, unit), 'F');
  try {
    return { state: 'ok', value: { sus: sayboltSeconds(r.values['kv']!, tempF), tempF } };
  } catch (e) {
    return rangeError(e, 'kv');
  }
}

/** Viscosity at another temperature (ASTM D341) from KV40 and KV100; temperature in the user's unit. */
export function runViscosityAt(
  params: URLSearchParams,
  unit: TemperatureUnit,
): ToolResult<{ kv: number; tempC: number }> {
  if (params.get('tool') !== 'at') return { state: 'idle' };
  const r = needNumbers(params, {
    kv40: 'the viscosity at 40 °C',
    kv100: 'the viscosity at 100 °C',
    temp: 'the temperature',
  });
  if ('fields' in r) return { state: 'error', fields: r.fields };
  const tempC = toCelsius(r.values['temp']!, unit);
  try {
    return { state: 'ok', value: { kv: viscosityAt(r.values['kv40']!, r.values['kv100']!, tempC), tempC } };
  } catch (e) {
    const msg = e instanceof Error ? e.message : '';
    return rangeError(e, /falls below|absolute zero/.test(msg) ? 'temp' : 'kv100');
  }
}

export interface GradeAnswer {
  kv100: number;
  /** Every J300 high-temperature grade whose window holds the KV100, thinnest first (empty: none). */
  grades: SaeHighTempGrade[];
  /** The grades as words: '40', or '12, 16 or 20'; empty when none fits. */
  label: string;
  /** When several grades fit: the sentence saying that the HTHS viscosity decides between them. */
  overlap: string | null;
}

/** The SAE J300 high-temperature grades a KV100 falls in: all of them where the windows overlap. */
export function runGradeOf(params: URLSearchParams): ToolResult<GradeAnswer> {
  if (params.get('tool') !== 'grade') return { state: 'idle' };
  const r = needNumbers(params, { kv100: 'the viscosity at 100 °C' });
  if ('fields' in r) return { state: 'error', fields: r.fields };
  const kv100 = r.values['kv100']!;
  if (kv100 <= 0) return { state: 'error', fields: { kv100: 'A viscosity must be above zero.' } };
  const grades = saeGradesOf(kv100);
  const overlap =
    grades.length > 1
      ? `The viscosity at 100 °C alone cannot tell these apart. SAE J300 separates them by the high-temperature high-shear viscosity (HTHS) at 150 °C: at least ${grades.map((g) => `${SAE_J300_MIN_HTHS[g]!.toFixed(1)} mPa·s for SAE ${g}`).join(', ')}. The oil’s data sheet gives its HTHS.`
      : null;
  const label =
    grades.length > 1 ? `${grades.slice(0, -1).join(', ')} or ${grades[grades.length - 1]}` : grades.join('');
  return { state: 'ok', value: { kv100, grades, label, overlap } };
}

export interface GradeSuitability {
  suits: boolean;
  /** The manual's rows for this grade. */
  rows: RecommendedGrade[];
  /** Parts of the riding range (°C) that no row of this grade covers. */
  uncovered: [number, number][];
}

function sameGrade(a: string, b: string): boolean {
  const wa = findGradeWindow(a);
  const wb = findGradeWindow(b);
  if (wa && wb) return wa.grade === wb.grade;
  return a.replace(/[\s-]/g, '').toUpperCase() === b.replace(/[\s-]/g, '').toUpperCase();
}

/**
 * Whether a grade suits riding between lowC and highC by the manual's chart: the rows of that grade must
 * together cover the whole range (rows may touch or overlap; a gap leaves part of the range uncovered).
 */
export function checkGradeSuitsRiding(
  chart: readonly RecommendedGrade[],
  grade: string,
  lowC: number,
  highC: number,
): GradeSuitability {
  const [lo, hi] = lowC <= highC ? [lowC, highC] : [highC, lowC];
  const rows = chart.filter((r) => sameGrade(r.grade, grade)).sort((a, b) => a.minC - b.minC);
  if (lo === hi) {
    const covered = rows.some((r) => r.minC <= lo && lo <= r.maxC);
    return { suits: covered, rows, uncovered: covered ? [] : [[lo, hi]] };
  }
  const uncovered: [number, number][] = [];
  let from = lo;
  for (const r of rows) {
    if (r.maxC < from) continue;
    if (r.minC > from) uncovered.push([from, Math.min(r.minC, hi)]);
    from = Math.max(from, r.maxC);
    if (from >= hi) break;
  }
  if (from < hi) uncovered.push([from, hi]);
  const real = uncovered.filter(([a, b]) => b > a);
  return { suits: rows.length > 0 && real.length === 0, rows, uncovered: real };
}
