/**
 * Regret bound of online mirror descent x_{t+1} = argmin_{x∈X} η⟨g_t, x⟩ + D_ψ(x‖x_t) with a
 * regularizer ψ that is σ-strongly convex w.r.t. a norm ‖·‖ (MATH.md §1.5). Symbols ↔ options:
 * B ↔ `divergenceBound` (≥ D_ψ(u‖x_1) for the comparators of interest), σ ↔ `strongConvexity`,
 * G ↔ `gradientBound` (≥ ‖g_t‖_*, the dual norm), T ↔ `rounds`, η ↔ `stepSize`.
 *
 * Instances: Euclidean ψ = ½‖x‖² (σ = 1, B = D²/2) gives D G √T at the tuned step; negentropy on
 * Δ_N (σ = 1 w.r.t. ‖·‖₁, dual ‖·‖∞, B = ln N from the uniform start) gives √(2T ln N).
 *
 * @module
 */

import { nonNegative, positive, roundsArg } from "./checks.js";

/** Parameters of {@link mirrorDescentRegretBound}. */
export interface MirrorDescentBoundParameters {
  /** B ≥ D_ψ(u‖x_1). */
  readonly divergenceBound: number;
  /** σ > 0. @defaultValue 1 */
  readonly strongConvexity?: number;
  /** G ≥ max_t ‖g_t‖_*; ignored when `sumSquaredDualNorms` is given. */
  readonly gradientBound?: number;
  /** Σ_t ‖g_t‖_*² measured on the run (data-dependent form); overrides T·G². */
  readonly sumSquaredDualNorms?: number;
  /** T ≥ 1. */
  readonly rounds: number;
  /** η > 0. */
  readonly stepSize: number;
}

/**
 * Fixed step η:
 *   R_T(u) ≤ B/η + (η / (2σ)) Σ_t ‖g_t‖_*²  ≤  B/η + η T G² / (2σ).
 * Source: T. Lattimore, C. Szepesvári, "Bandit Algorithms", Cambridge 2020, Theorem 28.4 (with
 * Cor. 28.8 for σ = 1); the general-σ form is derived in MATH.md §1.5. Tuned step
 * η* = √(2σB / (T G²)) ({@link mirrorDescentTunedStepSize}) gives G √(2BT/σ).
 */
export function mirrorDescentRegretBound(p: MirrorDescentBoundParameters): number {
  const fn = "mirrorDescentRegretBound";
  const B = nonNegative(fn, "divergenceBound", p.divergenceBound);
  const sigma =
    p.strongConvexity === undefined ? 1 : positive(fn, "strongConvexity", p.strongConvexity);
  const T = roundsArg(fn, p.rounds);
  const eta = positive(fn, "stepSize", p.stepSize);
  let sq: number;
  if (p.sumSquaredDualNorms !== undefined) {
    sq = nonNegative(fn, "sumSquaredDualNorms", p.sumSquaredDualNorms);
  } else {
    const G = nonNegative(fn, "gradientBound", p.gradientBound);
    sq = T * G * G;
  }
  return B / eta + (eta * sq) / (2 * sigma);
}

/** Parameters of {@link mirrorDescentTunedStepSize}. */
export interface MirrorDescentTuningParameters {
  readonly divergenceBound: number;
  /** @defaultValue 1 */
  readonly strongConvexity?: number;
  readonly gradientBound: number;
  readonly rounds: number;
}

/**
 * η* = √(2σB / (T G²)), the minimizer of the worst-case form B/η + ηTG²/(2σ) of
 * {@link mirrorDescentRegretBound}, where it equals G√(2BT/σ). Derived (MATH.md §1.5; Lattimore &
 * Szepesvári, "Bandit Algorithms", 2020, Cor. 28.8 for σ = 1).
 */
export function mirrorDescentTunedStepSize(p: MirrorDescentTuningParameters): number {
  const fn = "mirrorDescentTunedStepSize";
  const B = positive(fn, "divergenceBound", p.divergenceBound);
  const sigma =
    p.strongConvexity === undefined ? 1 : positive(fn, "strongConvexity", p.strongConvexity);
  const G = positive(fn, "gradientBound", p.gradientBound);
  const T = roundsArg(fn, p.rounds);
  return Math.sqrt((2 * sigma * B) / (T * G * G));
}
