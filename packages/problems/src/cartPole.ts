/**
 * Cart-pole swing-up with the parameters of Barto, Sutton & Anderson (1983) and the frictionless
 * equations of Florian (2007).
 *
 * @module
 */
import { type Dynamics, kernels, RecedeError, requireInteger, requirePositive } from "@recede/core";
import { quadraticCost } from "./costs/quadraticCost.js";
import { stateLimitPenalty } from "./costs/stateLimitPenalty.js";
import { sumCosts } from "./costs/sumCosts.js";
import { parseVector, parseWeight, square, type WeightInput } from "./internal/options.js";
import { Rk4Jacobian, Rk4Stepper, type VectorField } from "./internal/rk4.js";
import { fmt, holdTest } from "./internal/success.js";
import { type LinearQuadratic, type Problem, wrapAngle } from "./problem.js";

/**
 * The core trig kernel (in-place form: no double crosses the call, so nothing is allocated even
 * where V8 does not inline it), bound once, and its scratch: sc[0] = θ in, (sin θ, cos θ) out.
 */
const sinCosInPlace = kernels.sinCosInPlace;
const sc = new Float64Array(2);

/** Options of {@link cartPole}. */
export interface CartPoleOptions {
  /**
   * Cart mass m_c (kg).
   * @defaultValue 1.0 (Barto, Sutton & Anderson 1983)
   */
  readonly cartMass?: number;
  /**
   * Pole mass m_p (kg).
   * @defaultValue 0.1 (Barto, Sutton & Anderson 1983)
   */
  readonly poleMass?: number;
  /**
   * Half pole length l (m): pivot to the pole's centre of mass (uniform rod).
   * @defaultValue 0.5 (Barto, Sutton & Anderson 1983)
   */
  readonly halfLength?: number;
  /**
   * Gravity g (m/s²).
   * @defaultValue 9.8 (Barto, Sutton & Anderson 1983)
   */
  readonly gravity?: number;
  /**
   * Cart–track Coulomb friction coefficient μ_c (Barto et al. used 0.0005), with the normal-force
   * sign handled as in Florian (2007).
   * @defaultValue 0 (frictionless)
   */
  readonly cartFriction?: number;
  /**
   * Pole–cart viscous friction coefficient μ_p (N·m·s; Barto et al. used 0.000002).
   * @defaultValue 0 (frictionless)
   */
  readonly poleFriction?: number;
  /**
   * Force bound |F| ≤ forceLimit (N).
   * @defaultValue 10 (the ±10 N of Barto, Sutton & Anderson 1983)
   */
  readonly forceLimit?: number;
  /**
   * Track half-length: the cart should stay within |x| ≤ trackLimit (m), enforced as a soft
   * penalty in the cost and required by the success test.
   * @defaultValue 2.4 (Barto, Sutton & Anderson 1983)
   */
  readonly trackLimit?: number;
  /**
   * Weight of the squared track violation in the cost.
   * @defaultValue 1000
   */
  readonly trackWeight?: number;
  /**
   * Cost added per step while off the track.
   * @defaultValue 100
   */
  readonly trackViolationCost?: number;
  /**
   * Control period Δt (s); one RK4 step per period (the original used Euler with τ = 0.02 s).
   * @defaultValue 0.02
   */
  readonly dt?: number;
  /**
   * State weight Q on (x, ẋ, wrap(θ), θ̇).
   * @defaultValue [1, 0.1, 10, 0.1]
   */
  readonly q?: WeightInput;
  /**
   * Force weight R.
   * @defaultValue 0.001
   */
  readonly r?: WeightInput;
  /**
   * Terminal weight Qf.
   * @defaultValue [10, 1, 100, 1]
   */
  readonly qf?: WeightInput;
  /**
   * Start state (x, ẋ, θ, θ̇).
   * @defaultValue [0, 0, π, 0] (pole hanging, at rest)
   */
  readonly initialState?: ArrayLike<number>;
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
   * Success: |wrap(θ)| ≤ angleTolerance (rad) …
   * @defaultValue 0.2
   */
  readonly angleTolerance?: number;
  /**
   * … |θ̇| ≤ rateTolerance (rad/s) and |x| ≤ trackLimit …
   * @defaultValue 1
   */
  readonly rateTolerance?: number;
  /**
   * … for the last holdSteps states.
   * @defaultValue 50
   */
  readonly holdSteps?: number;
}

/** Physical parameters of a {@link CartPoleProblem}. */
export interface CartPoleParameters {
  readonly cartMass: number;
  readonly poleMass: number;
  readonly halfLength: number;
  readonly gravity: number;
  readonly cartFriction: number;
  readonly poleFriction: number;
  readonly forceLimit: number;
  readonly trackLimit: number;
}

/** The cart-pole problem with its parameters and the continuous-time accelerations. */
export interface CartPoleProblem extends Problem {
  /** The physical parameters in use. */
  readonly parameters: CartPoleParameters;
  /**
   * Continuous-time accelerations at state x[o..o+3] under force F: out[oo] ← ẍ, out[oo+1] ← θ̈.
   */
  accelerations(x: Float64Array, o: number, force: number, out: Float64Array, oo: number): void;
}

/**
 * Cart-pole (pole on a cart on a track) swing-up from hanging to upright.
 *
 * Model: frictionless cart-pole with a uniform rod (I = m_p l²/3 about its centre), in the form of
 * R. V. Florian, "Correct Equations for the Dynamics of the Cart-Pole System", Center for Cognitive
 * and Neural Studies, Romania, 2007, with μ_c = μ_p = 0 (MATH.md §7.1):
 *   θ̈ = [g sin θ + cos θ (−F − m_p l θ̇² sin θ)/M] / [l (4/3 − m_p cos²θ / M)],
 *   ẍ = [F + m_p l (θ̇² sin θ − θ̈ cos θ)] / M,     M = m_c + m_p,
 * θ measured from upright, positive towards +x. Parameters of A. G. Barto, R. S. Sutton,
 * C. W. Anderson, "Neuronlike Adaptive Elements That Can Solve Difficult Learning Control Problems",
 * IEEE Trans. SMC 13(5), 1983: m_c = 1 kg, m_p = 0.1 kg, l = 0.5 m, g = 9.8 m/s², |F| ≤ 10 N,
 * |x| ≤ 2.4 m. Integrated with one classical RK4 step per Δt; the model evaluates sin θ and
 * cos θ with the core trig kernel (`kernels.sinCosInPlace` of @recede/core: deterministic, the
 * same bits on every JavaScript engine, within 1–2 ulp of `Math`).
 *
 * Optional friction (`cartFriction` μ_c, `poleFriction` μ_p; default 0): Florian's corrected
 * equations with Coulomb cart friction −μ_c N_c sgn(N_c ẋ), where the track's normal force
 * N_c = M g − m_p l (θ̈ sin θ + θ̇² cos θ) may change sign (its sign is found by solving with N_c > 0
 * assumed and re-solving if that fails), and viscous joint friction −μ_p θ̇ (MATH.md §7.1, with the
 * denominator l(4/3 − (m_p cos θ / M)(cos θ − μ_c σ sin θ)) that a direct Newton–Euler solve gives).
 * Static friction is not modelled (sgn(0) = 0). With friction the step uses a generic RK4 loop and
 * the Jacobians use central differences with the friction sign frozen at the linearization point. The track limit is a soft penalty in
 * the cost (weight `trackWeight` on the squared excess plus `trackViolationCost` per step off the
 * track) and a hard requirement of the success test.
 *
 * Success: |wrap(θ)| ≤ `angleTolerance`, |θ̇| ≤ `rateTolerance` and |x| ≤ `trackLimit` for the last
 * `holdSteps` states.
 *
 * State (x, ẋ, θ, θ̇), control (F).
 *
 * @example
 * ```ts
 * const p = cartPole({ cartFriction: 0.0005, poleFriction: 0.000002 }); // the 1983 benchmark
 * const acc = new Float64Array(2);
 * p.accelerations(p.initialState(), 0, 10, acc, 0); // (ẍ, θ̈) under F = 10 N
 * ```
 */
export function cartPole(options: CartPoleOptions = {}): CartPoleProblem {
  const fn = "cartPole";
  const mc = requirePositive(fn, "cartMass", options.cartMass ?? 1.0);
  const mp = requirePositive(fn, "poleMass", options.poleMass ?? 0.1);
  const l = requirePositive(fn, "halfLength", options.halfLength ?? 0.5);
  const g = requirePositive(fn, "gravity", options.gravity ?? 9.8);
  const muC = options.cartFriction ?? 0;
  const muP = options.poleFriction ?? 0;
  for (const [arg, v] of [
    ["cartFriction", muC],
    ["poleFriction", muP],
  ] as const) {
    if (!Number.isFinite(v) || v < 0) throw new RecedeError("range", fn, arg, ">= 0", v);
  }
  const frictionless = muC === 0 && muP === 0;
  const forceLimit = requirePositive(fn, "forceLimit", options.forceLimit ?? 10);
  const trackLimit = requirePositive(fn, "trackLimit", options.trackLimit ?? 2.4);
  const trackWeight = options.trackWeight ?? 1000;
  const trackFlag = options.trackViolationCost ?? 100;
  for (const [arg, v] of [
    ["trackWeight", trackWeight],
    ["trackViolationCost", trackFlag],
  ] as const) {
    if (!Number.isFinite(v) || v < 0) throw new RecedeError("range", fn, arg, ">= 0", v);
  }
  const dt = requirePositive(fn, "dt", options.dt ?? 0.02);
  const q = parseWeight(fn, "q", options.q ?? [1, 0.1, 10, 0.1], 4, "psd");
  const r = parseWeight(fn, "r", options.r ?? 0.001, 1, "pd");
  const qf = parseWeight(fn, "qf", options.qf ?? [10, 1, 100, 1], 4, "psd");
  const x0 = parseVector(fn, "initialState", options.initialState, 4, [0, 0, Math.PI, 0]);
  const horizon = requireInteger(fn, "horizon", options.horizon ?? 50, 1);
  const episodeLength = requireInteger(fn, "episodeLength", options.episodeLength ?? 250, 1);
  const angTol = requirePositive(fn, "angleTolerance", options.angleTolerance ?? 0.2);
  const rateTol = requirePositive(fn, "rateTolerance", options.rateTolerance ?? 1);
  const hold = requireInteger(fn, "holdSteps", options.holdSteps ?? 50, 1);

  const M = mc + mp;
  const mpl = mp * l;
  const invM = 1 / M;
  const l43 = (4 / 3) * l;
  const lmpM = (l * mp) / M;
  /** θ̈ at sin θ = s, cos θ = c (frictionless Florian form, constants folded). */
  const thetaAcc = (s: number, c: number, w: number, F: number): number =>
    (g * s - c * (F + mpl * w * w * s) * invM) / (l43 - lmpM * c * c);
  /** ẍ given θ̈. */
  const cartAcc = (s: number, c: number, w: number, F: number, thdd: number): number =>
    (F + mpl * (w * w * s - thdd * c)) * invM;
  const acc = new Float64Array(3);
  // (θ, θ̇, F) handed to accelSigned through an array: doubles passed as arguments to a call V8
  // does not inline would be boxed (allocated) on every call
  const fa = new Float64Array(3);
  /**
   * acc[0] ← ẍ, acc[1] ← θ̈ with friction at (θ, θ̇, F) = fa, for σ = sgn(N_c ẋ) given (Florian
   * 2007, with the denominator (cos θ − μ_c σ sin θ) of MATH.md §7.1), and acc[2] ← N_c.
   */
  const accelSigned = (sig: number): void => {
    const th = fa[0];
    const w = fa[1];
    const F = fa[2];
    sc[0] = th;
    sinCosInPlace(sc, 0);
    const s = sc[0];
    const c = sc[1];
    const num =
      g * s +
      c * ((-F - mpl * w * w * (s + muC * sig * c)) * invM + muC * g * sig) -
      (muP * w) / mpl;
    const thdd = num / (l43 - lmpM * c * (c - muC * sig * s));
    const nc = M * g - mpl * (thdd * s + w * w * c);
    acc[0] = (F + mpl * (w * w * s - thdd * c) - muC * nc * sig) * invM;
    acc[1] = thdd;
    acc[2] = nc;
  };
  /**
   * Accelerations with friction at fa for a cart moving with sign sv = sgn(ẋ): σ = sgn(N_c ẋ) is
   * found by assuming N_c > 0 and re-solving with −sv if that gives N_c < 0 (Florian 2007).
   * Returns σ.
   */
  const accelWithFriction = (sv: number): number => {
    accelSigned(sv);
    if (sv === 0 || muC === 0 || acc[2] >= 0) return sv;
    accelSigned(-sv);
    return -sv;
  };
  /** acc[0] ← ẍ, acc[1] ← θ̈ at state x[xo..] under force u[uo]. */
  const accelAt = (x: Float64Array, xo: number, u: Float64Array, uo: number): void => {
    const th = x[xo + 2];
    const w = x[xo + 3];
    const F = u[uo];
    if (frictionless) {
      sc[0] = th;
      sinCosInPlace(sc, 0);
      const s = sc[0];
      const c = sc[1];
      const thdd = thetaAcc(s, c, w, F);
      acc[0] = cartAcc(s, c, w, F, thdd);
      acc[1] = thdd;
      return;
    }
    fa[0] = th;
    fa[1] = w;
    fa[2] = F;
    const v = x[xo + 1];
    accelWithFriction(v > 0 ? 1 : v < 0 ? -1 : 0);
  };
  const forceScratch = new Float64Array(1);
  // central-difference partials for the friction model, with σ frozen at the base point
  const fdBase = new Float64Array(4);
  const fdPlus = new Float64Array(2);
  const fdMinus = new Float64Array(2);

  /** ∂(ẍ, θ̈)/∂(ẋ, θ, θ̇, F) by central differences with σ frozen (friction model only). */
  const frictionPartials = (
    x: Float64Array,
    xo: number,
    F: number,
    fx: Float64Array,
    fu: Float64Array,
  ): void => {
    for (let i = 0; i < 4; i++) fdBase[i] = x[xo + i];
    fa[0] = fdBase[2];
    fa[1] = fdBase[3];
    fa[2] = F;
    const sig = accelWithFriction(fdBase[1] > 0 ? 1 : fdBase[1] < 0 ? -1 : 0);
    fx.fill(0);
    fu.fill(0);
    fx[1] = 1;
    fx[2 * 4 + 3] = 1;
    // ẋ enters only through σ, which is frozen: ∂/∂ẋ = 0 (and ∂/∂x = 0)
    for (const j of [2, 3, 4]) {
      const base = j === 4 ? F : fdBase[j];
      const step = 1e-6 * Math.max(1, Math.abs(base));
      const at = (delta: number, out: Float64Array): void => {
        fa[0] = j === 2 ? fdBase[2] + delta : fdBase[2];
        fa[1] = j === 3 ? fdBase[3] + delta : fdBase[3];
        fa[2] = j === 4 ? F + delta : F;
        accelSigned(sig);
        out[0] = acc[0];
        out[1] = acc[1];
      };
      at(step, fdPlus);
      at(-step, fdMinus);
      const dx = (fdPlus[0] - fdMinus[0]) / (2 * step);
      const dth = (fdPlus[1] - fdMinus[1]) / (2 * step);
      if (j === 4) {
        fu[1] = dx;
        fu[3] = dth;
      } else {
        fx[1 * 4 + j] = dx;
        fx[3 * 4 + j] = dth;
      }
    }
  };

  const field: VectorField = {
    n: 4,
    m: 1,
    deriv(x, xo, u, uo, out, oo): void {
      accelAt(x, xo, u, uo);
      out[oo] = x[xo + 1];
      out[oo + 1] = acc[0];
      out[oo + 2] = x[xo + 3];
      out[oo + 3] = acc[1];
    },
    partials(x, xo, u, uo, fx, fu): void {
      if (!frictionless) {
        frictionPartials(x, xo, u[uo], fx, fu);
        return;
      }
      const th = x[xo + 2];
      const w = x[xo + 3];
      const F = u[uo];
      const s = Math.sin(th);
      const c = Math.cos(th);
      const N = g * s + (c * (-F - mpl * w * w * s)) / M;
      const D = l * (4 / 3 - (mp * c * c) / M);
      const thdd = N / D;
      const Nth = g * c + (s * F + mpl * w * w * (s * s - c * c)) / M;
      const Dth = (l * 2 * mp * c * s) / M;
      const tTh = (Nth * D - N * Dth) / (D * D);
      const tW = (-2 * mpl * w * s * c) / M / D;
      const tF = -c / M / D;
      fx.fill(0);
      fx[1] = 1; // ∂ẋ/∂ẋ
      fx[2 * 4 + 3] = 1; // ∂θ̇/∂θ̇
      fx[1 * 4 + 2] = (mpl * (w * w * c - tTh * c + thdd * s)) / M;
      fx[1 * 4 + 3] = (mpl * (2 * w * s - tW * c)) / M;
      fx[3 * 4 + 2] = tTh;
      fx[3 * 4 + 3] = tW;
      fu[0] = 0;
      fu[1] = (1 - mpl * c * tF) / M;
      fu[2] = 0;
      fu[3] = tF;
    },
  };
  const lin = new Rk4Jacobian(field, dt);
  const generic = new Rk4Stepper(field, dt);
  const h = dt;
  const dynamics: Dynamics = {
    stateSize: 4,
    controlSize: 1,
    step(x, xo, u, uo, count, _t): void {
      if (!frictionless) {
        generic.step(x, xo, u, uo, count);
        return;
      }
      for (let k = 0; k < count; k++) {
        const b = xo + 4 * k;
        const F = u[uo + k];
        const p = x[b];
        const v = x[b + 1];
        const th = x[b + 2];
        const w = x[b + 3];
        // classical RK4 with the state in locals; pure helpers so V8 can inline them; sin and
        // cos of each stage angle from one call of the core trig kernel
        sc[0] = th;
        sinCosInPlace(sc, 0);
        let sn = sc[0];
        let cs = sc[1];
        const k1w = thetaAcc(sn, cs, w, F);
        const k1v = cartAcc(sn, cs, w, F, k1w);
        const k1p = v;
        const k1t = w;
        const k2p = v + 0.5 * h * k1v;
        const k2t = w + 0.5 * h * k1w;
        sc[0] = th + 0.5 * h * k1t;
        sinCosInPlace(sc, 0);
        sn = sc[0];
        cs = sc[1];
        const k2w = thetaAcc(sn, cs, k2t, F);
        const k2v = cartAcc(sn, cs, k2t, F, k2w);
        const k3p = v + 0.5 * h * k2v;
        const k3t = w + 0.5 * h * k2w;
        sc[0] = th + 0.5 * h * k2t;
        sinCosInPlace(sc, 0);
        sn = sc[0];
        cs = sc[1];
        const k3w = thetaAcc(sn, cs, k3t, F);
        const k3v = cartAcc(sn, cs, k3t, F, k3w);
        const k4p = v + h * k3v;
        const k4t = w + h * k3w;
        sc[0] = th + h * k3t;
        sinCosInPlace(sc, 0);
        sn = sc[0];
        cs = sc[1];
        const k4w = thetaAcc(sn, cs, k4t, F);
        const k4v = cartAcc(sn, cs, k4t, F, k4w);
        const c = h / 6;
        x[b] = p + c * (k1p + 2 * k2p + 2 * k3p + k4p);
        x[b + 1] = v + c * (k1v + 2 * k2v + 2 * k3v + k4v);
        x[b + 2] = th + c * (k1t + 2 * k2t + 2 * k3t + k4t);
        x[b + 3] = w + c * (k1w + 2 * k2w + 2 * k3w + k4w);
      }
    },
    jacobians(x, u, _t, a, b): void {
      lin.jacobians(x, u, a, b);
    },
  };

  const goal = new Float64Array(4);
  const cost = sumCosts(
    quadraticCost({
      stateSize: 4,
      controlSize: 1,
      q: square(q, 4),
      r: square(r, 1),
      qf: square(qf, 4),
      angleIndices: [2],
    }),
    stateLimitPenalty({
      stateSize: 4,
      controlSize: 1,
      limits: [
        {
          index: 0,
          lower: -trackLimit,
          upper: trackLimit,
          weight: trackWeight,
          violationCost: trackFlag,
        },
      ],
    }),
  );

  const a = new Float64Array(16);
  const b = new Float64Array(4);
  lin.jacobians(goal, new Float64Array(1), a, b);
  const ca = new Float64Array(16);
  const cb = new Float64Array(4);
  field.partials(goal, 0, new Float64Array(1), 0, ca, cb);
  const lq: LinearQuadratic = {
    stateSize: 4,
    controlSize: 1,
    a,
    b,
    q: new Float64Array(q),
    r: new Float64Array(r),
    qf: new Float64Array(qf),
    state: new Float64Array(4),
    control: new Float64Array(1),
    continuousA: ca,
    continuousB: cb,
    exact: false,
  };
  const criterion = `|θ| ≤ ${angTol} rad, |θ̇| ≤ ${rateTol} rad/s and |x| ≤ ${trackLimit} m for the last ${hold} states`;
  const assess = (states: Float64Array, count?: number) =>
    holdTest(`${fn}.assess`, states, 4, count, hold, criterion, (x, o) => {
      const e = Math.abs(wrapAngle(x[o + 2]));
      if (!(e <= angTol)) return `|θ| = ${fmt(e)} rad > ${angTol}`;
      const w = Math.abs(x[o + 3]);
      if (!(w <= rateTol)) return `|θ̇| = ${fmt(w)} rad/s > ${rateTol}`;
      const p = Math.abs(x[o]);
      if (!(p <= trackLimit)) return `|x| = ${fmt(p)} m > ${trackLimit}`;
      return "";
    });
  return {
    name: "cart-pole",
    description:
      "Cart-pole on a finite track: swing the pole up from hanging and balance it upright near the track centre, with a bounded force.",
    source:
      "A. G. Barto, R. S. Sutton, C. W. Anderson, Neuronlike Adaptive Elements That Can Solve Difficult Learning Control Problems, IEEE Trans. SMC 13(5), 1983; equations: R. V. Florian, Correct Equations for the Dynamics of the Cart-Pole System, 2007",
    stateSize: 4,
    controlSize: 1,
    stateNames: ["x", "ẋ", "θ", "θ̇"],
    controlNames: ["F"],
    angleIndices: [2],
    dt,
    dynamics,
    cost,
    bounds: {
      lower: new Float64Array([-forceLimit]),
      upper: new Float64Array([forceLimit]),
    },
    goal,
    goalControl: new Float64Array(1),
    horizon,
    episodeLength,
    linearQuadratic: lq,
    parameters: {
      cartMass: mc,
      poleMass: mp,
      halfLength: l,
      gravity: g,
      cartFriction: muC,
      poleFriction: muP,
      forceLimit,
      trackLimit,
    },
    initialState: () => new Float64Array(x0),
    success: (states, count) => assess(states, count).success,
    assess,
    accelerations(x, o, force, out, oo): void {
      forceScratch[0] = force;
      accelAt(x, o, forceScratch, 0);
      out[oo] = acc[0];
      out[oo + 1] = acc[1];
    },
  };
}
