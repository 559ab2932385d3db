/**
 * Wear chart data: types, the query schema of /api/trends/[machineId], and the pure shaping of a machine's
 * samples into one series per measurand with its level, baseline band and distance from it at every point.
 */
import { z } from 'zod';
import { BASELINE_JUMP, computeBaselineBand, computeWearRate, getMeasurand, isMeasurandCode, type MeasurandCode } from '../analysis';
import { fromStoredMeter, type MeterUnit } from '../units/units';
import type { GradeChangeMark, TrendBasis, TrendOilChangeRow, TrendPoint, TrendSampleRow, TrendSeries } from './trend-types';

export * from './trend-types';

/** Most measurands one chart shows at once; more lines than this stop being readable. */
export const MAX_TREND_MEASURANDS = 8;

/** Query of the trend endpoint: ?measurands=Fe,Al&basis=ppm|rate&x=odometer|date. */
export const trendQuerySchema = z.object({
  measurands: z
    .string()
    .trim()
    .min(1, 'Pick at least one element.')
    .transform((s) => [...new Set(s.split(',').map((c) => c.trim()).filter(Boolean))])
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

const BAND = BASELINE_JUMP.params;

/** The rate unit for a meter: per 1,000 mi or km, per 100 h. */
export function describeRateUnit(meter: MeterUnit): string {
  return meter === 'h' ? 'ppm per 100 h' : `ppm per 1,000 ${meter}`;
}

/** True when a measurand can be shown as a wear rate (elements in ppm; condition figures cannot). */
export function canShowAsRate(code: MeasurandCode): boolean {
  return getMeasurand(code).group !== 'condition';
}

/** Below detection counts as half the detection limit in a band, as the analysis engine's baselines do. */
function bandValue(value: number, qualifier: '<' | '>' | null): number {
  return qualifier === '<' ? value / 2 : value;
}

/**
 * Shapes a machine's samples (oldest first) into chart series: the value in the chosen basis, the level from
 * the stored findings, and the baseline band of the previous accepted samples (the engine's window and
 * multiples), so the chart draws the band the rules used.
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
    const previous: number[] = [];
    const points: TrendPoint[] = [];
    for (const s of sorted) {
      const r = s.readings[code];
      if (!r || !Number.isFinite(r.value)) continue;
      const distanceOnOil = s.distanceOnOilStored === null ? null : fromStoredMeter(s.distanceOnOilStored, meter);
      let value: number | null = r.value;
      let forBand = bandValue(r.value, r.qualifier);
      if (seriesBasis === 'rate') {
        const topUp = { topUpVolume: s.topUpL, oilVolume: s.oilVolumeL ?? undefined };
        const rate = distanceOnOil === null ? null : computeWearRate(r.value, distanceOnOil, meter, topUp);
        const rateForBand = distanceOnOil === null ? null : computeWearRate(forBand, distanceOnOil, meter, topUp);
        value = rate ? rate.rate : null;
        forBand = rateForBand ? rateForBand.rate : NaN;
      }
      if (value === null) continue; // No distance on oil: a rate cannot be drawn for this sample.
      const b = computeBaselineBand(previous, {
        minSamples: BAND.minSamples,
        window: BAND.window,
        watchSd: BAND.watchSd,
        actSd: BAND.actSd,
        floorAbsolute: BAND.floorPpm,
        floorFraction: BAND.floorFraction,
      });
      const band =
        b.status === 'ready' ? { lower: Math.max(0, b.mean - BAND.watchSd * b.spread), mean: b.mean, upper: b.watchAbove } : null;
      const fromBaseline =
        b.status === 'ready' ? { delta: value - b.mean, spreads: b.spread > 0 ? (value - b.mean) / b.spread : 0 } : null;
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
        band,
        fromBaseline,
      });
      // Only accepted samples build the baseline of the ones after them.
      if (s.inBaseline && Number.isFinite(forBand)) previous.push(forBand);
    }
    return { code, name: info.name, group: info.group, unit, basis: seriesBasis, points };
  });
}

/** Oil changes where the grade poured differs from the one before, for marks on the chart's axis. */
export function findGradeChanges(changes: readonly TrendOilChangeRow[], meter: MeterUnit): GradeChangeMark[] {
  const sorted = [...changes].sort((a, b) => a.odometerStored - b.odometerStored || a.changedOn.localeCompare(b.changedOn));
  const marks: GradeChangeMark[] = [];
  for (let i = 1; i < sorted.length; i++) {
    const prev = sorted[i - 1]!;
    const cur = sorted[i]!;
    if (normaliseGrade(prev.grade) !== normaliseGrade(cur.grade)) {
      marks.push({ date: cur.changedOn, odometer: fromStoredMeter(cur.odometerStored, meter), from: prev.grade, to: cur.grade });
    }
  }
  return marks;
}

function normaliseGrade(grade: string): string {
  return grade.replace(/[\s-]/g, '').toUpperCase();
}
