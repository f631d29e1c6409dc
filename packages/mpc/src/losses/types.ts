/**
 * The sample-loss contract: turn the K rollout costs of one iteration into per-sample weights for
 * the mirror step, and estimate the round's loss ℓ_t at the current plan.
 *
 * @module
 */

/**
 * A loss over sampled costs (MATH.md §3.2). Costs of failed samples are +∞ and must get weight 0.
 *
 * Implementations allocate at most once (scratch grown to the largest K seen), never per call after
 * that, and compute in the log domain with the maximum score subtracted.
 */
export interface SampleLoss {
  /** Short name, e.g. `"exponential-utility"`. */
  readonly name: string;
  /**
   * True when the weights are a probability vector (w ≥ 0, Σw = 1) and the mirror step is the
   * convex combination m⁺ = (1−γ)m + γΣw φ; false for signed weights (un-normalized step).
   */
  readonly normalized: boolean;
  /**
   * Write the weights of `count` samples into `weights[0..count)` and return the estimate ℓ̂_t of
   * the loss at the current plan. Returns NaN (weights unspecified) when no sample is usable.
   */
  weigh(costs: Float64Array, count: number, weights: Float64Array): number;
  /**
   * Optional: the same as {@link SampleLoss.weigh}, but writes the estimate to `out[0]`. The
   * controller prefers it: a double returned from a call V8 does not inline is allocated on the
   * heap (16 bytes per control step, measured), a double written to a Float64Array is not.
   */
  weighInto?(costs: Float64Array, count: number, weights: Float64Array, out: Float64Array): void;
}
