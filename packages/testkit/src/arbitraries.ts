/**
 * fast-check arbitraries for recede's numeric inputs: finite vectors, bounded gradients, simplex
 * points, SPD matrices, loss sequences and seeds. All produce Float64Array (row-major for matrices).
 *
 * @module
 */
import fc from "fast-check";

/** Options of {@link finiteVector}. */
export interface FiniteVectorOptions {
  /** @defaultValue -10 */
  readonly min?: number;
  /** @defaultValue 10 */
  readonly max?: number;
}

/** Vectors of length `n` with every entry a finite double in [min, max]. */
export function finiteVector(
  n: number,
  options: FiniteVectorOptions = {},
): fc.Arbitrary<Float64Array> {
  const min = options.min ?? -10;
  const max = options.max ?? 10;
  return fc
    .array(fc.double({ min, max, noNaN: true, noDefaultInfinity: true }), {
      minLength: n,
      maxLength: n,
    })
    .map((a) => Float64Array.from(a));
}

/** Vectors of length `n` with entries in [min, max], min > 0 (strictly positive). */
export function positiveVector(n: number, min = 1e-3, max = 10): fc.Arbitrary<Float64Array> {
  return finiteVector(n, { min, max });
}

/**
 * Gradients of length `n` with ‖g‖ ≤ `bound`: the Euclidean norm (`"l2"`, default) or the
 * max-norm (`"linf"`). The norm itself is drawn uniformly in [0, bound], so the boundary is hit.
 */
export function boundedGradient(
  n: number,
  bound: number,
  norm: "l2" | "linf" = "l2",
): fc.Arbitrary<Float64Array> {
  if (norm === "linf") return finiteVector(n, { min: -bound, max: bound });
  return fc
    .tuple(
      fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: n, maxLength: n }),
      fc.oneof(fc.constant(1), fc.double({ min: 0, max: 1, noNaN: true })),
    )
    .map(([v, r]) => {
      let s = 0;
      for (const e of v) s += e * e;
      const k = s > 0 ? (bound * r) / Math.sqrt(s) : 0;
      const g = new Float64Array(n);
      for (let i = 0; i < n; i++) g[i] = v[i] * k;
      // Rounding may put ‖g‖ a hair above the bound; shrink by one ulp-ish factor.
      return g.map((e) => e * (1 - 1e-15));
    });
}

/**
 * Points of the probability simplex Δ_n with every coordinate ≥ `floor`·(something ≤ 1): the
 * coordinates are e^{u_i} normalized, with u_i ∈ [ln floor, 0], so they spread over many orders of
 * magnitude (default floor 1e-8).
 */
export function simplexPoint(n: number, floor = 1e-8): fc.Arbitrary<Float64Array> {
  const lo = Math.log(floor);
  return fc
    .array(fc.double({ min: lo, max: 0, noNaN: true }), { minLength: n, maxLength: n })
    .map((u) => {
      const x = new Float64Array(n);
      let s = 0;
      for (let i = 0; i < n; i++) {
        x[i] = Math.exp(u[i]);
        s += x[i];
      }
      for (let i = 0; i < n; i++) x[i] /= s;
      return x;
    });
}

/**
 * Points of the closed Euclidean ball {‖x − center‖ ≤ radius} (center default 0). The radius is
 * shrunk by 1e-12 (relative) so that rounding in adding the center cannot push a point outside.
 */
export function ballPoint(
  n: number,
  radius: number,
  center?: Float64Array,
): fc.Arbitrary<Float64Array> {
  return boundedGradient(n, radius * (1 - 1e-12)).map((v) => {
    if (center !== undefined) for (let i = 0; i < n; i++) v[i] += center[i];
    return v;
  });
}

/**
 * Symmetric positive definite n×n matrices (row-major): M = AAᵀ/n + λI with Aᵢⱼ ∈ [−1, 1] and
 * λ ∈ [minEigen, 1], so the smallest eigenvalue is ≥ `minEigen` (default 0.1) and the condition
 * number is at most about (1 + n)/minEigen.
 */
export function spdMatrix(n: number, minEigen = 0.1): fc.Arbitrary<Float64Array> {
  return fc
    .tuple(
      fc.array(fc.double({ min: -1, max: 1, noNaN: true }), {
        minLength: n * n,
        maxLength: n * n,
      }),
      fc.double({ min: minEigen, max: 1, noNaN: true }),
    )
    .map(([a, lambda]) => {
      const m = new Float64Array(n * n);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j <= i; j++) {
          let s = 0;
          for (let k = 0; k < n; k++) s += a[i * n + k] * a[j * n + k];
          s /= n;
          if (i === j) s += lambda;
          m[i * n + j] = s;
          m[j * n + i] = s;
        }
      }
      return m;
    });
}

/** Sequences of `rounds` loss vectors of length `n` with entries in [min, max] (default [0, 1]). */
export function lossSequence(
  rounds: number,
  n: number,
  min = 0,
  max = 1,
): fc.Arbitrary<Float64Array[]> {
  return fc.array(finiteVector(n, { min, max }), { minLength: rounds, maxLength: rounds });
}

/** Seeds for `createStream`: non-negative 31-bit integers. */
export function seed(): fc.Arbitrary<number> {
  return fc.integer({ min: 0, max: 0x7fffffff });
}

/** Step sizes in [min, max] (default [1e-3, 2]). */
export function stepSize(min = 1e-3, max = 2): fc.Arbitrary<number> {
  return fc.double({ min, max, noNaN: true });
}
