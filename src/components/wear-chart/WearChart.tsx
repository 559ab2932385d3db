/**
 * The wear chart island: an element picker, raw ppm or rate, x by odometer or date, the baseline band behind
 * each line, level-shaped points, a tooltip with the sample's figures, grade changes on the axis, and the same
 * data as a table for keyboards and screen readers. Only the Chart.js pieces used are registered.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import {
  Chart as ChartJS,
  Filler,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  type ChartDataset,
  type ChartOptions,
  type Plugin,
  type TooltipItem,
} from 'chart.js';
import { Line } from 'react-chartjs-2';
import { MEASURANDS } from '~/lib/analysis/measurands';
import { expandTrendResponse, type CompactTrendResponse } from '~/lib/trends/trend-compact';
import { PICKER_GROUPS, type TrendAxis, type TrendBasis, type TrendResponse } from '~/lib/trends/trend-types';
import { buildChartDatasets, buildGradeMarks, type XYPoint } from './chart-data';
import {
  LEVEL_COLOURS,
  SERIES_COLOURS,
  bandHatch,
  bandSwatchStyle,
  hatchAngleFor,
  pointRadiusFor,
  pointStyleFor,
} from './chart-styles';
import {
  formatBand,
  formatChartFigure,
  formatDistance,
  formatFromBaseline,
  formatDateTick,
  formatReported,
} from './format';
import { formatDay } from '~/lib/words/dates';
import { TrendTable } from './TrendTable';

ChartJS.register(LineController, LineElement, PointElement, LinearScale, Filler, Tooltip);

interface Props {
  machineId: string;
  /** Elements shown first; a ?chart=Al,Si in the page address wins. */
  initial?: string[];
}

type State = { status: 'loading' } | { status: 'error'; message: string } | { status: 'ready'; data: TrendResponse };

const DEFAULT_CODES = ['Fe', 'Al', 'Si'];

/** Elements named by ?chart=Al,Si in the page address, if any (read after hydration, never on the server). */
function readUrlCodes(): string[] | null {
  if (typeof window === 'undefined') return null;
  const fromUrl = new URLSearchParams(window.location.search).get('chart');
  if (!fromUrl) return null;
  const codes = fromUrl.split(',').filter((c) => MEASURANDS.some((m) => m.code === c));
  return codes.length > 0 ? codes.slice(0, 8) : null;
}

/** Dashed vertical lines where an oil change poured a different grade. */
function gradeMarksPlugin(marks: { x: number; label: string }[]): Plugin<'line'> {
  return {
    id: 'gradeMarks',
    afterDatasetsDraw(chart) {
      const { ctx, chartArea, scales } = chart;
      const xScale = scales['x'];
      if (!xScale) return;
      ctx.save();
      ctx.strokeStyle = '#3a4a5a';
      ctx.fillStyle = '#16202a';
      ctx.setLineDash([4, 4]);
      ctx.font = '12px sans-serif';
      for (const m of marks) {
        const px = xScale.getPixelForValue(m.x);
        if (px < chartArea.left || px > chartArea.right) continue;
        ctx.beginPath();
        ctx.moveTo(px, chartArea.top);
        ctx.lineTo(px, chartArea.bottom);
        ctx.stroke();
        ctx.fillText(m.label, Math.min(px + 4, chartArea.right - ctx.measureText(m.label).width), chartArea.top + 12);
      }
      ctx.restore();
    },
  };
}

/** The wear chart of one machine. */
export default function WearChart({ machineId, initial }: Props) {
  // The server and the first client render agree on the page's own start; the address wins right after.
  const [codes, setCodes] = useState<string[]>(() => (initial && initial.length > 0 ? initial : DEFAULT_CODES));
  useEffect(() => {
    const fromUrl = readUrlCodes();
    if (fromUrl) setCodes(fromUrl);
  }, []);
  const [basis, setBasis] = useState<TrendBasis>('ppm');
  const [axis, setAxis] = useState<TrendAxis>('odometer');
  const [state, setState] = useState<State>({ status: 'loading' });
  const [attempt, setAttempt] = useState(0);

  useEffect(() => {
    if (codes.length === 0) return;
    const controller = new AbortController();
    setState({ status: 'loading' });
    const q = new URLSearchParams({ measurands: codes.join(','), basis, x: axis });
    fetch(`/api/trends/${encodeURIComponent(machineId)}?${q}`, {
      signal: controller.signal,
      headers: { accept: 'application/json' },
    })
      .then(async (res) => {
        const body = (await res.json()) as CompactTrendResponse | { error: { message: string } };
        if (!res.ok || 'error' in body)
          throw new Error('error' in body ? body.error.message : `The server answered ${res.status}.`);
        setState({ status: 'ready', data: expandTrendResponse(body) });
      })
      .catch((e: unknown) => {
        if (controller.signal.aborted) return;
        setState({ status: 'error', message: e instanceof Error ? e.message : 'The chart could not be loaded.' });
      });
    return () => controller.abort();
  }, [machineId, codes, basis, axis, attempt]);

  const toggle = (code: string) =>
    setCodes((cur) => (cur.includes(code) ? cur.filter((c) => c !== code) : cur.length >= 8 ? cur : [...cur, code]));

  const ready = state.status === 'ready' ? state.data : null;
  const [meter, setMeter] = useState<string | null>(null);
  useEffect(() => {
    if (ready) setMeter(ready.machine.meter);
  }, [ready]);
  const chart = useMemo(() => (ready ? buildChart(ready) : null), [ready]);
  const empty = ready !== null && ready.series.every((s) => s.points.length === 0);
  // The band colours as the drawn chart holds them (its band datasets' edges), for the key and its check.
  const chartRef = useRef<ChartJS<'line', XYPoint[]> | null>(null);
  const [bandColours, setBandColours] = useState<string[]>([]);
  useEffect(() => {
    const drawn = chartRef.current?.data.datasets ?? [];
    setBandColours(drawn.filter((d) => d.label?.endsWith('baseline band')).map((d) => String(d.borderColor)));
  }, [chart]);

  const named = (code: string) => MEASURANDS.find((m) => m.code === code)?.name ?? code;

  const settings = (
    <form
      className="space-y-3"
      onSubmit={(e) => e.preventDefault()}
      aria-label="Wear chart settings"
      data-testid="wear-chart-settings"
    >
      <div className="flex flex-wrap items-center gap-2" aria-label="Elements drawn" role="group">
        <span className="text-sm font-semibold">Drawn:</span>
        {codes.map((code) => (
          <button
            key={code}
            type="button"
            onClick={() => toggle(code)}
            className="inline-flex min-h-tap items-center gap-1 rounded-full border-2 border-steel-500 bg-steel-50 px-3 text-sm"
            aria-label={`Stop drawing ${named(code)}`}
            data-code={code}
          >
            {named(code)} <span aria-hidden="true">×</span>
          </button>
        ))}
      </div>
      <details className="rounded-card border border-line" data-testid="element-picker">
        <summary className="min-h-tap cursor-pointer px-3 py-3 font-semibold">
          Pick elements ({codes.length} of at most 8)
        </summary>
        <div className="grid gap-2 p-2 sm:grid-cols-2 lg:grid-cols-4">
          {PICKER_GROUPS.map((g) => (
            <fieldset key={g.group} className="rounded-card border border-line p-2">
              <legend className="px-1 text-sm font-semibold">{g.label}</legend>
              <div className="flex flex-wrap gap-1">
                {MEASURANDS.filter((m) => m.group === g.group).map((m) => (
                  <label
                    key={m.code}
                    className="flex min-h-tap min-w-tap cursor-pointer items-center gap-1 rounded px-2 hover:bg-paper-sunk"
                    title={m.name}
                  >
                    <input
                      type="checkbox"
                      checked={codes.includes(m.code)}
                      onChange={() => toggle(m.code)}
                      className="h-5 w-5"
                      aria-label={m.name}
                    />
                    <span className="font-mono text-sm">{m.code}</span>
                  </label>
                ))}
              </div>
            </fieldset>
          ))}
        </div>
      </details>
      <div className="flex flex-wrap gap-3">
        <fieldset className="flex flex-wrap items-center gap-x-2 rounded-card border border-line px-2">
          <legend className="px-1 text-sm font-semibold">Values</legend>
          {(['ppm', 'rate'] as const).map((b) => (
            <label key={b} className="flex min-h-tap items-center gap-2 px-1">
              <input
                type="radio"
                name="basis"
                value={b}
                checked={basis === b}
                onChange={() => setBasis(b)}
                className="h-5 w-5"
              />
              {b === 'ppm'
                ? 'Raw ppm'
                : meter === 'h'
                  ? 'Per 100 h of oil use'
                  : `Per 1,000 ${meter ?? 'mi/km'} of oil use`}
            </label>
          ))}
        </fieldset>
        <fieldset className="flex flex-wrap items-center gap-x-2 rounded-card border border-line px-2">
          <legend className="px-1 text-sm font-semibold">Across</legend>
          {(['odometer', 'date'] as const).map((a) => (
            <label key={a} className="flex min-h-tap items-center gap-2 px-1">
              <input
                type="radio"
                name="axis"
                value={a}
                checked={axis === a}
                onChange={() => setAxis(a)}
                className="h-5 w-5"
              />
              {a === 'odometer' ? (meter === 'h' ? 'Hour meter' : 'Odometer') : 'Date'}
            </label>
          ))}
        </fieldset>
      </div>
    </form>
  );

  // The chart first and the picker under it: on a phone the first screen shows the story, not checkboxes.
  return (
    <div className="space-y-4" data-testid="wear-chart">
      <div aria-live="polite" className="min-h-[1.5rem]">
        {codes.length === 0 && <p>Pick at least one element to draw.</p>}
        {state.status === 'error' && (
          <div role="alert" className="rounded-card border-l-8 border-level-act bg-level-act-bg p-3">
            <p>The wear chart could not be loaded: {state.message}</p>
            <button type="button" className="btn-secondary mt-2" onClick={() => setAttempt((n) => n + 1)}>
              Try again
            </button>
          </div>
        )}
        {empty && (
          <div className="empty-state empty-state-compact" data-testid="wear-chart-empty">
            <p>
              <span className="font-semibold">No results for these elements yet.</span>{' '}
              <span className="text-sm text-ink-soft">The chart fills in as lab results come in.</span>
            </p>
          </div>
        )}
      </div>

      {/* The chart's box keeps its height while the readings load, so nothing under it jumps. */}
      {codes.length > 0 && state.status === 'loading' && (
        <div
          className="flex h-72 w-full items-center justify-center rounded-card border border-dashed border-line md:h-96"
          role="status"
          data-testid="wear-chart-loading"
        >
          <p className="text-ink-soft">Loading the wear chart…</p>
        </div>
      )}
      {ready && chart && !empty && (
        <>
          <figure
            className="relative h-72 w-full md:h-96"
            aria-label="Wear chart; the same data is in the table below"
            data-band-colours={bandColours.join(' ')}
          >
            <Line
              ref={chartRef}
              data={chart.data}
              options={chart.options}
              plugins={[gradeMarksPlugin(buildGradeMarks(ready))]}
              aria-label={`Wear chart of ${ready.series.map((x) => x.name).join(', ')}; the same readings are in the tables below`}
            />
          </figure>
          <Legend data={ready} />
          {ready.notes.map((n) => (
            <p key={n} className="text-sm text-ink-soft">
              {n}
            </p>
          ))}
        </>
      )}
      {settings}
      {ready && chart && !empty && <TrendTable data={ready} />}
    </div>
  );
}

/** The label of a crew reference band on the chart, when any point was judged against one. */
function crewLabel(data: TrendResponse): string | undefined {
  for (const s of data.series)
    for (const p of s.points) if (p.band?.source === 'crew' && p.band.sourceLabel) return p.band.sourceLabel;
  return undefined;
}

function Legend({ data }: { data: TrendResponse }) {
  return (
    <ul className="flex flex-wrap gap-x-4 gap-y-1 text-sm" aria-label="Chart key">
      {data.series.map((s, i) => {
        const colour = SERIES_COLOURS[i % SERIES_COLOURS.length]!;
        return (
          <li key={s.code} className="flex items-center gap-2">
            <span aria-hidden="true" className="inline-block h-1 w-6" style={{ background: colour }} />
            <span
              aria-hidden="true"
              className="inline-block h-3.5 w-6 border-y-2 border-dashed"
              style={bandSwatchStyle(colour, hatchAngleFor(i))}
              data-band-swatch={s.code}
            />
            {s.name} ({s.unit}) and its baseline band
          </li>
        );
      })}
      {crewLabel(data) && (
        <li className="flex items-center gap-2" data-testid="crew-reference-legend">
          <span
            aria-hidden="true"
            className="inline-block h-3 w-6 border border-dashed border-steel-700 bg-steel-100"
          />
          Early band: crew reference {crewLabel(data)}
        </li>
      )}
      {(['steady', 'watch', 'act'] as const).map((l) => (
        <li key={l} className="flex items-center gap-1">
          <svg width="16" height="16" viewBox="0 0 20 20" aria-hidden="true" fill={LEVEL_COLOURS[l]}>
            {l === 'steady' && <circle cx="10" cy="10" r="7" />}
            {l === 'watch' && <path d="M10 1.5 18.5 10 10 18.5 1.5 10Z" />}
            {l === 'act' && <path d="M6.3 1.5h7.4l4.8 4.8v7.4l-4.8 4.8H6.3l-4.8-4.8V6.3Z" />}
          </svg>
          {l}
        </li>
      ))}
      {data.series.some((s) => s.points.some((p) => !p.inBaseline)) && (
        <li className="flex items-center gap-1">
          <svg width="12" height="12" viewBox="0 0 20 20" aria-hidden="true">
            <circle cx="10" cy="10" r="6" fill="#ffffff" stroke="currentColor" strokeWidth="3" />
          </svg>
          hollow: kept out of the baseline
        </li>
      )}
      {data.gradeChanges.length > 0 && <li>┆ a different oil grade poured</li>}
    </ul>
  );
}

function buildChart(data: TrendResponse): {
  data: { datasets: ChartDataset<'line', XYPoint[]>[] };
  options: ChartOptions<'line'>;
} {
  const specs = buildChartDatasets(data, SERIES_COLOURS);
  const meter = data.machine.meter;
  const datasets: ChartDataset<'line', XYPoint[]>[] = specs.map((spec) => {
    // The band: both edges outlined in the series colour (dashed, so an edge never reads as the readings' line)
    // and a hatch between them, leaning the other way from its neighbour's, instead of stacked translucent fills.
    if (spec.kind === 'band-lower') {
      return {
        label: spec.label,
        data: spec.data,
        borderWidth: 1.5,
        borderDash: [4, 3],
        borderColor: spec.colour,
        pointRadius: 0,
        pointHitRadius: 0,
        fill: false,
      };
    }
    if (spec.kind === 'band-upper') {
      return {
        label: spec.label,
        data: spec.data,
        borderWidth: 1.5,
        borderDash: [4, 3],
        borderColor: spec.colour,
        backgroundColor: bandHatch(spec.colour, hatchAngleFor(spec.seriesIndex)),
        pointRadius: 0,
        pointHitRadius: 0,
        fill: '-1',
      };
    }
    return {
      label: spec.label,
      data: spec.data,
      borderColor: spec.colour,
      borderWidth: 2,
      fill: false,
      tension: 0,
      pointStyle: spec.levels.map(pointStyleFor),
      pointRadius: spec.levels.map(pointRadiusFor),
      pointHoverRadius: spec.levels.map((l) => pointRadiusFor(l) + 2),
      // A sample kept out of the baseline is drawn hollow (its shape and border keep the level).
      pointBackgroundColor: spec.levels.map((l, i) => (spec.excluded[i] ? '#ffffff' : LEVEL_COLOURS[l])),
      pointBorderColor: spec.levels.map((l) => (l === 'steady' ? spec.colour : LEVEL_COLOURS[l])),
      pointBorderWidth: spec.excluded.map((x) => (x ? 3 : 1)),
    };
  });
  const lineIndexes = new Set(specs.flatMap((s, i) => (s.kind === 'line' ? [i] : [])));
  const options: ChartOptions<'line'> = {
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    parsing: false,
    normalized: true,
    interaction: { mode: 'nearest', intersect: false },
    scales: {
      x: {
        type: 'linear',
        title: { display: true, text: data.x === 'date' ? 'Date drawn' : `Odometer (${meter})` },
        ticks: {
          callback: (v) => (data.x === 'date' ? formatDateTick(Number(v)) : Number(v).toLocaleString('en-US')),
          maxRotation: 0,
          autoSkip: true,
        },
      },
      y: {
        type: 'linear',
        beginAtZero: true,
        title: {
          display: true,
          text: data.series
            .map((s) => s.unit)
            .filter((u, i, a) => a.indexOf(u) === i)
            .join(' · '),
        },
      },
    },
    plugins: {
      tooltip: {
        filter: (item) => lineIndexes.has(item.datasetIndex),
        callbacks: {
          title: (items: TooltipItem<'line'>[]) => {
            const p = (items[0]?.raw as XYPoint | undefined)?.point;
            return p ? `Bottle ${p.bottleCode} · ${formatDay(p.date)}` : '';
          },
          label: (item: TooltipItem<'line'>) => {
            const p = (item.raw as XYPoint).point;
            const s = data.series[Math.floor(item.datasetIndex / 3)]!;
            return [
              `${s.name}: ${formatChartFigure(p.value)} ${s.unit}${s.basis === 'rate' ? ` (lab: ${formatReported(p)} ppm)` : p.qualifier ? ` (lab: ${formatReported(p)})` : ''} · level: ${p.level}`,
              `Odometer ${formatDistance(p.odometer, meter)} · on oil ${formatDistance(p.distanceOnOil, meter)} · ${p.grade ?? 'grade not recorded'}`,
              `Baseline ${formatBand(p)} · ${formatFromBaseline(p)}`,
              ...(p.inBaseline ? [] : [`Kept out of the baseline: ${p.baselineNote ?? 'no reason given'}`]),
            ];
          },
        },
      },
    },
  };
  return { data: { datasets }, options };
}
