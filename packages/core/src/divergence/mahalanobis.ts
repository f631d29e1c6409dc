/**
 * The Mahalanobis geometry: ψ(x) = ½ xᵀMx for a symmetric positive definite metric M.
 *
 * @module
 */
import { RecedeError, requirePositive } from "../errors.js";
import { requireOptions, toVector } from "../internal/vectorInput.js";
import { cholesky as choleskyFactor, choleskySolve } from "../kernels/matrix.js";
import { type MatrixInput, toRowMajor } from "../matrixInput.js";
import type { BallSet } from "./euclidean.js";
import type { Geometry } from "./geometry.js";

/** Options of {@link mahalanobis}. */
export interface MahalanobisOptions {
  /**
   * The metric M (d×d, symmetric positive definite): an `ndarray` view, `{ data, rows, cols }`
   * (row-major), an array of rows, or a bare row-major Float64Array of length d². It is copied;
   * later changes to the input have no effect.
   */
  readonly metric: MatrixInput | Float64Array;
  /**
   * Feasible set X: a ball in the M-norm, {x : (x − c)ᵀM(x − c) ≤ r²}, onto which the M-norm
   * (Bregman) projection has the closed form c + (x − c)·min(1, r/‖x − c‖_M).
   * Boxes and Euclidean balls are not offered: their M-norm projection is a quadratic program
   * with no closed form.
   * @defaultValue none (X = ℝᵈ)
   */
  readonly feasible?: BallSet;
  /**
   * Largest accepted asymmetry, relative to max|Mᵢⱼ|: |Mᵢⱼ − Mⱼᵢ| ≤ symmetryTolerance·max|M|.
   * M is then symmetrized as ½(M + Mᵀ).
   * @defaultValue 1e-10
   */
  readonly symmetryTolerance?: number;
  /**
   * Relative slack of {@link Geometry.contains} for the ball: ‖x − c‖_M ≤ r·(1 + tolerance).
   * @defaultValue 1e-12
   */
  readonly tolerance?: number;
}

/** The Mahalanobis geometry, with its metric, solve and projection exposed. */
export interface MahalanobisGeometry extends Geometry {
  readonly name: "mahalanobis";
  /** The symmetrized metric M, row-major d×d (a private copy: do not write). */
  readonly metric: Float64Array;
  /** Its lower Cholesky factor L, M = LLᵀ, row-major d×d (do not write). */
  readonly factor: Float64Array;
  /** out ← M⁻¹ v by two triangular solves. `out` may alias `v`. Returns `out`. */
  solve(v: Float64Array, out: Float64Array): Float64Array;
  /** out ← the M-norm projection of x onto the feasible set (a copy when there is none). */
  project(x: Float64Array, out: Float64Array): Float64Array;
}

const FN = "mahalanobis";

/**
 * The Mahalanobis geometry for an SPD metric M.
 *
 * ψ(x) = ½ xᵀMx, D(x‖y) = ½ (x − y)ᵀM(x − y), ∇ψ(x) = Mx, ∇ψ*(θ) = M⁻¹θ, and the mirror step is the
 * M⁻¹-preconditioned gradient step  x⁺ = Π^M_X(x_t − η M⁻¹ g),  with M⁻¹g computed by two
 * triangular solves against the Cholesky factor L (M = LLᵀ) computed once here. With M = ∇²f(x_t)
 * and η = 1 the step is Newton's step, which lands on the minimizer of a strictly convex quadratic.
 * Symbols ↔ options: M ↔ `metric`, X ↔ `feasible`.
 *
 * Throws a {@link RecedeError} with code `"not-spd"` when M is not symmetric (beyond
 * `symmetryTolerance`) or its Cholesky factorization fails.
 *
 * Source: A. Beck, M. Teboulle, "Mirror Descent and Nonlinear Projected Subgradient Methods for
 * Convex Optimization", Oper. Res. Lett., 2003 (mirror descent with a Bregman divergence);
 * G. Golub, C. Van Loan, "Matrix Computations", 4th ed., 2013, §4.2 (Cholesky).
 *
 * @example
 * ```ts
 * const geo = mahalanobis({ metric: [[2, 0], [0, 4]] });
 * const x = new Float64Array([1, 1]);
 * geo.step(x, new Float64Array([2, 4]), 1, x); // Newton step on ½xᵀMx: x = [0, 0]
 * ```
 */
export function mahalanobis(options: MahalanobisOptions): MahalanobisGeometry {
  requireOptions(FN, options);
  if (options.metric === undefined || options.metric === null) {
    throw new RecedeError(
      "type",
      FN,
      "metric",
      "an SPD matrix (ndarray, {data, rows, cols} or rows)",
      options.metric,
    );
  }
  const m = readMetric(options.metric);
  const d = m.rows;
  if (d < 1 || m.cols !== d) {
    throw new RecedeError(
      "dimension",
      FN,
      "metric",
      "a square matrix of size >= 1",
      `shape ${m.rows}×${m.cols}`,
    );
  }
  const symTol = options.symmetryTolerance === undefined ? 1e-10 : options.symmetryTolerance;
  if (typeof symTol !== "number" || !(symTol >= 0) || !Number.isFinite(symTol)) {
    throw new RecedeError("range", FN, "symmetryTolerance", "a finite number >= 0", symTol);
  }
  const tol = options.tolerance === undefined ? 1e-12 : options.tolerance;
  if (typeof tol !== "number" || !(tol >= 0) || !Number.isFinite(tol)) {
    throw new RecedeError("range", FN, "tolerance", "a finite number >= 0", tol);
  }
  const a = m.data;
  let amax = 0;
  for (let i = 0; i < d * d; i++) amax = Math.max(amax, Math.abs(a[i]));
  for (let i = 0; i < d; i++) {
    for (let j = 0; j < i; j++) {
      const asym = Math.abs(a[i * d + j] - a[j * d + i]);
      if (asym > symTol * amax) {
        throw new RecedeError(
          "not-spd",
          FN,
          "metric",
          `symmetric (|M[${i}][${j}] − M[${j}][${i}]| <= ${symTol}·max|M|)`,
          `M[${i}][${j}] = ${a[i * d + j]}, M[${j}][${i}] = ${a[j * d + i]}`,
        );
      }
      const v = 0.5 * (a[i * d + j] + a[j * d + i]);
      a[i * d + j] = v;
      a[j * d + i] = v;
    }
  }
  const l = new Float64Array(d * d);
  if (!choleskyFactor(d, a, 0, l, 0)) {
    throw new RecedeError(
      "not-spd",
      FN,
      "metric",
      "symmetric positive definite (Cholesky factorization failed)",
      `a ${d}×${d} matrix that is not positive definite`,
    );
  }
  let center: Float64Array | null = null;
  let radius = 0;
  const f = options.feasible;
  if (f !== undefined) {
    if (typeof f !== "object" || f === null || f.kind !== "ball") {
      throw new RecedeError(
        "type",
        FN,
        "feasible",
        '{ kind: "ball", radius, center? } (an M-norm ball)',
        typeof f === "object" && f !== null ? (f as { kind?: unknown }).kind : f,
      );
    }
    radius = requirePositive(FN, "feasible.radius", f.radius);
    center =
      f.center === undefined ? new Float64Array(d) : toVector(FN, "feasible.center", f.center, d);
  }
  return new MahalanobisImpl(d, a, l, center, radius, tol);
}

/** A MatrixInput, or a bare row-major Float64Array of length d² (d inferred). */
function readMetric(metric: unknown): { data: Float64Array; rows: number; cols: number } {
  if (metric instanceof Float64Array) {
    const d = Math.round(Math.sqrt(metric.length));
    if (d * d !== metric.length) {
      throw new RecedeError(
        "dimension",
        FN,
        "metric",
        "a row-major Float64Array of length d²",
        metric,
      );
    }
    return toRowMajor(FN, "metric", { data: metric, rows: d, cols: d });
  }
  return toRowMajor(FN, "metric", metric as MatrixInput);
}

class MahalanobisImpl implements MahalanobisGeometry {
  readonly name = "mahalanobis" as const;
  private readonly work: Float64Array;

  constructor(
    readonly dimension: number,
    readonly metric: Float64Array,
    readonly factor: Float64Array,
    private readonly center: Float64Array | null,
    private readonly radius: number,
    private readonly tol: number,
  ) {
    this.work = new Float64Array(dimension);
  }

  /** vᵀMv for v in `v`. */
  private quad(v: Float64Array): number {
    const d = this.dimension;
    const a = this.metric;
    let s = 0;
    for (let i = 0; i < d; i++) {
      let r = 0;
      const row = i * d;
      for (let j = 0; j < d; j++) r += a[row + j] * v[j];
      s += v[i] * r;
    }
    return s;
  }

  potential(x: Float64Array): number {
    return 0.5 * this.quad(x);
  }

  divergence(x: Float64Array, y: Float64Array): number {
    const w = this.work;
    for (let i = 0; i < this.dimension; i++) w[i] = x[i] - y[i];
    return Math.max(0, 0.5 * this.quad(w));
  }

  mirrorMap(x: Float64Array, out: Float64Array): Float64Array {
    const d = this.dimension;
    const a = this.metric;
    const w = this.work;
    for (let i = 0; i < d; i++) {
      let r = 0;
      const row = i * d;
      for (let j = 0; j < d; j++) r += a[row + j] * x[j];
      w[i] = r;
    }
    for (let i = 0; i < d; i++) out[i] = w[i];
    return out;
  }

  inverseMirrorMap(theta: Float64Array, out: Float64Array): Float64Array {
    return this.solve(theta, out);
  }

  solve(v: Float64Array, out: Float64Array): Float64Array {
    if (out !== v) for (let i = 0; i < this.dimension; i++) out[i] = v[i];
    return choleskySolve(this.dimension, this.factor, 0, out, 0);
  }

  step(xt: Float64Array, g: Float64Array, eta: number, out: Float64Array): Float64Array {
    const d = this.dimension;
    const w = this.work;
    for (let i = 0; i < d; i++) w[i] = g[i];
    choleskySolve(d, this.factor, 0, w, 0);
    for (let i = 0; i < d; i++) out[i] = xt[i] - eta * w[i];
    return this.center === null ? out : this.project(out, out);
  }

  project(x: Float64Array, out: Float64Array): Float64Array {
    const d = this.dimension;
    const c = this.center;
    if (c === null) {
      if (out !== x) for (let i = 0; i < d; i++) out[i] = x[i];
      return out;
    }
    const w = this.work;
    for (let i = 0; i < d; i++) w[i] = x[i] - c[i];
    const norm = Math.sqrt(Math.max(0, this.quad(w)));
    if (norm > this.radius) {
      const k = this.radius / norm;
      for (let i = 0; i < d; i++) out[i] = c[i] + w[i] * k;
    } else if (out !== x) for (let i = 0; i < d; i++) out[i] = x[i];
    return out;
  }

  contains(x: Float64Array): boolean {
    const d = this.dimension;
    if (x.length !== d) return false;
    for (let i = 0; i < d; i++) if (!Number.isFinite(x[i])) return false;
    const c = this.center;
    if (c === null) return true;
    const w = this.work;
    for (let i = 0; i < d; i++) w[i] = x[i] - c[i];
    return Math.sqrt(Math.max(0, this.quad(w))) <= this.radius * (1 + this.tol);
  }
}
