/**
 * Wear-part forecast: at what odometer will a part reach its service limit?
 *
 * A straight line of size against odometer is fitted by least squares through the part's readings plus one
 * assumed point at the odometer the part was fitted: the size the recorded reading is expected to have had
 * then. A reading of several pieces records the worst one (the thinnest plate, the longest chain run), and
 * the expected worst of n pieces spread evenly over the new range [a, b] is a + (b − a)/(n + 1) (thinnest)
 * or b − (b − a)/(n + 1) (longest), the expected extreme order statistic of a uniform distribution; one piece
 * starts at the middle. Starting an 8-plate pack from the middle of its range would invent wear it never had.
 * The forecast is where the line meets the service limit. How sure it is comes with it:
 * - one reading: the range comes from the corners — the part could have started anywhere in the new range
 *   and the reading is only good to the measuring resolution (± resolution);
 * - two or more readings: a 95 % prediction interval of the fit (Student's t with n − 2 degrees of
 *   freedom), read where its edges meet the limit. The spread used is never smaller than the new range's
 *   own spread (a uniform spread of width w has sd w/√12) nor half the resolution, so a lucky straight
 *   line of three points does not look certain. When the band widens faster than the part wears, no
 *   late edge exists and the forecast says so.
 * Before any line is drawn the readings are checked for what a line would hide: every reading still inside
 * the new range (no measurable wear: no odometer is given), the latest reading at or past the limit, an
 * earlier reading past the limit with a later one back inside (most likely a replaced part), and a reading
 * that moved away from the limit by more than the resolution (a replaced part or a measuring slip).
 * Parts that grow towards a maximum (a chain's length over a count of links) work the same way mirrored.
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
  /** Pieces measured per reading (the reading is the worst of them); 1 when absent. */
  pieceCount?: number | undefined;
}

/** A later reading further from the limit than an earlier one by more than the resolution. */
export interface WearReversal {
  from: WearReading;
  to: WearReading;
}

export type WearForecast =
  | { status: 'no-readings' }
  | {
      status: 'past-limit';
      /** The latest reading, at or past the limit. */
      odometer: number;
      value: number;
      /** Odometer of the first reading at or past the limit (may be earlier than the latest). */
      firstPastAt: number;
    }
  | {
      /** An earlier reading was at or past the limit but the latest is not: most likely a replaced part. */
      status: 'back-from-limit';
      past: WearReading;
      latest: WearReading;
    }
  | { status: 'no-measurable-wear'; readings: number; reversals: WearReversal[] }
  | { status: 'no-wear-trend'; readings: number; ratePer1000: number; reversals: WearReversal[] }
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
      /** The assumed size at the fitted odometer (the line's first point), for drawing the same line. */
      start: WearReading;
      reversals: WearReversal[];
    };

/** The expected worst of `pieces` new pieces spread evenly over the new range (see the module comment). */
export function expectedStartSize(newMin: number, newMax: number, direction: 'min' | 'max', pieces = 1): number {
  const n = Math.max(1, Math.floor(pieces));
  const step = (newMax - newMin) / (n + 1);
  return direction === 'min' ? newMin + step : newMax - step;
}

/**
 * Two-sided 95 % Student's t critical values t(0.975; df), df = 1…30, from the table in the
 * NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.2 (values from memory of that table).
 */
const T975 = [
  12.706, 4.303, 3.182, 2.776, 2.571, 2.447, 2.365, 2.306, 2.262, 2.228, 2.201, 2.179, 2.16, 2.145, 2.131, 2.12, 2.11,
  2.101, 2.093, 2.086, 2.08, 2.074, 2.069, 2.064, 2.06, 2.056, 2.052, 2.048, 2.045, 2.042,
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
  const firstPast = readings.find((r) => toGo(r.value) <= 0);
  if (toGo(latest.value) <= 0) {
    return { status: 'past-limit', odometer: latest.odometer, value: latest.value, firstPastAt: firstPast!.odometer };
  }
  if (firstPast) return { status: 'back-from-limit', past: firstPast, latest };

  const reversals = findReversals(readings, toGo, resolution);
  // Inside the new range within the resolution: the worn edge of the range (newMin for a part that thins,
  // newMax for one that grows) less one resolution step.
  const newEdge = toGo(input.limitDirection === 'min' ? newMin : newMax);
  if (readings.every((r) => toGo(r.value) >= newEdge - resolution)) {
    return { status: 'no-measurable-wear', readings: readings.length, reversals };
  }

  const startValue = expectedStartSize(newMin, newMax, input.limitDirection, input.pieceCount);
  const xs = [fittedAt, ...readings.map((r) => r.odometer)];
  const ys = [toGo(startValue), ...readings.map((r) => toGo(r.value))];
  const n = xs.length;
  const xbar = xs.reduce((s, x) => s + x, 0) / n;
  const ybar = ys.reduce((s, y) => s + y, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (xs[i]! - xbar) ** 2;
    sxy += (xs[i]! - xbar) * (ys[i]! - ybar);
  }
  if (sxx === 0) return { status: 'no-wear-trend', readings: readings.length, ratePer1000: 0, reversals };
  const slope = sxy / sxx;
  const intercept = ybar - slope * xbar;
  const ratePer1000 = -slope * 1000;
  if (slope >= 0) return { status: 'no-wear-trend', readings: readings.length, ratePer1000, reversals };
  const limitAt = -intercept / slope;
  const remaining = limitAt - latest.odometer;

  const finish = (low: number, high: number | null, method: 'resolution-corners' | 'prediction-interval') => {
    // The latest reading is still short of the limit, so nothing of the range lies before it; with
    // readings that go back and forth the fitted line can cross the limit earlier than that, and the
    // headline then stays inside its own range rather than before the latest reading.
    const lowClamped = Math.max(low, latest.odometer);
    const highClamped = high === null ? null : Math.max(high, lowClamped);
    const at = Math.min(Math.max(limitAt, lowClamped), highClamped ?? Infinity);
    const width = highClamped === null ? Infinity : highClamped - lowClamped;
    const toGoDistance = at - latest.odometer;
    const rel = toGoDistance > 0 ? width / toGoDistance : Infinity;
    const sureness = rel > 1 ? 'wide' : rel > 0.4 ? 'moderate' : 'narrow';
    return {
      status: 'forecast' as const,
      limitAt: at,
      low: lowClamped,
      high: highClamped,
      method,
      readings: readings.length,
      ratePer1000,
      sureness,
      start: { odometer: fittedAt, value: startValue },
      reversals,
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

/** Each step between consecutive readings that moved away from the limit by more than the resolution. */
function findReversals(
  readings: readonly WearReading[],
  toGo: (v: number) => number,
  resolution: number,
): WearReversal[] {
  const out: WearReversal[] = [];
  for (let i = 1; i < readings.length; i++) {
    const from = readings[i - 1]!;
    const to = readings[i]!;
    // A tiny tolerance keeps a step of exactly one resolution (in floating point) from counting.
    if (toGo(to.value) - toGo(from.value) > resolution * (1 + 1e-9)) out.push({ from, to });
  }
  return out;
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
