/**
 * Double integrator in d axes, discretized exactly (zero-order hold): the canonical
 * linear-quadratic problem.
 *
 * @module
 */
import { type Dynamics, RecedeError, requireInteger, requirePositive } from "@recede/core";
import { quadraticCost } from "./costs/quadraticCost.js";
import { parseVector, parseWeight, square, type WeightInput } from "./internal/options.js";
import { fmt, holdTest } from "./internal/success.js";
import type { LinearQuadratic, Problem } from "./problem.js";

/** Options of {@link doubleIntegrator}. */
export interface DoubleIntegratorOptions {
  /**
   * Number of axes d; state (p₁…p_d, v₁…v_d), control (a₁…a_d).
   * @defaultValue 1
   */
  readonly axes?: number;
  /**
   * Sample time Δt (s).
   * @defaultValue 0.1
   */
  readonly dt?: number;
  /**
   * State weight Q (2d×2d): scalar s·I, diagonal, or matrix.
   * @defaultValue 1 (identity)
   */
  readonly q?: WeightInput;
  /**
   * Control weight R (d×d, positive definite).
   * @defaultValue 0.1
   */
  readonly r?: WeightInput;
  /**
   * Terminal weight Qf.
   * @defaultValue Q
   */
  readonly qf?: WeightInput;
  /**
   * Start state (length 2d).
   * @defaultValue every position 1, every velocity 0
   */
  readonly initialState?: ArrayLike<number>;
  /**
   * Bound |a_i| ≤ controlLimit on each acceleration (Infinity for none, which keeps the problem
   * exactly LQ).
   * @defaultValue Infinity
   */
  readonly controlLimit?: number;
  /**
   * Suggested MPC horizon H.
   * @defaultValue 30
   */
  readonly horizon?: number;
  /**
   * Episode length (steps).
   * @defaultValue 100
   */
  readonly episodeLength?: number;
  /**
   * Success: ‖x‖₂ ≤ tolerance …
   * @defaultValue 0.05
   */
  readonly tolerance?: number;
  /**
   * … for the last `holdSteps` states.
   * @defaultValue 10
   */
  readonly holdSteps?: number;
}

/**
 * Double integrator p̈ = u in d axes with exact zero-order-hold discretization (MATH.md §7.3):
 *   p⁺ = p + Δt v + ½Δt² u,  v⁺ = v + Δt u,
 * i.e. A = [[I, Δt I], [0, I]], B = [[½Δt² I], [Δt I]] (state ordered as all positions, then all
 * velocities), and cost Σ xᵀQx + uᵀRu + x_Hᵀ Qf x_H to the origin. The LQ data in
 * {@link Problem.linearQuadratic} is exact (`exact: true`). Source: the standard example of
 * K. J. Åström, B. Wittenmark, "Computer-Controlled Systems", 3rd ed., 1997, §2.3 (ZOH sampling).
 *
 * Success: ‖x‖₂ ≤ `tolerance` for the last `holdSteps` states.
 *
 * @example
 * ```ts
 * const p = doubleIntegrator({ axes: 2, dt: 0.05 });
 * const { a, b, q, r } = p.linearQuadratic!; // exact (A, B, Q, R) for an LQR solver
 * ```
 */
export function doubleIntegrator(options: DoubleIntegratorOptions = {}): Problem {
  const fn = "doubleIntegrator";
  const d = requireInteger(fn, "axes", options.axes ?? 1, 1);
  const dt = requirePositive(fn, "dt", options.dt ?? 0.1);
  const n = 2 * d;
  const q = parseWeight(fn, "q", options.q ?? 1, n, "psd");
  const r = parseWeight(fn, "r", options.r ?? 0.1, d, "pd");
  const qf = parseWeight(fn, "qf", options.qf ?? options.q ?? 1, n, "psd");
  const x0 = parseVector(
    fn,
    "initialState",
    options.initialState,
    n,
    Array.from({ length: n }, (_, i) => (i < d ? 1 : 0)),
  );
  const limit = options.controlLimit ?? Number.POSITIVE_INFINITY;
  if (Number.isNaN(limit) || !(limit > 0)) {
    throw new RecedeError("range", fn, "controlLimit", "> 0 (Infinity for none)", limit);
  }
  const horizon = requireInteger(fn, "horizon", options.horizon ?? 30, 1);
  const episodeLength = requireInteger(fn, "episodeLength", options.episodeLength ?? 100, 1);
  const tol = requirePositive(fn, "tolerance", options.tolerance ?? 0.05);
  const hold = requireInteger(fn, "holdSteps", options.holdSteps ?? 10, 1);

  const a = new Float64Array(n * n);
  const b = new Float64Array(n * d);
  const h2 = 0.5 * dt * dt;
  for (let i = 0; i < d; i++) {
    a[i * n + i] = 1;
    a[i * n + d + i] = dt;
    a[(d + i) * n + d + i] = 1;
    b[i * d + i] = h2;
    b[(d + i) * d + i] = dt;
  }

  const dynamics: Dynamics = {
    stateSize: n,
    controlSize: d,
    step(x, xo, u, uo, count, _t): void {
      for (let k = 0; k < count; k++) {
        const xb = xo + k * n;
        const ub = uo + k * d;
        for (let i = 0; i < d; i++) {
          const acc = u[ub + i];
          const v = x[xb + d + i];
          x[xb + i] += dt * v + h2 * acc;
          x[xb + d + i] = v + dt * acc;
        }
      }
    },
    jacobians(_x, _u, _t, outA, outB): void {
      outA.set(a);
      outB.set(b);
    },
  };

  const cost = quadraticCost({
    stateSize: n,
    controlSize: d,
    q: square(q, n),
    r: square(r, d),
    qf: square(qf, n),
  });
  const lq: LinearQuadratic = {
    stateSize: n,
    controlSize: d,
    a: new Float64Array(a),
    b: new Float64Array(b),
    q: new Float64Array(q),
    r: new Float64Array(r),
    qf: new Float64Array(qf),
    state: new Float64Array(n),
    control: new Float64Array(d),
    continuousA: continuousA(d),
    continuousB: continuousB(d),
    exact: true,
  };
  const names = (p: string) => Array.from({ length: d }, (_, i) => (d === 1 ? p : `${p}${i + 1}`));
  const criterion = `‖x‖₂ ≤ ${tol} for the last ${hold} states`;
  const assess = (states: Float64Array, count?: number) =>
    holdTest(`${fn}.assess`, states, n, count, hold, criterion, (x, o) => {
      let s = 0;
      for (let i = 0; i < n; i++) s += x[o + i] * x[o + i];
      const norm = Math.sqrt(s);
      return norm <= tol ? "" : `‖x‖₂ = ${fmt(norm)} > ${tol}`;
    });
  return {
    name: "double-integrator",
    description: `Double integrator in ${d} axis(es): drive position and velocity to the origin with bounded effort (exact ZOH, linear-quadratic).`,
    source:
      "K. J. Åström, B. Wittenmark, Computer-Controlled Systems: Theory and Design, 3rd ed., 1997 (ZOH sampling of the double integrator)",
    stateSize: n,
    controlSize: d,
    stateNames: [...names("p"), ...names("v")],
    controlNames: names("a"),
    angleIndices: [],
    dt,
    dynamics,
    cost,
    bounds: {
      lower: new Float64Array(d).fill(-limit),
      upper: new Float64Array(d).fill(limit),
    },
    goal: new Float64Array(n),
    goalControl: new Float64Array(d),
    horizon,
    episodeLength,
    linearQuadratic: lq,
    initialState: () => new Float64Array(x0),
    success: (states, count) => assess(states, count).success,
    assess,
  };
}

function continuousA(d: number): Float64Array {
  const n = 2 * d;
  const a = new Float64Array(n * n);
  for (let i = 0; i < d; i++) a[i * n + d + i] = 1;
  return a;
}

function continuousB(d: number): Float64Array {
  const b = new Float64Array(2 * d * d);
  for (let i = 0; i < d; i++) b[(d + i) * d + i] = 1;
  return b;
}
