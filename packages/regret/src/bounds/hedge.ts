/**
 * Regret bounds of Hedge / the exponentially weighted average forecaster
 * p_{t+1,i} ∝ p_{t,i} e^{−η ℓ_{t,i}} with p_1 uniform (MATH.md §1.4), for the expected-loss regret
 * Σ_t ⟨p_t, ℓ_t⟩ − min_i Σ_t ℓ_{t,i}. Symbols ↔ options: N ↔ `experts`, T ↔ `rounds`,
 * η ↔ `stepSize`, ρ ↔ `lossRange` (losses lie in an interval [a, a + ρ]).
 *
 * The same bounds hold for exponentiated gradient on the simplex with ℓ_{t,i} replaced by the
 * gradient coordinates g_{t,i} ∈ [a, a + ρ] (the normalized update is shift-invariant).
 *
 * @module
 */

import { expertsArg, positive, roundsArg } from "./checks.js";

/** Validated (N, T, ρ) of a Hedge bound's parameters, ρ defaulting to 1. */
function read(fn: string, p: HedgeHorizonParameters): [number, number, number] {
  const N = expertsArg(fn, p.experts);
  const T = roundsArg(fn, p.rounds);
  const rho = p.lossRange === undefined ? 1 : positive(fn, "lossRange", p.lossRange);
  return [N, T, rho];
}

/** Parameters of the fixed-step Hedge bound. */
export interface HedgeBoundParameters {
  /** N ≥ 2. */
  readonly experts: number;
  /** T ≥ 1. */
  readonly rounds: number;
  /** η > 0. */
  readonly stepSize: number;
  /** ρ: width of the interval that holds every loss. @defaultValue 1 */
  readonly lossRange?: number;
}

/**
 * Fixed step η, losses in [a, a + ρ]:
 *   R_T ≤ ln N / η + η T ρ² / 8.
 * Source: N. Cesa-Bianchi, G. Lugosi, "Prediction, Learning, and Games", Cambridge 2006,
 * Theorem 2.2 (stated for ρ = 1; Hoeffding-lemma analysis; MATH.md §1.4). For ρ ≠ 1 the ρ² factor
 * is Hoeffding's lemma for a range ρ (derived; equivalently, rescale the losses by 1/ρ).
 * At η = √(8 ln N / T)/ρ ({@link hedgeTunedStepSize}) it is ρ√((T/2) ln N).
 */
export function hedgeRegretBound(p: HedgeBoundParameters): number {
  const fn = "hedgeRegretBound";
  const [N, T, rho] = read(fn, p);
  const eta = positive(fn, "stepSize", p.stepSize);
  return Math.log(N) / eta + (eta * T * rho * rho) / 8;
}

/** Parameters of the tuned and anytime Hedge bounds. */
export interface HedgeHorizonParameters {
  /** N ≥ 2. */
  readonly experts: number;
  /** T ≥ 1. */
  readonly rounds: number;
  /** ρ. @defaultValue 1 */
  readonly lossRange?: number;
}

/** η* = √(8 ln N / T) / ρ, the minimizer of {@link hedgeRegretBound} (Cesa-Bianchi & Lugosi 2006, Cor. 2.2). */
export function hedgeTunedStepSize(p: HedgeHorizonParameters): number {
  const fn = "hedgeTunedStepSize";
  const [N, T, rho] = read(fn, p);
  return Math.sqrt((8 * Math.log(N)) / T) / rho;
}

/**
 * Anytime Hedge, η_t = √(8 ln N / t) / ρ (no horizon needed):
 *   R_T ≤ ρ (2√((T/2) ln N) + √((ln N)/8)).
 * Source: N. Cesa-Bianchi, G. Lugosi, "Prediction, Learning, and Games", Cambridge 2006,
 * Theorem 2.3 (for ρ = 1; MATH.md §1.4 marks the form as recalled [R]); the factor ρ follows by
 * rescaling the losses (derived).
 */
export function hedgeAnytimeRegretBound(p: HedgeHorizonParameters): number {
  const fn = "hedgeAnytimeRegretBound";
  const [N, T, rho] = read(fn, p);
  const lnN = Math.log(N);
  return rho * (2 * Math.sqrt((T / 2) * lnN) + Math.sqrt(lnN / 8));
}
