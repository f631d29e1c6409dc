/**
 * Small dense matrix kernels on row-major Float64Array with offsets: Cholesky factor and solves for
 * symmetric positive definite (SPD) matrices, symmetric matrix–vector product, general products.
 * No allocation; no validation (callers validate once).
 *
 * Cholesky–Banachiewicz ordering (common practice; Golub & Van Loan, "Matrix Computations", 4th ed.,
 * 2013, §4.2).
 *
 * @module
 */

/**
 * Lower Cholesky factor L of the n×n SPD matrix A (row-major at `oa`), written into `l` at `ol`
 * (upper triangle zeroed). `l` may alias `a` with the same offset. Returns false (and leaves `l`
 * partially written) when A is not numerically positive definite.
 */
export function cholesky(
  n: number,
  a: Float64Array,
  oa: number,
  l: Float64Array,
  ol: number,
): boolean {
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[oa + i * n + j];
      for (let k = 0; k < j; k++) s -= l[ol + i * n + k] * l[ol + j * n + k];
      if (i === j) {
        if (!(s > 0) || !Number.isFinite(s)) return false;
        l[ol + i * n + i] = Math.sqrt(s);
      } else {
        l[ol + i * n + j] = s / l[ol + j * n + j];
      }
    }
    for (let j = i + 1; j < n; j++) l[ol + i * n + j] = 0;
  }
  return true;
}

/** Solve L y = b in place (b ← L⁻¹ b) for lower-triangular L (n×n at `ol`). Returns `b`. */
export function forwardSubstitute(
  n: number,
  l: Float64Array,
  ol: number,
  b: Float64Array,
  ob: number,
): Float64Array {
  for (let i = 0; i < n; i++) {
    let s = b[ob + i];
    for (let k = 0; k < i; k++) s -= l[ol + i * n + k] * b[ob + k];
    b[ob + i] = s / l[ol + i * n + i];
  }
  return b;
}

/** Solve Lᵀ x = b in place (b ← L⁻ᵀ b) for lower-triangular L. Returns `b`. */
export function backSubstituteTransposed(
  n: number,
  l: Float64Array,
  ol: number,
  b: Float64Array,
  ob: number,
): Float64Array {
  for (let i = n - 1; i >= 0; i--) {
    let s = b[ob + i];
    for (let k = i + 1; k < n; k++) s -= l[ol + k * n + i] * b[ob + k];
    b[ob + i] = s / l[ol + i * n + i];
  }
  return b;
}

/** Solve A x = b in place given A's Cholesky factor L (b ← A⁻¹ b). Returns `b`. */
export function choleskySolve(
  n: number,
  l: Float64Array,
  ol: number,
  b: Float64Array,
  ob: number,
): Float64Array {
  forwardSubstitute(n, l, ol, b, ob);
  return backSubstituteTransposed(n, l, ol, b, ob);
}

/**
 * y ← A x for the n×n symmetric A (row-major at `oa`; both triangles read): the square case of
 * `gemv`. `y` must not alias `x`. Returns `y`.
 */
export function symv(
  n: number,
  a: Float64Array,
  oa: number,
  x: Float64Array,
  ox: number,
  y: Float64Array,
  oy: number,
): Float64Array {
  return gemv(n, n, a, oa, x, ox, y, oy);
}

/** y ← A x for the r×c matrix A (row-major at `oa`). `y` must not alias `x`. Returns `y`. */
export function gemv(
  r: number,
  c: number,
  a: Float64Array,
  oa: number,
  x: Float64Array,
  ox: number,
  y: Float64Array,
  oy: number,
): Float64Array {
  for (let i = 0; i < r; i++) {
    let s = 0;
    const row = oa + i * c;
    for (let j = 0; j < c; j++) s += a[row + j] * x[ox + j];
    y[oy + i] = s;
  }
  return y;
}

/** C ← A B for A r×k and B k×c (row-major). C must alias neither. Returns `C`. */
export function gemm(
  r: number,
  k: number,
  c: number,
  a: Float64Array,
  oa: number,
  b: Float64Array,
  ob: number,
  out: Float64Array,
  oc: number,
): Float64Array {
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < c; j++) {
      let s = 0;
      for (let p = 0; p < k; p++) s += a[oa + i * k + p] * b[ob + p * c + j];
      out[oc + i * c + j] = s;
    }
  }
  return out;
}

/** ln det A = 2 Σ ln L_ii from A's Cholesky factor L. */
export function choleskyLogDet(n: number, l: Float64Array, ol: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) s += Math.log(l[ol + i * n + i]);
  return 2 * s;
}
