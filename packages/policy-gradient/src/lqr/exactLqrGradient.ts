/**
 * The exact policy gradient of the linear-quadratic regulator with respect to a linear gain K,
 * and the gradient, natural and Gauss–Newton updates of Fazel, Ge, Kakade & Mesbahi (2018).
 *
 * @module
 */
import {
  discreteLyapunov,
  type MatrixInput,
  mahalanobis,
  RecedeError,
  requireInteger,
  requirePositive,
  requireVector,
  spectralRadius,
  toRowMajor,
} from "@recede/core";
import type { LinearQuadratic } from "@recede/problems";
import { requireOptionsObject, requireUnitHalfOpen } from "../internal/validate.js";

/** Options of {@link lqrPolicyProblem}. */
export interface LqrPolicyProblemOptions {
  /** A (n×n). */
  readonly a: MatrixInput;
  /** B (n×m). */
  readonly b: MatrixInput;
  /** Q (n×n, symmetric positive semidefinite). */
  readonly q: MatrixInput;
  /** R (m×m, symmetric positive definite). */
  readonly r: MatrixInput;
  /**
   * Σ₀ = E[x₀x₀ᵀ] (n×n, symmetric positive definite).
   * @defaultValue the identity
   */
  readonly initialCovariance?: MatrixInput;
  /**
   * Discount γ ∈ (0, 1].
   * @defaultValue 1
   */
  readonly discount?: number;
  /**
   * Covariance W (m×m) of Gaussian action noise, u = −Kx + w (the exploration of a linear-Gaussian
   * policy); needs γ < 1 when non-zero.
   * @defaultValue 0
   */
  readonly actionNoise?: MatrixInput;
}

/** Everything {@link LqrPolicyProblem.evaluate} computes for one gain (row-major arrays). */
export interface LqrPolicyEvaluation {
  /** C(K). */
  readonly cost: number;
  /** ∇C(K) (m×n). */
  readonly gradient: Float64Array;
  /** P_K (n×n), the value matrix. */
  readonly valueMatrix: Float64Array;
  /** Σ_K (n×n), the discounted state correlation Σ_t γ^t E[x_t x_tᵀ]. */
  readonly stateCovariance: Float64Array;
  /** E_K = (R + γBᵀP_K B)K − γBᵀP_K A (m×n). */
  readonly e: Float64Array;
  /** R + γ BᵀP_K B (m×m). */
  readonly curvature: Float64Array;
  /** ρ(√γ (A − BK)). */
  readonly spectralRadius: number;
}

/** Update rules of {@link LqrPolicyProblem.step}. */
export type LqrUpdateMethod = "gradient" | "natural" | "gauss-newton";

function matmul(r: number, k: number, c: number, a: Float64Array, b: Float64Array): Float64Array {
  const out = new Float64Array(r * c);
  for (let i = 0; i < r; i++) {
    for (let p = 0; p < k; p++) {
      const v = a[i * k + p];
      if (v === 0) continue;
      for (let j = 0; j < c; j++) out[i * c + j] += v * b[p * c + j];
    }
  }
  return out;
}

function transpose(r: number, c: number, a: Float64Array): Float64Array {
  const out = new Float64Array(r * c);
  for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) out[j * r + i] = a[i * c + j];
  return out;
}

function mat(
  data: Float64Array,
  rows: number,
  cols: number,
): { data: Float64Array; rows: number; cols: number } {
  return { data, rows, cols };
}

/**
 * An infinite-horizon LQR problem seen as a function of the gain K of the policy u = −Kx (+ w).
 * Create with {@link lqrPolicyProblem}.
 */
export class LqrPolicyProblem {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** γ. */
  readonly discount: number;
  private readonly A: Float64Array;
  private readonly B: Float64Array;
  private readonly Q: Float64Array;
  private readonly R: Float64Array;
  private readonly S0: Float64Array;
  private readonly noiseCost: number;

  /** Use {@link lqrPolicyProblem}; the constructor trusts validated options. */
  constructor(
    n: number,
    m: number,
    A: Float64Array,
    B: Float64Array,
    Q: Float64Array,
    R: Float64Array,
    S0: Float64Array,
    gamma: number,
    W: Float64Array,
  ) {
    this.stateSize = n;
    this.controlSize = m;
    this.A = A;
    this.B = B;
    this.Q = Q;
    this.R = R;
    this.discount = gamma;
    // Σ₀′ = Σ₀ + γ/(1−γ) B W Bᵀ, noise cost tr(RW)/(1−γ).
    const s0 = S0.slice();
    let nc = 0;
    if (gamma < 1) {
      const bw = matmul(n, m, m, B, W);
      const bwb = matmul(n, m, n, bw, transpose(n, m, B));
      const f = gamma / (1 - gamma);
      for (let i = 0; i < n * n; i++) s0[i] += f * bwb[i];
      for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) nc += R[i * m + j] * W[j * m + i];
      nc /= 1 - gamma;
    }
    this.S0 = s0;
    this.noiseCost = nc;
  }

  private checkGain(fn: string, k: Float64Array): void {
    requireVector(fn, "gain", k, this.controlSize * this.stateSize);
  }

  /** The scaled closed loop √γ (A − BK) (n×n). */
  private closedLoop(k: Float64Array): Float64Array {
    const n = this.stateSize;
    const m = this.controlSize;
    const bk = matmul(n, m, n, this.B, k);
    const sg = Math.sqrt(this.discount);
    const out = new Float64Array(n * n);
    for (let i = 0; i < n * n; i++) out[i] = sg * (this.A[i] - bk[i]);
    return out;
  }

  /** ρ(√γ (A − BK)); the gain is stabilizing (finite cost) iff this is < 1. */
  closedLoopRadius(gain: Float64Array): number {
    this.checkGain("LqrPolicyProblem.closedLoopRadius", gain);
    return spectralRadius(mat(this.closedLoop(gain), this.stateSize, this.stateSize));
  }

  /**
   * C(K), ∇C(K), P_K, Σ_K and E_K for the gain K (m×n, row-major). Throws a typed error
   * (`code: "domain"`) when K is not stabilizing, ρ(√γ(A − BK)) ≥ 1.
   */
  evaluate(gain: Float64Array): LqrPolicyEvaluation {
    const fn = "LqrPolicyProblem.evaluate";
    this.checkGain(fn, gain);
    const n = this.stateSize;
    const m = this.controlSize;
    const g = this.discount;
    const acl = this.closedLoop(gain);
    const rho = spectralRadius(mat(acl, n, n));
    if (!(rho < 1)) {
      throw new RecedeError("domain", fn, "gain", "stabilizing: ρ(√γ(A − BK)) < 1", `ρ = ${rho}`);
    }
    // P = (Q + KᵀRK) + A_clᵀ P A_cl  →  discreteLyapunov(A_cl, ·) solves X = A_clᵀ X A_cl + Q.
    const kt = transpose(m, n, gain);
    const qk = matmul(n, m, n, kt, matmul(m, m, n, this.R, gain));
    for (let i = 0; i < n * n; i++) qk[i] += this.Q[i];
    const P = discreteLyapunov(mat(acl, n, n), mat(qk, n, n)).data;
    // Σ = Σ₀′ + A_cl Σ A_clᵀ  →  discreteLyapunov(A_clᵀ, Σ₀′).
    const S = discreteLyapunov(mat(transpose(n, n, acl), n, n), mat(this.S0, n, n)).data;
    let cost = this.noiseCost;
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) cost += P[i * n + j] * this.S0[j * n + i];
    const bt = transpose(n, m, this.B);
    const btp = matmul(m, n, n, bt, P);
    const curv = matmul(m, n, m, btp, this.B);
    for (let i = 0; i < m * m; i++) curv[i] = this.R[i] + g * curv[i];
    const e = matmul(m, m, n, curv, gain);
    const btpa = matmul(m, n, n, btp, this.A);
    for (let i = 0; i < m * n; i++) e[i] -= g * btpa[i];
    const grad = matmul(m, n, n, e, S);
    for (let i = 0; i < m * n; i++) grad[i] *= 2;
    return {
      cost,
      gradient: grad,
      valueMatrix: P,
      stateCovariance: S,
      e,
      curvature: curv,
      spectralRadius: rho,
    };
  }

  /** C(K) (throws for a non-stabilizing K). */
  cost(gain: Float64Array): number {
    return this.evaluate(gain).cost;
  }

  /**
   * One update of K as a mirror step of the core Mahalanobis geometry on vec(K) (row-major):
   * - `"gradient"`: metric I, K⁺ = K − η ∇C(K);
   * - `"natural"`: metric I_m ⊗ Σ_K, K⁺ = K − η ∇C(K) Σ_K⁻¹ = K − 2η E_K;
   * - `"gauss-newton"`: metric (R + γBᵀP_K B) ⊗ Σ_K,
   *   K⁺ = K − η (R + γBᵀP_K B)⁻¹ ∇C(K) Σ_K⁻¹ (η = ½ is Hewer's policy iteration).
   * Returns a new array; throws a typed error (and changes nothing) when K or K⁺ is not stabilizing.
   */
  step(gain: Float64Array, method: LqrUpdateMethod, stepSize: number): Float64Array {
    const fn = "LqrPolicyProblem.step";
    if (method !== "gradient" && method !== "natural" && method !== "gauss-newton") {
      throw new RecedeError(
        "range",
        fn,
        "method",
        '"gradient", "natural" or "gauss-newton"',
        method,
      );
    }
    requirePositive(fn, "stepSize", stepSize);
    const ev = this.evaluate(gain);
    const n = this.stateSize;
    const m = this.controlSize;
    const d = m * n;
    const metric = new Float64Array(d * d);
    for (let a = 0; a < m; a++) {
      for (let b = 0; b < m; b++) {
        const w = method === "gauss-newton" ? ev.curvature[a * m + b] : a === b ? 1 : 0;
        if (w === 0) continue;
        for (let i = 0; i < n; i++) {
          for (let j = 0; j < n; j++) {
            const s = method === "gradient" ? (i === j ? 1 : 0) : ev.stateCovariance[i * n + j];
            metric[(a * n + i) * d + b * n + j] = w * s;
          }
        }
      }
    }
    const geo = mahalanobis({ metric: mat(metric, d, d) });
    const next = geo.step(gain, ev.gradient, stepSize, new Float64Array(d));
    const rho = this.closedLoopRadius(next);
    if (!(rho < 1)) {
      throw new RecedeError(
        "domain",
        fn,
        "stepSize",
        "small enough that the updated gain stays stabilizing (ρ(√γ(A − BK⁺)) < 1)",
        `${stepSize} (ρ after the step = ${rho})`,
      );
    }
    return next;
  }
}

/**
 * Create the LQR policy-optimization problem of Fazel, Ge, Kakade & Mesbahi, "Global Convergence
 * of Policy Gradient Methods for the Linear Quadratic Regulator", ICML, 2018 (MATH.md §5.6):
 *   C(K) = E Σ_t γ^t (x_tᵀQx_t + u_tᵀRu_t),  x_{t+1} = Ax_t + Bu_t,  u_t = −Kx_t + w_t,
 *   C(K) = tr(P_K Σ₀′) + tr(RW)/(1−γ),  P_K = Q + KᵀRK + γ(A−BK)ᵀP_K(A−BK),
 *   Σ_K = Σ₀′ + γ(A−BK)Σ_K(A−BK)ᵀ,  Σ₀′ = Σ₀ + γ/(1−γ)·BWBᵀ,
 *   ∇C(K) = 2((R + γBᵀP_K B)K − γBᵀP_K A)Σ_K = 2E_KΣ_K.
 * With γ = 1 and W = 0 these are the paper's formulas; the discounted, noisy form follows by
 * A → √γA, B → √γB (the noise enters only through Σ₀′ because it is independent of the state).
 * Lyapunov solves use `discreteLyapunov` of `@recede/core`. Symbols ↔ options: A, B, Q, R ↔
 * `a`, `b`, `q`, `r`; Σ₀ ↔ `initialCovariance`; γ ↔ `discount`; W ↔ `actionNoise`.
 *
 * @example
 * ```ts
 * const lqr = lqrPolicyProblem({ a: [[1, 0.1], [0, 1]], b: [[0.005], [0.1]], q: [[1, 0], [0, 1]], r: [[0.1]] });
 * let k = new Float64Array([1, 1.5]);
 * for (let i = 0; i < 50; i++) k = lqr.step(k, "gauss-newton", 0.5); // → the DARE gain
 * ```
 */
export function lqrPolicyProblem(options: LqrPolicyProblemOptions): LqrPolicyProblem {
  const fn = "lqrPolicyProblem";
  requireOptionsObject(fn, options);
  const A = toRowMajor(fn, "a", options.a);
  const n = requireInteger(fn, "a.rows", A.rows, 1);
  if (A.cols !== n)
    throw new RecedeError("dimension", fn, "a", "square", `shape ${A.rows}×${A.cols}`);
  const B = toRowMajor(fn, "b", options.b, n, -1);
  const m = requireInteger(fn, "b.cols", B.cols, 1);
  const Q = toRowMajor(fn, "q", options.q, n, n);
  const R = toRowMajor(fn, "r", options.r, m, m);
  const eye = new Float64Array(n * n);
  for (let i = 0; i < n; i++) eye[i * n + i] = 1;
  const S0 =
    options.initialCovariance === undefined
      ? mat(eye, n, n)
      : toRowMajor(fn, "initialCovariance", options.initialCovariance, n, n);
  const gamma = requireUnitHalfOpen(fn, "discount", options.discount ?? 1);
  const W =
    options.actionNoise === undefined
      ? mat(new Float64Array(m * m), m, m)
      : toRowMajor(fn, "actionNoise", options.actionNoise, m, m);
  if (gamma === 1 && W.data.some((v) => v !== 0)) {
    throw new RecedeError(
      "range",
      fn,
      "discount",
      "< 1 when actionNoise is non-zero (the cost is infinite otherwise)",
      gamma,
    );
  }
  // Symmetric positive definiteness of R and Σ₀ (Cholesky), symmetry of Q.
  requireSpd(fn, "r", R.data, m);
  requireSpd(fn, "initialCovariance", S0.data, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      if (
        Math.abs(Q.data[i * n + j] - Q.data[j * n + i]) >
        1e-12 * (1 + Math.abs(Q.data[i * n + j]))
      ) {
        throw new RecedeError("not-spd", fn, "q", "symmetric", `q[${i}][${j}] ≠ q[${j}][${i}]`);
      }
    }
  }
  return new LqrPolicyProblem(n, m, A.data, B.data, Q.data, R.data, S0.data, gamma, W.data);
}

function requireSpd(fn: string, arg: string, a: Float64Array, n: number): void {
  try {
    mahalanobis({ metric: mat(a.slice(), n, n) });
  } catch {
    throw new RecedeError(
      "not-spd",
      fn,
      arg,
      "symmetric positive definite",
      `a ${n}×${n} matrix that is not`,
    );
  }
}

/** Options of {@link lqrPolicyProblemFrom}: the parts of {@link LqrPolicyProblemOptions} the LQ data does not give. */
export interface LqrFromLinearQuadraticOptions {
  /** Σ₀. @defaultValue the identity */
  readonly initialCovariance?: MatrixInput;
  /** γ. @defaultValue 1 */
  readonly discount?: number;
  /** W. @defaultValue 0 */
  readonly actionNoise?: MatrixInput;
}

/**
 * {@link lqrPolicyProblem} on the linear-quadratic data of a reference problem
 * (`problem.linearQuadratic` of `@recede/problems`: A, B, Q, R about the goal; the terminal weight
 * does not enter the infinite-horizon cost). The gain then acts on δx = x − x̄.
 *
 * @example
 * ```ts
 * const lqr = lqrPolicyProblemFrom(doubleIntegrator().linearQuadratic!);
 * ```
 */
export function lqrPolicyProblemFrom(
  lq: LinearQuadratic,
  options: LqrFromLinearQuadraticOptions = {},
): LqrPolicyProblem {
  const fn = "lqrPolicyProblemFrom";
  if (typeof lq !== "object" || lq === null || !(lq.a instanceof Float64Array)) {
    throw new RecedeError("type", fn, "lq", "a LinearQuadratic record", lq);
  }
  const n = lq.stateSize;
  const m = lq.controlSize;
  return lqrPolicyProblem({
    a: mat(lq.a, n, n),
    b: mat(lq.b, n, m),
    q: mat(lq.q, n, n),
    r: mat(lq.r, m, m),
    initialCovariance: options.initialCovariance,
    discount: options.discount,
    actionNoise: options.actionNoise,
  });
}
