/**
 * Planar quadrotor with two rotor thrusts, with an optional external disturbance.
 *
 * @module
 */
import { type Dynamics, kernels, RecedeError, requireInteger, requirePositive } from "@recede/core";
import { quadraticCost } from "./costs/quadraticCost.js";
import { parseVector, parseWeight, square, type WeightInput } from "./internal/options.js";
import { Rk4Jacobian, type VectorField } from "./internal/rk4.js";
import { fmt, holdTest } from "./internal/success.js";
import { type LinearQuadratic, type Problem, wrapAngle } from "./problem.js";

/**
 * The core trig kernel (in-place form: no double crosses the call, so nothing is allocated even
 * where V8 does not inline it), bound once, and its scratch: sc[0] = θ in, (sin θ, cos θ) out.
 */
const sinCosInPlace = kernels.sinCosInPlace;
const sc = new Float64Array(2);

/**
 * External disturbance acting on a planar quadrotor (gusts, payload swing, ground effect …).
 * Write into `out[0]` the horizontal force F_x (N), `out[1]` the vertical force F_y (N) and `out[2]`
 * the torque τ (N·m) at time `time` (s) and state x[xo .. xo+5]. `out` arrives zeroed. Called once
 * per sample per step; the values are held constant over the step.
 */
export type QuadrotorDisturbance = (
  time: number,
  x: Float64Array,
  xo: number,
  out: Float64Array,
) => void;

/** Options of {@link planarQuadrotor}. */
export interface PlanarQuadrotorOptions {
  /**
   * Mass m (kg).
   * @defaultValue 1.0
   */
  readonly mass?: number;
  /**
   * Arm length r (m): distance from the centre to each rotor.
   * @defaultValue 0.2
   */
  readonly armLength?: number;
  /**
   * Moment of inertia I about the body axis (kg·m²). The default is two 0.25 kg motor-rotor
   * point masses at r = 0.2 m: 2·0.25·0.2² = 0.02.
   * @defaultValue 0.02
   */
  readonly inertia?: number;
  /**
   * Gravity g (m/s²).
   * @defaultValue 9.81
   */
  readonly gravity?: number;
  /**
   * Linear aerodynamic drag coefficient c_d (N·s/m) on the translational velocity.
   * @defaultValue 0
   */
  readonly drag?: number;
  /**
   * Maximum thrust of each rotor u_max (N); must exceed m·g/2 so the vehicle can hover.
   * @defaultValue m·g (a thrust-to-weight ratio of 2, common practice for small multirotors)
   */
  readonly maxThrust?: number;
  /**
   * Control period Δt (s); one RK4 step per period.
   * @defaultValue 0.02
   */
  readonly dt?: number;
  /**
   * Target hover position (x*, y*) (m).
   * @defaultValue [0, 1]
   */
  readonly target?: ArrayLike<number>;
  /**
   * Start state (x, y, θ, ẋ, ẏ, θ̇).
   * @defaultValue [-1.5, 2, 0, 0, 0, 0]
   */
  readonly initialState?: ArrayLike<number>;
  /**
   * State weight Q on (x − x*, y − y*, θ, ẋ, ẏ, θ̇).
   * @defaultValue [10, 10, 1, 1, 1, 0.1]
   */
  readonly q?: WeightInput;
  /**
   * Thrust weight R on u − (mg/2)·1.
   * @defaultValue 0.1
   */
  readonly r?: WeightInput;
  /**
   * Terminal weight Qf.
   * @defaultValue [100, 100, 10, 10, 10, 1]
   */
  readonly qf?: WeightInput;
  /**
   * External force/torque on the vehicle (for a plant that differs from the controller's model).
   * @defaultValue none
   */
  readonly disturbance?: QuadrotorDisturbance;
  /**
   * Suggested MPC horizon H (steps).
   * @defaultValue 50
   */
  readonly horizon?: number;
  /**
   * Episode length (steps).
   * @defaultValue 250
   */
  readonly episodeLength?: number;
  /**
   * Success: position error ‖(x, y) − (x*, y*)‖ ≤ positionTolerance (m) …
   * @defaultValue 0.1
   */
  readonly positionTolerance?: number;
  /**
   * … speed ‖(ẋ, ẏ)‖ ≤ speedTolerance (m/s) …
   * @defaultValue 0.2
   */
  readonly speedTolerance?: number;
  /**
   * … |θ| ≤ angleTolerance (rad) …
   * @defaultValue 0.1
   */
  readonly angleTolerance?: number;
  /**
   * … for the last holdSteps states.
   * @defaultValue 25
   */
  readonly holdSteps?: number;
}

/** Physical parameters of a {@link PlanarQuadrotorProblem}. */
export interface PlanarQuadrotorParameters {
  readonly mass: number;
  readonly armLength: number;
  readonly inertia: number;
  readonly gravity: number;
  readonly drag: number;
  readonly maxThrust: number;
  /** Thrust per rotor at hover, m·g/2. */
  readonly hoverThrust: number;
}

/** The planar quadrotor problem with its parameters. */
export interface PlanarQuadrotorProblem extends Problem {
  /** The physical parameters in use. */
  readonly parameters: PlanarQuadrotorParameters;
  /** Whether this instance's dynamics include a disturbance (a plant), or not (a model). */
  readonly disturbed: boolean;
}

/**
 * Planar quadrotor (vertical plane, two rotors), after R. Tedrake, "Underactuated Robotics",
 * chapter "Acrobots, Cart-Poles, and Quadrotors" (online textbook, 2009–2024), MATH.md §7.4:
 *   m ẍ = −(u₁ + u₂) sin θ − c_d ẋ + F_x,   m ÿ = (u₁ + u₂) cos θ − m g − c_d ẏ + F_y,
 *   I θ̈ = r (u₁ − u₂) + τ,
 * with 0 ≤ u_i ≤ u_max, θ the roll angle (positive tilts thrust towards −x) and (F_x, F_y, τ) an
 * optional external disturbance ({@link QuadrotorDisturbance}, default none) held constant over
 * each step. One classical RK4 step per Δt; sin θ and cos θ come from the core trig kernel
 * (`kernels.sinCosInPlace` of @recede/core: deterministic, the same bits on every JavaScript
 * engine, within 1–2 ulp of `Math`). Parameter values are ours (no textbook values were
 * confirmed): m = 1 kg, r = 0.2 m, I = 0.02 kg·m², u_max = m g; the linear drag c_d (default 0,
 * as in the textbook model) is an addition of ours.
 *
 * Cost: quadratic in the error to hovering at the target (angle wrapped) and in u − (mg/2)·1.
 * Jacobians are those of the undisturbed model. Hover (u₁ = u₂ = mg/2) at the target is an
 * equilibrium; its linearization is ẍ ≈ −gθ, ÿ ≈ (δu₁ + δu₂)/m, θ̈ = r(δu₁ − δu₂)/I.
 *
 * Success: position error ≤ `positionTolerance`, speed ≤ `speedTolerance` and |θ| ≤
 * `angleTolerance` for the last `holdSteps` states.
 *
 * State (x, y, θ, ẋ, ẏ, θ̇), control (u₁, u₂).
 *
 * @example
 * ```ts
 * const model = planarQuadrotor();
 * // the plant: same vehicle, plus a 2 N side gust after t = 1 s that the model does not know
 * const plant = planarQuadrotor({ disturbance: (t, _x, _o, out) => { out[0] = t > 1 ? 2 : 0; } });
 * ```
 */
export function planarQuadrotor(options: PlanarQuadrotorOptions = {}): PlanarQuadrotorProblem {
  const fn = "planarQuadrotor";
  const mass = requirePositive(fn, "mass", options.mass ?? 1.0);
  const arm = requirePositive(fn, "armLength", options.armLength ?? 0.2);
  const inertia = requirePositive(fn, "inertia", options.inertia ?? 0.02);
  const g = requirePositive(fn, "gravity", options.gravity ?? 9.81);
  const drag = options.drag ?? 0;
  if (!Number.isFinite(drag) || drag < 0) throw new RecedeError("range", fn, "drag", ">= 0", drag);
  const hover = (mass * g) / 2;
  const umax = requirePositive(fn, "maxThrust", options.maxThrust ?? mass * g);
  if (!(umax > hover)) {
    throw new RecedeError("range", fn, "maxThrust", `> m·g/2 = ${hover}`, umax);
  }
  const dt = requirePositive(fn, "dt", options.dt ?? 0.02);
  const target = parseVector(fn, "target", options.target, 2, [0, 1]);
  const x0 = parseVector(fn, "initialState", options.initialState, 6, [-1.5, 2, 0, 0, 0, 0]);
  const q = parseWeight(fn, "q", options.q ?? [10, 10, 1, 1, 1, 0.1], 6, "psd");
  const r = parseWeight(fn, "r", options.r ?? 0.1, 2, "pd");
  const qf = parseWeight(fn, "qf", options.qf ?? [100, 100, 10, 10, 10, 1], 6, "psd");
  const disturbance = options.disturbance;
  if (disturbance !== undefined && typeof disturbance !== "function") {
    throw new RecedeError("type", fn, "disturbance", "a function", disturbance);
  }
  const horizon = requireInteger(fn, "horizon", options.horizon ?? 50, 1);
  const episodeLength = requireInteger(fn, "episodeLength", options.episodeLength ?? 250, 1);
  const posTol = requirePositive(fn, "positionTolerance", options.positionTolerance ?? 0.1);
  const speedTol = requirePositive(fn, "speedTolerance", options.speedTolerance ?? 0.2);
  const angTol = requirePositive(fn, "angleTolerance", options.angleTolerance ?? 0.1);
  const hold = requireInteger(fn, "holdSteps", options.holdSteps ?? 25, 1);

  const invM = 1 / mass;
  const cd = drag / mass;
  const rOverI = arm / inertia;
  const field: VectorField = {
    n: 6,
    m: 2,
    deriv(x, xo, u, uo, out, oo): void {
      const T = u[uo] + u[uo + 1];
      sc[0] = x[xo + 2];
      sinCosInPlace(sc, 0);
      out[oo] = x[xo + 3];
      out[oo + 1] = x[xo + 4];
      out[oo + 2] = x[xo + 5];
      out[oo + 3] = -T * sc[0] * invM - cd * x[xo + 3];
      out[oo + 4] = T * sc[1] * invM - g - cd * x[xo + 4];
      out[oo + 5] = rOverI * (u[uo] - u[uo + 1]);
    },
    partials(x, xo, u, uo, fx, fu): void {
      const T = u[uo] + u[uo + 1];
      const s = Math.sin(x[xo + 2]);
      const c = Math.cos(x[xo + 2]);
      fx.fill(0);
      fx[0 * 6 + 3] = 1;
      fx[1 * 6 + 4] = 1;
      fx[2 * 6 + 5] = 1;
      fx[3 * 6 + 2] = -T * c * invM;
      fx[4 * 6 + 2] = -T * s * invM;
      fx[3 * 6 + 3] = -cd;
      fx[4 * 6 + 4] = -cd;
      fu.fill(0);
      fu[3 * 2] = -s * invM;
      fu[3 * 2 + 1] = -s * invM;
      fu[4 * 2] = c * invM;
      fu[4 * 2 + 1] = c * invM;
      fu[5 * 2] = rOverI;
      fu[5 * 2 + 1] = -rOverI;
    },
  };
  const lin = new Rk4Jacobian(field, dt);
  const h = dt;
  const dist = new Float64Array(3);
  const dynamics: Dynamics = {
    stateSize: 6,
    controlSize: 2,
    step(x, xo, u, uo, count, t): void {
      for (let k = 0; k < count; k++) {
        const b = xo + 6 * k;
        const u1 = u[uo + 2 * k];
        const u2 = u[uo + 2 * k + 1];
        let ax = 0;
        let ay = -g;
        let aw = rOverI * (u1 - u2);
        if (disturbance !== undefined) {
          dist[0] = 0;
          dist[1] = 0;
          dist[2] = 0;
          disturbance(t * dt, x, b, dist);
          ax += dist[0] * invM;
          ay += dist[1] * invM;
          aw += dist[2] / inertia;
        }
        const Tm = (u1 + u2) * invM;
        const px = x[b];
        const py = x[b + 1];
        const th = x[b + 2];
        const vx = x[b + 3];
        const vy = x[b + 4];
        const w = x[b + 5];
        // RK4: only θ enters the accelerations nonlinearly; θ̈ is constant over the step; sin
        // and cos of each stage angle from one call of the core trig kernel
        const k1x = vx;
        const k1y = vy;
        const k1t = w;
        sc[0] = th;
        sinCosInPlace(sc, 0);
        const k1vx = ax - Tm * sc[0] - cd * vx;
        const k1vy = ay + Tm * sc[1] - cd * vy;
        const k2x = vx + 0.5 * h * k1vx;
        const k2y = vy + 0.5 * h * k1vy;
        const k2t = w + 0.5 * h * aw;
        const th2 = th + 0.5 * h * k1t;
        sc[0] = th2;
        sinCosInPlace(sc, 0);
        const k2vx = ax - Tm * sc[0] - cd * k2x;
        const k2vy = ay + Tm * sc[1] - cd * k2y;
        const k3x = vx + 0.5 * h * k2vx;
        const k3y = vy + 0.5 * h * k2vy;
        const k3t = k2t;
        const th3 = th + 0.5 * h * k2t;
        sc[0] = th3;
        sinCosInPlace(sc, 0);
        const k3vx = ax - Tm * sc[0] - cd * k3x;
        const k3vy = ay + Tm * sc[1] - cd * k3y;
        const k4x = vx + h * k3vx;
        const k4y = vy + h * k3vy;
        const k4t = w + h * aw;
        const th4 = th + h * k3t;
        sc[0] = th4;
        sinCosInPlace(sc, 0);
        const k4vx = ax - Tm * sc[0] - cd * k4x;
        const k4vy = ay + Tm * sc[1] - cd * k4y;
        const c = h / 6;
        x[b] = px + c * (k1x + 2 * k2x + 2 * k3x + k4x);
        x[b + 1] = py + c * (k1y + 2 * k2y + 2 * k3y + k4y);
        x[b + 2] = th + c * (k1t + 2 * k2t + 2 * k3t + k4t);
        x[b + 3] = vx + c * (k1vx + 2 * k2vx + 2 * k3vx + k4vx);
        x[b + 4] = vy + c * (k1vy + 2 * k2vy + 2 * k3vy + k4vy);
        x[b + 5] = w + h * aw;
      }
    },
    jacobians(x, u, _t, a, b): void {
      lin.jacobians(x, u, a, b);
    },
  };

  const goal = new Float64Array([target[0], target[1], 0, 0, 0, 0]);
  const goalControl = new Float64Array([hover, hover]);
  const cost = quadraticCost({
    stateSize: 6,
    controlSize: 2,
    q: square(q, 6),
    r: square(r, 2),
    qf: square(qf, 6),
    reference: goal,
    controlReference: goalControl,
    angleIndices: [2],
  });
  const a = new Float64Array(36);
  const bm = new Float64Array(12);
  lin.jacobians(goal, goalControl, a, bm);
  const ca = new Float64Array(36);
  const cb = new Float64Array(12);
  field.partials(goal, 0, goalControl, 0, ca, cb);
  const lq: LinearQuadratic = {
    stateSize: 6,
    controlSize: 2,
    a,
    b: bm,
    q: new Float64Array(q),
    r: new Float64Array(r),
    qf: new Float64Array(qf),
    state: new Float64Array(goal),
    control: new Float64Array(goalControl),
    continuousA: ca,
    continuousB: cb,
    exact: false,
  };
  const criterion = `‖(x, y) − target‖ ≤ ${posTol} m, ‖(ẋ, ẏ)‖ ≤ ${speedTol} m/s and |θ| ≤ ${angTol} rad for the last ${hold} states`;
  const assess = (states: Float64Array, count?: number) =>
    holdTest(`${fn}.assess`, states, 6, count, hold, criterion, (x, o) => {
      const e = Math.hypot(x[o] - target[0], x[o + 1] - target[1]);
      if (!(e <= posTol)) return `position error ${fmt(e)} m > ${posTol}`;
      const v = Math.hypot(x[o + 3], x[o + 4]);
      if (!(v <= speedTol)) return `speed ${fmt(v)} m/s > ${speedTol}`;
      const th = Math.abs(wrapAngle(x[o + 2]));
      if (!(th <= angTol)) return `|θ| = ${fmt(th)} rad > ${angTol}`;
      return "";
    });
  return {
    name: "planar-quadrotor",
    description:
      "Planar quadrotor with two thrust-limited rotors: fly to a hover point and hold it, optionally against an external disturbance the model does not know.",
    source:
      'R. Tedrake, Underactuated Robotics, chapter "Acrobots, Cart-Poles, and Quadrotors", online textbook, 2009–2024',
    stateSize: 6,
    controlSize: 2,
    stateNames: ["x", "y", "θ", "ẋ", "ẏ", "θ̇"],
    controlNames: ["u₁", "u₂"],
    angleIndices: [2],
    dt,
    dynamics,
    cost,
    bounds: { lower: new Float64Array(2), upper: new Float64Array([umax, umax]) },
    goal,
    goalControl,
    horizon,
    episodeLength,
    linearQuadratic: lq,
    parameters: {
      mass,
      armLength: arm,
      inertia,
      gravity: g,
      drag,
      maxThrust: umax,
      hoverThrust: hover,
    },
    disturbed: disturbance !== undefined,
    initialState: () => new Float64Array(x0),
    success: (states, count) => assess(states, count).success,
    assess,
  };
}
