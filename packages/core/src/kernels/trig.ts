/**
 * Fast, deterministic sine and cosine for model code in hot loops.
 *
 * Method (common practice, in the form of W. J. Cody and W. Waite, "Software Manual for the
 * Elementary Functions", Prentice-Hall, 1980): with k = round(x · 2/π) and the reduced argument
 *   r = ((x − k·P₁) − k·P₂) − k·P₃,   P₁ + P₂ + P₃ ≈ π/2,  |r| ≤ π/4 (+ rounding),
 * where P₁ and P₂ carry 33 significant bits each (so k·P₁ and k·P₂ are exact for |k| < 2²⁰) and P₃
 * the next 53 bits, sin r and cos r come from two polynomials in z = r²:
 *   sin r ≈ r + r·z·(S₁ + S₂z + … + S₆z⁵),   cos r ≈ 1 − z/2 + z²·(C₂ + C₃z + … + C₇z⁵),
 * evaluated by Estrin's scheme, and the quadrant k mod 4 selects and signs them:
 *   k ≡ 0: (sin, cos) = ( s,  c),  1: ( c, −s),  2: (−s, −c),  3: (−c,  s).
 * The coefficients are Chebyshev interpolants (near-minimax) of (sin √z − √z)/z^{3/2} and
 * (cos √z − 1 + z/2)/z² on z ∈ [0, (π/4)²], computed in 50-digit arithmetic and rounded to double
 * by scripts/reference/core_trig.py (Chebyshev interpolation: common practice; truncation error
 * below 1.4·10⁻¹⁷ relative for sin and 7·10⁻¹⁹ for cos, against 8 Taylor terms each for the same
 * accuracy). P₁, P₂, P₃ are π/2 rounded in parts from 80 digits of π (Machin's formula) by the same
 * script.
 *
 * Range: the reduction is used for 2⁻²⁷ ≤ |x| < 2¹⁹·π/2 ≈ 8.2·10⁵ ({@link trigReductionLimit});
 * beyond it, and for NaN and ±∞, the kernel returns `Math.sin`/`Math.cos` (NaN for NaN and ±∞).
 * For |x| < 2⁻²⁷ it returns sin x = x and cos x = 1, the correctly rounded values, so
 * sin(−0) = −0. The quadrant is selected, never added, so sin(−x) = −sin(x) and cos(−x) = cos(x)
 * hold bit for bit.
 *
 * Accuracy, measured (packages/core/src/kernels/trig.ref.test.ts, against NumPy 2.4's numpy.sin
 * and numpy.cos on glibc): at most 1 ulp for |x| ≤ 10³ and at the doubles nearest to multiples of
 * π/2 (|k| ≤ 5·10⁵), at most 2 ulp up to 10⁶ (for large k the two roundings in
 * (x − k·P₁ − k·P₂) − k·P₃ cost up to about 1 ulp of r); fast-check (trig.prop.test.ts) checks
 * 2 ulp against `Math.sin`/`Math.cos` over |x| ≤ 10⁶. Besides those roundings r carries an
 * absolute error below about 5·10⁻³⁷·|k| (π/2 − (P₁ + P₂ + P₃) ≈ 1.0·10⁻³⁷ and the rounding of
 * k·P₃), so the relative error can exceed a few ulps only for doubles within about 10⁻²¹·|k| of a
 * multiple of π/2: rare doubles with large |x|, none in the reference set.
 *
 * Determinism: inside the reduction range the result is computed with IEEE-754 double additions
 * and multiplications only (no `Math.sin`, no fused multiply–add: JavaScript forbids contraction),
 * so it is the same bit pattern on every conforming JavaScript engine and platform. `Math.sin` and
 * `Math.cos` are implementation-approximated (ECMAScript §21.3.2) and do differ between engines.
 *
 * Speed (bench/RESULTS.md §2, "Trig kernel"): one call costs less than the pair
 * `Math.sin(x)`, `Math.cos(x)` on V8. No separate scalar sine or cosine is offered: measured, it
 * was no faster than `Math.sin` alone.
 *
 * @module
 */

/**
 * |x| below which {@link sinCos} and {@link sinCosInPlace} reduce the argument themselves:
 * 2¹⁹·π/2 ≈ 823 550 (then |k| ≤ 2¹⁹ + 1 < 2²⁰ and the Cody–Waite products k·P₁, k·P₂ are exact).
 * At and beyond it (and for NaN, ±∞) they return `Math.sin`/`Math.cos`.
 */
export const trigReductionLimit: number = 823549.6645826427;

/**
 * sin x and cos x together: writes sin x to `out[offset]` and cos x to `out[offset + 1]`.
 *
 * Cody–Waite reduction by π/2 in three parts and Estrin-evaluated polynomials of degree 13 (sin)
 * and 14 (cos) on |r| ≤ π/4 (module documentation). Deterministic (the same bits on every
 * JavaScript engine) for |x| < {@link trigReductionLimit}; `Math.sin`/`Math.cos` beyond it and for
 * NaN/±∞. Measured error ≤ 1 ulp against NumPy for |x| ≤ 10³ (≤ 2 ulp up to the limit). No
 * allocation when V8 inlines the call. In a function that calls it at several places (an RK4 step
 * calls it four times per sample), V8's inlining budget may leave some calls out of line, and a
 * double passed to such a call is boxed (16 bytes per call): there, use {@link sinCosInPlace},
 * which takes no double argument. Same bits either way.
 *
 * Source: W. J. Cody and W. Waite, "Software Manual for the Elementary Functions", 1980 (range
 * reduction); the polynomial coefficients are Chebyshev interpolants (common practice).
 *
 * @example
 * ```ts
 * const sc = new Float64Array(2);
 * kernels.sinCos(0.5, sc, 0); // sc[0] = sin 0.5, sc[1] = cos 0.5
 * ```
 */
export function sinCos(x: number, out: Float64Array, offset: number): void {
  out[offset] = x;
  sinCosInPlace(out, offset);
}

/**
 * In-place {@link sinCos} for hot loops: reads x from `buf[offset]`, then writes sin x to
 * `buf[offset]` and cos x to `buf[offset + 1]`.
 *
 * The same computation and bits as {@link sinCos}. It takes no double argument and returns
 * nothing, so a call that V8 does not inline allocates nothing: use it in model code that
 * evaluates several angles per sample, with a preallocated scratch (a module-level
 * `Float64Array(2)` works well):
 * `sc[0] = θ; sinCosInPlace(sc, 0); const s = sc[0], c = sc[1];`.
 *
 * Source: W. J. Cody and W. Waite, "Software Manual for the Elementary Functions", 1980.
 *
 * @example
 * ```ts
 * const sc = new Float64Array(2);
 * sc[0] = Math.PI / 6;
 * kernels.sinCosInPlace(sc, 0); // sc[0] ≈ 0.5, sc[1] ≈ 0.866
 * ```
 */
export function sinCosInPlace(buf: Float64Array, offset: number): void {
  const x = buf[offset];
  const ax = Math.abs(x);
  if (!(ax < 823549.6645826427) || ax < 7.450580596923828e-9) {
    // outside the reduction range, NaN or ±∞: the engine's Math; |x| < 2⁻²⁷: sin x = x and
    // cos x = 1, correctly rounded (the polynomials give the same, except sin(−0) = +0)
    buf[offset] = ax < 7.450580596923828e-9 ? x : Math.sin(x);
    buf[offset + 1] = ax < 7.450580596923828e-9 ? 1 : Math.cos(x);
    return;
  }
  // k = round-to-nearest-even(x·2/π) by adding and removing 1.5·2⁵²
  const kf = x * 0.6366197723675814 + 6755399441055744 - 6755399441055744;
  // r = x − k·π/2 with π/2 = P₁ + P₂ + P₃ (33 + 33 + 53 bits); r = x exactly when k = 0
  const r = x - kf * 1.5707963267341256 - kf * 6.077100506303966e-11 - kf * 2.0222662487959506e-21;
  const z = r * r;
  const z2 = z * z;
  const z4 = z2 * z2;
  // Estrin: (S₁ + S₂z) + z²(S₃ + S₄z) + z⁴(S₅ + S₆z), likewise for C₂ … C₇
  const s =
    r +
    r *
      z *
      (-0.16666666666666666 +
        z * 0.008333333333330948 +
        z2 * (-0.00019841269836758574 + z * 2.755731610255244e-6) +
        z4 * (-2.5051131845003624e-8 + z * 1.5918129294866608e-10));
  const c =
    1 -
    0.5 * z +
    z2 *
      (0.041666666666666664 +
        z * -0.0013888888888887398 +
        z2 * (2.480158729876569e-5 + z * -2.7557317271729793e-7) +
        z4 * (2.08761462684032e-9 + z * -1.1382632425521717e-11));
  // quadrant k mod 4: select (no arithmetic on the values, so signs and zeros are kept) and sign
  // (±1, exact)
  const q = kf | 0;
  const odd = (q & 1) !== 0;
  buf[offset] = (odd ? c : s) * (1 - (q & 2));
  buf[offset + 1] = (odd ? s : c) * (1 - ((q + 1) & 2));
}

/**
 * Give every branch of {@link sinCosInPlace} type feedback once, at load. A branch that has never
 * run compiles to a deoptimization in the optimized code of the caller it is inlined into, so the
 * first tiny, huge or non-finite angle after warm-up would deoptimize the whole model step
 * (measured: the cart-pole's RK4 step, inside the allocation benchmark's window, `--trace-deopt`:
 * "Insufficient type feedback for compare operation"). Same pattern as the warm-up in rng.ts.
 */
function warmUp(): void {
  const b = new Float64Array(2);
  const xs = [0.5, 2, -3, 1e-12, -0, 1e7, Number.NaN, Number.POSITIVE_INFINITY];
  for (let i = 0; i < xs.length; i++) {
    b[0] = xs[i];
    sinCosInPlace(b, 0);
    sinCos(xs[i], b, 0);
  }
}
warmUp();
