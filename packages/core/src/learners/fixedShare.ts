/**
 * The fixed-share dynamic step for the simplex: mix a little of the uniform distribution back in.
 *
 * @module
 */
import { RecedeError, requireFinite } from "../errors.js";
import type { DynamicStep } from "./dynamicMirrorDescent.js";

/**
 * Fixed share: Φ(x)ᵢ = (1 − α)·xᵢ + α/N, a dynamic step for {@link dynamicMirrorDescent} on the
 * simplex ({@link entropy}). Every weight stays ≥ α/N, so an expert that was bad for a while can
 * regain the lead within O(ln(N/α)/η) rounds: the learner tracks the best expert when it switches.
 * With α = 0 it is the identity (plain Hedge). Symbols ↔ arguments: α ↔ `alpha` ∈ [0, 1].
 *
 * Bound (Hedge losses in [0, 1], constant η): against any sequence of experts with m switches,
 * regret ≤ [(m + 1) ln N + m ln(1/α) + (T − m − 1) ln(1/(1 − α))]/η + ηT/8.
 *
 * Source: M. Herbster, M. Warmuth, "Tracking the Best Expert", Machine Learning, 1998;
 * N. Cesa-Bianchi, G. Lugosi, "Prediction, Learning, and Games", 2006, §5.2 (bound form from
 * memory); used as the dynamic model in E. Hall, R. Willett, IEEE JSTSP, 2015.
 *
 * @example
 * ```ts
 * const learner = dynamicMirrorDescent({
 *   geometry: entropy({ dimension: 3 }),
 *   initial: [1 / 3, 1 / 3, 1 / 3],
 *   stepSize: 0.5,
 *   dynamic: fixedShare(0.01),
 * });
 * learner.update({ gradient: new Float64Array([1, 0, 0]) });
 * ```
 */
export function fixedShare(alpha: number): DynamicStep {
  const a = requireFinite("fixedShare", "alpha", alpha);
  if (a < 0 || a > 1) throw new RecedeError("range", "fixedShare", "alpha", "in [0, 1]", alpha);
  const keep = 1 - a;
  return (x, _round, out) => {
    const n = x.length;
    const share = a / n;
    for (let i = 0; i < n; i++) out[i] = keep * x[i] + share;
  };
}
