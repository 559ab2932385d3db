/**
 * A machine's own baseline for one measurand, after the statistical approach of ASTM D7720: alarm limits
 * are drawn from the distribution of that machine's previous accepted samples, not from a fleet table.
 *
 * The multiples are Sumpwise's choice (D7720 leaves them to the user): the baseline band runs up to
 * mean + 2 sd (watch above it) and act starts at mean + 3 sd. For normally distributed readings that is
 * about the 97.7th and 99.9th percentile of the machine's own history.
 */
import { mean, sampleStandardDeviation, linearRegression, rSquared } from 'simple-statistics';

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

/** Baseline settings, read from the rule definitions so the documentation page shows the same numbers. */
export interface BandSettings {
  /** Fewer previous samples than this: "building baseline", only fixed limits apply. */
  minSamples: number;
  /** Only the most recent `window` previous samples count (a rolling baseline). */
  window: number;
  /** Watch above mean + watchSd · spread. */
  watchSd: number;
  /** Act at or above mean + actSd · spread. */
  actSd: number;
  /** The spread is never taken below max(floorAbsolute, floorFraction · |mean|). */
  floorAbsolute: number;
  floorFraction: number;
}

export type BaselineBand =
  | { status: 'building'; n: number; needed: number }
  | {
      status: 'ready';
      n: number;
      mean: number;
      sd: number;
      /** The spread actually used: sd, or the floor when the history is flatter than the floor. */
      spread: number;
      floored: boolean;
      /** Upper edge of the baseline band: above it is watch. */
      watchAbove: number;
      /** At or above this is act. */
      actFrom: number;
    };

/**
 * The baseline band from previous readings (oldest first): the rolling window's mean and spread with a
 * floor, so a perfectly flat history cannot turn a 1 ppm change into an alarm.
 */
export function computeBaselineBand(previous: readonly number[], settings: BandSettings): BaselineBand {
  const recent = previous.slice(-settings.window).filter((v) => Number.isFinite(v));
  if (recent.length < settings.minSamples) {
    return { status: 'building', n: recent.length, needed: settings.minSamples };
  }
  const stats = computeBaseline(recent);
  const floor = Math.max(settings.floorAbsolute, settings.floorFraction * Math.abs(stats.mean));
  const sd = Number.isFinite(stats.sd) ? stats.sd : 0;
  const spread = Math.max(sd, floor);
  return {
    status: 'ready',
    n: stats.n,
    mean: stats.mean,
    sd,
    spread,
    floored: spread > sd,
    watchAbove: stats.mean + settings.watchSd * spread,
    actFrom: stats.mean + settings.actSd * spread,
  };
}

export interface TrendFit {
  n: number;
  slope: number;
  intercept: number;
  /** Coefficient of determination of the fit (1 for a perfect line; NaN for a flat line). */
  r2: number;
}

/** Least-squares straight line y = intercept + slope · x through the points (simple-statistics). */
export function computeTrendFit(points: readonly (readonly [x: number, y: number])[]): TrendFit {
  if (points.length < 2) throw new RangeError('A trend needs at least two points.');
  const pairs = points.map(([x, y]) => [x, y]);
  const { m, b } = linearRegression(pairs);
  const r2 = rSquared(pairs, (x: number) => m * x + b);
  return { n: points.length, slope: m, intercept: b, r2 };
}
