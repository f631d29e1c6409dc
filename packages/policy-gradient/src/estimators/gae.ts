/**
 * Generalized advantage estimation GAE(γ, λ) with a fitted value baseline.
 *
 * @module
 */
import { RecedeError } from "@recede/core";
import { EpisodeBatch } from "../environment/episodeBatch.js";
import {
  CompactionScratch,
  FitScratch,
  fitOnActiveSteps,
  scoredFromBatch,
} from "../internal/compact.js";
import { requireUnitClosed, requireUnitHalfOpen } from "../internal/validate.js";
import type { GradientEstimator } from "./reinforce.js";
import type { ScoredSamples } from "./scoredSamples.js";
import { linearValueFunction, type ValueModel } from "./valueFunction.js";

/** Options of {@link gae}. */
export interface GaeOptions {
  /**
   * Discount γ ∈ (0, 1].
   * @defaultValue 0.99
   */
  readonly discount?: number;
  /**
   * λ ∈ [0, 1]: 0 gives the one-step TD residual, 1 the Monte-Carlo return minus V.
   * @defaultValue 0.95
   */
  readonly lambda?: number;
  /**
   * The value model V(s, t).
   * @defaultValue a {@link linearValueFunction} with quadratic state features and 3 time features,
   * created on the first batch
   */
  readonly value?: ValueModel;
  /**
   * Treat the end of an episode as a time-limit truncation and bootstrap with V(x_T, T) on top of
   * the terminal cost; false treats it as the true end of the task (V beyond T is 0).
   * @defaultValue false
   */
  readonly bootstrapAtHorizon?: boolean;
  /**
   * Multiply step t's weight by γ^t (see {@link ReinforceOptions.discountWeighting}).
   * @defaultValue true
   */
  readonly discountWeighting?: boolean;
}

/** GAE estimator; create with {@link gae}. */
export class GaeEstimator implements GradientEstimator {
  readonly name: string = "gae";
  /** γ. */
  readonly discount: number;
  /** λ. */
  readonly lambda: number;
  /** Whether the horizon is a truncation (bootstrap with V). */
  readonly bootstrapAtHorizon: boolean;
  /** Whether step weights carry γ^t. */
  readonly discountWeighting: boolean;
  private valueModel: ValueModel | null;
  private values: Float64Array = new Float64Array(0);
  private advantages: Float64Array = new Float64Array(0);
  private weights: Float64Array = new Float64Array(0);
  private targets: Float64Array = new Float64Array(0);
  private readonly scratch: CompactionScratch = new CompactionScratch();
  private readonly fitScratch: FitScratch = new FitScratch();

  /** Use {@link gae}; the constructor trusts validated options. */
  constructor(
    discount: number,
    lambda: number,
    value: ValueModel | null,
    bootstrap: boolean,
    dw: boolean,
  ) {
    this.discount = discount;
    this.lambda = lambda;
    this.valueModel = value;
    this.bootstrapAtHorizon = bootstrap;
    this.discountWeighting = dw;
  }

  /** The value model (null before the first batch when it is created on demand). */
  get value(): ValueModel | null {
    return this.valueModel;
  }

  /** The advantages Â of the last scored batch (sample-major, length E·T; 0 on padding). */
  get lastAdvantages(): Float64Array {
    return this.advantages;
  }

  score(batch: EpisodeBatch): ScoredSamples {
    const fn = "GaeEstimator.score";
    if (!(batch instanceof EpisodeBatch))
      throw new RecedeError("type", fn, "batch", "an EpisodeBatch", batch);
    const E = batch.episodes;
    const T = batch.horizon;
    const n = batch.stateSize;
    const N = E * T;
    if (this.valueModel === null) {
      this.valueModel = linearValueFunction({ stateSize: n, horizon: T });
    } else if (this.valueModel.stateSize !== n) {
      throw new RecedeError(
        "dimension",
        fn,
        "batch.stateSize",
        `${this.valueModel.stateSize} (the value model's)`,
        n,
      );
    }
    const V = this.valueModel;
    if (this.values.length !== N) {
      this.values = new Float64Array(N);
      this.advantages = new Float64Array(N);
      this.weights = new Float64Array(N);
      this.targets = new Float64Array(N);
    }
    const v = this.values;
    const A = this.advantages;
    const g = this.discount;
    const gl = g * this.lambda;
    const L = batch.lengths;
    for (let i = 0; i < N; i++) v[i] = V.predict(batch.states, i * n, i % T);
    for (let e = 0; e < E; e++) {
      // Value after the last step: its terminal cost, plus V(x_T, T) on a time-limit truncation
      // (never after a true termination).
      let next = batch.terminalCosts[e];
      if (this.bootstrapAtHorizon && batch.terminated[e] === 0)
        next += V.predict(batch.finalStates, e * n, T);
      let adv = 0;
      for (let t = T - 1; t >= L[e]; t--) A[e * T + t] = 0;
      for (let t = L[e] - 1; t >= 0; t--) {
        const i = e * T + t;
        const delta = batch.costs[i] + g * next - v[i];
        adv = delta + gl * adv;
        A[i] = adv;
        next = v[i];
      }
    }
    for (let i = 0; i < N; i++) this.targets[i] = A[i] + v[i];
    fitOnActiveSteps(V, batch, this.targets, this.fitScratch);
    const w = this.weights;
    for (let e = 0; e < E; e++) {
      let d = 1;
      for (let t = 0; t < T; t++) {
        const i = e * T + t;
        w[i] = this.discountWeighting ? d * A[i] : A[i];
        d *= g;
      }
    }
    return scoredFromBatch(batch, w, this.scratch);
  }
}

/**
 * Generalized advantage estimation (J. Schulman, P. Moritz, S. Levine, M. Jordan, P. Abbeel,
 * "High-Dimensional Continuous Control Using Generalized Advantage Estimation", ICLR, 2016;
 * MATH.md §5.2), cost form:
 *   δ_t = c_t + γ V(s_{t+1}) − V(s_t),   Â_t = Σ_l (γλ)^l δ_{t+l} = δ_t + γλ Â_{t+1},
 * with V(s_T) = c_H(x_T) (+ V(x_T, T) when `bootstrapAtHorizon`). The value model is evaluated
 * first, then refitted on the λ-return targets R̂_t = Â_t + V(s_t) of this batch (ridge least
 * squares for the default linear model), so the next batch uses it. Weights w_i = γ^t Â_t,
 * normalizer E. Symbols ↔ options: γ ↔ `discount`, λ ↔ `lambda`, V ↔ `value`.
 *
 * @example
 * ```ts
 * const est = gae({ discount: 0.99, lambda: 0.95 });
 * ```
 */
export function gae(options: GaeOptions = {}): GaeEstimator {
  const fn = "gae";
  const discount = requireUnitHalfOpen(fn, "discount", options.discount ?? 0.99);
  const lambda = requireUnitClosed(fn, "lambda", options.lambda ?? 0.95);
  const value = options.value ?? null;
  if (
    value !== null &&
    (typeof value !== "object" ||
      typeof value.predict !== "function" ||
      typeof value.fit !== "function")
  ) {
    throw new RecedeError("type", fn, "value", "a ValueModel", value);
  }
  const bootstrap = options.bootstrapAtHorizon ?? false;
  const dw = options.discountWeighting ?? true;
  return new GaeEstimator(discount, lambda, value, bootstrap === true, dw === true);
}
