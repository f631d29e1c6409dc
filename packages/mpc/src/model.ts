/**
 * Model helpers on top of the batched contracts of `@recede/core` ({@link Dynamics},
 * {@link CostModel}): a linear time-invariant model with its Jacobians, and a linear-quadratic cost
 * with an optional cross term that exposes its matrices. Both allocate nothing per call.
 *
 * @module
 */
import type { CostModel, Dynamics } from "@recede/core";
import { RecedeError, requireInteger } from "@recede/core";
import { type MatrixLike, matrix, requireObject, shapeOf } from "./internal/input.js";

/** Options of {@link linearDynamics}. */
export interface LinearDynamicsOptions {
  /** State matrix A (n×n): a matrix input or a row-major Float64Array. */
  readonly a: MatrixLike;
  /** Input matrix B (n×m). */
  readonly b: MatrixLike;
  /** State size n (needed when `a` is a flat Float64Array). @defaultValue inferred from `a` */
  readonly stateSize?: number;
  /** Control size m (needed when `b` is a flat Float64Array). @defaultValue inferred from `b` */
  readonly controlSize?: number;
}

/** A linear model x_{t+1} = A x_t + B u_t that exposes A and B. */
export interface LinearDynamics extends Dynamics {
  /** A, row-major n×n (a private copy; do not write). */
  readonly a: Float64Array;
  /** B, row-major n×m (a private copy; do not write). */
  readonly b: Float64Array;
  jacobians(x: Float64Array, u: Float64Array, t: number, a: Float64Array, b: Float64Array): void;
}

function inferShape(
  v: MatrixLike,
  given: number | undefined,
  fn: string,
  arg: string,
  axis: 0 | 1,
): number {
  if (given !== undefined) return requireInteger(fn, arg, given, 1);
  if (v instanceof Float64Array) {
    throw new RecedeError(
      "dimension",
      fn,
      arg,
      "given when the matrix is a flat Float64Array",
      given,
    );
  }
  return shapeOf(v)[axis];
}

/**
 * Linear time-invariant dynamics x_{t+1} = A x_t + B u_t, batched.
 *
 * Symbols ↔ options: A ↔ `a`, B ↔ `b`. Jacobians are constant: ∂f/∂x = A, ∂f/∂u = B.
 * Source: the standard discrete-time state-space model (B. D. O. Anderson, J. B. Moore, "Optimal
 * Control: Linear Quadratic Methods", Prentice Hall, 1990, ch. 2).
 *
 * @example
 * ```ts
 * const dt = 0.1;
 * const model = linearDynamics({ a: [[1, dt], [0, 1]], b: [[dt * dt / 2], [dt]] });
 * ```
 */
export function linearDynamics(options: LinearDynamicsOptions): LinearDynamics {
  const fn = "linearDynamics";
  requireObject(fn, "options", options);
  const n = inferShape(options.a, options.stateSize, fn, "stateSize", 0);
  const m = inferShape(options.b, options.controlSize, fn, "controlSize", 1);
  if (n < 1) throw new RecedeError("dimension", fn, "a", "at least 1×1", n);
  if (m < 1) throw new RecedeError("dimension", fn, "b", "at least one column", m);
  const a = matrix(fn, "a", options.a, n, n);
  const b = matrix(fn, "b", options.b, n, m);
  return new LinearDynamicsImpl(n, m, a, b);
}

class LinearDynamicsImpl implements LinearDynamics {
  private readonly scratch: Float64Array;
  constructor(
    readonly stateSize: number,
    readonly controlSize: number,
    readonly a: Float64Array,
    readonly b: Float64Array,
  ) {
    this.scratch = new Float64Array(stateSize);
  }

  step(x: Float64Array, xo: number, u: Float64Array, uo: number, count: number, _t: number): void {
    const n = this.stateSize;
    const m = this.controlSize;
    const a = this.a;
    const b = this.b;
    const s = this.scratch;
    for (let k = 0; k < count; k++) {
      const xb = xo + k * n;
      const ub = uo + k * m;
      for (let i = 0; i < n; i++) {
        let v = 0;
        const ra = i * n;
        for (let j = 0; j < n; j++) v += a[ra + j] * x[xb + j];
        const rb = i * m;
        for (let j = 0; j < m; j++) v += b[rb + j] * u[ub + j];
        s[i] = v;
      }
      for (let i = 0; i < n; i++) x[xb + i] = s[i];
    }
  }

  jacobians(
    _x: Float64Array,
    _u: Float64Array,
    _t: number,
    a: Float64Array,
    b: Float64Array,
  ): void {
    a.set(this.a);
    b.set(this.b);
  }
}

/** Options of {@link linearQuadraticCost}. */
export interface LinearQuadraticCostOptions {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** Running state weight Q (n×n, symmetric positive semidefinite). */
  readonly q: MatrixLike;
  /** Running control weight R (m×m, symmetric positive definite). */
  readonly r: MatrixLike;
  /** Cross weight S (n×m). @defaultValue zero */
  readonly s?: MatrixLike;
  /** Terminal weight Qf (n×n). @defaultValue Q */
  readonly qf?: MatrixLike;
}

/** A linear-quadratic cost that exposes its matrices (for LQR and the Newton step). */
export interface LinearQuadraticCost extends CostModel {
  /** Q, row-major n×n (do not write). */
  readonly q: Float64Array;
  /** R, row-major m×m (do not write). */
  readonly r: Float64Array;
  /** S, row-major n×m (do not write). */
  readonly s: Float64Array;
  /** Qf, row-major n×n (do not write). */
  readonly qf: Float64Array;
}

/**
 * Linear-quadratic cost with cross term, batched:
 *   c(x, u) = xᵀQx + 2xᵀSu + uᵀRu,   c_H(x) = xᵀQf x
 * (no factor ½: the convention of MATH.md §4.1, shared with the Riccati solvers).
 *
 * Symbols ↔ options: Q ↔ `q`, R ↔ `r`, S ↔ `s`, Qf ↔ `qf`. Symmetry and definiteness are the
 * caller's responsibility here (the Riccati solvers check them). Source: B. D. O. Anderson,
 * J. B. Moore, "Optimal Control: Linear Quadratic Methods", Prentice Hall, 1990 (cost with cross term).
 */
export function linearQuadraticCost(options: LinearQuadraticCostOptions): LinearQuadraticCost {
  const fn = "linearQuadraticCost";
  requireObject(fn, "options", options);
  const n = requireInteger(fn, "stateSize", options.stateSize, 1);
  const m = requireInteger(fn, "controlSize", options.controlSize, 1);
  const q = matrix(fn, "q", options.q, n, n);
  const r = matrix(fn, "r", options.r, m, m);
  const s = options.s === undefined ? new Float64Array(n * m) : matrix(fn, "s", options.s, n, m);
  const qf = options.qf === undefined ? new Float64Array(q) : matrix(fn, "qf", options.qf, n, n);
  return new LinearQuadraticCostImpl(n, m, q, r, s, qf);
}

class LinearQuadraticCostImpl implements LinearQuadraticCost {
  constructor(
    readonly stateSize: number,
    readonly controlSize: number,
    readonly q: Float64Array,
    readonly r: Float64Array,
    readonly s: Float64Array,
    readonly qf: Float64Array,
  ) {}

  running(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    _t: number,
    out: Float64Array,
    oo: number,
  ): void {
    const n = this.stateSize;
    const m = this.controlSize;
    const q = this.q;
    const r = this.r;
    const s = this.s;
    for (let k = 0; k < count; k++) {
      const xb = xo + k * n;
      const ub = uo + k * m;
      let c = 0;
      for (let i = 0; i < n; i++) {
        const xi = x[xb + i];
        let qi = 0;
        for (let j = 0; j < n; j++) qi += q[i * n + j] * x[xb + j];
        let si = 0;
        for (let j = 0; j < m; j++) si += s[i * m + j] * u[ub + j];
        c += xi * (qi + 2 * si);
      }
      for (let i = 0; i < m; i++) {
        let ri = 0;
        for (let j = 0; j < m; j++) ri += r[i * m + j] * u[ub + j];
        c += u[ub + i] * ri;
      }
      out[oo + k] += c;
    }
  }

  terminal(x: Float64Array, xo: number, count: number, out: Float64Array, oo: number): void {
    const n = this.stateSize;
    const qf = this.qf;
    for (let k = 0; k < count; k++) {
      const xb = xo + k * n;
      let c = 0;
      for (let i = 0; i < n; i++) {
        let v = 0;
        for (let j = 0; j < n; j++) v += qf[i * n + j] * x[xb + j];
        c += x[xb + i] * v;
      }
      out[oo + k] += c;
    }
  }
}
