/**
 * Student's t distribution: the quantile a prediction limit needs when a new reading is compared with a
 * mean and a standard deviation estimated from only n earlier readings (n − 1 degrees of freedom).
 *
 * The CDF uses the regularised incomplete beta function (continued fraction, the textbook Lentz method);
 * the quantile inverts it by bisection. Checked against the NIST/SEMATECH e-Handbook of Statistical Methods,
 * table 1.3.6.7.2 (upper critical values of the t distribution), in tests/unit/analysis/statistics.test.ts.
 */

function logGamma(x: number): number {
  // Lanczos approximation (g = 7, n = 9), accurate to ~15 digits for x > 0.
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let a = c[0]!;
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += c[i]! / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

function betaContinuedFraction(a: number, b: number, x: number): number {
  const TINY = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 300; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const step = d * c;
    h *= step;
    if (Math.abs(step - 1) < 1e-15) break;
  }
  return h;
}

/** Regularised incomplete beta function I_x(a, b). */
export function regularizedIncompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const front = Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
  return x < (a + 1) / (a + b + 2)
    ? (front * betaContinuedFraction(a, b, x)) / a
    : 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** P(T ≤ t) for Student's t with `df` degrees of freedom. */
export function studentTCdf(t: number, df: number): number {
  const tail = 0.5 * regularizedIncompleteBeta(df / (df + t * t), df / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

const QUANTILES = new Map<number, Map<number, number>>();

/** The t value below which a fraction `p` (0.5 < p < 1) of Student's t with `df` degrees of freedom lies. */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0.5 && p < 1)) throw new RangeError('Only upper quantiles (0.5 < p < 1) are needed here.');
  if (!(df >= 1)) throw new RangeError('A t quantile needs at least one degree of freedom.');
  let byDf = QUANTILES.get(p);
  if (!byDf) {
    byDf = new Map();
    QUANTILES.set(p, byDf);
  }
  const known = byDf.get(df);
  if (known !== undefined) return known;
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, df) < p) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-12 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (studentTCdf(mid, df) < p) lo = mid;
    else hi = mid;
  }
  const q = (lo + hi) / 2;
  byDf.set(df, q);
  return q;
}
