/**
 * Conjugate gradient for symmetric positive definite systems given only matrix-vector products.
 *
 * @module
 */

/** Outcome of {@link conjugateGradient}. */
export interface ConjugateGradientReport {
  /** Iterations taken (matrix-vector products used). */
  readonly iterations: number;
  /** ‖b − A x‖₂ at exit (the recursively updated residual). */
  readonly residualNorm: number;
  /** True when ‖r‖ ≤ tolerance·‖b‖ was reached within the iteration budget. */
  readonly converged: boolean;
}

/** Scratch vectors for {@link conjugateGradient} (each of length d), reused across calls. */
export interface ConjugateGradientScratch {
  readonly r: Float64Array;
  readonly p: Float64Array;
  readonly ap: Float64Array;
}

/**
 * Solve A x = b for SPD A, given `apply(v, out)` writing out ← A v, starting from x = 0.
 *
 * Hestenes–Stiefel iteration: r₀ = p₀ = b; α_k = r_kᵀr_k / p_kᵀAp_k; x ← x + α_k p_k;
 * r ← r − α_k A p_k; β_k = r_{k+1}ᵀr_{k+1} / r_kᵀr_k; p ← r + β_k p. Stops when ‖r‖ ≤ tol·‖b‖, after
 * `maxIterations`, or when pᵀAp ≤ 0 (A not positive definite along p). Exact in at most d steps in
 * exact arithmetic. Source: M. R. Hestenes, E. Stiefel, "Methods of Conjugate Gradients for Solving
 * Linear Systems", J. Res. Nat. Bur. Standards 49(6), 1952.
 *
 * @param d - dimension
 * @param apply - out ← A v (must not alias)
 * @param b - right-hand side (not modified)
 * @param x - solution, overwritten
 * @param scratch - work vectors r, p, ap of length d
 */
export function conjugateGradient(
  d: number,
  apply: (v: Float64Array, out: Float64Array) => void,
  b: Float64Array,
  x: Float64Array,
  scratch: ConjugateGradientScratch,
  maxIterations: number,
  tolerance: number,
): ConjugateGradientReport {
  const { r, p, ap } = scratch;
  let rr = 0;
  for (let i = 0; i < d; i++) {
    x[i] = 0;
    r[i] = b[i];
    p[i] = b[i];
    rr += b[i] * b[i];
  }
  const stop = tolerance * tolerance * rr;
  if (rr === 0) return { iterations: 0, residualNorm: 0, converged: true };
  let k = 0;
  while (k < maxIterations) {
    apply(p, ap);
    k++;
    let pap = 0;
    for (let i = 0; i < d; i++) pap += p[i] * ap[i];
    if (!(pap > 0)) break;
    const alpha = rr / pap;
    let rrNew = 0;
    for (let i = 0; i < d; i++) {
      x[i] += alpha * p[i];
      r[i] -= alpha * ap[i];
      rrNew += r[i] * r[i];
    }
    if (rrNew <= stop) {
      rr = rrNew;
      return { iterations: k, residualNorm: Math.sqrt(rr), converged: true };
    }
    const beta = rrNew / rr;
    rr = rrNew;
    for (let i = 0; i < d; i++) p[i] = r[i] + beta * p[i];
  }
  return { iterations: k, residualNorm: Math.sqrt(rr), converged: rr <= stop };
}
