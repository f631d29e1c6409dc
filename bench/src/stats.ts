/**
 * Summary statistics for sweeps: mean, sample standard deviation, Student-t confidence intervals
 * over seeds, and order statistics for timings.
 *
 * The confidence interval for the mean of s independent seeds is
 * x̄ ± t_{1−α/2, s−1} · sd / √s (Student 1908, "The probable error of a mean", Biometrika 6(1)),
 * with the t quantile found by bisection on the exact finite-series CDF for integer degrees of
 * freedom (Abramowitz & Stegun, "Handbook of Mathematical Functions", 1964, 26.7.3–26.7.4).
 * Tests compare against scipy.stats.t (fixture bench/fixtures/student_t.json).
 *
 * @module
 */

/**
 * Student-t cumulative distribution P(T ≤ t) for an integer number of degrees of freedom ν ≥ 1,
 * by the finite series of Abramowitz & Stegun, "Handbook of Mathematical Functions", 1964,
 * 26.7.3 (ν odd) and 26.7.4 (ν even), with θ = atan(t/√ν) and A(t|ν) = P(|T| ≤ t):
 *   ν odd:  A = (2/π)[θ + sin θ (cos θ + ⅔cos³θ + … + (2·4⋯(ν−3))/(1·3⋯(ν−2)) cos^{ν−2}θ)]  (A = 2θ/π for ν = 1)
 *   ν even: A = sin θ [1 + ½cos²θ + (1·3)/(2·4)cos⁴θ + … + (1·3⋯(ν−3))/(2·4⋯(ν−2)) cos^{ν−2}θ]
 */
export function studentTCdf(t: number, df: number): number {
  if (!Number.isInteger(df) || df < 1)
    throw new RangeError(`studentTCdf: df must be an integer ≥ 1 (got ${df})`);
  const theta = Math.atan(Math.abs(t) / Math.sqrt(df));
  const c = Math.cos(theta);
  const s = Math.sin(theta);
  const c2 = c * c;
  let a: number;
  if (df % 2 === 1) {
    let sum = 0;
    if (df > 1) {
      let term = c;
      sum = term;
      for (let k = 3; k <= df - 2; k += 2) {
        term *= (c2 * (k - 1)) / k;
        sum += term;
      }
    }
    a = (2 / Math.PI) * (theta + s * sum);
  } else {
    let term = 1;
    let sum = 1;
    for (let k = 2; k <= df - 2; k += 2) {
      term *= (c2 * (k - 1)) / k;
      sum += term;
    }
    a = s * sum;
  }
  const upper = 0.5 + 0.5 * a;
  return t >= 0 ? upper : 1 - upper;
}

/**
 * Student-t quantile t_{p, ν}: the t with P(T ≤ t) = p, for p ∈ (0, 1) and an integer ν = `df` ≥ 1.
 * Solved by bisection on {@link studentTCdf} to relative precision 1e-13.
 */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`studentTQuantile: p must be in (0, 1) (got ${p})`);
  if (!Number.isInteger(df) || df < 1)
    throw new RangeError(`studentTQuantile: df must be an integer ≥ 1 (got ${df})`);
  if (p === 0.5) return 0;
  const sign = p > 0.5 ? 1 : -1;
  const q = p > 0.5 ? p : 1 - p;
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, df) < q) hi *= 2;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (studentTCdf(mid, df) < q) lo = mid;
    else hi = mid;
    if (hi - lo <= 1e-13 * hi) break;
  }
  return sign * 0.5 * (lo + hi);
}

/** Mean and a two-sided confidence interval of the mean. */
export interface Interval {
  /** Number of values n. */
  readonly n: number;
  /** Arithmetic mean x̄. */
  readonly mean: number;
  /** Sample standard deviation (divisor n − 1); 0 when n = 1. */
  readonly sd: number;
  /** Lower end x̄ − t·sd/√n (equal to the mean when n = 1). */
  readonly low: number;
  /** Upper end x̄ + t·sd/√n. */
  readonly high: number;
}

/**
 * Mean and Student-t confidence interval x̄ ± t_{(1+level)/2, n−1}·sd/√n.
 * Sums are taken in the order given: callers sort values first when they need results that do not
 * depend on input order. With n = 1 the interval collapses to the value (no spread is known).
 * @param level - confidence level. @defaultValue 0.95
 */
export function meanInterval(values: readonly number[], level = 0.95): Interval {
  const n = values.length;
  if (n === 0) return { n: 0, mean: Number.NaN, sd: Number.NaN, low: Number.NaN, high: Number.NaN };
  let sum = 0;
  for (const v of values) sum += v;
  const mean = sum / n;
  if (n === 1) return { n, mean, sd: 0, low: mean, high: mean };
  let ss = 0;
  for (const v of values) ss += (v - mean) * (v - mean);
  const sd = Math.sqrt(ss / (n - 1));
  const half = (studentTQuantile((1 + level) / 2, n - 1) * sd) / Math.sqrt(n);
  return { n, mean, sd, low: mean - half, high: mean + half };
}

/**
 * Quantile of a sample by linear interpolation between order statistics (the "type 7" rule of
 * Hyndman & Fan, "Sample quantiles in statistical packages", The American Statistician, 1996).
 */
export function quantile(values: ArrayLike<number>, p: number): number {
  const n = values.length;
  if (n === 0) return Number.NaN;
  const sorted = Float64Array.from(values).sort();
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}
