/**
 * Hedge (exponential weights over N experts) as a one-line composition: mirror descent in the
 * simplex entropy geometry.
 *
 * @module
 */
import { entropy } from "../divergence/entropy.js";
import { RecedeError, requireInteger } from "../errors.js";
import { requireOptions, toVector, type VectorInput } from "../internal/vectorInput.js";
import { type MirrorDescentLearner, mirrorDescent } from "./mirrorDescent.js";
import type { StepSizeInput } from "./stepSize.js";

/** Options of {@link hedge}. */
export interface HedgeOptions {
  /** Number N of experts (an integer ≥ 1). */
  readonly experts: number;
  /** η_t, as for {@link mirrorDescent}; η = √(8 ln N / T) is the tuned constant for T rounds. */
  readonly stepSize: StepSizeInput;
  /**
   * The first weights p₁ on the simplex.
   * @defaultValue uniform, 1/N each
   */
  readonly initial?: VectorInput;
}

/**
 * Hedge: p_{t+1,i} ∝ p_{t,i} e^{−η_t ℓ_{t,i}}, i.e. `mirrorDescent` with `entropy({ dimension: N })`
 * (feed the loss vector ℓ_t as the gradient). With losses in [0, 1] and η = √(8 ln N / T), the
 * expected regret against the best expert is at most √(T ln N / 2). Symbols ↔ options:
 * N ↔ `experts`, η ↔ `stepSize`, p₁ ↔ `initial`.
 *
 * Source: Y. Freund, R. Schapire, "A Decision-Theoretic Generalization of On-Line Learning and an
 * Application to Boosting", J. Comput. Syst. Sci., 1997; N. Cesa-Bianchi, G. Lugosi, "Prediction,
 * Learning, and Games", 2006, Thm 2.2.
 *
 * @example
 * ```ts
 * const learner = hedge({ experts: 3, stepSize: Math.sqrt((8 * Math.log(3)) / 100) });
 * learner.update({ gradient: new Float64Array([1, 0, 0.5]) });
 * learner.decision(); // weight moves toward expert 1
 * ```
 */
export function hedge(options: HedgeOptions): MirrorDescentLearner {
  const fn = "hedge";
  requireOptions(fn, options);
  const n = requireInteger(fn, "experts", options.experts, 1);
  const geometry = entropy({ dimension: n });
  const initial =
    options.initial === undefined
      ? new Float64Array(n).fill(1 / n)
      : toVector(fn, "initial", options.initial, n);
  if (!geometry.contains(initial)) {
    throw new RecedeError("domain", fn, "initial", "on the probability simplex", initial);
  }
  return mirrorDescent({ geometry, initial, stepSize: options.stepSize });
}
