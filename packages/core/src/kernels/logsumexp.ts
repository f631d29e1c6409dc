/**
 * Log-domain reductions: log-sum-exp and normalized exponential weights.
 *
 * lse(a) = a_max + ln Σ_i exp(a_i − a_max) (common practice; see e.g. MATH.md §8.1). Subtracting
 * the maximum is exactly MPPI's ρ = min_j C_j shift (Williams et al., "Information Theoretic MPC for
 * Model-Based Reinforcement Learning", ICRA 2017). Entries equal to −∞ contribute zero weight; if all
 * are −∞ (or NaN), lse is −∞ and the weights are left untouched by {@link expWeights}, which then
 * returns −∞ so the caller can keep its previous state.
 *
 * @module
 */

/** lse(a) over n entries starting at `oa`; −∞ when every entry is −∞ or NaN; +∞ if any is +∞. */
export function logSumExp(n: number, a: Float64Array, oa: number): number {
  let m = Number.NEGATIVE_INFINITY;
  for (let i = 0; i < n; i++) {
    const v = a[oa + i];
    if (v > m) m = v;
  }
  if (m === Number.NEGATIVE_INFINITY || m === Number.POSITIVE_INFINITY) return m;
  let s = 0;
  for (let i = 0; i < n; i++) {
    const v = a[oa + i];
    if (v > Number.NEGATIVE_INFINITY) s += Math.exp(v - m);
  }
  return m + Math.log(s);
}

/**
 * Normalized exponential weights w_i = exp(a_i − lse(a)), written into `w[ow..ow+n)`.
 *
 * NaN scores count as −∞ (weight 0). Returns lse(a); when it is −∞ (no finite score) `w` is not
 * written. When some score is +∞, the +∞ entries share the weight equally.
 *
 * With an output array `lse` (and offset `ol`), lse(a) is written to `lse[ol]` instead of being
 * returned. Hot loops should use this form: V8 boxes a non-integer double returned from a call
 * it does not inline (16 bytes on the heap per call; `pnpm bench alloc` traced one per MPPI step
 * to this return), while a double stored into a Float64Array is not boxed.
 */
export function expWeights(
  n: number,
  a: Float64Array,
  oa: number,
  w: Float64Array,
  ow: number,
): number;
export function expWeights(
  n: number,
  a: Float64Array,
  oa: number,
  w: Float64Array,
  ow: number,
  lse: Float64Array,
  ol: number,
): void;
export function expWeights(
  n: number,
  a: Float64Array,
  oa: number,
  w: Float64Array,
  ow: number,
  lse?: Float64Array,
  ol = 0,
): number | undefined {
  let m = Number.NEGATIVE_INFINITY;
  for (let i = 0; i < n; i++) {
    const v = a[oa + i];
    if (v > m) m = v;
  }
  let r = m;
  if (m === Number.POSITIVE_INFINITY) {
    let c = 0;
    for (let i = 0; i < n; i++) if (a[oa + i] === m) c++;
    for (let i = 0; i < n; i++) w[ow + i] = a[oa + i] === m ? 1 / c : 0;
  } else if (m !== Number.NEGATIVE_INFINITY) {
    let s = 0;
    for (let i = 0; i < n; i++) {
      const v = a[oa + i];
      const e = v > Number.NEGATIVE_INFINITY ? Math.exp(v - m) : 0;
      w[ow + i] = e;
      s += e;
    }
    const inv = 1 / s;
    for (let i = 0; i < n; i++) w[ow + i] *= inv;
    r = m + Math.log(s);
  }
  if (lse === undefined) return r;
  lse[ol] = r;
  return undefined;
}
