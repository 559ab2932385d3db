/**
 * Wear-part forecast: at what odometer will a part reach its service limit?
 *
 * A straight line of thickness against odometer is fitted by least squares through the part's readings
 * plus one assumed point: the middle of the manual's new range at the odometer the part was fitted.
 * The forecast is where that line meets the service limit. How sure it is comes with it:
 * - one reading: the line runs through two points, so no spread can be estimated; the range comes from
 *   the corners instead — the part could have started anywhere in the new range and the reading is only
 *   good to the measuring resolution (± resolution);
 * - two or more readings: a 95 % prediction interval of the fit (Student's t with n − 2 degrees of
 *   freedom), read where its edges meet the limit. The spread used is never smaller than the new range's
 *   own spread (a uniform spread of width w has sd w/√12) nor half the resolution, so a lucky straight
 *   line of three points does not look certain. When the band widens faster than the part wears, no
 *   late edge exists and the forecast says so.
 * All values in any one consistent pair of units (e.g. inches and miles); the caller converts.
 * This is arithmetic, not a verdict: the service manual and a mechanic decide when a part is replaced.
 */

export interface WearReading {
  odometer: number;
  value: number;
}

export interface WearForecastInput {
  newMin: number;
  newMax: number;
  serviceLimit: number;
  /** 'min': the part wears thinner towards the limit (plates, pads); 'max': it grows towards it (stretch). */
  limitDirection: 'min' | 'max';
  /** Odometer when the part was fitted new. */
  fittedAt: number;
  readings: readonly WearReading[];
  /** Smallest step the measuring tool reads (e.g. 0.001 in or 0.01 mm). */
  resolution: number;
}

export type WearForecast =
  | { status: 'no-readings' }
  | { status: 'past-limit'; odometer: number; value: number }
  | { status: 'no-wear-trend'; readings: number; ratePer1000: number }
  | {
      status: 'forecast';
      /** Odometer at which the fitted line meets the service limit. */
      limitAt: number;
      /** Early and late edges of the range; `high` is null when no late edge can be given yet. */
      low: number;
      high: number | null;
      method: 'resolution-corners' | 'prediction-interval';
      readings: number;
      /** Wear per 1,000 odometer units, positive towards the limit. */
      ratePer1000: number;
      /** The range's width relative to the distance still to go: narrow, moderate or wide. */
      sureness: 'narrow' | 'moderate' | 'wide';
    };

/**
 * Two-sided 95 % Student's t critical values t(0.975; df), df = 1…30, from the table in the
 * NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.2 (values from memory of that table).
 */
const T975 = [
  12.706, 4.303, 3.182, 2.776, 2.571, 2.447, 2.365, 2.306, 2.262, 2.228, 2.201, 2.179, 2.16, 2.145, 2.131, 2.12,
  2.11, 2.101, 2.093, 2.086, 2.08, 2.074, 2.069, 2.064, 2.06, 2.056, 2.052, 2.048, 2.045, 2.042,
];

/** The 95 % two-sided t critical value for df degrees of freedom (table to 30, then 40/60/120/∞ steps). */
export function tCritical95(df: number): number {
  if (df < 1) throw new RangeError('A t value needs at least one degree of freedom.');
  if (df <= 30) return T975[Math.floor(df) - 1]!;
  // Same table: 40 → 2.021, 60 → 2.000, 120 → 1.980, ∞ → 1.960 (rounded down to the next tabulated df).
  if (df < 40) return 2.042;
  if (df < 60) return 2.021;
  if (df < 120) return 2.0;
  return 1.98;
}

/** Forecasts the odometer at which a wear part reaches its service limit, with a range saying how sure. */
export function forecastWearLimit(input: WearForecastInput): WearForecast {
  const { newMin, newMax, fittedAt, resolution } = input;
  if (!(newMax >= newMin) || !(resolution > 0)) throw new RangeError('New range or resolution is not valid.');
  const readings = [...input.readings].filter((r) => r.odometer >= fittedAt).sort((a, b) => a.odometer - b.odometer);
  if (readings.length === 0) return { status: 'no-readings' };

  // Work in "distance to go" form: positive y means material left before the limit, whatever the direction.
  const sign = input.limitDirection === 'min' ? 1 : -1;
  const toGo = (v: number) => sign * (v - input.serviceLimit);
  const latest = readings[readings.length - 1]!;
  if (toGo(latest.value) <= 0) return { status: 'past-limit', odometer: latest.odometer, value: latest.value };

  const mid = (newMin + newMax) / 2;
  const xs = [fittedAt, ...readings.map((r) => r.odometer)];
  const ys = [toGo(mid), ...readings.map((r) => toGo(r.value))];
  const n = xs.length;
  const xbar = xs.reduce((s, x) => s + x, 0) / n;
  const ybar = ys.reduce((s, y) => s + y, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (xs[i]! - xbar) ** 2;
    sxy += (xs[i]! - xbar) * (ys[i]! - ybar);
  }
  if (sxx === 0) return { status: 'no-wear-trend', readings: readings.length, ratePer1000: 0 };
  const slope = sxy / sxx;
  const intercept = ybar - slope * xbar;
  const ratePer1000 = -slope * 1000;
  if (slope >= 0) return { status: 'no-wear-trend', readings: readings.length, ratePer1000 };
  const limitAt = -intercept / slope;
  const remaining = limitAt - latest.odometer;

  const finish = (low: number, high: number | null, method: 'resolution-corners' | 'prediction-interval') => {
    const lowClamped = Math.max(low, latest.odometer);
    const width = high === null ? Infinity : high - lowClamped;
    const rel = remaining > 0 ? width / remaining : Infinity;
    const sureness = rel > 1 ? 'wide' : rel > 0.4 ? 'moderate' : 'narrow';
    return {
      status: 'forecast' as const, limitAt, low: lowClamped, high, method, readings: readings.length, ratePer1000, sureness,
    } satisfies WearForecast;
  };

  if (readings.length === 1) {
    // Corners: start anywhere in the new range, reading ± resolution. Each corner's straight line meets
    // the limit at fittedAt + Δx · start/(start − reading) (in distance-to-go form).
    const r = readings[0]!;
    const dx = r.odometer - fittedAt;
    const crossings: (number | null)[] = [];
    for (const start of [toGo(newMin), toGo(newMax)]) {
      for (const reading of [toGo(r.value) - resolution, toGo(r.value) + resolution]) {
        const drop = start - reading;
        crossings.push(drop > 0 && reading > 0 ? fittedAt + (dx * start) / drop : reading <= 0 ? r.odometer : null);
      }
    }
    const finite = crossings.filter((c): c is number => c !== null);
    const low = Math.min(...finite);
    const high = finite.length === crossings.length ? Math.max(...finite) : null;
    return finish(low, high, 'resolution-corners');
  }

  let sse = 0;
  for (let i = 0; i < n; i++) sse += (ys[i]! - (intercept + slope * xs[i]!)) ** 2;
  const floor = Math.max((newMax - newMin) / Math.sqrt(12), resolution / 2);
  const s = Math.max(Math.sqrt(sse / (n - 2)), floor);
  const t = tCritical95(n - 2);
  const half = (x: number) => t * s * Math.sqrt(1 + 1 / n + (x - xbar) ** 2 / sxx);
  const lowerEdge = (x: number) => intercept + slope * x - half(x);
  const upperEdge = (x: number) => intercept + slope * x + half(x);

  // Early edge: where the lower edge of the band first touches the limit (lowerEdge is concave and is
  // already below zero at limitAt).
  let low = latest.odometer;
  if (lowerEdge(low) <= 0) low = latest.odometer;
  else low = bisect(lowerEdge, low, limitAt);

  // Late edge: exists only when the fitted wear outruns the band's widening (asymptotic slope < 0).
  let high: number | null = null;
  if (slope + (t * s) / Math.sqrt(sxx) < 0) {
    let hi = limitAt + Math.max(remaining, 1);
    for (let k = 0; k < 200 && upperEdge(hi) > 0; k++) hi = limitAt + (hi - limitAt) * 2;
    if (upperEdge(hi) <= 0) high = bisect(upperEdge, limitAt, hi);
  }
  return finish(low, high, 'prediction-interval');
}

/** The x in [a, b] where f changes sign (f(a) > 0 ≥ f(b)), to a relative tolerance of 1e-10. */
function bisect(f: (x: number) => number, a: number, b: number): number {
  let lo = a;
  let hi = b;
  for (let i = 0; i < 200 && hi - lo > 1e-10 * Math.max(1, Math.abs(hi)); i++) {
    const m = (lo + hi) / 2;
    if (f(m) > 0) lo = m;
    else hi = m;
  }
  return (lo + hi) / 2;
}
