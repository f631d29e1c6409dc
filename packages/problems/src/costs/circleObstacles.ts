/**
 * Circular obstacles in the plane, as a batched cost.
 *
 * @module
 */
import { type CostModel, RecedeError, requireFinite, requireInteger } from "@recede/core";

/** A disc the robot must keep out of. */
export interface CircleObstacle {
  /** Centre x (m). */
  readonly x: number;
  /** Centre y (m). */
  readonly y: number;
  /** Radius (m), already inflated by the robot's own radius if it has one. */
  readonly radius: number;
  /**
   * Velocity of the centre (m/s) along x, for a moving obstacle (a walking picker, a forklift).
   * @defaultValue 0
   */
  readonly vx?: number;
  /**
   * Velocity of the centre (m/s) along y.
   * @defaultValue 0
   */
  readonly vy?: number;
}

/** Options of {@link circleObstacles}. */
export interface CircleObstaclesOptions {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** The obstacles. */
  readonly obstacles: readonly CircleObstacle[];
  /**
   * State components holding the planar position (x, y).
   * @defaultValue [0, 1]
   */
  readonly positionIndices?: readonly [number, number];
  /**
   * Clearance c (m): the soft penalty starts at distance radius + c from the centre.
   * @defaultValue 0.2
   */
  readonly clearance?: number;
  /**
   * Weight w of the squared clearance violation.
   * @defaultValue 100
   */
  readonly weight?: number;
  /**
   * Cost added per step inside an obstacle (a collision).
   * @defaultValue 1000
   */
  readonly collisionCost?: number;
  /**
   * Whether the terminal cost also charges the penalty.
   * @defaultValue true
   */
  readonly terminal?: boolean;
  /**
   * Time per horizon step Δt (s), needed to move obstacles along the horizon.
   * @defaultValue 0 (obstacles evaluated at the current time at every step)
   */
  readonly dt?: number;
  /**
   * Horizon H: the terminal cost sees moving obstacles at time + H·Δt.
   * @defaultValue 0
   */
  readonly horizon?: number;
}

/** The obstacle cost, with a clock for moving obstacles. */
export interface CircleObstaclesCost extends CostModel {
  /** Current time (s): horizon step t sees centres at o_j + v_j·(time + t·Δt). */
  readonly time: number;
  /** Set the current time (s) before planning, e.g. episode step × Δt. */
  setTime(seconds: number): void;
}

/**
 * Obstacle cost, summed over discs with centre o_j and radius ρ_j, d_j = ‖p − o_j‖:
 *   c(x) = Σ_j w·[ρ_j + c − d_j]₊² + collisionCost·1{d_j < ρ_j},
 * with moving centres o_j(τ) = o_j + v_j τ at τ = time + t·Δt for horizon step t (constant-velocity
 * prediction, common practice for dynamic obstacles).
 * The smooth exterior term keeps samples away from the boundary; the indicator makes any collision
 * expensive for a sampling controller (common practice in sampling MPC, e.g. G. Williams et al.,
 * "Information-Theoretic Model Predictive Control: Theory and Applications to Autonomous Driving",
 * IEEE T-RO 34(6), 2018, which also charges crashes with a large constant).
 */
export function circleObstacles(options: CircleObstaclesOptions): CircleObstaclesCost {
  const fn = "circleObstacles";
  const n = requireInteger(fn, "stateSize", options.stateSize, 2);
  const m = requireInteger(fn, "controlSize", options.controlSize, 0);
  const [ix, iy] = options.positionIndices ?? [0, 1];
  for (const i of [ix, iy]) {
    if (!Number.isInteger(i) || i < 0 || i >= n) {
      throw new RecedeError("range", fn, "positionIndices", `integers in [0, ${n - 1}]`, i);
    }
  }
  if (!Array.isArray(options.obstacles)) {
    throw new RecedeError("type", fn, "obstacles", "an array", options.obstacles);
  }
  const J = options.obstacles.length;
  const ox = new Float64Array(J);
  const oy = new Float64Array(J);
  const rad = new Float64Array(J);
  const vx = new Float64Array(J);
  const vy = new Float64Array(J);
  options.obstacles.forEach((o, j) => {
    vx[j] = requireFinite(fn, `obstacles[${j}].vx`, o.vx ?? 0);
    vy[j] = requireFinite(fn, `obstacles[${j}].vy`, o.vy ?? 0);
    ox[j] = requireFinite(fn, `obstacles[${j}].x`, o.x);
    oy[j] = requireFinite(fn, `obstacles[${j}].y`, o.y);
    rad[j] = requireFinite(fn, `obstacles[${j}].radius`, o.radius);
    if (rad[j] <= 0) throw new RecedeError("range", fn, `obstacles[${j}].radius`, "> 0", rad[j]);
  });
  const nonNegative = (arg: string, v: number): number => {
    requireFinite(fn, arg, v);
    if (v < 0) throw new RecedeError("range", fn, arg, ">= 0", v);
    return v;
  };
  const clearance = nonNegative("clearance", options.clearance ?? 0.2);
  const w = nonNegative("weight", options.weight ?? 100);
  const hit = nonNegative("collisionCost", options.collisionCost ?? 1000);
  const withTerminal = options.terminal ?? true;
  const dt = nonNegative("dt", options.dt ?? 0);
  const horizon = requireInteger(fn, "horizon", options.horizon ?? 0, 0);
  let time = 0;
  // Every operation runs on every call and "no charge" adds the double −0 (s ≥ +0, so the bits are
  // those of `if (e > 0) s += w·e²; if (d < ρ) s += hit`): an operation first reached long after
  // warm-up, or a small-integer 0 meeting its first double, deoptimizes the compiled rollout.
  const penalty = (x: Float64Array, b: number, tau: number): number => {
    const px = x[b + ix];
    const py = x[b + iy];
    let s = 0;
    for (let j = 0; j < J; j++) {
      const d = hypot2(px - ox[j] - vx[j] * tau, py - oy[j] - vy[j] * tau);
      const e = rad[j] + clearance - d;
      const pe = w * e * e;
      s += e > 0 ? pe : -0;
      s += d < rad[j] ? hit : -0;
    }
    return s;
  };
  return {
    stateSize: n,
    controlSize: m,
    get time(): number {
      return time;
    },
    setTime(seconds: number): void {
      time = requireFinite("CircleObstaclesCost.setTime", "seconds", seconds);
    },
    running(x, xo, _u, _uo, count, t, out, oo): void {
      const tau = time + t * dt;
      for (let k = 0; k < count; k++) out[oo + k] += penalty(x, xo + k * n, tau);
    },
    terminal(x, xo, count, out, oo): void {
      if (!withTerminal) return;
      const tau = time + horizon * dt;
      for (let k = 0; k < count; k++) out[oo + k] += penalty(x, xo + k * n, tau);
    },
  };
}

/**
 * √(x² + y²), bit for bit what `Math.hypot(x, y)` returns on V8 (Node 20), at about a third of its
 * cost (`Math.hypot` took 25 ns per call here, most of an MPPI step with three obstacles; bench
 * /RESULTS.md §4): +∞ if either is infinite, else NaN if either is NaN, else with M = max(|x|, |y|)
 * and r = min(|x|, |y|)/M, √(1 + r²)·M (0 when M = 0). The scaling by M avoids overflow and
 * underflow. V8 computes the same sum (its 2-argument case: one scaled term is exactly 1, and its
 * Kahan compensation is then exactly 0); costs.prop.test.ts checks the identity on random doubles
 * of every magnitude and on the special values.
 */
export function hypot2(x: number, y: number): number {
  const a = x < 0 ? -x : x;
  const b = y < 0 ? -y : y;
  if (a === Number.POSITIVE_INFINITY || b === Number.POSITIVE_INFINITY) {
    return Number.POSITIVE_INFINITY;
  }
  // biome-ignore lint/suspicious/noSelfCompare: the NaN test without a call.
  if (a !== a || b !== b) return Number.NaN;
  let max = a;
  let min = b;
  if (b > a) {
    max = b;
    min = a;
  }
  if (max === 0) return 0;
  const r = min / max;
  return Math.sqrt(1 + r * r) * max;
}
