/**
 * REINFORCE with a baseline (Williams 1992): score-function gradient weights from discounted
 * returns-to-go.
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
import { requireUnitHalfOpen } from "../internal/validate.js";
import type { ScoredSamples } from "./scoredSamples.js";
import type { ValueModel } from "./valueFunction.js";

/**
 * Discounted returns-to-go G_t = Σ_{k=t}^{L−1} γ^{k−t} c_k + γ^{L−t} c_H(x_L) for every sample of
 * `batch` (sample i = e·T + t; L = the episode's length, T unless it terminated early), written
 * into `out` (length E·T; padding steps get 0). Returns `out`.
 * Computed backwards, G_t = c_t + γ G_{t+1} (common practice; R. S. Sutton, A. G. Barto,
 * "Reinforcement Learning: An Introduction", 2nd ed., 2018, §3.3).
 */
export function returnsToGo(
  batch: EpisodeBatch,
  discount: number,
  out: Float64Array,
): Float64Array {
  const T = batch.horizon;
  for (let e = 0; e < batch.episodes; e++) {
    const L = batch.lengths[e];
    for (let t = L; t < T; t++) out[e * T + t] = 0;
    let g = batch.terminalCosts[e];
    for (let t = L - 1; t >= 0; t--) {
      g = batch.costs[e * T + t] + discount * g;
      out[e * T + t] = g;
    }
  }
  return out;
}

/** Options of {@link reinforce}. */
export interface ReinforceOptions {
  /**
   * Discount γ ∈ (0, 1].
   * @defaultValue 1
   */
  readonly discount?: number;
  /**
   * Baseline b(s_t, t): `"none"`; `"mean"` — the leave-one-out mean of G_t over the other episodes
   * of the batch at the same step (unbiased); or a {@link ValueModel} fitted to the returns of
   * *previous* batches (predicted first, refitted after, so it never depends on the batch it scores
   * and the estimate stays unbiased).
   * @defaultValue "mean"
   */
  readonly baseline?: "none" | "mean" | ValueModel;
  /**
   * Multiply step t's weight by γ^t — the unbiased gradient of the discounted objective. Common
   * practice drops the factor (a biased choice; MATH.md §5.1).
   * @defaultValue true
   */
  readonly discountWeighting?: boolean;
}

/** Turns an {@link EpisodeBatch} into {@link ScoredSamples}. */
export interface GradientEstimator {
  /** Short name, e.g. `"reinforce"`. */
  readonly name: string;
  /** Score the batch's samples (buffers owned by the estimator, valid until the next call). */
  score(batch: EpisodeBatch): ScoredSamples;
}

/** REINFORCE estimator; create with {@link reinforce}. */
export class ReinforceEstimator implements GradientEstimator {
  readonly name: string = "reinforce";
  /** γ. */
  readonly discount: number;
  /** The baseline in use. */
  readonly baseline: "none" | "mean" | ValueModel;
  /** Whether step weights carry γ^t. */
  readonly discountWeighting: boolean;
  private returns: Float64Array = new Float64Array(0);
  private weights: Float64Array = new Float64Array(0);
  private readonly scratch: CompactionScratch = new CompactionScratch();
  private readonly fitScratch: FitScratch = new FitScratch();

  /** Use {@link reinforce}; the constructor trusts validated options. */
  constructor(
    discount: number,
    baseline: "none" | "mean" | ValueModel,
    discountWeighting: boolean,
  ) {
    this.discount = discount;
    this.baseline = baseline;
    this.discountWeighting = discountWeighting;
  }

  score(batch: EpisodeBatch): ScoredSamples {
    if (!(batch instanceof EpisodeBatch)) {
      throw new RecedeError("type", "ReinforceEstimator.score", "batch", "an EpisodeBatch", batch);
    }
    const E = batch.episodes;
    const T = batch.horizon;
    const N = E * T;
    if (this.returns.length !== N) {
      this.returns = new Float64Array(N);
      this.weights = new Float64Array(N);
    }
    const G = returnsToGo(batch, this.discount, this.returns);
    const w = this.weights;
    const base = this.baseline;
    const L = batch.lengths;
    if (base === "mean" && E > 1) {
      for (let t = 0; t < T; t++) {
        let s = 0;
        let c = 0;
        for (let e = 0; e < E; e++) {
          if (t < L[e]) {
            s += G[e * T + t];
            c++;
          }
        }
        for (let e = 0; e < E; e++) {
          const i = e * T + t;
          w[i] = t >= L[e] ? 0 : c > 1 ? G[i] - (s - G[i]) / (c - 1) : G[i];
        }
      }
    } else if (typeof base === "object") {
      const n = batch.stateSize;
      for (let i = 0; i < N; i++)
        w[i] = i % T < L[(i - (i % T)) / T] ? G[i] - base.predict(batch.states, i * n, i % T) : 0;
      fitOnActiveSteps(base, batch, G, this.fitScratch);
    } else w.set(G);
    if (this.discountWeighting && this.discount !== 1) {
      for (let e = 0; e < E; e++) {
        let d = 1;
        for (let t = 0; t < T; t++) {
          w[e * T + t] *= d;
          d *= this.discount;
        }
      }
    }
    return scoredFromBatch(batch, w, this.scratch);
  }
}

/**
 * REINFORCE with a baseline (R. J. Williams, "Simple Statistical Gradient-Following Algorithms for
 * Connectionist Reinforcement Learning", Machine Learning, 1992; MATH.md §5.1), cost form:
 *   ∇J(θ) ≈ (1/E) Σ_e Σ_t γ^t ∇ ln π_θ(a_t | s_t) (G_t − b(s_t, t)),
 *   G_t = Σ_{k≥t} γ^{k−t} c_k + γ^{T−t} c_H.
 * Symbols ↔ options: γ ↔ `discount`, b ↔ `baseline`. The weights w_i = γ^t (G_t − b) go to a
 * policy update as {@link ScoredSamples} with normalizer E.
 *
 * @example
 * ```ts
 * const est = reinforce({ discount: 0.99, baseline: "mean" });
 * const samples = est.score(env.collect(pi, theta, stream, batch));
 * ```
 */
export function reinforce(options: ReinforceOptions = {}): ReinforceEstimator {
  const fn = "reinforce";
  const discount = requireUnitHalfOpen(fn, "discount", options.discount ?? 1);
  const baseline = options.baseline ?? "mean";
  if (
    baseline !== "none" &&
    baseline !== "mean" &&
    (typeof baseline !== "object" || baseline === null || typeof baseline.predict !== "function")
  ) {
    throw new RecedeError("type", fn, "baseline", '"none", "mean" or a ValueModel', baseline);
  }
  const dw = options.discountWeighting ?? true;
  if (typeof dw !== "boolean")
    throw new RecedeError("type", fn, "discountWeighting", "a boolean", dw);
  return new ReinforceEstimator(discount, baseline, dw);
}
