/**
 * A machine's own baseline for one measurand, after the statistical approach of ASTM D7720: alarm limits are
 * drawn from that machine's previous in-control samples, not from a fleet table.
 *
 * Limits are prediction limits for one new reading (mean + t(n−1) · s · √(1 + 1/n)): with only a handful of
 * earlier samples the standard deviation is itself uncertain, and Student's t with n − 1 degrees of freedom,
 * not the normal distribution, says how often a new in-control reading lands above mean + k · s. The one-sided
 * probabilities are the designed false-alarm rates per reading (watchAlpha, actAlpha in the rule definitions).
 *
 * The spread never falls below the lab's own scatter at that level (the floor): a band cannot claim to be
 * narrower than the lab can measure, so a flat history of 4, 4, 4 does not turn a 6 into an alarm.
 */
import { mean, sampleStandardDeviation, linearRegression, rSquared } from 'simple-statistics';
import { studentTQuantile } from './statistics';

export interface BaselineStats {
  n: number;
  mean: number;
  /** Sample standard deviation (n − 1 in the denominator); NaN with fewer than two values. */
  sd: number;
  min: number;
  max: number;
}

/** Summary statistics of a list of readings: n, mean, sample standard deviation, min and max. */
export function computeBaseline(values: readonly number[]): BaselineStats {
  const finite = values.filter((v) => Number.isFinite(v));
  const n = finite.length;
  if (n === 0) return { n: 0, mean: NaN, sd: NaN, min: NaN, max: NaN };
  let min = Infinity;
  let max = -Infinity;
  for (const v of finite) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  // simple-statistics sums with compensation and takes deviations from the mean (two passes), which keeps
  // the NIST StRD NumAcc sets (large mean, tiny spread) accurate.
  return { n, mean: mean(finite), sd: n >= 2 ? sampleStandardDeviation(finite) : NaN, min, max };
}

/** Baseline settings, read from the rule definitions so the rules page shows the same numbers. */
export interface BandSettings {
  /** Fewer previous in-control samples than this: "building baseline", only fixed limits apply. */
  minSamples: number;
  /** Only the most recent `window` previous in-control samples count (a rolling baseline). */
  window: number;
  /** One-sided probability that an in-control reading lands above the watch edge (designed false-alarm rate). */
  watchAlpha: number;
  /** The same for the act edge. */
  actAlpha: number;
  /** The lab's own scatter at a level (same units as the values): the least spread a band may use. */
  floorAt: (level: number) => number;
}

export type BaselineBand =
  | { status: 'building'; n: number; needed: number }
  | {
      status: 'ready';
      n: number;
      mean: number;
      sd: number;
      /** The spread actually used: sd, or the lab-scatter floor when the history is flatter than the lab can measure. */
      spread: number;
      floored: boolean;
      /** t(n−1) quantiles × √(1 + 1/n): the multiples of the spread the edges sit at. */
      watchMultiple: number;
      actMultiple: number;
      /** Lower edge drawn on the chart (mean − watchMultiple · spread, never below 0). */
      lower: number;
      /** Upper edge of the baseline band: above it is watch. */
      watchAbove: number;
      /** At or above this is act. */
      actFrom: number;
    };

/** The multiple of the spread for a one-sided prediction limit at probability 1 − alpha with n earlier values. */
export function predictionMultiple(alpha: number, n: number): number {
  return studentTQuantile(1 - alpha, n - 1) * Math.sqrt(1 + 1 / n);
}

/**
 * The baseline band from previous in-control readings (oldest first): the rolling window's mean and spread,
 * with prediction-limit edges at the designed false-alarm rates.
 */
export function computeBaselineBand(previous: readonly number[], settings: BandSettings): BaselineBand {
  const recent = previous.filter((v) => Number.isFinite(v)).slice(-settings.window);
  if (recent.length < Math.max(2, settings.minSamples)) {
    return { status: 'building', n: recent.length, needed: Math.max(2, settings.minSamples) };
  }
  const stats = computeBaseline(recent);
  const floor = Math.max(0, settings.floorAt(Math.abs(stats.mean)));
  const sd = Number.isFinite(stats.sd) ? stats.sd : 0;
  const spread = Math.max(sd, floor);
  const watchMultiple = predictionMultiple(settings.watchAlpha, stats.n);
  const actMultiple = predictionMultiple(settings.actAlpha, stats.n);
  return {
    status: 'ready',
    n: stats.n,
    mean: stats.mean,
    sd,
    spread,
    floored: spread > sd,
    watchMultiple,
    actMultiple,
    lower: Math.max(0, stats.mean - watchMultiple * spread),
    watchAbove: stats.mean + watchMultiple * spread,
    actFrom: stats.mean + actMultiple * spread,
  };
}

export interface TrendFit {
  n: number;
  slope: number;
  intercept: number;
  /** Coefficient of determination of the fit (1 for a perfect line; NaN for a flat line). */
  r2: number;
  /** Standard error of the slope (NaN with two points); slope / slopeSe is the t statistic of the climb. */
  slopeSe: number;
}

/** Least-squares straight line y = intercept + slope · x through the points (simple-statistics). */
export function computeTrendFit(points: readonly (readonly [x: number, y: number])[]): TrendFit {
  if (points.length < 2) throw new RangeError('A trend needs at least two points.');
  const pairs = points.map(([x, y]) => [x, y]);
  const { m, b } = linearRegression(pairs);
  const r2 = rSquared(pairs, (x: number) => m * x + b);
  const n = points.length;
  let slopeSe = NaN;
  if (n > 2) {
    const xbar = points.reduce((s, [x]) => s + x, 0) / n;
    let sxx = 0;
    let sse = 0;
    for (const [x, y] of points) {
      sxx += (x - xbar) ** 2;
      sse += (y - (b + m * x)) ** 2;
    }
    slopeSe = sxx > 0 ? Math.sqrt(sse / (n - 2) / sxx) : NaN;
  }
  return { n, slope: m, intercept: b, r2, slopeSe };
}
