/**
 * The generalized Kullback–Leibler divergence shared by the simplex and the positive-orthant
 * entropy geometries (their potentials differ by a linear term, so their Bregman divergences agree).
 *
 * @module
 */

/**
 * D(x‖y) = Σᵢ xᵢ ln(xᵢ/yᵢ) − xᵢ + yᵢ over the first n entries, with 0 ln 0 = 0: +∞ when some yᵢ = 0
 * carries xᵢ > 0, NaN for a negative or NaN entry; clamped at 0 against rounding.
 */
export function generalizedKl(n: number, x: Float64Array, y: Float64Array): number {
  let s = 0;
  for (let i = 0; i < n; i++) {
    const a = x[i];
    const b = y[i];
    if (a > 0) {
      if (!(b > 0)) return b === 0 ? Number.POSITIVE_INFINITY : Number.NaN;
      s += a * Math.log(a / b) - a + b;
    } else if (a === 0) s += b;
    else return Number.NaN;
  }
  return Math.max(s, 0);
}
