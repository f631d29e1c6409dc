/**
 * The model contracts shared by MPC, policy gradient and the reference problems: batched dynamics,
 * batched costs and box bounds on the control, all on flat row-major Float64Array buffers.
 *
 * Sizes: n = state size, m = control size. A batch of `count` states lives at
 * `x[xo + k·n + i]` (k < count, i < n); the matching controls at `u[uo + k·m + j]`.
 * Implementations allocate nothing per call and never read or write outside the indexed range,
 * so a worker can process a slice of a shared buffer by passing offsets and a count.
 *
 * @module
 */
import { RecedeError } from "./errors.js";

/** Discrete-time dynamics x_{t+1} = f(x_t, u_t, t), evaluated for a batch in place. */
export interface Dynamics {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /**
   * Advance `count` states in place: for k < count,
   * x[xo+k·n ..] ← f(x[xo+k·n ..], u[uo+k·m ..], t). `t` is the time index within the horizon
   * (0-based) for time-varying models; time-invariant models ignore it.
   * A model may write non-finite values for samples it cannot advance; callers treat them as failed.
   */
  step(x: Float64Array, xo: number, u: Float64Array, uo: number, count: number, t: number): void;
  /**
   * Optional Jacobians at one point: A ← ∂f/∂x (n×n row-major), B ← ∂f/∂u (n×m row-major).
   */
  jacobians?(x: Float64Array, u: Float64Array, t: number, a: Float64Array, b: Float64Array): void;
}

/** Running and terminal costs, accumulated for a batch. */
export interface CostModel {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /**
   * out[oo+k] += c(x_k, u_k, t) for k < count, with x_k at x[xo+k·n ..] and u_k at u[uo+k·m ..]
   * (the state *before* the step at time t, and the control applied at t).
   */
  running(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    t: number,
    out: Float64Array,
    oo: number,
  ): void;
  /** out[oo+k] += c_H(x_k) for k < count (the state after the last step). */
  terminal(x: Float64Array, xo: number, count: number, out: Float64Array, oo: number): void;
}

/** Box bounds lower ≤ u ≤ upper on each control component (±Infinity for none). */
export interface ControlBounds {
  readonly lower: Float64Array;
  readonly upper: Float64Array;
}

/**
 * Validate box bounds on an m-vector and return copies: `lower` and `upper` must be Float64Arrays
 * of length m with no NaN and lower_j ≤ upper_j (±Infinity leaves a side open). Errors name `fn`
 * and `arg` (`arg.lower`, `arg.upper`, or `arg[j]` for a crossed pair). The input is not kept.
 *
 * @example
 * ```ts
 * const b = requireControlBounds("myController", "bounds", {
 *   lower: new Float64Array([-1, 0]),
 *   upper: new Float64Array([1, Infinity]),
 * }, 2);
 * ```
 */
export function requireControlBounds(
  fn: string,
  arg: string,
  bounds: ControlBounds,
  m: number,
): ControlBounds {
  if (typeof bounds !== "object" || bounds === null) {
    throw new RecedeError("type", fn, arg, "an object { lower, upper }", bounds);
  }
  for (const side of ["lower", "upper"] as const) {
    const v = bounds[side];
    if (!(v instanceof Float64Array) || v.length !== m) {
      throw new RecedeError("dimension", fn, `${arg}.${side}`, `a Float64Array of length ${m}`, v);
    }
  }
  const { lower, upper } = bounds;
  for (let j = 0; j < m; j++) {
    if (Number.isNaN(lower[j]) || Number.isNaN(upper[j]) || lower[j] > upper[j]) {
      throw new RecedeError(
        "range",
        fn,
        `${arg}[${j}]`,
        "lower <= upper",
        `[${lower[j]}, ${upper[j]}]`,
      );
    }
  }
  return { lower: lower.slice(), upper: upper.slice() };
}

/** A single-sample dynamics function, for {@link batchDynamics}. */
export interface PointDynamics {
  readonly stateSize: number;
  readonly controlSize: number;
  /** out ← f(x, u, t). `out` never aliases `x`. */
  next(x: Float64Array, u: Float64Array, t: number, out: Float64Array): void;
  jacobians?(x: Float64Array, u: Float64Array, t: number, a: Float64Array, b: Float64Array): void;
}

/**
 * Wrap a per-sample dynamics function into the batched {@link Dynamics} contract.
 *
 * Convenient, at a cost: each sample is copied into and out of small scratch vectors allocated
 * once here (2n + m extra copies and one extra call per sample); a natively batched step avoids it.
 */
export function batchDynamics(point: PointDynamics): Dynamics {
  const n = point.stateSize;
  const m = point.controlSize;
  const xs = new Float64Array(n);
  const us = new Float64Array(m);
  const out = new Float64Array(n);
  const dyn: Dynamics = {
    stateSize: n,
    controlSize: m,
    step(x, xo, u, uo, count, t): void {
      for (let k = 0; k < count; k++) {
        const xb = xo + k * n;
        const ub = uo + k * m;
        for (let i = 0; i < n; i++) xs[i] = x[xb + i];
        for (let j = 0; j < m; j++) us[j] = u[ub + j];
        point.next(xs, us, t, out);
        for (let i = 0; i < n; i++) x[xb + i] = out[i];
      }
    },
  };
  if (point.jacobians) {
    const jac = point.jacobians.bind(point);
    return { ...dyn, step: dyn.step, jacobians: jac };
  }
  return dyn;
}
