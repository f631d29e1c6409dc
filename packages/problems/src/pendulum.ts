/**
 * Torque-limited pendulum swing-up.
 *
 * @module
 */
import { type Dynamics, RecedeError, requireInteger, requirePositive } from "@recede/core";
import { quadraticCost } from "./costs/quadraticCost.js";
import { parseVector, parseWeight, square, type WeightInput } from "./internal/options.js";
import { Rk4Jacobian, type VectorField } from "./internal/rk4.js";
import { fmt, holdTest } from "./internal/success.js";
import { type LinearQuadratic, type Problem, wrapAngle } from "./problem.js";

/** Options of {@link pendulum}. */
export interface PendulumOptions {
  /**
   * Bob mass m (kg).
   * @defaultValue 1
   */
  readonly mass?: number;
  /**
   * Rod length l (m), massless rod.
   * @defaultValue 1
   */
  readonly length?: number;
  /**
   * Viscous damping b (N·m·s).
   * @defaultValue 0.1
   */
  readonly damping?: number;
  /**
   * Gravity g (m/s²).
   * @defaultValue 9.81
   */
  readonly gravity?: number;
  /**
   * Torque bound |u| ≤ torqueLimit (N·m). Below m·g·l the pendulum cannot be lifted directly and
   * must be swung up.
   * @defaultValue 5
   */
  readonly torqueLimit?: number;
  /**
   * Control period Δt (s); one RK4 step per period.
   * @defaultValue 0.05
   */
  readonly dt?: number;
  /**
   * State weight Q on (θ − π wrapped, θ̇).
   * @defaultValue [10, 0.1]
   */
  readonly q?: WeightInput;
  /**
   * Torque weight R.
   * @defaultValue 0.01
   */
  readonly r?: WeightInput;
  /**
   * Terminal weight Qf.
   * @defaultValue [100, 1]
   */
  readonly qf?: WeightInput;
  /**
   * Start state (θ, θ̇).
   * @defaultValue [0, 0] (hanging at rest)
   */
  readonly initialState?: ArrayLike<number>;
  /**
   * Suggested MPC horizon H (steps).
   * @defaultValue 40
   */
  readonly horizon?: number;
  /**
   * Episode length (steps).
   * @defaultValue 200
   */
  readonly episodeLength?: number;
  /**
   * Success: |θ − π| (wrapped) ≤ angleTolerance (rad) …
   * @defaultValue 0.1
   */
  readonly angleTolerance?: number;
  /**
   * … and |θ̇| ≤ rateTolerance (rad/s) …
   * @defaultValue 0.5
   */
  readonly rateTolerance?: number;
  /**
   * … for the last holdSteps states.
   * @defaultValue 40
   */
  readonly holdSteps?: number;
}

/** Physical parameters of a {@link PendulumProblem}. */
export interface PendulumParameters {
  readonly mass: number;
  readonly length: number;
  readonly damping: number;
  readonly gravity: number;
  readonly torqueLimit: number;
}

/** The pendulum problem with its parameters and energy. */
export interface PendulumProblem extends Problem {
  /** The physical parameters in use. */
  readonly parameters: PendulumParameters;
  /** Mechanical energy E = ½ m l² θ̇² − m g l cos θ of the state at x[o..o+1]. */
  energy(x: Float64Array, o?: number): number;
}

/**
 * Torque-limited simple pendulum swing-up, after R. Tedrake, "Underactuated Robotics", chapter
 * "The Simple Pendulum" (online textbook, 2009–2024):
 *   m l² θ̈ + b θ̇ + m g l sin θ = u,  |u| ≤ torqueLimit,
 * with θ = 0 hanging down and θ = π upright. Integrated with one classical RK4 step per Δt.
 * Cost: quadratic in (wrap(θ − π), θ̇) and u. Parameter values m = 1 kg, l = 1 m, b = 0.1 N·m·s,
 * g = 9.81 m/s² are a common convention, not published benchmark constants (MATH.md §7.2); the default
 * torque limit 5 N·m is about half of m g l, so the controller must pump energy.
 *
 * Success: |wrap(θ − π)| ≤ `angleTolerance` and |θ̇| ≤ `rateTolerance` for the last `holdSteps` states.
 *
 * State (θ, θ̇), control (u). Symbols ↔ options: m ↔ `mass`, l ↔ `length`, b ↔ `damping`,
 * g ↔ `gravity`.
 *
 * @example
 * ```ts
 * const p = pendulum({ torqueLimit: 3 });
 * const x = p.initialState(); // hanging at rest
 * p.dynamics.step(x, 0, new Float64Array([3]), 0, 1, 0);
 * p.energy(x); // > −m g l: the push added energy
 * ```
 */
export function pendulum(options: PendulumOptions = {}): PendulumProblem {
  const fn = "pendulum";
  const mass = requirePositive(fn, "mass", options.mass ?? 1);
  const length = requirePositive(fn, "length", options.length ?? 1);
  const damping = options.damping ?? 0.1;
  if (!Number.isFinite(damping) || damping < 0) {
    throw new RecedeError("range", fn, "damping", ">= 0", damping);
  }
  const gravity = requirePositive(fn, "gravity", options.gravity ?? 9.81);
  const torqueLimit = requirePositive(fn, "torqueLimit", options.torqueLimit ?? 5);
  const dt = requirePositive(fn, "dt", options.dt ?? 0.05);
  const q = parseWeight(fn, "q", options.q ?? [10, 0.1], 2, "psd");
  const r = parseWeight(fn, "r", options.r ?? 0.01, 1, "pd");
  const qf = parseWeight(fn, "qf", options.qf ?? [100, 1], 2, "psd");
  const x0 = parseVector(fn, "initialState", options.initialState, 2, [0, 0]);
  const horizon = requireInteger(fn, "horizon", options.horizon ?? 40, 1);
  const episodeLength = requireInteger(fn, "episodeLength", options.episodeLength ?? 200, 1);
  const angTol = requirePositive(fn, "angleTolerance", options.angleTolerance ?? 0.1);
  const rateTol = requirePositive(fn, "rateTolerance", options.rateTolerance ?? 0.5);
  const hold = requireInteger(fn, "holdSteps", options.holdSteps ?? 40, 1);

  const inertia = mass * length * length;
  const cu = 1 / inertia; // θ̈ per unit torque
  const cb = damping / inertia; // θ̈ per unit rate
  const cg = gravity / length; // θ̈ per unit sin θ

  const field: VectorField = {
    n: 2,
    m: 1,
    deriv(x, xo, u, uo, out, oo): void {
      out[oo] = x[xo + 1];
      out[oo + 1] = cu * u[uo] - cb * x[xo + 1] - cg * Math.sin(x[xo]);
    },
    partials(x, xo, _u, _uo, fx, fu): void {
      fx[0] = 0;
      fx[1] = 1;
      fx[2] = -cg * Math.cos(x[xo]);
      fx[3] = -cb;
      fu[0] = 0;
      fu[1] = cu;
    },
  };
  const lin = new Rk4Jacobian(field, dt);
  const h = dt;
  const dynamics: Dynamics = {
    stateSize: 2,
    controlSize: 1,
    step(x, xo, u, uo, count, _t): void {
      for (let k = 0; k < count; k++) {
        const b = xo + 2 * k;
        const th = x[b];
        const w = x[b + 1];
        const tq = cu * u[uo + k];
        // classical RK4 with the state in locals (no scratch, no allocation). Math.sin, not the
        // core trig kernel: for a lone sine per stage the kernel (sin and cos together) measured
        // slower (bench/RESULTS.md §2, "Trig kernel")
        const k1t = w;
        const k1w = tq - cb * w - cg * Math.sin(th);
        const k2t = w + 0.5 * h * k1w;
        const k2w = tq - cb * k2t - cg * Math.sin(th + 0.5 * h * k1t);
        const k3t = w + 0.5 * h * k2w;
        const k3w = tq - cb * k3t - cg * Math.sin(th + 0.5 * h * k2t);
        const k4t = w + h * k3w;
        const k4w = tq - cb * k4t - cg * Math.sin(th + h * k3t);
        x[b] = th + (h / 6) * (k1t + 2 * k2t + 2 * k3t + k4t);
        x[b + 1] = w + (h / 6) * (k1w + 2 * k2w + 2 * k3w + k4w);
      }
    },
    jacobians(x, u, _t, a, b): void {
      lin.jacobians(x, u, a, b);
    },
  };

  const goal = new Float64Array([Math.PI, 0]);
  const cost = quadraticCost({
    stateSize: 2,
    controlSize: 1,
    q: square(q, 2),
    r: square(r, 1),
    qf: square(qf, 2),
    reference: goal,
    angleIndices: [0],
  });
  const a = new Float64Array(4);
  const b = new Float64Array(2);
  dynamics.jacobians?.(goal, new Float64Array(1), 0, a, b);
  const lq: LinearQuadratic = {
    stateSize: 2,
    controlSize: 1,
    a,
    b,
    q: new Float64Array(q),
    r: new Float64Array(r),
    qf: new Float64Array(qf),
    state: new Float64Array(goal),
    control: new Float64Array(1),
    continuousA: new Float64Array([0, 1, cg, -cb]),
    continuousB: new Float64Array([0, cu]),
    exact: false,
  };
  const criterion = `|θ−π| ≤ ${angTol} rad and |θ̇| ≤ ${rateTol} rad/s for the last ${hold} states`;
  const assess = (states: Float64Array, count?: number) =>
    holdTest(`${fn}.assess`, states, 2, count, hold, criterion, (x, o) => {
      const e = Math.abs(wrapAngle(x[o] - Math.PI));
      if (!(e <= angTol)) return `|θ−π| = ${fmt(e)} rad > ${angTol}`;
      const w = Math.abs(x[o + 1]);
      if (!(w <= rateTol)) return `|θ̇| = ${fmt(w)} rad/s > ${rateTol}`;
      return "";
    });
  return {
    name: "pendulum",
    description:
      "Torque-limited simple pendulum: swing up from hanging (θ = 0) to upright (θ = π) and balance there.",
    source:
      'R. Tedrake, Underactuated Robotics, chapter "The Simple Pendulum", online textbook, 2009–2024',
    stateSize: 2,
    controlSize: 1,
    stateNames: ["θ", "θ̇"],
    controlNames: ["u"],
    angleIndices: [0],
    dt,
    dynamics,
    cost,
    bounds: {
      lower: new Float64Array([-torqueLimit]),
      upper: new Float64Array([torqueLimit]),
    },
    goal,
    goalControl: new Float64Array(1),
    horizon,
    episodeLength,
    linearQuadratic: lq,
    parameters: { mass, length, damping, gravity, torqueLimit },
    initialState: () => new Float64Array(x0),
    success: (states, count) => assess(states, count).success,
    assess,
    energy(x, o = 0): number {
      const w = x[o + 1];
      return 0.5 * inertia * w * w - mass * gravity * length * Math.cos(x[o]);
    },
  };
}
