/**
 * What a wear part's page shows: the part in the rider's length unit, the forecast in words, a small chart of
 * size against the meter (geometry only, drawn by the page) and the measurements. Pure: no database, no Astro.
 */
import type { WearForecast } from '../analysis/wear-forecast';
import {
  formatLength,
  fromMillimetres,
  fromStoredMeter,
  toMillimetres,
  type LengthUnit,
  type MeterUnit,
} from '../units/units';
import { formatCount, meterLabel } from '../words/words';
import { describeForecast, formatWholeMeter, type ForecastTone } from './forecast-words';
import type { WearMeasurement, WearPart } from './wear-parts';

export interface WearPartPageInput {
  part: WearPart;
  meter: MeterUnit;
  measurements: readonly WearMeasurement[];
  forecast: WearForecast;
  lengthUnit: LengthUnit;
}

/** The chart's drawing box: width, height and the padding left of and below the plot. */
export const WEAR_CHART_BOX = { width: 340, height: 180, pad: 34 } as const;

export interface WearChartView {
  ariaLabel: string;
  limitY: number;
  newTopY: number;
  newHeight: number;
  /** The fitted line from the expected new size to the limit, when there is a forecast. */
  fit: { x1: number; y1: number; x2: number; y2: number } | null;
  /** The forecast's range along the limit line. */
  range: { x: number; width: number } | null;
  points: { x: number; y: number }[];
  xMinLabel: string;
  xMaxLabel: string;
}

export interface WearPartPageView {
  summary: string;
  forecast: { tone: ForecastTone; headline: string; detail: string };
  chart: WearChartView;
  meterLabel: string;
  /** "Thinnest piece" for a part that wears thinner, "Longest piece" for one that grows. */
  sizeHeader: string;
  /** "thinnest" or "longest": the piece that counts. */
  countingPiece: string;
  measurements: { measuredOn: string; odometer: string; size: string; pieces: string }[];
}

/** One piece's size as the table lists it: three decimals in inches, two in millimetres. */
export function formatPieceSize(mm: number, unit: LengthUnit): string {
  return fromMillimetres(mm, unit).toFixed(unit === 'in' ? 3 : 2);
}

/**
 * The chart's geometry: x is the meter (from the fitted odometer to a little past the forecast's late edge), y
 * the size in the rider's unit, spanning the new range and the limit with some room.
 */
export function buildWearChart(input: WearPartPageInput): WearChartView {
  const { part, meter, measurements, forecast, lengthUnit: L } = input;
  const { width: W, height: H, pad: P } = WEAR_CHART_BOX;
  const xs = [
    fromStoredMeter(part.fittedOdometer, meter),
    ...measurements.map((x) => fromStoredMeter(x.odometer, meter)),
  ];
  const xMax =
    Math.max(...xs, forecast.status === 'forecast' ? (forecast.high ?? forecast.limitAt * 1.2) : 0, 1) * 1.05;
  const xMin = Math.min(...xs);
  const yTop = fromMillimetres(part.newMaxMm, L);
  const yBot = fromMillimetres(part.serviceLimitMm, L);
  // A part that grows (a chain) has its limit above the new range: the axis spans both either way.
  const yMost = Math.max(yTop, yBot);
  const yLeast = Math.min(fromMillimetres(part.newMinMm, L), yBot);
  const pad = (yMost - yLeast) * 0.15;
  const yHi = yMost + pad;
  const yLo = Math.max(0, yLeast - pad);
  const sx = (x: number) => P + ((x - xMin) / (xMax - xMin || 1)) * (W - P - 8);
  const sy = (y: number) => 8 + ((yHi - y) / (yHi - yLo || 1)) * (H - P);
  const limitY = sy(yBot);
  // The forecast's own first point (the expected worst new piece), converted from the manual's unit.
  const fit =
    forecast.status === 'forecast'
      ? {
          x1: sx(xMin),
          y1: sy(fromMillimetres(toMillimetres(forecast.start.value, part.manualUnit), L)),
          x2: sx(forecast.limitAt),
          y2: limitY,
        }
      : null;
  const range =
    forecast.status === 'forecast'
      ? { x: sx(forecast.low), width: Math.max(2, sx(forecast.high ?? xMax) - sx(forecast.low)) }
      : null;
  return {
    ariaLabel: `${part.limitDirection === 'min' ? 'Thickness' : 'Length'} against ${meterLabel(meter).toLowerCase()}: ${formatCount(measurements.length, 'reading')}, limit ${formatLength(part.serviceLimitMm, L)}`,
    limitY,
    newTopY: sy(yTop),
    newHeight: Math.max(1, sy(fromMillimetres(part.newMinMm, L)) - sy(yTop)),
    fit,
    range,
    points: measurements.map((x) => ({
      x: sx(fromStoredMeter(x.odometer, meter)),
      y: sy(fromMillimetres(x.summaryMm, L)),
    })),
    xMinLabel: formatWholeMeter(xMin, meter),
    xMaxLabel: formatWholeMeter(xMax, meter),
  };
}

/** The wear part page's model. */
export function buildWearPartPageView(input: WearPartPageInput): WearPartPageView {
  const { part, meter, measurements, forecast, lengthUnit: L } = input;
  const odometer = (stored: number) => formatWholeMeter(fromStoredMeter(stored, meter), meter);
  // Sizes in the forecast are in the manual's unit; the words show them in the user's, like the rest of the page.
  const words = describeForecast(forecast, meter, part, (v) => formatLength(toMillimetres(v, part.manualUnit), L));
  return {
    summary: `${formatCount(part.pieceCount, 'piece')} · new ${formatLength(part.newMinMm, L)}–${formatLength(part.newMaxMm, L)} · service limit ${formatLength(part.serviceLimitMm, L)} · fitted at ${odometer(part.fittedOdometer)}`,
    forecast: { tone: words.tone, headline: words.headline, detail: words.detail },
    chart: buildWearChart(input),
    meterLabel: meterLabel(meter),
    sizeHeader: part.limitDirection === 'min' ? 'Thinnest piece' : 'Longest piece',
    countingPiece: part.limitDirection === 'min' ? 'thinnest' : 'longest',
    measurements: measurements.map((x) => ({
      measuredOn: x.measuredOn,
      odometer: odometer(x.odometer),
      size: formatLength(x.summaryMm, L),
      pieces: x.piecesMm.length ? x.piecesMm.map((v) => formatPieceSize(v, L)).join(' · ') : '—',
    })),
  };
}
