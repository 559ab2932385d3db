/** Shapes the trend endpoint's answer into Chart.js datasets: band lower, band upper (filled), then the line. */
import type { Level } from '~/lib/levels';
import type { TrendAxis, TrendPoint, TrendResponse } from '~/lib/trends/trend-types';
import { dateToX } from './format';

export interface XYPoint {
  x: number;
  y: number;
  /** The trend point behind it, for the tooltip. */
  point: TrendPoint;
}

export interface ChartDatasetSpec {
  kind: 'band-lower' | 'band-upper' | 'line';
  code: string;
  label: string;
  data: XYPoint[];
  colour: string;
  /** Position of the series among those drawn (its band's hatch direction follows it). */
  seriesIndex: number;
  levels: Level[];
  /** True where the sample is kept out of the baseline (drawn hollow on the chart). */
  excluded: boolean[];
}

/** The x of a point on the chosen axis. */
export function xOf(p: TrendPoint, axis: TrendAxis): number {
  return axis === 'date' ? dateToX(p.date) : p.odometer;
}

/**
 * Three datasets per series, in drawing order: the band's lower edge, its upper edge (filled down to the
 * lower one, so the band sits behind the line) and the readings. Points without a band leave gaps in it.
 */
export function buildChartDatasets(data: TrendResponse, colours: readonly string[]): ChartDatasetSpec[] {
  const out: ChartDatasetSpec[] = [];
  data.series.forEach((s, i) => {
    const colour = colours[i % colours.length]!;
    const withBand = s.points.filter((p) => p.band !== null);
    const lower: XYPoint[] = withBand.map((p) => ({ x: xOf(p, data.x), y: p.band!.lower, point: p }));
    const upper: XYPoint[] = withBand.map((p) => ({ x: xOf(p, data.x), y: p.band!.upper, point: p }));
    out.push({
      kind: 'band-lower',
      code: s.code,
      label: `${s.code} baseline band (lower)`,
      data: lower,
      colour,
      seriesIndex: i,
      levels: [],
      excluded: [],
    });
    out.push({
      kind: 'band-upper',
      code: s.code,
      label: `${s.code} baseline band`,
      data: upper,
      colour,
      seriesIndex: i,
      levels: [],
      excluded: [],
    });
    out.push({
      kind: 'line',
      code: s.code,
      label: `${s.code} (${s.unit})`,
      data: s.points.map((p) => ({ x: xOf(p, data.x), y: p.value, point: p })),
      colour,
      seriesIndex: i,
      levels: s.points.map((p) => p.level),
      excluded: s.points.map((p) => !p.inBaseline),
    });
  });
  return out;
}

/** Grade changes as x positions on the chosen axis, with their label. */
export function buildGradeMarks(data: TrendResponse): { x: number; label: string }[] {
  return data.gradeChanges.map((g) => ({
    x: data.x === 'date' ? dateToX(g.date) : g.odometer,
    label: `${g.from} → ${g.to}`,
  }));
}
