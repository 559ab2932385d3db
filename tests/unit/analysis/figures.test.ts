import { describe, expect, test } from 'vitest';
import { formatFigure } from '~/lib/analysis/figures';
import { countReadingValue, readBaselineValue } from '~/lib/analysis/rules';
import type { SamplePoint } from '~/lib/analysis/types';

describe('formatFigure', () => {
  // Rounding: whole from 100, one decimal from 10, two below, trailing zeros dropped (common practice for lab
  // wear-metal figures, no published source). Sentences: no separators; chart and table: thousands separators.
  test.each([
    [0, '0', '0'],
    [0.004, '0', '0'],
    [0.125, '0.13', '0.13'],
    [2.5, '2.5', '2.5'],
    [9.999, '10', '10'],
    [12.34, '12.3', '12.3'],
    [99.96, '100', '100'],
    [123.6, '124', '124'],
    [1100, '1100', '1,100'],
    [-4.567, '-4.57', '-4.57'],
    [-1500.2, '-1500', '-1,500'],
  ])('%d: "%s" in a sentence, "%s" on the chart', (v, sentence, chart) => {
    expect(formatFigure(v)).toBe(sentence);
    expect(formatFigure(v, { thousands: false })).toBe(sentence);
    expect(formatFigure(v, { thousands: true })).toBe(chart);
  });
});

describe('below detection counts as half', () => {
  // Half the detection limit for a '<' reading: a common convention for censored lab data, no published source.
  test.each([
    [{ value: 5 }, 5],
    [{ value: 5, qualifier: '<' as const }, 2.5],
    [{ value: 1, qualifier: '<' as const }, 0.5],
    [{ value: 900, qualifier: '>' as const }, 900],
  ])('%o counts as %d', (reading, counted) => {
    expect(countReadingValue(reading)).toBe(counted);
  });

  test.each([
    [{ Fe: { value: 8, qualifier: '<' as const } }, 4],
    [{ Fe: { value: 8 } }, 8],
    [{ Fe: { value: Number.NaN } }, undefined],
    [{}, undefined],
  ])('a sample holding %o gives the baseline %s for iron', (readings, expected) => {
    const sample = { id: 's', takenAt: '2026-01-01', odometer: 0, distanceOnOil: 0, readings } as SamplePoint;
    expect(readBaselineValue(sample, 'Fe')).toBe(expected);
  });
});
