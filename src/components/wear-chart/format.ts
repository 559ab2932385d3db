/** Number and label formatting shared by the wear chart and its table. */
import { formatFigure } from '~/lib/analysis/figures';
import type { TrendPoint } from '~/lib/trends/trend-types';
import { formatDay } from '~/lib/words/dates';

/** A figure as the chart and its table show it: the engine's rounding, with thousands separators. */
export function formatChartFigure(v: number): string {
  return formatFigure(v, { thousands: true });
}

/** The reading as the lab reported it, with its qualifier. */
export function formatReported(p: TrendPoint): string {
  return `${p.qualifier ?? ''}${formatChartFigure(p.reported)}`;
}

/** "+4.1 (1.5 × the band's upper half-width above the mean)" or "baseline still building". */
export function formatFromBaseline(p: TrendPoint): string {
  if (!p.fromBaseline || !p.band) return 'baseline still building';
  const d = p.fromBaseline.delta;
  const s = p.fromBaseline.spreads;
  const dir = d >= 0 ? 'above' : 'below';
  return `${d >= 0 ? '+' : '−'}${formatChartFigure(Math.abs(d))} (${formatChartFigure(Math.abs(s))} × the band's half-width ${dir} the mean)`;
}

/** Baseline band as the rule used it: "lower–upper (mean m, act from a, n samples)". */
export function formatBand(p: TrendPoint): string {
  if (!p.band) return 'building';
  return `${formatChartFigure(p.band.lower)}–${formatChartFigure(p.band.upper)} (mean ${formatChartFigure(p.band.mean)}, act from ${formatChartFigure(p.band.actFrom)}, ${p.band.n} samples)`;
}

/** Whole distance with thousands separators, one decimal for hour meters. */
export function formatDistance(v: number | null, meter: string): string {
  if (v === null) return '—';
  return `${v.toLocaleString('en-US', { maximumFractionDigits: meter === 'h' ? 1 : 0 })} ${meter}`;
}

/** Epoch milliseconds of a YYYY-MM-DD date (UTC), the x value when the axis is by date. */
export function dateToX(date: string): number {
  return Date.parse(`${date.slice(0, 10)}T00:00:00Z`);
}

/** YYYY-MM-DD of an epoch-millisecond tick. */
export function xToDate(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

/** An axis tick by date as people read it ("3 Nov 2026"): the tick is a UTC midnight, so no zone shifts it. */
export function formatDateTick(ms: number): string {
  return Number.isFinite(ms) ? formatDay(xToDate(ms)) : '';
}
