/**
 * Compensated summation for long regret sums (MATH.md §8.4: accumulate regret sums with
 * Kahan/pairwise summation for long horizons).
 *
 * Alongside the running sum s we keep a compensation c that collects the rounding error of every
 * addition, computed exactly and without branches by Knuth's TwoSum (D. E. Knuth, "The Art of
 * Computer Programming", Vol. 2, §4.2.2):
 *   t = s + v;  b = t − s;  c += (s − (t − b)) + (v − b);  s = t,
 * and report s + c. This is the cascaded summation "Sum2" of T. Ogita, S. M. Rump, S. Oishi
 * ("Accurate Sum and Dot Product", SIAM J. Sci. Comput. 26(6), 2005), equivalent in accuracy to
 * Neumaier's variant of Kahan summation (A. Neumaier, ZAMM 54, 1974): error ≤ u|Σv_i| +
 * γ²_{n−1}Σ|v_i|, i.e. as if computed in twice the working precision and then rounded, against
 * (n−1)u·Σ|v_i| for the naive loop (Higham, "Accuracy and Stability of Numerical Algorithms",
 * 2nd ed., SIAM 2002, §4.3). TwoSum needs no comparison, so sign-alternating data cost no branch
 * mispredictions.
 *
 * @module
 */

/**
 * Add `v` to the compensated pair (`sum[i]`, `comp[i]`) in place (TwoSum update). No allocation.
 */
export function compensatedAdd(sum: Float64Array, comp: Float64Array, i: number, v: number): void {
  const s = sum[i];
  const t = s + v;
  const b = t - s;
  comp[i] += s - (t - b) + (v - b);
  sum[i] = t;
}

/**
 * Σ_{i<n} x[offset + i·stride] by compensated (TwoSum / Sum2) summation. No allocation.
 *
 * With s the running sum and c the compensation: t = s + v; b = t − s;
 * c += (s − (t − b)) + (v − b); s = t; the result is s + c — accurate as if summed in twice the
 * working precision. Source: T. Ogita, S. M. Rump, S. Oishi, "Accurate Sum and Dot Product", SIAM
 * J. Sci. Comput., 2005 (Sum2), with Knuth's TwoSum (D. E. Knuth, "The Art of Computer
 * Programming", Vol. 2, §4.2.2).
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
    const b = t - s;
    c += s - (t - b) + (v - b);
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
