// The wear chart's band and marker styles: colours that stand out from the page, bands that stay apart where they
// overlap, and an act octagon large enough to tell from a circle.
import { describe, expect, test } from 'vitest';
import {
  ACT_MARKER_PX,
  LEVEL_COLOURS,
  SERIES_COLOURS,
  bandSwatchStyle,
  contrastRatio,
  hatchAngleFor,
  pointRadiusFor,
  relativeLuminance,
} from '~/components/wear-chart/chart-styles';

// The page and card grounds the chart sits on (tailwind.config.cjs paper.DEFAULT and paper.raised).
const GROUNDS = ['#f7f5f0', '#ffffff'];

describe('contrastRatio', () => {
  // Reference values of the WCAG 2.1 definition ("relative luminance", "contrast ratio"): black on white is 21:1,
  // a colour on itself 1:1, and #767676 on white 4.54:1 (the well-known lightest grey passing 4.5:1 on white).
  test.each([
    ['#000000', '#ffffff', 21],
    ['#ffffff', '#ffffff', 1],
    ['#767676', '#ffffff', 4.54],
  ])('%s on %s is %d:1', (a, b, ratio) => {
    expect(contrastRatio(a, b)).toBeCloseTo(ratio, 2);
  });
  test('luminance runs from 0 (black) to 1 (white)', () => {
    expect(relativeLuminance('#000000')).toBe(0);
    expect(relativeLuminance('#ffffff')).toBeCloseTo(1, 10);
  });
});

describe('band and line colours', () => {
  // WCAG 2.1 SC 1.4.11 (non-text contrast): graphical objects need 3:1 against adjacent colours. The band's
  // outline is drawn in the series colour at full strength, so each series colour must meet it on both grounds.
  test.each(SERIES_COLOURS.flatMap((c) => GROUNDS.map((g) => [c, g] as const)))('series %s on %s ≥ 3:1', (c, g) => {
    expect(contrastRatio(c, g)).toBeGreaterThanOrEqual(3);
  });
  test.each(Object.entries(LEVEL_COLOURS))('level %s colour on the page ≥ 3:1', (_, c) => {
    for (const g of GROUNDS) expect(contrastRatio(c, g)).toBeGreaterThanOrEqual(3);
  });
  test('neighbouring bands hatch in opposite directions, so an overlap cross-hatches', () => {
    for (let i = 0; i < SERIES_COLOURS.length - 1; i++) expect(hatchAngleFor(i)).not.toBe(hatchAngleFor(i + 1));
  });
  test('the key swatch is outlined in the band colour', () => {
    expect(bandSwatchStyle('#1f4560', 45)).toEqual({
      borderColor: '#1f4560',
      backgroundImage: 'repeating-linear-gradient(45deg, rgba(31, 69, 96, 0.55) 0 1.5px, transparent 1.5px 5px)',
    });
    expect(bandSwatchStyle('#1f4560', 135).backgroundImage).toContain('135deg');
  });
});

describe('level markers', () => {
  test('the act octagon is at least 10 px and the largest marker', () => {
    expect(ACT_MARKER_PX).toBeGreaterThanOrEqual(10);
    expect(ACT_MARKER_PX).toBeGreaterThan(2 * pointRadiusFor('watch'));
    expect(pointRadiusFor('watch')).toBeGreaterThan(pointRadiusFor('steady'));
  });
});
