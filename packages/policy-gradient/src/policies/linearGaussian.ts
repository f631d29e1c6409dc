/**
 * Linear-Gaussian policy: u = −K x + b + σ ⊙ ε, ε ∼ N(0, I), with learnable log-std.
 *
 * @module
 */
import {
  type MatrixInput,
  RecedeError,
  requireInteger,
  requirePositive,
  type Stream,
  toRowMajor,
} from "@recede/core";
import {
  finishGaussianFisher,
  gaussianLogProb,
  gaussianMeanKl,
  gaussianPerturb,
  gaussianScore,
} from "../internal/gaussianHead.js";
import { requireOptionsObject } from "../internal/validate.js";
import type { ParameterBlock, StochasticPolicy } from "./policy.js";

/** Options of {@link linearGaussianPolicy}. */
export interface LinearGaussianPolicyOptions {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly actionSize: number;
  /**
   * Learn an action offset b (u = −Kx + b + noise).
   * @defaultValue true
   */
  readonly bias?: boolean;
  /**
   * Initial gain K (m×n). Zero when omitted.
   * @defaultValue zeros
   */
  readonly initialGain?: MatrixInput;
  /**
   * Initial standard deviation σ of the action noise: one value for all components, or one per
   * component.
   * @defaultValue 1
   */
  readonly initialStd?: number | Float64Array;
}

/**
 * A linear-Gaussian policy family π_θ(u | x) = N(−K x + b, diag σ²).
 *
 * θ layout: K (m×n, row-major) | b (m, when `bias`) | ln σ (m).
 * Score: ∂ln π/∂K_{ji} = −(u_j − μ_j) x_i/σ_j², ∂ln π/∂b_j = (u_j − μ_j)/σ_j²,
 * ∂ln π/∂ln σ_j = (u_j − μ_j)²/σ_j² − 1 (MATH.md §5.1; Williams 1992).
 * Fisher: F = (1/N) Σ_s J_sᵀ diag(σ⁻²) J_s ⊕ 2·I on the ln σ block, J_s = ∂μ/∂(K, b).
 */
export class LinearGaussianPolicy implements StochasticPolicy {
  readonly name: string = "linear-gaussian";
  readonly kind: "gaussian" = "gaussian";
  readonly stateSize: number;
  readonly actionSize: number;
  readonly actionCount: number = 0;
  readonly parameterCount: number;
  readonly blocks: readonly ParameterBlock[];
  /** True when θ holds an offset b. */
  readonly hasBias: boolean;
  /** Offset of ln σ in θ. */
  readonly logStdOffset: number;
  private readonly init: Float64Array;
  private readonly mu: Float64Array;
  private readonly mu2: Float64Array;
  private readonly dmu: Float64Array;
  private readonly klMu: Float64Array;

  /** Use {@link linearGaussianPolicy}; the constructor trusts validated options. */
  constructor(n: number, m: number, bias: boolean, init: Float64Array) {
    this.stateSize = n;
    this.actionSize = m;
    this.hasBias = bias;
    this.logStdOffset = m * n + (bias ? m : 0);
    this.parameterCount = this.logStdOffset + m;
    const blocks: ParameterBlock[] = [{ name: "gain", offset: 0, length: m * n, shape: [m, n] }];
    if (bias) blocks.push({ name: "bias", offset: m * n, length: m, shape: [m] });
    blocks.push({ name: "logStd", offset: this.logStdOffset, length: m, shape: [m] });
    this.blocks = blocks;
    this.init = init;
    this.mu = new Float64Array(m);
    this.mu2 = new Float64Array(m);
    this.dmu = new Float64Array(m);
    this.klMu = new Float64Array(m);
  }

  initialParameters(): Float64Array {
    return this.init.slice();
  }

  private meanInto(theta: Float64Array, x: Float64Array, xo: number, out: Float64Array): void {
    const n = this.stateSize;
    const m = this.actionSize;
    const bo = m * n;
    for (let j = 0; j < m; j++) {
      let s = this.hasBias ? theta[bo + j] : 0;
      const r = j * n;
      for (let i = 0; i < n; i++) s -= theta[r + i] * x[xo + i];
      out[j] = s;
    }
  }

  sample(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    stream: Stream,
    action: Float64Array,
    ao: number,
  ): void {
    this.meanInto(theta, state, so, this.mu);
    stream.fillNormal(action, ao, this.actionSize);
    gaussianPerturb(this.actionSize, this.mu, theta, this.logStdOffset, action, ao);
  }

  mean(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
  ): void {
    this.meanInto(theta, state, so, this.mu);
    for (let j = 0; j < this.actionSize; j++) action[ao + j] = this.mu[j];
  }

  logProb(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
  ): number {
    this.meanInto(theta, state, so, this.mu);
    return gaussianLogProb(this.actionSize, this.mu, 0, theta, this.logStdOffset, action, ao);
  }

  addGradLogProb(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
    weight: number,
    out: Float64Array,
  ): number {
    const m = this.actionSize;
    this.meanInto(theta, state, so, this.mu);
    const lp = gaussianScore(
      m,
      this.mu,
      0,
      theta,
      this.logStdOffset,
      action,
      ao,
      weight,
      this.dmu,
      out,
    );
    this.addMeanTranspose(state, so, this.dmu, out);
    return lp;
  }

  /**
   * out ← out + J(x)ᵀ w for the mean's Jacobian J(x) = ∂μ/∂(K, b) at x: −w_j x_i on K_{ji}, +w_j on
   * b_j (the ln σ block is not touched).
   */
  private addMeanTranspose(x: Float64Array, xo: number, w: Float64Array, out: Float64Array): void {
    const n = this.stateSize;
    const m = this.actionSize;
    for (let j = 0; j < m; j++) {
      const r = j * n;
      const wj = w[j];
      for (let i = 0; i < n; i++) out[r + i] -= wj * x[xo + i];
    }
    if (this.hasBias) for (let j = 0; j < m; j++) out[m * n + j] += w[j];
  }

  fisherVectorProduct(
    theta: Float64Array,
    states: Float64Array,
    so: number,
    count: number,
    v: Float64Array,
    out: Float64Array,
  ): Float64Array {
    const m = this.actionSize;
    const ls = this.logStdOffset;
    out.fill(0);
    const w = this.dmu;
    for (let k = 0; k < count; k++) {
      const xo = so + k * this.stateSize;
      // μ is linear in (K, b), so J v = −V_K x + v_b is the mean map applied to v; w = Σ⁻¹ J v.
      this.meanInto(v, states, xo, w);
      for (let j = 0; j < m; j++) w[j] *= Math.exp(-2 * theta[ls + j]);
      this.addMeanTranspose(states, xo, w, out);
    }
    return finishGaussianFisher(m, ls, count, v, out);
  }

  meanKl(
    thetaOld: Float64Array,
    thetaNew: Float64Array,
    states: Float64Array,
    so: number,
    count: number,
  ): number {
    const ls = this.logStdOffset;
    return gaussianMeanKl(this, ls, thetaOld, thetaNew, states, so, count, this.mu2, this.klMu);
  }
}

/**
 * Create a linear-Gaussian policy family u = −K x + b + σ ⊙ ε (see {@link LinearGaussianPolicy}).
 *
 * Symbols ↔ options: n ↔ `stateSize`, m ↔ `actionSize`, K₀ ↔ `initialGain`, σ₀ ↔ `initialStd`.
 * Source: the Gaussian unit of Williams, "Simple Statistical Gradient-Following Algorithms for
 * Connectionist Reinforcement Learning", Machine Learning, 1992.
 *
 * @example
 * ```ts
 * const pi = linearGaussianPolicy({ stateSize: 2, actionSize: 1, initialStd: 0.3 });
 * const theta = pi.initialParameters(); // [K11, K12, b, ln σ]
 * ```
 */
export function linearGaussianPolicy(options: LinearGaussianPolicyOptions): LinearGaussianPolicy {
  const fn = "linearGaussianPolicy";
  requireOptionsObject(fn, options);
  const n = requireInteger(fn, "stateSize", options.stateSize, 1);
  const m = requireInteger(fn, "actionSize", options.actionSize, 1);
  const bias = options.bias ?? true;
  if (typeof bias !== "boolean") throw new RecedeError("type", fn, "bias", "a boolean", bias);
  const count = m * n + (bias ? m : 0) + m;
  const init = new Float64Array(count);
  if (options.initialGain !== undefined) {
    init.set(toRowMajor(fn, "initialGain", options.initialGain, m, n).data, 0);
  }
  const ls = count - m;
  const std = options.initialStd ?? 1;
  if (typeof std === "number") {
    requirePositive(fn, "initialStd", std);
    for (let j = 0; j < m; j++) init[ls + j] = Math.log(std);
  } else {
    if (!(std instanceof Float64Array) || std.length !== m) {
      throw new RecedeError(
        "dimension",
        fn,
        "initialStd",
        `a number or a Float64Array of length ${m}`,
        std,
      );
    }
    for (let j = 0; j < m; j++) {
      requirePositive(fn, `initialStd[${j}]`, std[j]);
      init[ls + j] = Math.log(std[j]);
    }
  }
  return new LinearGaussianPolicy(n, m, bias, init);
}
