/**
 * Scenario (our own, for the demo): a rooftop parcel drone in gusts.
 *
 * A planar quadrotor carrying a parcel starts some metres up and to the side of a rooftop landing
 * pad and must descend and set down on the pad. Sideways gusts push it; the controller's model
 * does not know them (model mismatch). Each rotor's thrust is limited to [0, maxThrust].
 *
 * Model (planar rigid body; Newton–Euler equations in the vertical plane, common practice): state
 * x = (p_x, p_z, θ, v_x, v_z, ω) with p_z the height above the roof and θ the roll angle
 * (counter-clockwise positive), controls u = (T_left, T_right) in newtons:
 *
 *   m v̇_x = −(T_l + T_r) sin θ − c_d v_x + F_gust(t)
 *   m v̇_z =  (T_l + T_r) cos θ − c_d v_z − m g
 *   J ω̇   =  ℓ (T_r − T_l)
 *
 * integrated with one classical RK4 step per control period. The controllers' model is the same
 * body with F_gust = 0 (it knows nothing of the wind) and with the roof: touchdown is an absorbing
 * state there, as it ends the episode in the plant, so a planned sequence that lands is scored on
 * its touchdown (see {@link droneCost}).
 *
 * Gusts (plant only): a steady side wind plus "1 − cos" discrete gusts, the shape used for
 * discrete gusts in flight-dynamics practice (e.g. the discrete gust of US military specification
 * MIL-F-8785C, 1980): F(t) = A/2 · (1 − cos(2π (t − t₀)/d)) for t₀ ≤ t ≤ t₀ + d. Amplitudes,
 * signs, start times and durations are drawn from the episode's seeded stream, so every optimizer
 * meets the same gusts on the same seed.
 *
 * Landing (thresholds are the scenario's own): the episode ends at touchdown (p_z ≤ 0) or after
 * `steps` control periods. Success ⇔ touchdown with miss distance |p_x| ≤ {@link DRONE_THRESHOLDS}
 * `.missDistance`, touchdown speed ‖v‖ ≤ `.touchdownSpeed` and |θ| ≤ `.tilt`. A step with
 * |θ| > `.tiltLimit` counts as a constraint violation (a parcel-carrying drone must not bank hard).
 *
 * @module
 */
import type { ControlBounds, CostModel, Dynamics, Stream } from "@recede/core";
import type { LinearQuadratic } from "@recede/problems";
import type { TrackingReference, TrackingReferenceSource } from "../optimizers/mpc.js";
import type { ParamSchemaMap, ParamValues } from "../params.js";
import type { BenchProblem, ProblemDefinition } from "../registry.js";

/** Physical parameters of the drone and parcel. */
export const DRONE_PARAMETERS: {
  readonly mass: number;
  readonly arm: number;
  readonly inertia: number;
  readonly drag: number;
  readonly gravity: number;
  readonly maxThrust: number;
} = Object.freeze({
  /** Drone plus parcel, kg. */
  mass: 1.8,
  /** Rotor arm ℓ, m. */
  arm: 0.25,
  /** Roll inertia J, kg m². */
  inertia: 0.04,
  /** Linear drag coefficient c_d, N s/m. */
  drag: 0.35,
  /** Gravity g, m/s². */
  gravity: 9.81,
  /** Thrust limit per rotor, N (thrust-to-weight 1.7). */
  maxThrust: 15,
});

/** The landing thresholds that define success. */
export const DRONE_THRESHOLDS: {
  readonly missDistance: number;
  readonly touchdownSpeed: number;
  readonly tilt: number;
  readonly tiltLimit: number;
} = Object.freeze({
  /** Largest |p_x| at touchdown, m (the pad's usable radius). */
  missDistance: 0.5,
  /** Largest speed ‖v‖ at touchdown, m/s (what the landing gear and the parcel tolerate). */
  touchdownSpeed: 1.0,
  /** Largest |θ| at touchdown, rad (15°). */
  tilt: (15 * Math.PI) / 180,
  /** |θ| above this counts as a constraint violation, rad (30°). */
  tiltLimit: (30 * Math.PI) / 180,
});

const N = 6;
const M = 2;

/** Continuous-time vector field with an external side force; writes ẋ into d[do..do+6). */
function field(
  s: Float64Array,
  so: number,
  tl: number,
  tr: number,
  side: number,
  d: Float64Array,
  dOff: number,
): void {
  const { mass, arm, inertia, drag, gravity } = DRONE_PARAMETERS;
  const th = s[so + 2];
  const total = tl + tr;
  d[dOff] = s[so + 3];
  d[dOff + 1] = s[so + 4];
  d[dOff + 2] = s[so + 5];
  d[dOff + 3] = (-total * Math.sin(th) - drag * s[so + 3] + side) / mass;
  d[dOff + 4] = (total * Math.cos(th) - drag * s[so + 4]) / mass - gravity;
  d[dOff + 5] = (arm * (tr - tl)) / inertia;
}

/**
 * One RK4 step of length dt for `count` states in place; `side` is the constant side force.
 * With `roof`, the roof is part of the model: a state with p_z ≤ 0 has landed and stays where it
 * is (absorbing), and a step that crosses p_z = 0 is cut at the crossing by linear interpolation
 * between the step's end points, exactly as the plant does at touchdown.
 */
class DroneRk4 {
  private readonly k = new Float64Array(4 * N);
  private readonly tmp = new Float64Array(N);
  private readonly prev = new Float64Array(N);
  constructor(
    private readonly dt: number,
    private readonly roof: boolean,
  ) {}

  step(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    side: number,
  ): void {
    const { k, tmp, prev, dt, roof } = this;
    for (let s = 0; s < count; s++) {
      const b = xo + s * N;
      if (roof && x[b + 1] <= 0) continue;
      for (let i = 0; i < N; i++) prev[i] = x[b + i];
      const tl = u[uo + s * M];
      const tr = u[uo + s * M + 1];
      field(x, b, tl, tr, side, k, 0);
      for (let i = 0; i < N; i++) tmp[i] = x[b + i] + 0.5 * dt * k[i];
      field(tmp, 0, tl, tr, side, k, N);
      for (let i = 0; i < N; i++) tmp[i] = x[b + i] + 0.5 * dt * k[N + i];
      field(tmp, 0, tl, tr, side, k, 2 * N);
      for (let i = 0; i < N; i++) tmp[i] = x[b + i] + dt * k[2 * N + i];
      field(tmp, 0, tl, tr, side, k, 3 * N);
      for (let i = 0; i < N; i++)
        x[b + i] += (dt / 6) * (k[i] + 2 * k[N + i] + 2 * k[2 * N + i] + k[3 * N + i]);
      if (roof && x[b + 1] <= 0) {
        // Touchdown inside this period: cut the step at the crossing p_z = 0.
        const a = prev[1] / (prev[1] - x[b + 1]);
        for (let i = 0; i < N; i++) x[b + i] = prev[i] + a * (x[b + i] - prev[i]);
        x[b + 1] = 0;
      }
    }
  }
}

/** Cost weights of the landing task (see {@link droneCost} for the formula). */
export const DRONE_WEIGHTS: {
  readonly position: number;
  readonly height: number;
  readonly tilt: number;
  readonly velocity: number;
  readonly rate: number;
  readonly thrust: number;
  readonly envelope: number;
  readonly envelopeBase: number;
  readonly envelopeSlope: number;
  readonly cone: number;
  readonly coneBase: number;
  readonly coneSlope: number;
  readonly bank: number;
  readonly bankAngle: number;
  readonly airborne: number;
  readonly terminal: number;
  readonly aimHeight: number;
  readonly touchdown: number;
  readonly touchdownExcess: number;
  readonly touchdownMargin: number;
} = Object.freeze({
  position: 4,
  height: 2,
  tilt: 10,
  velocity: 0.3,
  rate: 0.5,
  thrust: 0.01,
  /** Weight w_e of the squared excess over the descent-speed envelope −v_z ≤ e₀ + e₁·p_z. */
  envelope: 40,
  /** e₀, m/s: the descent speed the envelope allows at the roof. */
  envelopeBase: 0.3,
  /** e₁, 1/s: how much faster the envelope allows descending per metre of height. */
  envelopeSlope: 0.5,
  /** Weight w_c of the squared excess over the approach cone |p_x| ≤ c₀ + c₁·p_z. */
  cone: 20,
  /** c₀, m: half-width of the cone at the roof. */
  coneBase: 0.2,
  /** c₁: widening of the cone per metre of height. */
  coneSlope: 0.6,
  /** Weight w_b of the squared excess of |θ| over the bank angle θ_b. */
  bank: 2000,
  /** θ_b, rad (15°): tilt above which banking is penalized steeply (violations start at 30°). */
  bankAngle: (15 * Math.PI) / 180,
  /** Cost per step while airborne (p_z > 0): the price of time in the air (battery, schedule). */
  airborne: 2,
  /** Terminal weight w_H on the state part q(x) when the horizon ends in the air. */
  terminal: 10,
  /**
   * Height the cost aims at, m: slightly below the roof, so that reaching the pad (and touching
   * down) is what the cost asks for rather than hovering just above it.
   */
  aimHeight: -0.5,
  /** Weight w_L of the landed state's normalized touchdown figures, per remaining step. */
  touchdown: 10,
  /** Weight w_F of their excess over the margin, per remaining step. */
  touchdownExcess: 200,
  /** Margin ρ: touchdown figures beyond ρ × their threshold are penalized steeply. */
  touchdownMargin: 0.7,
});
/** Hover thrust per rotor, N. */
export const HOVER_THRUST: number = (DRONE_PARAMETERS.mass * DRONE_PARAMETERS.gravity) / 2;

/**
 * Quadratic part q(x) of the landing cost (also the terminal cost, scaled):
 * w_x p_x² + w_z (p_z − z_aim)² + w_θ θ² + w_v (v_x² + v_z²) + w_ω ω², with z_aim = `aimHeight` < 0.
 */
function stateCost(x: Float64Array, b: number): number {
  const w = DRONE_WEIGHTS;
  const px = x[b];
  const pz = x[b + 1] - DRONE_WEIGHTS.aimHeight;
  const th = x[b + 2];
  const vx = x[b + 3];
  const vz = x[b + 4];
  const om = x[b + 5];
  return (
    w.position * px * px +
    w.height * pz * pz +
    w.tilt * th * th +
    w.velocity * (vx * vx + vz * vz) +
    w.rate * om * om
  );
}

/**
 * Cost of the landed (absorbing) state, per remaining step: with the touchdown figures normalized
 * by their thresholds, a₁ = |p_x|/r_miss, a₂ = ‖v‖/v_td, a₃ = |θ|/θ_td,
 *   ℓ(x) = w_L Σ_i a_i² + w_F Σ_i max(0, a_i − ρ)².
 * The first part prefers a soft, centred touchdown; the second is steep once a figure passes ρ of
 * its threshold, so the planner keeps a margin to the success test rather than aiming at its edge.
 */
function landedCost(x: Float64Array, b: number): number {
  const w = DRONE_WEIGHTS;
  const th = DRONE_THRESHOLDS;
  const a1 = Math.abs(x[b]) / th.missDistance;
  const a2 = Math.sqrt(x[b + 3] * x[b + 3] + x[b + 4] * x[b + 4]) / th.touchdownSpeed;
  const a3 = Math.abs(x[b + 2]) / th.tilt;
  const e1 = a1 > w.touchdownMargin ? a1 - w.touchdownMargin : 0;
  const e2 = a2 > w.touchdownMargin ? a2 - w.touchdownMargin : 0;
  const e3 = a3 > w.touchdownMargin ? a3 - w.touchdownMargin : 0;
  return (
    w.touchdown * (a1 * a1 + a2 * a2 + a3 * a3) + w.touchdownExcess * (e1 * e1 + e2 * e2 + e3 * e3)
  );
}

/**
 * The landing cost. Airborne (p_z > 0), the running cost is
 *   c(x, u) = q(x) + w_u ‖u − u_hover‖² + w_e max(0, −v_z − e₀ − e₁ p_z)²
 *           + w_c max(0, |p_x| − c₀ − c₁ p_z)² + w_b max(0, |θ| − θ_b)² + w_a;
 * landed (p_z ≤ 0, the model's absorbing touchdown state), it is ℓ(x) of the touchdown figures
 * (see `landedCost`), and the controls no longer matter. Terminal: c_H(x) = w_H q(x) in the air,
 * w_H ℓ(x) once landed (so a plant episode, which ends at touchdown, pays w_H ℓ for how it
 * touched down, and a hard or off-pad landing shows in the episode cost). The envelope asks for a descent that slows near the roof, the cone for being
 * over the pad before getting low, the bank term keeps the tilt well below the 30° limit, w_a prices
 * time in the air, and ℓ scores the touchdown itself (speed, miss distance, tilt) against the
 * success thresholds. The episode cost of a run is this cost along the plant's path, ending with
 * w_H ℓ of the touchdown state.
 */
export const droneCost: CostModel = {
  stateSize: N,
  controlSize: M,
  running(x, xo, u, uo, count, _t, out, oo): void {
    const w = DRONE_WEIGHTS;
    for (let k = 0; k < count; k++) {
      const b = xo + k * N;
      const pz = x[b + 1];
      if (pz <= 0) {
        out[oo + k] += landedCost(x, b);
        continue;
      }
      const du0 = u[uo + k * M] - HOVER_THRUST;
      const du1 = u[uo + k * M + 1] - HOVER_THRUST;
      const excess = -x[b + 4] - w.envelopeBase - w.envelopeSlope * pz;
      const env = excess > 0 ? excess * excess : 0;
      const wide = Math.abs(x[b]) - w.coneBase - w.coneSlope * pz;
      const cone = wide > 0 ? wide * wide : 0;
      const tilt = Math.abs(x[b + 2]) - w.bankAngle;
      const bank = tilt > 0 ? tilt * tilt : 0;
      out[oo + k] +=
        stateCost(x, b) +
        w.thrust * (du0 * du0 + du1 * du1) +
        w.envelope * env +
        w.cone * cone +
        w.bank * bank +
        w.airborne;
    }
  },
  terminal(x, xo, count, out, oo): void {
    for (let k = 0; k < count; k++) {
      const b = xo + k * N;
      out[oo + k] += DRONE_WEIGHTS.terminal * (x[b + 1] <= 0 ? landedCost(x, b) : stateCost(x, b));
    }
  },
};

/**
 * The controller's model: the drone without gusts. With `roof` (the default) the roof is in the
 * model: touchdown (p_z reaching 0) is an absorbing state, as in the plant, so a planned sequence
 * that lands is scored on its touchdown. `roof: false` gives the free-flight model (used for
 * linearization).
 */
export function droneModel(dt: number, roof = true): Dynamics {
  const rk = new DroneRk4(dt, roof);
  return {
    stateSize: N,
    controlSize: M,
    step(x, xo, u, uo, count): void {
      rk.step(x, xo, u, uo, count, 0);
    },
  };
}

/**
 * Linear-quadratic data about hover at the pad (x̄ = 0, ū = hover thrust): A, B are the Jacobians
 * of the discrete RK4 model by central differences (step 1e-6; common practice), Q = diag of the
 * cost's state weights, R = w_u I, Qf = w_H Q. The descent envelope is not quadratic and is left
 * out, so LQR sees only the quadratic part of the task.
 */
export function droneLinearQuadratic(dt: number): LinearQuadratic {
  const model = droneModel(dt, false);
  const h = 1e-6;
  const x = new Float64Array(N);
  const u = new Float64Array(M);
  const a = new Float64Array(N * N);
  const b = new Float64Array(N * M);
  const plus = new Float64Array(N);
  const minus = new Float64Array(N);
  const ub = new Float64Array([HOVER_THRUST, HOVER_THRUST]);
  const column = (k: number, isState: boolean): void => {
    for (const [sign, out] of [
      [1, plus],
      [-1, minus],
    ] as const) {
      x.fill(0);
      u.set(ub);
      if (isState) x[k] += sign * h;
      else u[k] += sign * h;
      model.step(x, 0, u, 0, 1, 0);
      out.set(x);
    }
    for (let i = 0; i < N; i++) {
      const d = (plus[i] - minus[i]) / (2 * h);
      if (isState) a[i * N + k] = d;
      else b[i * M + k] = d;
    }
  };
  for (let k = 0; k < N; k++) column(k, true);
  for (let k = 0; k < M; k++) column(k, false);
  const w = DRONE_WEIGHTS;
  const qd = [w.position, w.height, w.tilt, w.velocity, w.velocity, w.rate];
  const q = new Float64Array(N * N);
  const qf = new Float64Array(N * N);
  qd.forEach((v, i) => {
    q[i * N + i] = v;
    qf[i * N + i] = w.terminal * v;
  });
  return {
    stateSize: N,
    controlSize: M,
    a,
    b,
    q,
    r: new Float64Array([w.thrust, 0, 0, w.thrust]),
    qf,
    state: new Float64Array([0, DRONE_WEIGHTS.aimHeight, 0, 0, 0, 0]),
    control: ub,
    continuousA: null,
    continuousB: null,
    exact: false,
  };
}

/** Settings of the drone's glide path (see {@link droneGlidePath}). */
export interface GlidePathSettings {
  /** Height of the gate above the pad where the vertical descent starts, m. @defaultValue 1 */
  readonly gateHeight?: number;
  /** Setpoint speed along the approach to the gate, m/s. @defaultValue 1.2 */
  readonly approachSpeed?: number;
  /** Setpoint descent speed below the gate, m/s. @defaultValue 0.4 */
  readonly descentSpeed?: number;
  /**
   * Largest position error ‖p − r‖ at which the setpoint still advances, m; beyond it the setpoint
   * waits for the drone. @defaultValue 0.6
   */
  readonly maxLag?: number;
}

/**
 * The drone's glide path to the pad as a moving setpoint for a tracking controller: a straight
 * approach from the start position to a gate `gateHeight` above the pad centre at `approachSpeed`,
 * then a vertical descent at `descentSpeed` that continues to `aimHeight` below the roof, so the
 * drone touches down at about the descent speed. The reference state is
 * r = (p_x^r, p_z^r, 0, v_x^r, v_z^r, 0), its velocity the setpoint's own.
 *
 * The setpoint advances only while the drone is within `maxLag` of it, and otherwise waits: a
 * simple reference governor, which keeps the tracking error, and so the feedback u = ū − K(x − r),
 * small enough to stay clear of the thrust limits after a gust. (Reference governors: E. G.
 * Gilbert, I. Kolmanovsky, K. T. Tan, "Discrete-time reference governors and the nonlinear control
 * of systems with state and control constraints", Int. J. Robust Nonlinear Control, 1995, from
 * memory; ours is the elementary rate-limited form, not their admissible-set construction.)
 */
export function droneGlidePath(dt: number, settings: GlidePathSettings = {}): TrackingReference {
  const gate = settings.gateHeight ?? 1;
  const approach = settings.approachSpeed ?? 1.2;
  const descent = settings.descentSpeed ?? 0.4;
  const maxLag = settings.maxLag ?? 0.6;
  const floor = DRONE_WEIGHTS.aimHeight;
  let rx = 0;
  let rz = 0;
  return {
    stateSize: N,
    reset(x0) {
      rx = x0[0];
      rz = x0[1];
    },
    next(x, out) {
      let vx = 0;
      let vz = 0;
      const lag = Math.hypot(x[0] - rx, x[1] - rz);
      if (lag <= maxLag) {
        const dx = -rx;
        const dz = gate - rz;
        const d = Math.hypot(dx, dz);
        if (rz > gate + 1e-9 || Math.abs(rx) > 1e-9) {
          // Approach: straight to the gate, without passing it.
          const s = Math.min(approach, d / dt);
          vx = d > 0 ? (s * dx) / d : 0;
          vz = d > 0 ? (s * dz) / d : 0;
        } else if (rz > floor) {
          vz = -Math.min(descent, (rz - floor) / dt);
        }
        rx += vx * dt;
        rz += vz * dt;
      }
      out.fill(0);
      out[0] = rx;
      out[1] = rz;
      out[3] = vx;
      out[4] = vz;
    },
  };
}

/** One "1 − cos" gust. */
interface Gust {
  readonly start: number;
  readonly duration: number;
  readonly amplitude: number;
}

/** Gust settings of a scenario instance. */
export interface GustSettings {
  /** Largest steady side force, N (drawn uniformly in ±). */
  readonly steady: number;
  /** Range of gust amplitudes, N (sign drawn at random). */
  readonly amplitude: readonly [number, number];
  /** Number of gusts per episode. */
  readonly count: number;
}

/** Side force F_gust(t) of a wind history, N. */
function gustForce(steady: number, gusts: readonly Gust[], time: number): number {
  let f = steady;
  for (const g of gusts) {
    const s = time - g.start;
    if (s >= 0 && s <= g.duration)
      f += 0.5 * g.amplitude * (1 - Math.cos((2 * Math.PI * s) / g.duration));
  }
  return f;
}

/** Parameters the sweep file may set for the `parcel-drone` problem. */
export const droneParams: ParamSchemaMap = {
  steps: { type: "integer", min: 1, default: 240, description: "episode length in control steps" },
  dt: { type: "number", above: 0, max: 0.2, default: 0.05, description: "control period, s" },
  gustSteady: { type: "number", min: 0, default: 1.0, description: "largest steady side force, N" },
  gustMin: { type: "number", min: 0, default: 1.5, description: "smallest gust amplitude, N" },
  gustMax: { type: "number", min: 0, default: 3.5, description: "largest gust amplitude, N" },
  gusts: { type: "integer", min: 0, max: 10, default: 3, description: "gusts per episode" },
  startOffset: { type: "number", default: -4, description: "mean start p_x (pad at 0), m" },
  startHeight: {
    type: "number",
    above: 0,
    default: 8,
    description: "mean start height above the roof, m",
  },
};

/** The wind history of one episode, drawn from its stream (also used by charts). */
export function drawWind(
  rng: Stream,
  settings: GustSettings,
  horizonSeconds: number,
): { steady: number; gusts: Gust[]; force(time: number): number } {
  const steady = settings.steady * (2 * rng.uniform() - 1);
  const gusts: Gust[] = [];
  for (let i = 0; i < settings.count; i++) {
    const start = 0.5 + rng.uniform() * Math.max(0, horizonSeconds * 0.7);
    const duration = 0.8 + 1.2 * rng.uniform();
    const mag =
      settings.amplitude[0] + (settings.amplitude[1] - settings.amplitude[0]) * rng.uniform();
    gusts.push({ start, duration, amplitude: rng.uniform() < 0.5 ? -mag : mag });
  }
  return { steady, gusts, force: (time: number) => gustForce(steady, gusts, time) };
}

/** Build a parcel-drone scenario instance. */
export function parcelDrone(params: ParamValues = {}): BenchProblem & TrackingReferenceSource {
  const num = (k: string): number => {
    const v = params[k] ?? (droneParams[k] as { default?: number }).default;
    return v as number;
  };
  const dt = num("dt");
  const steps = num("steps");
  const model = droneModel(dt);
  const plantRk = new DroneRk4(dt, false);
  const bounds: ControlBounds = {
    lower: new Float64Array([0, 0]),
    upper: new Float64Array([DRONE_PARAMETERS.maxThrust, DRONE_PARAMETERS.maxThrust]),
  };
  const settings: GustSettings = {
    steady: num("gustSteady"),
    amplitude: [num("gustMin"), Math.max(num("gustMin"), num("gustMax"))],
    count: num("gusts"),
  };
  let wind: ReturnType<typeof drawWind> | undefined;
  let touchdown: { speed: number; miss: number; tilt: number } | undefined;
  const th = DRONE_THRESHOLDS;
  return {
    id: "parcel-drone",
    stateSize: N,
    controlSize: M,
    dt,
    steps,
    model,
    cost: droneCost,
    bounds,
    stateNames: ["p_x", "p_z", "θ", "v_x", "v_z", "ω"],
    equilibrium: {
      state: new Float64Array([0, DRONE_WEIGHTS.aimHeight, 0, 0, 0, 0]),
      control: new Float64Array([HOVER_THRUST, HOVER_THRUST]),
    },
    linearQuadratic: droneLinearQuadratic(dt),
    trackingReference: () => droneGlidePath(dt),
    initialState(rng: Stream): Float64Array {
      touchdown = undefined;
      const x = new Float64Array(N);
      x[0] = num("startOffset") + (rng.uniform() - 0.5);
      x[1] = num("startHeight") + (rng.uniform() - 0.5);
      wind = drawWind(rng.fork(1), settings, steps * dt);
      return x;
    },
    plantStep(x, u, t): void {
      const before = x[1];
      const side = wind ? wind.force((t + 0.5) * dt) : 0;
      const prev = Float64Array.from(x);
      plantRk.step(x, 0, u, 0, 1, side);
      if (x[1] <= 0 && before > 0) {
        // Touchdown inside this period: interpolate to the crossing p_z = 0.
        const a = before / (before - x[1]);
        for (let i = 0; i < N; i++) x[i] = prev[i] + a * (x[i] - prev[i]);
        x[1] = 0;
        touchdown = { speed: Math.hypot(x[3], x[4]), miss: Math.abs(x[0]), tilt: Math.abs(x[2]) };
      }
    },
    violation(x): number {
      return Math.max(0, Math.abs(x[2]) - th.tiltLimit);
    },
    finished(x): boolean {
      return x[1] <= 0;
    },
    outcome(states, count): { success: boolean; metrics: Record<string, number> } {
      const last = (count - 1) * N;
      const landed = states[last + 1] <= 0 && touchdown !== undefined;
      if (!landed || !touchdown)
        return {
          success: false,
          metrics: {
            landed: 0,
            missDistance: Number.NaN,
            touchdownSpeed: Number.NaN,
            touchdownTilt: Number.NaN,
            landingTime: Number.NaN,
          },
        };
      const ok =
        touchdown.miss <= th.missDistance &&
        touchdown.speed <= th.touchdownSpeed &&
        touchdown.tilt <= th.tilt;
      return {
        success: ok,
        metrics: {
          landed: 1,
          missDistance: touchdown.miss,
          touchdownSpeed: touchdown.speed,
          touchdownTilt: (touchdown.tilt * 180) / Math.PI,
          landingTime: (count - 1) * dt,
        },
      };
    },
  };
}

/** Registry entry of the scenario. */
export const parcelDroneDefinition: ProblemDefinition = {
  id: "parcel-drone",
  description:
    "Rooftop parcel drone in gusts: a planar quadrotor lands on a rooftop pad while sideways gusts unknown to the model push it (bench scenario).",
  params: droneParams,
  create: (params) => parcelDrone(params),
};
