/** How a figure is rounded for people: one rule for the engine's sentences, the wear chart and its table. */

export interface FigureOptions {
  /** Thousands separators ("1,100"), as the chart and its table show figures; sentences stored with findings have none. */
  thousands?: boolean;
}

/**
 * A figure to sensible precision: whole from 100, one decimal from 10, two below, trailing zeros dropped
 * (common practice for lab wear-metal figures, no published source).
 */
export function formatFigure(v: number, options: FigureOptions = {}): string {
  const digits = Math.abs(v) >= 100 ? 0 : Math.abs(v) >= 10 ? 1 : 2;
  const rounded = Number(v.toFixed(digits));
  return options.thousands ? rounded.toLocaleString('en-US') : String(rounded);
}
