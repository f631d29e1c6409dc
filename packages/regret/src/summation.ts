/**
 * Compensated summation for long regret sums (MATH.md §8.4: accumulate regret sums with
 * Kahan/pairwise summation for long horizons).
 *
 * We use Neumaier's variant of Kahan summation (A. Neumaier, "Rundungsfehleranalyse einiger
 * Verfahren zur Summation endlicher Summen", ZAMM 54, 1974; W. Kahan, "Further remarks on reducing
 * truncation errors", Comm. ACM 8(1), 1965): alongside the running sum s keep a compensation c that
 * collects the low-order bits lost by each addition,
 *   t = s + v;  c += |s| ≥ |v| ? (s − t) + v : (v − t) + s;  s = t,
 * and report s + c. The error bound is 2u·Σ|v_i| + O(n u²) independent of n (Higham, "Accuracy and
 * Stability of Numerical Algorithms", 2nd ed., SIAM 2002, §4.3), against (n−1)u·Σ|v_i| for the
 * naive loop.
 *
 * @module
 */

/**
 * Add `v` to the compensated pair (`sum[i]`, `comp[i]`) in place (Neumaier's update). No allocation.
 */
export function compensatedAdd(sum: Float64Array, comp: Float64Array, i: number, v: number): void {
  const s = sum[i];
  const t = s + v;
  if (Math.abs(s) >= Math.abs(v)) comp[i] += s - t + v;
  else comp[i] += v - t + s;
  sum[i] = t;
}

/**
 * Σ_{i<n} x[offset + i·stride] by Neumaier-compensated summation. No allocation.
 *
 * @param x - values
 * @param offset - index of the first value
 * @param n - number of values
 * @param stride - distance between consecutive values
 */
export function compensatedSum(
  x: ArrayLike<number>,
  offset: number = 0,
  n: number = x.length,
  stride: number = 1,
): number {
  let s = 0;
  let c = 0;
  for (let i = 0; i < n; i++) {
    const v = x[offset + i * stride];
    const t = s + v;
    if (Math.abs(s) >= Math.abs(v)) c += s - t + v;
    else c += v - t + s;
    s = t;
  }
  return s + c;
}

/**
 * Σ_{i<n} x[offset + i] by pairwise (cascade) summation: blocks of 16 summed directly, then halves
 * combined recursively. Error bound O(u log₂ n)·Σ|x_i| (Higham 2002, §4.2). Recursion depth
 * log₂(n/16); no allocation.
 */
export function pairwiseSum(
  x: ArrayLike<number>,
  offset: number = 0,
  n: number = x.length,
): number {
  if (n <= 16) {
    let s = 0;
    for (let i = 0; i < n; i++) s += x[offset + i];
    return s;
  }
  const h = n >> 1;
  return pairwiseSum(x, offset, h) + pairwiseSum(x, offset + h, n - h);
}
