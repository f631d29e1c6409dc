/**
 * A user-defined log-utility loss.
 *
 * @module
 */
import { kernels, RecedeError } from "@recede/core";
import { requireObject } from "../internal/input.js";
import type { SampleLoss } from "./types.js";

/** Options of {@link customLoss}. */
export interface CustomLossOptions {
  /** Name shown in reports. @defaultValue "custom" */
  readonly name?: string;
  /**
   * Write log-utilities a_i = ln S(C_i) for `count` costs into `scores` (S ≥ 0 non-increasing;
   * −∞ for zero utility). Called once per iteration with the controller's buffers (no copy).
   * Failed samples arrive with C = +∞; their score is forced to −∞ afterwards.
   */
  readonly score: (costs: Float64Array, count: number, scores: Float64Array) => void;
}

const FN = "customLoss";

/**
 * A log-utility loss ℓ_t(θ) = −ln E[S(C)] from a user score a = ln S(C) (MATH.md §3.2):
 *   w_i = exp(a_i − lse(a)),   ℓ̂_t = −(lse(a) − ln K),
 * computed in the log domain with the maximum subtracted (MATH.md §8.1); NaN scores count as −∞.
 * The weights feed the same convex-combination mirror step as MPPI and CEM.
 *
 * Source: N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning Approach to Model
 * Predictive Control", RSS 2019 (the log-utility family of losses).
 *
 * @example
 * ```ts
 * // Softmin on the square root of the cost.
 * const loss = customLoss({ score: (c, n, a) => { for (let i = 0; i < n; i++) a[i] = -Math.sqrt(c[i]); } });
 * ```
 */
export function customLoss(options: CustomLossOptions): SampleLoss {
  requireObject(FN, "options", options);
  if (typeof options.score !== "function") {
    throw new RecedeError(
      "type",
      FN,
      "score",
      "a function (costs, count, scores) => void",
      options.score,
    );
  }
  const name = options.name ?? "custom";
  if (typeof name !== "string") throw new RecedeError("type", FN, "name", "a string", name);
  return new CustomLoss(name, options.score);
}

class CustomLoss implements SampleLoss {
  readonly normalized = true;
  private scores = new Float64Array(0);
  constructor(
    readonly name: string,
    private readonly score: (costs: Float64Array, count: number, scores: Float64Array) => void,
  ) {}

  /** Scratch for {@link SampleLoss.weigh} (which returns what `weighInto` writes). */
  private readonly one: Float64Array = new Float64Array(1);

  weigh(costs: Float64Array, count: number, weights: Float64Array): number {
    this.weighInto(costs, count, weights, this.one);
    return this.one[0];
  }

  weighInto(costs: Float64Array, count: number, weights: Float64Array, out: Float64Array): void {
    if (this.scores.length < count) this.scores = new Float64Array(count);
    const a = this.scores;
    this.score(costs, count, a);
    for (let i = 0; i < count; i++) {
      if (!Number.isFinite(costs[i]) || Number.isNaN(a[i])) a[i] = Number.NEGATIVE_INFINITY;
    }
    // lse(a) through out[0]: a returned double is boxed when the kernel is not inlined.
    kernels.expWeights(count, a, 0, weights, 0, out, 0);
    const lse = out[0];
    out[0] = lse - lse === 0 ? -(lse - Math.log(count)) : Number.NaN;
  }
}
