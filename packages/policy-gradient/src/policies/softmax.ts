/**
 * Softmax (Gibbs) policy over N discrete actions with logits linear in the state.
 *
 * @module
 */
import { kernels, RecedeError, requireInteger, type Stream } from "@recede/core";
import { requireOptionsObject } from "../internal/validate.js";
import type { ParameterBlock, StochasticPolicy } from "./policy.js";

/** Options of {@link softmaxPolicy}. */
export interface SoftmaxPolicyOptions {
  /** State size n. */
  readonly stateSize: number;
  /** Number of discrete actions N (≥ 2). */
  readonly actionCount: number;
  /**
   * Learn a per-action logit offset c.
   * @defaultValue true
   */
  readonly bias?: boolean;
}

/**
 * The softmax policy family π_θ(a | x) = exp(z_a − lse(z)), z = W x + c.
 *
 * θ layout: W (N×n, row-major) | c (N, when `bias`). The action record is one number, the index a.
 * Score: ∇_W ln π = (e_a − p) xᵀ, ∇_c ln π = e_a − p (p = softmax(z)).
 * Fisher: F = (1/N_s) Σ_s J_sᵀ (diag p − p pᵀ) J_s with J_s = ∂z/∂θ — singular along the shift
 * z → z + t·1 (so damp it). KL(π_o‖π_n) = Σ_a p_o,a (ln p_o,a − ln p_n,a).
 * Sources: the Gibbs/softmax action-selection rule (Sutton & Barto, "Reinforcement Learning: An
 * Introduction", 2nd ed., 2018, §13.1); score-function form from Williams 1992.
 */
export class SoftmaxPolicy implements StochasticPolicy {
  readonly name: string = "softmax";
  readonly kind: "categorical" = "categorical";
  readonly stateSize: number;
  readonly actionSize: number = 1;
  readonly actionCount: number;
  readonly parameterCount: number;
  readonly blocks: readonly ParameterBlock[];
  /** True when θ holds logit offsets c. */
  readonly hasBias: boolean;
  private readonly z: Float64Array;
  private readonly z2: Float64Array;
  private readonly dz: Float64Array;

  /** Use {@link softmaxPolicy}; the constructor trusts validated options. */
  constructor(n: number, actions: number, bias: boolean) {
    this.stateSize = n;
    this.actionCount = actions;
    this.hasBias = bias;
    this.parameterCount = actions * n + (bias ? actions : 0);
    const blocks: ParameterBlock[] = [
      { name: "weight", offset: 0, length: actions * n, shape: [actions, n] },
    ];
    if (bias) blocks.push({ name: "bias", offset: actions * n, length: actions, shape: [actions] });
    this.blocks = blocks;
    this.z = new Float64Array(actions);
    this.z2 = new Float64Array(actions);
    this.dz = new Float64Array(actions);
  }

  initialParameters(): Float64Array {
    return new Float64Array(this.parameterCount);
  }

  /** out ← the scores z = W x + c (length N) for the weights and offsets held in `w`. */
  private scores(w: Float64Array, x: Float64Array, xo: number, out: Float64Array): void {
    const n = this.stateSize;
    const N = this.actionCount;
    const co = N * n;
    for (let a = 0; a < N; a++) {
      let s = this.hasBias ? w[co + a] : 0;
      const r = a * n;
      for (let i = 0; i < n; i++) s += w[r + i] * x[xo + i];
      out[a] = s;
    }
  }

  /** out ← log-probabilities ln p = z − logsumexp(z) (length N) at state x. */
  private logits(theta: Float64Array, x: Float64Array, xo: number, out: Float64Array): void {
    const N = this.actionCount;
    this.scores(theta, x, xo, out);
    const lse = kernels.logSumExp(N, out, 0);
    for (let a = 0; a < N; a++) out[a] -= lse;
  }

  /** out ← out + Jᵀ w for the scores' Jacobian J = ∂z/∂(W, c) at x: w_a x_i on W_{ai}, w_a on c_a. */
  private addScoreTranspose(x: Float64Array, xo: number, w: Float64Array, out: Float64Array): void {
    const n = this.stateSize;
    const N = this.actionCount;
    for (let a = 0; a < N; a++) {
      const r = a * n;
      const wa = w[a];
      for (let i = 0; i < n; i++) out[r + i] += wa * x[xo + i];
      if (this.hasBias) out[N * n + a] += wa;
    }
  }

  /** Write the action probabilities at `state` into `out` (length N). Returns `out`. */
  probabilities(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    out: Float64Array,
  ): Float64Array {
    this.logits(theta, state, so, this.z);
    for (let a = 0; a < this.actionCount; a++) out[a] = Math.exp(this.z[a]);
    return out;
  }

  sample(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    stream: Stream,
    action: Float64Array,
    ao: number,
  ): void {
    this.logits(theta, state, so, this.z);
    const u = stream.uniform();
    let c = 0;
    const N = this.actionCount;
    let pick = N - 1;
    for (let a = 0; a < N; a++) {
      c += Math.exp(this.z[a]);
      if (u < c) {
        pick = a;
        break;
      }
    }
    action[ao] = pick;
  }

  mean(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
  ): void {
    this.logits(theta, state, so, this.z);
    let best = 0;
    for (let a = 1; a < this.actionCount; a++) if (this.z[a] > this.z[best]) best = a;
    action[ao] = best;
  }

  logProb(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
  ): number {
    this.logits(theta, state, so, this.z);
    return this.z[action[ao]];
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
    const N = this.actionCount;
    this.logits(theta, state, so, this.z);
    const act = action[ao];
    const g = this.dz;
    for (let a = 0; a < N; a++) g[a] = weight * ((a === act ? 1 : 0) - Math.exp(this.z[a]));
    this.addScoreTranspose(state, so, g, out);
    return this.z[act];
  }

  fisherVectorProduct(
    theta: Float64Array,
    states: Float64Array,
    so: number,
    count: number,
    v: Float64Array,
    out: Float64Array,
  ): Float64Array {
    const N = this.actionCount;
    out.fill(0);
    const dz = this.dz;
    const p = this.z2;
    for (let k = 0; k < count; k++) {
      const xo = so + k * this.stateSize;
      this.logits(theta, states, xo, this.z);
      // The scores are linear in θ, so J v is the score map applied to v; then
      // w = (diag p − p pᵀ) J v and out += Jᵀ w.
      this.scores(v, states, xo, dz);
      let pd = 0;
      for (let a = 0; a < N; a++) {
        p[a] = Math.exp(this.z[a]);
        pd += p[a] * dz[a];
      }
      for (let a = 0; a < N; a++) dz[a] = p[a] * (dz[a] - pd);
      this.addScoreTranspose(states, xo, dz, out);
    }
    if (count > 0) {
      const inv = 1 / count;
      for (let q = 0; q < this.parameterCount; q++) out[q] *= inv;
    }
    return out;
  }

  meanKl(
    thetaOld: Float64Array,
    thetaNew: Float64Array,
    states: Float64Array,
    so: number,
    count: number,
  ): number {
    let s = 0;
    for (let k = 0; k < count; k++) {
      const xo = so + k * this.stateSize;
      this.logits(thetaOld, states, xo, this.z);
      this.logits(thetaNew, states, xo, this.z2);
      for (let a = 0; a < this.actionCount; a++) {
        s += Math.exp(this.z[a]) * (this.z[a] - this.z2[a]);
      }
    }
    return count > 0 ? s / count : 0;
  }
}

/**
 * Create a softmax policy family over `actionCount` discrete actions (see {@link SoftmaxPolicy}).
 *
 * Symbols ↔ options: n ↔ `stateSize`, N ↔ `actionCount`. Initial θ = 0 (the uniform policy).
 *
 * @example
 * ```ts
 * const pi = softmaxPolicy({ stateSize: 3, actionCount: 4 });
 * const theta = pi.initialParameters();
 * ```
 */
export function softmaxPolicy(options: SoftmaxPolicyOptions): SoftmaxPolicy {
  const fn = "softmaxPolicy";
  requireOptionsObject(fn, options);
  const n = requireInteger(fn, "stateSize", options.stateSize, 1);
  const N = requireInteger(fn, "actionCount", options.actionCount, 2);
  const bias = options.bias ?? true;
  if (typeof bias !== "boolean") throw new RecedeError("type", fn, "bias", "a boolean", bias);
  return new SoftmaxPolicy(n, N, bias);
}
