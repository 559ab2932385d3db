import { describe, expect, test } from 'vitest';
import type { WearForecast } from '~/lib/analysis/wear-forecast';
import { describeForecast } from '~/lib/wear-parts/forecast-words';
import {
  buildWearChart,
  buildWearPartPageView,
  formatPieceSize,
  WEAR_CHART_BOX,
} from '~/lib/wear-parts/wear-part-page-view';
import type { WearMeasurement, WearPart } from '~/lib/wear-parts/wear-parts';

const plates: WearPart = {
  id: 'w1',
  machineId: 'm1',
  name: 'Clutch friction plates',
  pieceCount: 8,
  newMinMm: 2.9,
  newMaxMm: 3.1,
  serviceLimitMm: 2.6,
  limitDirection: 'min',
  fittedOdometer: 0,
  manualUnit: 'mm',
  notes: '',
};
const chain: WearPart = {
  ...plates,
  name: 'Chain, 20 links',
  pieceCount: 1,
  newMinMm: 317.5,
  newMaxMm: 318,
  serviceLimitMm: 323.9,
  limitDirection: 'max',
};
const reading = (odometer: number, summaryMm: number, piecesMm: number[] = []): WearMeasurement => ({
  id: `r${odometer}`,
  measuredOn: '2026-03-01',
  odometer,
  piecesMm,
  summaryMm,
  note: '',
});
const none: WearForecast = { status: 'no-readings' };

describe('piece sizes', () => {
  // 1 in = 25.4 mm exactly (NIST SP 811 B.8); three decimals in inches, two in millimetres (feeler and micrometer practice).
  test.each([
    [2.8, 'mm', '2.80'],
    [2.8, 'in', '0.110'],
    [25.4, 'in', '1.000'],
    [3.125, 'mm', '3.13'],
  ] as const)('%d mm in %s: %s', (mm, unit, text) => expect(formatPieceSize(mm, unit)).toBe(text));
});

describe('the wear part page model', () => {
  test('words, table and summary in the rider units', () => {
    const measurements = [reading(5_000, 2.85, [2.85, 2.9]), reading(10_000, 2.8)];
    const v = buildWearPartPageView({ part: plates, meter: 'km', measurements, forecast: none, lengthUnit: 'mm' });
    expect(v.summary).toBe('8 pieces · new 2.90 mm–3.10 mm · service limit 2.60 mm · fitted at 0 km');
    expect(v).toMatchObject({ meterLabel: 'Odometer', sizeHeader: 'Thinnest piece', countingPiece: 'thinnest' });
    expect(v.forecast).toEqual(describeForecast(none, 'km', plates));
    expect(v.measurements).toEqual([
      { measuredOn: '2026-03-01', odometer: '5,000 km', size: '2.85 mm', pieces: '2.85 · 2.90' },
      { measuredOn: '2026-03-01', odometer: '10,000 km', size: '2.80 mm', pieces: '—' },
    ]);
  });

  test('a part that grows counts its longest piece; an hour meter says so', () => {
    const v = buildWearPartPageView({ part: chain, meter: 'h', measurements: [], forecast: none, lengthUnit: 'mm' });
    expect(v).toMatchObject({ meterLabel: 'Hour meter', sizeHeader: 'Longest piece', countingPiece: 'longest' });
  });
});

describe('the wear chart geometry', () => {
  const { width: W, height: H, pad: P } = WEAR_CHART_BOX;

  test('without a forecast: the limit below the new range, points inside the plot, no fitted line', () => {
    const c = buildWearChart({
      part: plates,
      meter: 'km',
      measurements: [reading(5_000, 2.85), reading(10_000, 2.8)],
      forecast: none,
      lengthUnit: 'mm',
    });
    expect(c.fit).toBeNull();
    expect(c.range).toBeNull();
    // y grows downwards: the new range's top is above the limit for a part that wears thinner.
    expect(c.newTopY).toBeLessThan(c.limitY);
    expect(c.newHeight).toBeGreaterThan(0);
    for (const p of c.points) {
      expect(p.x).toBeGreaterThanOrEqual(P);
      expect(p.x).toBeLessThanOrEqual(W - 8);
      expect(p.y).toBeGreaterThanOrEqual(8);
      expect(p.y).toBeLessThanOrEqual(H - P + 8);
    }
    // The axis runs from the fitted odometer to 5 % past the last reading.
    expect([c.xMinLabel, c.xMaxLabel]).toEqual(['0 km', '10,500 km']);
    expect(c.ariaLabel).toBe('Thickness against odometer: 2 readings, limit 2.60 mm');
  });

  test('with a forecast: the fitted line ends on the limit at the forecast odometer, the range sits on the limit line', () => {
    const forecast: WearForecast = {
      status: 'forecast',
      limitAt: 30_000,
      low: 25_000,
      high: 36_000,
      method: 'prediction-interval',
      readings: 2,
      ratePer1000: 0.01,
      sureness: 'moderate',
      start: { odometer: 0, value: 3.0 },
      reversals: [],
    };
    const c = buildWearChart({
      part: plates,
      meter: 'km',
      measurements: [reading(10_000, 2.8)],
      forecast,
      lengthUnit: 'mm',
    });
    expect(c.fit?.y2).toBe(c.limitY);
    expect(c.fit!.x2).toBeGreaterThan(c.fit!.x1);
    expect(c.range!.width).toBeGreaterThan(2);
    expect(c.xMaxLabel).toBe('37,800 km');
  });

  test('a growing part keeps its limit above the new range', () => {
    const c = buildWearChart({ part: chain, meter: 'km', measurements: [], forecast: none, lengthUnit: 'mm' });
    expect(c.limitY).toBeLessThan(c.newTopY);
    expect(c.ariaLabel).toBe('Length against odometer: 0 readings, limit 323.90 mm');
  });
});
