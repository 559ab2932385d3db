/**
 * Wear chart data: types, the query schema of /api/trends/[machineId], and the pure shaping of a machine's
 * samples into one series per measurand with its level, baseline band and distance from it at every point.
 */
import { z } from 'zod';
import { computeWearRate, getMeasurand, isMeasurandCode, type Level, type MeasurandCode } from '../analysis';
import { levelRank } from '../levels';
import { listFindingMeasurands } from '../reviews/finding-numbers';
import { fromStoredMeter, type MeterUnit } from '../units/units';
import type {
  GradeChangeMark,
  StoredBand,
  TrendBasis,
  TrendOilChangeRow,
  TrendPoint,
  TrendSampleRow,
  TrendSeries,
} from './trend-types';

export * from './trend-types';

/** Most measurands one chart shows at once; more lines than this stop being readable. */
export const MAX_TREND_MEASURANDS = 8;

/** Most elements the chart opens on: enough for a coolant story (Na, K, B) and dirt (Si, Al) together. */
export const CHART_START_MAX = 5;

/**
 * The elements the wear chart opens on: those the latest results flagged (climbing included, since a climb
 * is a finding), act before watch, each finding's main element first, then the others it names. Empty when
 * nothing is flagged, and the chart keeps its usual start.
 */
export function pickChartStart(
  findings: readonly { measurand: string | null; level: Level; ruleId: string; numbers: Record<string, unknown> }[],
): MeasurandCode[] {
  const ordered = findings
    .map((f, i) => ({ f, i }))
    .sort((a, b) => levelRank(b.f.level) - levelRank(a.f.level) || a.i - b.i);
  const codes: MeasurandCode[] = [];
  for (const { f } of ordered) {
    for (const code of listFindingMeasurands(f)) {
      if (!codes.includes(code)) codes.push(code);
    }
  }
  return codes.slice(0, CHART_START_MAX);
}

/** Query of the trend endpoint: ?measurands=Fe,Al&basis=ppm|rate&x=odometer|date. */
export const trendQuerySchema = z.object({
  measurands: z
    .string()
    .trim()
    .min(1, 'Pick at least one element.')
    .transform((s) => [
      ...new Set(
        s
          .split(',')
          .map((c) => c.trim())
          .filter(Boolean),
      ),
    ])
    .pipe(
      z
        .array(z.string().refine(isMeasurandCode, { message: 'Unknown element or oil-condition code.' }))
        .min(1, 'Pick at least one element.')
        .max(MAX_TREND_MEASURANDS, `Pick at most ${MAX_TREND_MEASURANDS} at once.`),
    )
    .transform((codes) => codes as MeasurandCode[]),
  basis: z.enum(['ppm', 'rate']).default('ppm'),
  x: z.enum(['odometer', 'date']).default('odometer'),
});

export type TrendQuery = z.infer<typeof trendQuerySchema>;

/** The rate unit for a meter: per 1,000 mi or km, per 100 h. */
export function describeRateUnit(meter: MeterUnit): string {
  return meter === 'h' ? 'ppm per 100 h' : `ppm per 1,000 ${meter}`;
}

/** True when a measurand can be shown as a wear rate (elements in ppm; condition figures cannot). */
export function canShowAsRate(code: MeasurandCode): boolean {
  return getMeasurand(code).group !== 'condition';
}

/**
 * A stored band in the chart's basis: the engine judged some measurands as rates and some in ppm; the factor
 * between the two at this sample is the same one the engine used (distance on oil and the top-up correction).
 */
function bandInBasis(
  band: StoredBand,
  basis: TrendBasis,
  ppmToRate: number | null,
): { lower: number; mean: number; upper: number; actFrom: number } | null {
  let k: number;
  if (band.basis === basis) k = 1;
  else if (band.basis === 'rate')
    k = band.toReported; // rate → reported ppm
  else if (ppmToRate === null) return null;
  else k = ppmToRate; // ppm → rate
  return { lower: band.lower * k, mean: band.mean * k, upper: band.watchAbove * k, actFrom: band.actFrom * k };
}

/**
 * Shapes a machine's samples (oldest first) into chart series: the value in the chosen basis, the level from
 * the stored findings, and the band the rules used when the sample was judged (stored with the findings), so the
 * chart, the sample page and the alerts show one band.
 */
export function shapeTrendSeries(input: {
  meter: MeterUnit;
  samples: readonly TrendSampleRow[];
  measurands: readonly MeasurandCode[];
  basis: TrendBasis;
}): TrendSeries[] {
  const { meter, samples, basis } = input;
  const sorted = [...samples].sort((a, b) => a.drawnOn.localeCompare(b.drawnOn) || a.odometerStored - b.odometerStored);
  return input.measurands.map((code) => {
    const info = getMeasurand(code);
    const seriesBasis: TrendBasis = basis === 'rate' && canShowAsRate(code) ? 'rate' : 'ppm';
    const unit = seriesBasis === 'rate' ? describeRateUnit(meter) : info.unit;
    const points: TrendPoint[] = [];
    for (const s of sorted) {
      const r = s.readings[code];
      if (!r || !Number.isFinite(r.value)) continue;
      const distanceOnOil = s.distanceOnOilStored === null ? null : fromStoredMeter(s.distanceOnOilStored, meter);
      const topUp = { topUpVolume: s.topUpL, oilVolume: s.oilVolumeL ?? undefined };
      const unitRate = distanceOnOil === null ? null : computeWearRate(1, distanceOnOil, meter, topUp);
      let value: number | null = r.value;
      if (seriesBasis === 'rate') value = unitRate ? unitRate.rate * r.value : null;
      if (value === null) continue; // No distance on oil: a rate cannot be drawn for this sample.
      const stored = s.bands[code];
      const band = stored ? bandInBasis(stored, seriesBasis, unitRate ? unitRate.rate : null) : null;
      const halfWidth = band ? band.upper - band.mean : 0;
      points.push({
        sampleId: s.id,
        bottleCode: s.bottleCode,
        date: s.drawnOn,
        odometer: fromStoredMeter(s.odometerStored, meter),
        distanceOnOil,
        grade: s.grade,
        value,
        reported: r.value,
        qualifier: r.qualifier,
        level: s.levels[code] ?? 'steady',
        band: band && stored ? { ...band, n: stored.n, source: stored.source, sourceLabel: stored.sourceLabel } : null,
        fromBaseline: band
          ? { delta: value - band.mean, spreads: halfWidth > 0 ? (value - band.mean) / halfWidth : 0 }
          : null,
        inBaseline: s.inBaseline,
        baselineNote: s.inBaseline ? null : s.baselineNote,
      });
    }
    return { code, name: info.name, group: info.group, unit, basis: seriesBasis, points };
  });
}

/** Oil changes where the grade poured differs from the one before, for marks on the chart's axis. */
export function findGradeChanges(changes: readonly TrendOilChangeRow[], meter: MeterUnit): GradeChangeMark[] {
  const sorted = [...changes].sort(
    (a, b) => a.odometerStored - b.odometerStored || a.changedOn.localeCompare(b.changedOn),
  );
  const marks: GradeChangeMark[] = [];
  for (let i = 1; i < sorted.length; i++) {
    const prev = sorted[i - 1]!;
    const cur = sorted[i]!;
    if (normaliseGrade(prev.grade) !== normaliseGrade(cur.grade)) {
      marks.push({
        date: cur.changedOn,
        odometer: fromStoredMeter(cur.odometerStored, meter),
        from: prev.grade,
        to: cur.grade,
      });
    }
  }
  return marks;
}

function normaliseGrade(grade: string): string {
  return grade.replace(/[\s-]/g, '').toUpperCase();
}
