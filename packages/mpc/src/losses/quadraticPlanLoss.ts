/**
 * The linear-quadratic plan objective J(U) with its adjoint gradient and exact Hessian.
 *
 * @module
 */
import { type CostModel, RecedeError } from "@recede/core";
import { type MatrixLike, matrix, requireObject } from "../internal/input.js";
import type { ObjectiveConfig, ObjectiveFamily, PlanObjective } from "./objective.js";

/** Options of {@link quadraticPlanLoss}. Every matrix defaults to the cost's own field. */
export interface QuadraticPlanLossOptions {
  /** Q (n×n). @defaultValue `cost.q` */
  readonly q?: MatrixLike;
  /** R (m×m). @defaultValue `cost.r` */
  readonly r?: MatrixLike;
  /** S (n×m). @defaultValue `cost.s`, or zero */
  readonly s?: MatrixLike;
  /** Qf (n×n). @defaultValue `cost.qf` */
  readonly qf?: MatrixLike;
}

const FN = "quadraticPlanLoss";

/**
 * The open-loop LQ objective of MATH.md §4.3 over the plan U = (u_0 … u_{H−1}) from the measured x_0:
 *   J(U) = Σ_{t<H} (x_tᵀQx_t + 2x_tᵀSu_t + u_tᵀRu_t) + x_HᵀQf x_H,  x_{t+1} = f(x_t, u_t, t).
 * Gradient by the adjoint (backward) recursion, with A_t, B_t the model's Jacobians along the
 * rollout: λ_H = 2Qf x_H, and for t = H−1 … 0
 *   ∂J/∂u_t = 2Ru_t + 2Sᵀx_t + B_tᵀλ_{t+1},   λ_t = 2Qx_t + 2Su_t + A_tᵀλ_{t+1}.
 * Hessian (constant for linear dynamics, built once from the Jacobians at x = 0, u = 0):
 *   𝐇 = 2(ℬᵀ𝒬ℬ + ℬᵀ𝒮 + 𝒮ᵀℬ + ℛ),
 * with ℬ the stacked impulse responses (block (i, j) = A^{i−1−j}B). For linear dynamics the
 * gradient and Hessian are exact, and one Mahalanobis mirror step with metric 𝐇 and γ = 1 lands
 * on the minimizer U* = −𝐇⁻¹𝐠, which equals the Riccati (LQR) solution. For nonlinear dynamics
 * the gradient is exact and 𝐇 is only the Gauss–Newton Hessian at the origin.
 * Symbols ↔ options: Q ↔ `q`, R ↔ `r`, S ↔ `s`, Qf ↔ `qf`. Requires `dynamics.jacobians`.
 *
 * Source: B. D. O. Anderson, J. B. Moore, "Optimal Control: Linear Quadratic Methods", 1990
 * (batch LQ formulation); derivation and numerical check in MATH.md §4.3.
 */
export function quadraticPlanLoss(options: QuadraticPlanLossOptions = {}): ObjectiveFamily {
  requireObject(FN, "options", options);
  return {
    name: "quadratic",
    create(config: ObjectiveConfig): PlanObjective {
      const dyn = config.dynamics;
      if (typeof dyn.jacobians !== "function") {
        throw new RecedeError(
          "type",
          FN,
          "dynamics.jacobians",
          "a function (the model's Jacobians)",
          dyn.jacobians,
        );
      }
      const n = dyn.stateSize;
      const m = dyn.controlSize;
      const from = (arg: "q" | "r" | "s" | "qf", rows: number, cols: number): Float64Array => {
        const given = options[arg];
        if (given !== undefined) return matrix(FN, arg, given, rows, cols);
        const field = (config.cost as CostModel & Record<string, unknown>)[arg];
        if (field instanceof Float64Array) return matrix(FN, `cost.${arg}`, field, rows, cols);
        if (arg === "s") return new Float64Array(n * m);
        throw new RecedeError(
          "type",
          FN,
          arg,
          `given, or a Float64Array field \`${arg}\` on the cost`,
          field,
        );
      };
      return new QuadraticPlanObjective(
        config,
        n,
        m,
        from("q", n, n),
        from("r", m, m),
        from("s", n, m),
        from("qf", n, n),
      );
    },
  };
}

class QuadraticPlanObjective implements PlanObjective {
  readonly name = "quadratic";
  readonly dimension: number;
  readonly hessian: Float64Array;
  private readonly states: Float64Array;
  private readonly ja: Float64Array;
  private readonly jb: Float64Array;
  private readonly lam: Float64Array;
  private readonly lam2: Float64Array;
  private readonly horizon: number;
  private readonly stepA: Float64Array;
  private readonly stepB: Float64Array;
  private readonly px: Float64Array;
  private readonly pu: Float64Array;

  constructor(
    private readonly config: ObjectiveConfig,
    private readonly n: number,
    private readonly m: number,
    private readonly q: Float64Array,
    private readonly r: Float64Array,
    private readonly s: Float64Array,
    private readonly qf: Float64Array,
  ) {
    const h = config.horizon;
    this.horizon = h;
    this.dimension = h * m;
    this.states = new Float64Array((h + 1) * n);
    this.ja = new Float64Array(h * n * n);
    this.jb = new Float64Array(h * n * m);
    this.lam = new Float64Array(n);
    this.lam2 = new Float64Array(n);
    this.stepA = new Float64Array(n * n);
    this.stepB = new Float64Array(n * m);
    this.px = new Float64Array(n);
    this.pu = new Float64Array(m);
    this.hessian = this.buildHessian();
  }

  private buildHessian(): Float64Array {
    const { n, m, q, r, s, qf, horizon: h } = this;
    const d = h * m;
    const dyn = this.config.dynamics;
    const zx = new Float64Array(n);
    const zu = new Float64Array(m);
    for (let t = 0; t < h; t++) {
      const a = new Float64Array(n * n);
      const b = new Float64Array(n * m);
      dyn.jacobians!(zx, zu, t, a, b);
      this.ja.set(a, t * n * n);
      this.jb.set(b, t * n * m);
    }
    // resp[c][t][i]: state response at time t to a unit input c = (τ, j) (zero for t ≤ τ).
    const resp = new Float64Array(d * (h + 1) * n);
    for (let tau = 0; tau < h; tau++) {
      for (let j = 0; j < m; j++) {
        const c = tau * m + j;
        const base = c * (h + 1) * n;
        for (let i = 0; i < n; i++)
          resp[base + (tau + 1) * n + i] = this.jb[tau * n * m + i * m + j];
        for (let t = tau + 1; t < h; t++) {
          const a0 = t * n * n;
          for (let i = 0; i < n; i++) {
            let v = 0;
            for (let k = 0; k < n; k++) v += this.ja[a0 + i * n + k] * resp[base + t * n + k];
            resp[base + (t + 1) * n + i] = v;
          }
        }
      }
    }
    const hess = new Float64Array(d * d);
    const quad = (
      w: Float64Array,
      x: Float64Array,
      ox: number,
      y: Float64Array,
      oy: number,
    ): number => {
      let v = 0;
      for (let i = 0; i < n; i++) {
        let row = 0;
        for (let k = 0; k < n; k++) row += w[i * n + k] * y[oy + k];
        v += x[ox + i] * row;
      }
      return v;
    };
    for (let c = 0; c < d; c++) {
      const tc = Math.floor(c / m);
      const jc = c % m;
      const bc = c * (h + 1) * n;
      for (let e = 0; e <= c; e++) {
        const te = Math.floor(e / m);
        const je = e % m;
        const be = e * (h + 1) * n;
        let v = 0;
        for (let t = 1; t < h; t++) v += quad(q, resp, bc + t * n, resp, be + t * n);
        v += quad(qf, resp, bc + h * n, resp, be + h * n);
        // Cross terms x_tᵀ S u_t: response of c at time τ_e times S column j_e, and symmetrically.
        for (let i = 0; i < n; i++) {
          v += resp[bc + te * n + i] * s[i * m + je];
          v += resp[be + tc * n + i] * s[i * m + jc];
        }
        if (tc === te) v += r[jc * m + je];
        hess[c * d + e] = 2 * v;
        hess[e * d + c] = 2 * v;
      }
    }
    return hess;
  }

  gradient(x0: Float64Array, plan: Float64Array, out: Float64Array): number {
    const { n, m, q, r, s, qf, horizon: h } = this;
    const dyn = this.config.dynamics;
    const xs = this.states;
    for (let i = 0; i < n; i++) xs[i] = x0[i];
    let cost = 0;
    // Forward: x_{t+1} = f(x_t, u_t, t) on the model itself (copy, then step in place).
    for (let t = 0; t < h; t++) {
      const xo = t * n;
      const uo = t * m;
      for (let i = 0; i < n; i++) {
        let qi = 0;
        for (let k = 0; k < n; k++) qi += q[i * n + k] * xs[xo + k];
        let si = 0;
        for (let k = 0; k < m; k++) si += s[i * m + k] * plan[uo + k];
        cost += xs[xo + i] * (qi + 2 * si);
      }
      for (let i = 0; i < m; i++) {
        let ri = 0;
        for (let k = 0; k < m; k++) ri += r[i * m + k] * plan[uo + k];
        cost += plan[uo + i] * ri;
      }
      for (let i = 0; i < n; i++) xs[xo + n + i] = xs[xo + i];
      dyn.step(xs, xo + n, plan, uo, 1, t);
    }
    const lam = this.lam;
    const lam2 = this.lam2;
    const xh = h * n;
    for (let i = 0; i < n; i++) {
      let v = 0;
      for (let k = 0; k < n; k++) v += qf[i * n + k] * xs[xh + k];
      cost += xs[xh + i] * v;
      lam[i] = 2 * v;
    }
    // Backward adjoint with the Jacobians along the rollout (ja, jb reused as scratch per step).
    const a = this.stepA;
    const b = this.stepB;
    for (let t = h - 1; t >= 0; t--) {
      const xo = t * n;
      const uo = t * m;
      this.jac(xs, xo, plan, uo, t, a, b);
      for (let j = 0; j < m; j++) {
        let g = 0;
        for (let k = 0; k < m; k++) g += 2 * r[j * m + k] * plan[uo + k];
        for (let i = 0; i < n; i++) g += 2 * s[i * m + j] * xs[xo + i] + b[i * m + j] * lam[i];
        out[uo + j] = g;
      }
      for (let i = 0; i < n; i++) {
        let v = 0;
        for (let k = 0; k < n; k++) v += 2 * q[i * n + k] * xs[xo + k] + a[k * n + i] * lam[k];
        for (let k = 0; k < m; k++) v += 2 * s[i * m + k] * plan[uo + k];
        lam2[i] = v;
      }
      for (let i = 0; i < n; i++) lam[i] = lam2[i];
    }
    return cost;
  }

  private jac(
    xs: Float64Array,
    xo: number,
    plan: Float64Array,
    uo: number,
    t: number,
    a: Float64Array,
    b: Float64Array,
  ): void {
    for (let i = 0; i < this.n; i++) this.px[i] = xs[xo + i];
    for (let j = 0; j < this.m; j++) this.pu[j] = plan[uo + j];
    this.config.dynamics.jacobians!(this.px, this.pu, t, a, b);
  }
}
