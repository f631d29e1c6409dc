/**
 * Kinematic bicycle mobile robot: reach a goal position, optionally around circular obstacles.
 *
 * @module
 */
import { type Dynamics, kernels, RecedeError, requireInteger, requirePositive } from "@recede/core";
import { type CircleObstacle, circleObstacles } from "./costs/circleObstacles.js";
import { quadraticCost } from "./costs/quadraticCost.js";
import { stateLimitPenalty } from "./costs/stateLimitPenalty.js";
import { sumCosts } from "./costs/sumCosts.js";
import { parseVector, parseWeight, square, type WeightInput } from "./internal/options.js";
import { Rk4Jacobian, type VectorField } from "./internal/rk4.js";
import { fmt, holdTest } from "./internal/success.js";
import type { Problem } from "./problem.js";

/**
 * The core trig kernel (in-place form: no double crosses the call, so nothing is allocated even
 * where V8 does not inline it), bound once, and its scratch: sc[0] = θ in, (sin θ, cos θ) out.
 */
const sinCosInPlace = kernels.sinCosInPlace;
const sc = new Float64Array(2);

/** Options of {@link bicycle}. */
export interface BicycleOptions {
  /**
   * Distance l_f from the reference point (centre of mass) to the front axle (m).
   * @defaultValue 0.3
   */
  readonly frontLength?: number;
  /**
   * Distance l_r from the reference point to the rear axle (m); 0 puts the reference point on the
   * rear axle.
   * @defaultValue 0.3
   */
  readonly rearLength?: number;
  /**
   * Steering bound |δ| ≤ maxSteering (rad).
   * @defaultValue 0.6
   */
  readonly maxSteering?: number;
  /**
   * Acceleration bound |a| ≤ maxAcceleration (m/s²).
   * @defaultValue 1.5
   */
  readonly maxAcceleration?: number;
  /**
   * Speed limits minSpeed ≤ v ≤ maxSpeed (m/s), soft (a penalty in the cost).
   * @defaultValue 1.5
   */
  readonly maxSpeed?: number;
  /**
   * @defaultValue -0.5 (slow reversing allowed)
   */
  readonly minSpeed?: number;
  /**
   * Weight of the squared speed-limit violation.
   * @defaultValue 100
   */
  readonly speedWeight?: number;
  /**
   * Control period Δt (s); one RK4 step per period.
   * @defaultValue 0.1
   */
  readonly dt?: number;
  /**
   * Goal position (x_g, y_g) (m).
   * @defaultValue [4, 3]
   */
  readonly goal?: ArrayLike<number>;
  /**
   * Goal heading ψ_g (rad); only matters when Q weights the heading.
   * @defaultValue 0
   */
  readonly goalHeading?: number;
  /**
   * Start state (x, y, ψ, v).
   * @defaultValue [0, 0, 0, 0]
   */
  readonly initialState?: ArrayLike<number>;
  /**
   * State weight Q on (x − x_g, y − y_g, wrap(ψ − ψ_g), v).
   * @defaultValue [1, 1, 0, 0.1]
   */
  readonly q?: WeightInput;
  /**
   * Control weight R on (a, δ).
   * @defaultValue [0.1, 0.1]
   */
  readonly r?: WeightInput;
  /**
   * Terminal weight Qf.
   * @defaultValue [10, 10, 0, 1]
   */
  readonly qf?: WeightInput;
  /**
   * Circular obstacles (inflate radii by the robot's own radius).
   * @defaultValue []
   */
  readonly obstacles?: readonly CircleObstacle[];
  /**
   * Obstacle clearance, weight and collision cost (see {@link circleObstacles}).
   * @defaultValue 0.2
   */
  readonly obstacleClearance?: number;
  /**
   * @defaultValue 100
   */
  readonly obstacleWeight?: number;
  /**
   * @defaultValue 1000
   */
  readonly collisionCost?: number;
  /**
   * Suggested MPC horizon H (steps).
   * @defaultValue 30
   */
  readonly horizon?: number;
  /**
   * Episode length (steps).
   * @defaultValue 150
   */
  readonly episodeLength?: number;
  /**
   * Success: distance to the goal ≤ positionTolerance (m) …
   * @defaultValue 0.15
   */
  readonly positionTolerance?: number;
  /**
   * … |v| ≤ speedTolerance (m/s) for the last holdSteps states, and no state of the whole
   * trajectory inside an obstacle.
   * @defaultValue 0.1
   */
  readonly speedTolerance?: number;
  /**
   * @defaultValue 10
   */
  readonly holdSteps?: number;
}

/** Parameters of a {@link BicycleProblem}. */
export interface BicycleParameters {
  readonly frontLength: number;
  readonly rearLength: number;
  /** Wheelbase L = l_f + l_r. */
  readonly wheelbase: number;
  readonly maxSteering: number;
  readonly maxAcceleration: number;
  readonly minSpeed: number;
  readonly maxSpeed: number;
}

/** The kinematic bicycle problem with its parameters and obstacles. */
export interface BicycleProblem extends Problem {
  /** The parameters in use. */
  readonly parameters: BicycleParameters;
  /** The obstacles in use (copies). */
  readonly obstacles: readonly CircleObstacle[];
}

/**
 * Kinematic bicycle model of a car-like mobile robot (R. Rajamani, "Vehicle Dynamics and Control",
 * Springer, 2006, §2.2; J. Kong, M. Pfeiffer, G. Schildbach, F. Borrelli, "Kinematic and Dynamic
 * Vehicle Models for Autonomous Driving Control Design", IEEE Intelligent Vehicles Symposium, 2015):
 *   ẋ = v cos(ψ + β),  ẏ = v sin(ψ + β),  ψ̇ = v cos β tan δ / (l_f + l_r),  v̇ = a,
 *   β = atan(l_r tan δ / (l_f + l_r)),
 * where (x, y) is the reference point at distance l_r ahead of the rear axle, ψ the heading, v the
 * speed, a the acceleration and δ the front steering angle. (v cos β tan δ / L equals the
 * v sin β / l_r of the sources, and stays defined for l_r = 0.) Under constant steering the rear
 * axle turns on a circle of radius L / tan δ. One classical RK4 step per Δt. The model evaluates
 * sin ψ and cos ψ with the core trig kernel (`kernels.sinCosInPlace` of @recede/core:
 * deterministic, the same bits on every JavaScript engine, within 1–2 ulp of `Math`), and β
 * through cos β = 1/√(1 + tan²β), sin β = tan β cos β and the angle-addition formulas for
 * cos(ψ + β), sin(ψ + β) (exact identities; no `atan`): the step is about 1.7× faster than with
 * `Math` (bench/RESULTS.md §2, "Trig kernel").
 *
 * Cost: quadratic to the goal, effort on (a, δ), soft speed limits, and circular obstacles.
 * `linearQuadratic` is null: at rest (v = 0) steering has no first-order effect, so the goal is
 * not a controllable linearization point.
 * Success: within `positionTolerance` of the goal at speed ≤ `speedTolerance` for the last
 * `holdSteps` states, and never inside an obstacle.
 *
 * State (x, y, ψ, v), control (a, δ).
 *
 * @example
 * ```ts
 * const p = bicycle({ goal: [6, 2], obstacles: [{ x: 3, y: 1, radius: 0.6 }] });
 * ```
 */
export function bicycle(options: BicycleOptions = {}): BicycleProblem {
  const fn = "bicycle";
  const lf = requirePositive(fn, "frontLength", options.frontLength ?? 0.3);
  const lr = options.rearLength ?? 0.3;
  if (!Number.isFinite(lr) || lr < 0) throw new RecedeError("range", fn, "rearLength", ">= 0", lr);
  const L = lf + lr;
  const maxSteer = requirePositive(fn, "maxSteering", options.maxSteering ?? 0.6);
  if (maxSteer >= Math.PI / 2) {
    throw new RecedeError("range", fn, "maxSteering", "< π/2", maxSteer);
  }
  const maxAcc = requirePositive(fn, "maxAcceleration", options.maxAcceleration ?? 1.5);
  const vmax = options.maxSpeed ?? 1.5;
  const vmin = options.minSpeed ?? -0.5;
  if (!Number.isFinite(vmax) || !Number.isFinite(vmin) || !(vmin < vmax)) {
    throw new RecedeError("range", fn, "minSpeed", "< maxSpeed (both finite)", vmin);
  }
  const speedWeight = options.speedWeight ?? 100;
  if (!Number.isFinite(speedWeight) || speedWeight < 0) {
    throw new RecedeError("range", fn, "speedWeight", ">= 0", speedWeight);
  }
  const dt = requirePositive(fn, "dt", options.dt ?? 0.1);
  const goalXY = parseVector(fn, "goal", options.goal, 2, [4, 3]);
  const goalHeading = options.goalHeading ?? 0;
  if (!Number.isFinite(goalHeading)) {
    throw new RecedeError("non-finite", fn, "goalHeading", "finite", goalHeading);
  }
  const x0 = parseVector(fn, "initialState", options.initialState, 4, [0, 0, 0, 0]);
  const q = parseWeight(fn, "q", options.q ?? [1, 1, 0, 0.1], 4, "psd");
  const r = parseWeight(fn, "r", options.r ?? [0.1, 0.1], 2, "pd");
  const qf = parseWeight(fn, "qf", options.qf ?? [10, 10, 0, 1], 4, "psd");
  const obstacles = (options.obstacles ?? []).map((o) => ({ x: o.x, y: o.y, radius: o.radius }));
  (options.obstacles ?? []).forEach((o, j) => {
    if ((o.vx ?? 0) !== 0 || (o.vy ?? 0) !== 0) {
      throw new RecedeError(
        "range",
        fn,
        `obstacles[${j}]`,
        "static (compose circleObstacles with dt for moving ones)",
        "a moving obstacle",
      );
    }
  });
  const horizon = requireInteger(fn, "horizon", options.horizon ?? 30, 1);
  const episodeLength = requireInteger(fn, "episodeLength", options.episodeLength ?? 150, 1);
  const posTol = requirePositive(fn, "positionTolerance", options.positionTolerance ?? 0.15);
  const speedTol = requirePositive(fn, "speedTolerance", options.speedTolerance ?? 0.1);
  const hold = requireInteger(fn, "holdSteps", options.holdSteps ?? 10, 1);

  const kr = lr / L;
  const field: VectorField = {
    n: 4,
    m: 2,
    deriv(x, xo, u, uo, out, oo): void {
      const v = x[xo + 3];
      const td = Math.tan(u[uo + 1]);
      const ktd = kr * td; // tan β
      const cbeta = 1 / Math.sqrt(1 + ktd * ktd); // cos β (|β| < π/2)
      const sbeta = ktd * cbeta; // sin β
      sc[0] = x[xo + 2];
      sinCosInPlace(sc, 0);
      out[oo] = v * (sc[1] * cbeta - sc[0] * sbeta); // v cos(ψ + β)
      out[oo + 1] = v * (sc[0] * cbeta + sc[1] * sbeta); // v sin(ψ + β)
      out[oo + 2] = (v * td * cbeta) / L;
      out[oo + 3] = u[uo];
    },
    partials(x, xo, u, uo, fx, fu): void {
      const v = x[xo + 3];
      const d = u[uo + 1];
      const td = Math.tan(d);
      const sec2 = 1 + td * td;
      const beta = Math.atan(kr * td);
      const db = (kr * sec2) / (1 + kr * kr * td * td);
      const s = x[xo + 2] + beta;
      const cs = Math.cos(s);
      const ss = Math.sin(s);
      const cb = Math.cos(beta);
      const sb = Math.sin(beta);
      fx.fill(0);
      fx[0 * 4 + 2] = -v * ss;
      fx[0 * 4 + 3] = cs;
      fx[1 * 4 + 2] = v * cs;
      fx[1 * 4 + 3] = ss;
      fx[2 * 4 + 3] = (cb * td) / L;
      fu.fill(0);
      fu[0 * 2 + 1] = -v * ss * db;
      fu[1 * 2 + 1] = v * cs * db;
      fu[2 * 2 + 1] = (v / L) * (cb * sec2 - sb * db * td);
      fu[3 * 2] = 1;
    },
  };
  const lin = new Rk4Jacobian(field, dt);
  const h = dt;
  const dynamics: Dynamics = {
    stateSize: 4,
    controlSize: 2,
    step(x, xo, u, uo, count, _t): void {
      for (let k = 0; k < count; k++) {
        const b = xo + 4 * k;
        const acc = u[uo + 2 * k];
        const td = Math.tan(u[uo + 2 * k + 1]);
        // β = atan(k_r tan δ) is never formed: cos β = 1/√(1 + tan²β) (|β| < π/2),
        // sin β = tan β cos β, and the stage angles ψ + β enter through
        // cos(ψ + β) = cos ψ cos β − sin ψ sin β, sin(ψ + β) = sin ψ cos β + cos ψ sin β
        const ktd = kr * td;
        const cbeta = 1 / Math.sqrt(1 + ktd * ktd);
        const sbeta = ktd * cbeta;
        const yawPerSpeed = (td * cbeta) / L; // ψ̇ = v·yawPerSpeed
        const px = x[b];
        const py = x[b + 1];
        const psi = x[b + 2];
        const v = x[b + 3];
        // RK4 with constant a and δ: v is linear in time, so only the angle stages vary;
        // sin and cos of each stage heading from one call of the core trig kernel
        const v2 = v + 0.5 * h * acc;
        const v4 = v + h * acc;
        sc[0] = psi;
        sinCosInPlace(sc, 0);
        const k1x = v * (sc[1] * cbeta - sc[0] * sbeta);
        const k1y = v * (sc[0] * cbeta + sc[1] * sbeta);
        const k1p = v * yawPerSpeed;
        sc[0] = psi + 0.5 * h * k1p;
        sinCosInPlace(sc, 0);
        const k2x = v2 * (sc[1] * cbeta - sc[0] * sbeta);
        const k2y = v2 * (sc[0] * cbeta + sc[1] * sbeta);
        const k2p = v2 * yawPerSpeed;
        sc[0] = psi + 0.5 * h * k2p;
        sinCosInPlace(sc, 0);
        const k3x = v2 * (sc[1] * cbeta - sc[0] * sbeta);
        const k3y = v2 * (sc[0] * cbeta + sc[1] * sbeta);
        const k3p = k2p;
        sc[0] = psi + h * k3p;
        sinCosInPlace(sc, 0);
        const k4x = v4 * (sc[1] * cbeta - sc[0] * sbeta);
        const k4y = v4 * (sc[0] * cbeta + sc[1] * sbeta);
        const k4p = v4 * yawPerSpeed;
        const c = h / 6;
        x[b] = px + c * (k1x + 2 * k2x + 2 * k3x + k4x);
        x[b + 1] = py + c * (k1y + 2 * k2y + 2 * k3y + k4y);
        x[b + 2] = psi + c * (k1p + 2 * k2p + 2 * k3p + k4p);
        x[b + 3] = v4;
      }
    },
    jacobians(x, u, _t, a, b): void {
      lin.jacobians(x, u, a, b);
    },
  };

  const goal = new Float64Array([goalXY[0], goalXY[1], goalHeading, 0]);
  const terms = [
    quadraticCost({
      stateSize: 4,
      controlSize: 2,
      q: square(q, 4),
      r: square(r, 2),
      qf: square(qf, 4),
      reference: goal,
      angleIndices: [2],
    }),
    stateLimitPenalty({
      stateSize: 4,
      controlSize: 2,
      limits: [{ index: 3, lower: vmin, upper: vmax, weight: speedWeight }],
    }),
  ];
  if (obstacles.length > 0) {
    terms.push(
      circleObstacles({
        stateSize: 4,
        controlSize: 2,
        obstacles,
        clearance: options.obstacleClearance,
        weight: options.obstacleWeight,
        collisionCost: options.collisionCost,
      }),
    );
  }
  const cost = sumCosts(...terms);

  const criterion = `distance to goal ≤ ${posTol} m and |v| ≤ ${speedTol} m/s for the last ${hold} states, never inside an obstacle`;
  const assess = (states: Float64Array, count?: number) => {
    const rep = holdTest(`${fn}.assess`, states, 4, count, hold, criterion, (x, o) => {
      const e = Math.hypot(x[o] - goalXY[0], x[o + 1] - goalXY[1]);
      if (!(e <= posTol)) return `distance to goal ${fmt(e)} m > ${posTol}`;
      const v = Math.abs(x[o + 3]);
      if (!(v <= speedTol)) return `|v| = ${fmt(v)} m/s > ${speedTol}`;
      return "";
    });
    const c = count ?? Math.floor(states.length / 4);
    for (let s = 0; s < c; s++) {
      for (let j = 0; j < obstacles.length; j++) {
        const o = obstacles[j];
        if (Math.hypot(states[4 * s] - o.x, states[4 * s + 1] - o.y) < o.radius) {
          return { ...rep, success: false, reason: `state ${s} is inside obstacle ${j}` };
        }
      }
    }
    return rep;
  };
  return {
    name: "bicycle",
    description:
      "Kinematic-bicycle mobile robot: drive to a goal position and stop there, within speed and steering limits, around circular obstacles.",
    source:
      'R. Rajamani, Vehicle Dynamics and Control, Springer, 2006, §2.2; J. Kong, M. Pfeiffer, G. Schildbach, F. Borrelli, "Kinematic and Dynamic Vehicle Models for Autonomous Driving Control Design", IEEE IV, 2015',
    stateSize: 4,
    controlSize: 2,
    stateNames: ["x", "y", "ψ", "v"],
    controlNames: ["a", "δ"],
    angleIndices: [2],
    dt,
    dynamics,
    cost,
    bounds: {
      lower: new Float64Array([-maxAcc, -maxSteer]),
      upper: new Float64Array([maxAcc, maxSteer]),
    },
    goal,
    goalControl: new Float64Array(2),
    horizon,
    episodeLength,
    linearQuadratic: null,
    parameters: {
      frontLength: lf,
      rearLength: lr,
      wheelbase: L,
      maxSteering: maxSteer,
      maxAcceleration: maxAcc,
      minSpeed: vmin,
      maxSpeed: vmax,
    },
    obstacles: obstacles.map((o) => ({ ...o })),
    initialState: () => new Float64Array(x0),
    success: (states, count) => assess(states, count).success,
    assess,
  };
}
