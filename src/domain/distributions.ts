/**
 * Student-t and normal distribution functions. simple-statistics 7 has no Student-t CDF or
 * quantile (its `tTest` returns only the statistic), so the t distribution is built here from
 * the regularized incomplete beta function, evaluated by its continued fraction with the
 * modified Lentz method. ln Γ comes from simple-statistics (Lanczos, g = 607/128).
 */
import { gammaln } from 'simple-statistics';

const CF_EPS = 1e-15;
const CF_TINY = 1e-300;
const CF_MAX_ITER = 500;

function betaContinuedFraction(a: number, b: number, x: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < CF_TINY) d = CF_TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= CF_MAX_ITER; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < CF_EPS) break;
  }
  return h;
}

/**
 * Regularized incomplete beta function I_x(a, b) for a, b > 0 and 0 ≤ x ≤ 1.
 * Returns NaN for arguments outside that domain. Accurate to about 1e-14 in the body of the
 * distribution.
 */
export function regularizedIncompleteBeta(x: number, a: number, b: number): number {
  if (!(a > 0) || !(b > 0) || !(x >= 0) || !(x <= 1)) return Number.NaN;
  if (x === 0) return 0;
  if (x === 1) return 1;
  const lnFront = gammaln(a + b) - gammaln(a) - gammaln(b) + a * Math.log(x) + b * Math.log1p(-x);
  const front = Math.exp(lnFront);
  if (x < (a + 1) / (a + b + 2)) return (front * betaContinuedFraction(a, b, x)) / a;
  return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/**
 * Cumulative distribution function of Student's t with `df` degrees of freedom (df > 0,
 * need not be an integer). P(T ≤ t). Infinite df is the standard normal.
 */
export function studentTCdf(t: number, df: number): number {
  if (Number.isNaN(t) || !(df > 0)) return Number.NaN;
  if (t === Infinity) return 1;
  if (t === -Infinity) return 0;
  if (df === Infinity) return normalCdf(t);
  const x = df / (df + t * t);
  const tail = 0.5 * regularizedIncompleteBeta(x, df / 2, 0.5);
  return t > 0 ? 1 - tail : tail;
}

/** Two-sided p-value P(|T| ≥ |t|) for Student's t with `df` degrees of freedom. */
export function studentTTwoSidedP(t: number, df: number): number {
  if (Number.isNaN(t) || !(df > 0)) return Number.NaN;
  if (!Number.isFinite(t)) return 0;
  if (df === Infinity) return 2 * (1 - normalCdf(Math.abs(t)));
  return regularizedIncompleteBeta(df / (df + t * t), df / 2, 0.5);
}

function studentTPdf(t: number, df: number): number {
  const lnPdf =
    gammaln((df + 1) / 2) -
    gammaln(df / 2) -
    0.5 * Math.log(df * Math.PI) -
    ((df + 1) / 2) * Math.log1p((t * t) / df);
  return Math.exp(lnPdf);
}

/**
 * Quantile (inverse CDF) of Student's t: the t with P(T ≤ t) = p, for 0 < p < 1 and df > 0.
 * Safeguarded Newton iteration on `studentTCdf` inside a bisection bracket; relative accuracy
 * about 1e-12. p = 0 or 1 give ∓Infinity; other p outside (0, 1) give NaN.
 */
export function studentTQuantile(p: number, df: number): number {
  let byDf = quantileCache.get(p);
  if (!byDf) {
    if (quantileCacheSize >= QUANTILE_CACHE_MAX) return computeStudentTQuantile(p, df);
    byDf = new Map();
    quantileCache.set(p, byDf);
  }
  const cached = byDf.get(df);
  if (cached !== undefined) return cached;
  const q = computeStudentTQuantile(p, df);
  if (quantileCacheSize < QUANTILE_CACHE_MAX) {
    byDf.set(df, q);
    quantileCacheSize++;
  }
  return q;
}

// Memo of quantiles by p, then df: the engine asks for the same few (p, df) pairs over and over.
const QUANTILE_CACHE_MAX = 4096;
const quantileCache = new Map<number, Map<number, number>>();
let quantileCacheSize = 0;

function computeStudentTQuantile(p: number, df: number): number {
  if (!(df > 0) || Number.isNaN(p) || p < 0 || p > 1) return Number.NaN;
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p === 0.5) return 0;
  if (df === Infinity) return normalQuantile(p);
  if (p < 0.5) return -computeStudentTQuantile(1 - p, df);
  // p > 0.5: root is positive. Bracket it.
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, df) < p) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) return Infinity;
  }
  let t = (lo + hi) / 2;
  for (let i = 0; i < 200; i++) {
    const f = studentTCdf(t, df) - p;
    if (f === 0) return t;
    if (f < 0) lo = t;
    else hi = t;
    const pdf = studentTPdf(t, df);
    let next = pdf > 0 ? t - f / pdf : Number.NaN;
    if (!(next > lo && next < hi)) next = (lo + hi) / 2;
    if (Math.abs(next - t) <= 1e-14 * Math.max(1, Math.abs(t))) return next;
    t = next;
  }
  return t;
}

/**
 * Complementary error function erfc(x), from the Maclaurin series of erf for |x| < 2.5 and the
 * Laplace continued fraction for erfc beyond; relative accuracy about 1e-13.
 */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return Number.NaN;
  if (x < 0) return 2 - erfc(-x);
  if (x < 2.5) {
    let term = x;
    let sum = x;
    for (let n = 1; n < 200; n++) {
      term *= (-x * x) / n;
      const add = term / (2 * n + 1);
      sum += add;
      if (Math.abs(add) < 1e-17 * Math.abs(sum)) break;
    }
    return 1 - (2 / Math.sqrt(Math.PI)) * sum;
  }
  if (x > 27) return 0;
  // erfc(x) = exp(-x²)/√π · 1/(x + (1/2)/(x + 1/(x + (3/2)/(x + …)))), modified Lentz.
  let f = x;
  let c = x;
  let d = 0;
  for (let k = 1; k < 500; k++) {
    const a = k / 2;
    d = x + a * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = x + a / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    const del = c * d;
    f *= del;
    if (Math.abs(del - 1) < CF_EPS) break;
  }
  return Math.exp(-x * x) / (Math.sqrt(Math.PI) * f);
}

/** Standard normal CDF Φ(z). */
export function normalCdf(z: number): number {
  if (z === Infinity) return 1;
  if (z === -Infinity) return 0;
  return 0.5 * erfc(-z / Math.SQRT2);
}

/**
 * Standard normal quantile Φ⁻¹(p) for 0 < p < 1, by bisection on `normalCdf` (absolute
 * accuracy about 1e-12). p = 0 or 1 give ∓Infinity; p outside [0, 1] gives NaN.
 */
export function normalQuantile(p: number): number {
  if (Number.isNaN(p) || p < 0 || p > 1) return Number.NaN;
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  let lo = -40;
  let hi = 40;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (normalCdf(mid) < p) lo = mid;
    else hi = mid;
    if (hi - lo < 1e-13) break;
  }
  return (lo + hi) / 2;
}
