/**
 * Fitted value baselines V(s, t) for the gradient estimators: a contract and a linear-in-features
 * model fitted by ridge least squares.
 *
 * @module
 */
import { kernels, RecedeError, requireInteger } from "@recede/core";
import { requireNonNegative, requireOptionsObject } from "../internal/validate.js";

/** A value model V(s, t) that predicts the cost-to-go from state s at step t. */
export interface ValueModel {
  /** State size n. */
  readonly stateSize: number;
  /** V(s, t) for the state at `states[so ..]`. */
  predict(states: Float64Array, so: number, t: number): number;
  /** Fit V to `targets[i]` at states `states[i·n ..]` and steps `times[i]`, i < count. */
  fit(states: Float64Array, times: Int32Array, targets: Float64Array, count: number): void;
  /** Forget the fit (V ≡ 0). */
  reset(): void;
}

/** Options of {@link linearValueFunction}. */
export interface LinearValueFunctionOptions {
  /** State size n. */
  readonly stateSize: number;
  /**
   * Episode length T used to scale time, τ = t/T.
   * @defaultValue none (then `timeFeatures` defaults to 0: a stationary V)
   */
  readonly horizon?: number;
  /**
   * State features: `"linear"` φ(s) = (1, s) or `"quadratic"` φ(s) = (1, s, s_i s_j for i ≤ j).
   * @defaultValue "quadratic"
   */
  readonly features?: "linear" | "quadratic";
  /**
   * Number of time features τ, τ², …, τᵏ appended (0 for a stationary V).
   * @defaultValue 3 when `horizon` is given, else 0
   */
  readonly timeFeatures?: number;
  /**
   * Ridge ζ in (ΦᵀΦ/N + ζ·I) w = Φᵀy/N.
   * @defaultValue 1e-6
   */
  readonly ridge?: number;
}

/**
 * V(s, t) = wᵀ φ(s, t), with φ = (1, s, [s ⊗ s upper triangle], τ, …, τᵏ), fitted by ridge least
 * squares: w = (ΦᵀΦ/N + ζ I)⁻¹ Φᵀ y/N, solved by Cholesky (if the factorization fails, ζ is raised
 * tenfold until it succeeds). Quadratic features make V exact for a linear-quadratic problem under
 * a linear policy (the cost-to-go there is quadratic in s; Anderson & Moore, "Optimal Control:
 * Linear Quadratic Methods", 1990), which is why they are the default. The time polynomial is the
 * time-dependent baseline of finite-horizon episodes (common practice).
 */
export class LinearValueFunction implements ValueModel {
  readonly stateSize: number;
  /** Number of features p. */
  readonly featureCount: number;
  /** The weights w (length p). */
  readonly weights: Float64Array;
  private readonly quadratic: boolean;
  private readonly timeFeatures: number;
  private readonly horizon: number;
  private readonly ridge: number;
  private readonly phi: Float64Array;
  private readonly gram: Float64Array;
  private readonly chol: Float64Array;
  private readonly rhs: Float64Array;

  /** Use {@link linearValueFunction}; the constructor trusts validated options. */
  constructor(n: number, quadratic: boolean, timeFeatures: number, horizon: number, ridge: number) {
    this.stateSize = n;
    this.quadratic = quadratic;
    this.timeFeatures = timeFeatures;
    this.horizon = horizon;
    this.ridge = ridge;
    const p = 1 + n + (quadratic ? (n * (n + 1)) / 2 : 0) + timeFeatures;
    this.featureCount = p;
    this.weights = new Float64Array(p);
    this.phi = new Float64Array(p);
    this.gram = new Float64Array(p * p);
    this.chol = new Float64Array(p * p);
    this.rhs = new Float64Array(p);
  }

  private features(states: Float64Array, so: number, t: number): void {
    const n = this.stateSize;
    const phi = this.phi;
    let k = 0;
    phi[k++] = 1;
    for (let i = 0; i < n; i++) phi[k++] = states[so + i];
    if (this.quadratic) {
      for (let i = 0; i < n; i++) {
        for (let j = i; j < n; j++) phi[k++] = states[so + i] * states[so + j];
      }
    }
    const tau = t / this.horizon;
    let pw = 1;
    for (let d = 0; d < this.timeFeatures; d++) {
      pw *= tau;
      phi[k++] = pw;
    }
  }

  predict(states: Float64Array, so: number, t: number): number {
    this.features(states, so, t);
    return kernels.dot(this.featureCount, this.weights, 0, this.phi, 0);
  }

  fit(states: Float64Array, times: Int32Array, targets: Float64Array, count: number): void {
    const p = this.featureCount;
    const n = this.stateSize;
    const G = this.gram;
    const b = this.rhs;
    G.fill(0);
    b.fill(0);
    let used = 0;
    for (let i = 0; i < count; i++) {
      const y = targets[i];
      if (!Number.isFinite(y)) continue;
      this.features(states, i * n, times[i]);
      const phi = this.phi;
      let finite = true;
      for (let q = 0; q < p; q++) if (!Number.isFinite(phi[q])) finite = false;
      if (!finite) continue;
      used++;
      for (let q = 0; q < p; q++) {
        const fq = phi[q];
        b[q] += fq * y;
        for (let r = 0; r <= q; r++) G[q * p + r] += fq * phi[r];
      }
    }
    if (used === 0) return;
    const inv = 1 / used;
    for (let q = 0; q < p; q++) {
      b[q] *= inv;
      for (let r = 0; r <= q; r++) {
        G[q * p + r] *= inv;
        G[r * p + q] = G[q * p + r];
      }
    }
    let zeta = this.ridge;
    for (let attempt = 0; attempt < 40; attempt++) {
      for (let q = 0; q < p * p; q++) this.chol[q] = G[q];
      for (let q = 0; q < p; q++) this.chol[q * p + q] += zeta;
      if (kernels.cholesky(p, this.chol, 0, this.chol, 0)) {
        this.weights.set(b);
        kernels.choleskySolve(p, this.chol, 0, this.weights, 0);
        return;
      }
      zeta = zeta > 0 ? zeta * 10 : 1e-12;
    }
  }

  reset(): void {
    this.weights.fill(0);
  }
}

/**
 * Create a linear-in-features value baseline (see {@link LinearValueFunction}).
 *
 * @example
 * ```ts
 * const v = linearValueFunction({ stateSize: 2, horizon: 100 });
 * ```
 */
export function linearValueFunction(options: LinearValueFunctionOptions): LinearValueFunction {
  const fn = "linearValueFunction";
  requireOptionsObject(fn, options);
  const n = requireInteger(fn, "stateSize", options.stateSize, 1);
  const horizon = requireInteger(fn, "horizon", options.horizon ?? 1, 1);
  const features = options.features ?? "quadratic";
  if (features !== "linear" && features !== "quadratic") {
    throw new RecedeError("type", fn, "features", '"linear" or "quadratic"', features);
  }
  const tf = requireInteger(
    fn,
    "timeFeatures",
    options.timeFeatures ?? (options.horizon === undefined ? 0 : 3),
    0,
  );
  const ridge = requireNonNegative(fn, "ridge", options.ridge ?? 1e-6);
  return new LinearValueFunction(n, features === "quadratic", tf, horizon, ridge);
}
