/**
 * The wear chart's data on the wire: the samples once (ids, bottle codes, dates, meters), then per series its
 * numbers as arrays in sample order, with null where the sample has no point. Labels that would repeat on
 * every point (levels, band sources) become small numbers into a list sent once. The chart expands it back to
 * the TrendResponse it draws from. Pure and free of zod, so the island that imports it stays small.
 */
import type { Level } from '../db/database';
import type { TrendPoint, TrendResponse, TrendSeries } from './trend-types';

/** Version of the compact form, so a cached old form is never read as a new one. */
export const COMPACT_TREND_VERSION = 1;

/** Levels by position: a point's level is sent as its index here. */
export const COMPACT_LEVELS: readonly Level[] = ['steady', 'watch', 'act'];

/** Significant digits kept on the wire: the chart and its table show at most four (formatFigure). */
const SIGNIFICANT_DIGITS = 6;

export interface CompactTrendSeries extends Omit<TrendSeries, 'points'> {
  /** Plotted value per sample (the response's basis), null where this series has no point for the sample. */
  value: (number | null)[];
  /** The reading as reported, only when it differs from `value` (a rate basis); otherwise the value is it. */
  reported?: (number | null)[];
  /** Index into COMPACT_LEVELS per sample (0 where there is no point). */
  level: number[];
  /** Sparse qualifiers: [sample index, '<' or '>'] for the few readings that carry one. */
  qualifiers: [number, '<' | '>'][];
  /** The band the rule used per sample, or null while building; `source` indexes `sources`. */
  band: {
    lower: (number | null)[];
    mean: (number | null)[];
    upper: (number | null)[];
    actFrom: (number | null)[];
    n: (number | null)[];
    source: (number | null)[];
  };
  sources: { source: 'own' | 'crew'; sourceLabel: string | null }[];
}

export interface CompactTrendResponse extends Omit<TrendResponse, 'series'> {
  v: typeof COMPACT_TREND_VERSION;
  samples: {
    id: string[];
    bottleCode: string[];
    date: string[];
    odometer: number[];
    distanceOnOil: (number | null)[];
    grade: (string | null)[];
    /** 1 in the baseline, 0 kept out (with its note in `baselineNote`). */
    inBaseline: number[];
    baselineNote: (string | null)[];
  };
  series: CompactTrendSeries[];
}

function round(v: number): number {
  return Number.isFinite(v) && v !== 0 ? Number(v.toPrecision(SIGNIFICANT_DIGITS)) : v;
}

function roundOrNull(v: number | null | undefined): number | null {
  return v === null || v === undefined ? null : round(v);
}

/** The response on the wire: every sample that has a point in any series, once, and numbers per series. */
export function compactTrendResponse(full: TrendResponse): CompactTrendResponse {
  const order = new Map<string, number>();
  const first: TrendPoint[] = [];
  // Every sample with a point in some series, oldest first as the series hold them; a sample missing from one
  // series still has its place (null there).
  const sorted = [...new Map(full.series.flatMap((s) => s.points).map((p) => [p.sampleId, p])).values()];
  sorted.sort((a, b) => a.date.localeCompare(b.date) || a.odometer - b.odometer);
  for (const p of sorted) {
    order.set(p.sampleId, first.length);
    first.push(p);
  }
  const count = first.length;
  const samples: CompactTrendResponse['samples'] = {
    id: first.map((p) => p.sampleId),
    bottleCode: first.map((p) => p.bottleCode),
    date: first.map((p) => p.date),
    odometer: first.map((p) => round(p.odometer)),
    distanceOnOil: first.map((p) => roundOrNull(p.distanceOnOil)),
    grade: first.map((p) => p.grade),
    inBaseline: first.map((p) => (p.inBaseline ? 1 : 0)),
    baselineNote: first.map((p) => p.baselineNote),
  };
  const series = full.series.map((s): CompactTrendSeries => {
    const { points, ...head } = s;
    const value = new Array<number | null>(count).fill(null);
    const reported = new Array<number | null>(count).fill(null);
    const level = new Array<number>(count).fill(0);
    const band = {
      lower: new Array<number | null>(count).fill(null),
      mean: new Array<number | null>(count).fill(null),
      upper: new Array<number | null>(count).fill(null),
      actFrom: new Array<number | null>(count).fill(null),
      n: new Array<number | null>(count).fill(null),
      source: new Array<number | null>(count).fill(null),
    };
    const sources: CompactTrendSeries['sources'] = [];
    const qualifiers: [number, '<' | '>'][] = [];
    let reportedDiffers = false;
    for (const p of points) {
      const i = order.get(p.sampleId)!;
      value[i] = round(p.value);
      reported[i] = round(p.reported);
      if (p.reported !== p.value) reportedDiffers = true;
      level[i] = Math.max(0, COMPACT_LEVELS.indexOf(p.level));
      if (p.qualifier) qualifiers.push([i, p.qualifier]);
      if (p.band) {
        band.lower[i] = round(p.band.lower);
        band.mean[i] = round(p.band.mean);
        band.upper[i] = round(p.band.upper);
        band.actFrom[i] = round(p.band.actFrom);
        band.n[i] = p.band.n;
        let k = sources.findIndex((x) => x.source === p.band!.source && x.sourceLabel === p.band!.sourceLabel);
        if (k === -1) k = sources.push({ source: p.band.source, sourceLabel: p.band.sourceLabel }) - 1;
        band.source[i] = k;
      }
    }
    return { ...head, value, ...(reportedDiffers ? { reported } : {}), level, qualifiers, band, sources };
  });
  const { series: _series, ...rest } = full;
  return { v: COMPACT_TREND_VERSION, ...rest, samples, series };
}

/** Back to the points the chart and its table draw: fromBaseline is derived here from the value and the band. */
export function expandTrendResponse(compact: CompactTrendResponse): TrendResponse {
  const { v: _v, samples, series, ...rest } = compact;
  return {
    ...rest,
    series: series.map((s): TrendSeries => {
      const { value, reported, level, qualifiers, band, sources, ...head } = s;
      const qualifierAt = new Map(qualifiers);
      const points: TrendPoint[] = [];
      value.forEach((v, i) => {
        if (v === null) return;
        const mean = band.mean[i];
        const lower = band.lower[i];
        const upper = band.upper[i];
        const actFrom = band.actFrom[i];
        const n = band.n[i];
        const source = sources[band.source[i] ?? -1];
        const hasBand =
          mean != null && lower != null && upper != null && actFrom != null && n != null && source !== undefined;
        const halfWidth = hasBand ? upper - mean : 0;
        points.push({
          sampleId: samples.id[i]!,
          bottleCode: samples.bottleCode[i]!,
          date: samples.date[i]!,
          odometer: samples.odometer[i]!,
          distanceOnOil: samples.distanceOnOil[i] ?? null,
          grade: samples.grade[i] ?? null,
          value: v,
          reported: reported?.[i] ?? v,
          qualifier: qualifierAt.get(i) ?? null,
          level: COMPACT_LEVELS[level[i] ?? 0] ?? 'steady',
          band: hasBand
            ? { lower, mean, upper, actFrom, n, source: source.source, sourceLabel: source.sourceLabel }
            : null,
          fromBaseline: hasBand ? { delta: v - mean, spreads: halfWidth > 0 ? (v - mean) / halfWidth : 0 } : null,
          inBaseline: samples.inBaseline[i] === 1,
          baselineNote: samples.baselineNote[i] ?? null,
        });
      });
      return { ...head, points };
    }),
  };
}
