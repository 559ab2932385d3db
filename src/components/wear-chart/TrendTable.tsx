/** The wear chart's data as tables, one per element: the accessible twin of the canvas. */
import type { Level } from '~/lib/levels';
import type { TrendResponse } from '~/lib/trends/trend-types';
import { LEVEL_COLOURS } from './chart-styles';
import { formatBand, formatChartFigure, formatDistance, formatFromBaseline, formatReported } from './format';
import { formatDay } from '~/lib/words/dates';

const SHAPES: Record<Level, string> = {
  steady: '<circle cx="10" cy="10" r="7" />',
  watch: '<path d="M10 1.5 18.5 10 10 18.5 1.5 10Z" />',
  act: '<path d="M6.3 1.5h7.4l4.8 4.8v7.4l-4.8 4.8H6.3l-4.8-4.8V6.3Z" />',
};

function LevelMark({ level }: { level: Level }) {
  return (
    <span
      className="inline-flex items-center gap-1 font-semibold"
      data-level={level}
      style={{ color: LEVEL_COLOURS[level] }}
    >
      <svg
        width="14"
        height="14"
        viewBox="0 0 20 20"
        aria-hidden="true"
        fill="currentColor"
        dangerouslySetInnerHTML={{ __html: SHAPES[level] }}
      />
      {level === 'steady' ? 'Steady' : level === 'watch' ? 'Watch' : 'Act'}
    </span>
  );
}

/** One table per series with every point's figures. */
export function TrendTable({ data }: { data: TrendResponse }) {
  const meter = data.machine.meter;
  // Folded at first on every screen: the chart tells the story, the tables are its readable twin on demand
  // (screen readers reach them through the summary, which names what is inside).
  return (
    <details className="rounded-card border border-line bg-paper-raised p-3" data-testid="wear-chart-table">
      <summary className="min-h-tap cursor-pointer font-semibold">The chart's data as tables</summary>
      {data.series.map((s) => (
        <div key={s.code} className="table-wrap mt-3">
          <table className="data-table" data-measurand={s.code}>
            <caption className="px-3 py-2 text-left font-semibold">
              {s.name} ({s.code}), {s.unit}
            </caption>
            <thead>
              <tr>
                <th scope="col">Bottle</th>
                <th scope="col">Date</th>
                <th scope="col" className="num">
                  Odometer
                </th>
                <th scope="col" className="num">
                  On oil
                </th>
                <th scope="col">Grade</th>
                <th scope="col" className="num">
                  Value
                </th>
                <th scope="col">Level</th>
                <th scope="col">Baseline band</th>
                <th scope="col">From baseline</th>
                <th scope="col">In baseline</th>
              </tr>
            </thead>
            <tbody>
              {s.points.length === 0 && (
                <tr>
                  <td colSpan={10}>No results for {s.name.toLowerCase()} yet.</td>
                </tr>
              )}
              {s.points.map((p) => (
                <tr key={p.sampleId} data-level={p.level}>
                  <td data-label="Bottle">
                    <a href={`/samples/${p.sampleId}`} className="font-mono">
                      {p.bottleCode}
                    </a>
                  </td>
                  <td data-label="Date">
                    <time dateTime={p.date.slice(0, 10)} className="nowrap">
                      {formatDay(p.date)}
                    </time>
                  </td>
                  <td data-label="Odometer" className="num">
                    {formatDistance(p.odometer, meter)}
                  </td>
                  <td data-label="On oil" className="num">
                    {formatDistance(p.distanceOnOil, meter)}
                  </td>
                  <td data-label="Grade" className="nowrap">
                    {p.grade ?? '—'}
                  </td>
                  <td data-label="Value" className="num">
                    {s.basis === 'rate'
                      ? `${formatChartFigure(p.value)} (${formatReported(p)} ppm)`
                      : formatReported(p)}
                  </td>
                  <td data-label="Level">
                    <LevelMark level={p.level} />
                  </td>
                  <td data-label="Baseline band">{formatBand(p)}</td>
                  <td data-label="From baseline">{formatFromBaseline(p)}</td>
                  <td data-label="In baseline" data-testid="in-baseline" data-in-baseline={String(p.inBaseline)}>
                    {p.inBaseline ? 'Yes' : `No: ${p.baselineNote ?? 'kept out'}`}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ))}
    </details>
  );
}
