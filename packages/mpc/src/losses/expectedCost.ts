/**
 * Expected-cost (risk-neutral) loss with the un-normalized mirror step.
 *
 * @module
 */
import { RecedeError, requirePositive } from "@recede/core";
import { requireObject } from "../internal/input.js";
import type { SampleLoss } from "./types.js";

/** Options of {@link expectedCost}. */
export interface ExpectedCostOptions {
  /**
   * Cost scale s > 0 dividing the centred costs, or `"std"` for the sample standard deviation of
   * the finite costs (which makes γ dimensionless).
   * @defaultValue "std"
   */
  readonly scale?: number | "std";
}

const FN = "expectedCost";

/**
 * Expected cost ℓ_t(θ) = E_{U∼π_θ}[C_t(U)] (MATH.md §3.2, case 1) with the likelihood-ratio
 * gradient in natural parameters, ∇_η ℓ = E[(C − b)(φ(U) − m)], estimated over the V finite samples
 * with the baseline b = their mean cost. The mirror step is then the un-normalized
 *   m⁺ = m − γ (1/V) Σ_i ((C_i − b)/s) (φ(U_i) − m) = m + γ(Σ v_i φ_i − (Σ v_i) m),
 *   v_i = −(C_i − b)/(V·s)   (v_i = 0 for failed samples),
 * so the weights are signed and sum to 0. Caveat (MATH.md §3.3): γ then carries units of 1/cost
 * unless s normalizes the costs, and the result need not be a valid distribution (a variance may go
 * negative): the Gaussian plan floors its variance and the controller clips the mean to the bounds.
 * Prefer the log-utility losses ({@link exponentialUtility}, {@link eliteFraction}) when in doubt.
 * Loss estimate ℓ̂_t = b. Symbols ↔ options: s ↔ `scale`.
 *
 * Source: N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning Approach to Model
 * Predictive Control", RSS 2019 (expected-cost loss); the likelihood-ratio identity as in
 * R. J. Williams, "Simple Statistical Gradient-Following Algorithms for Connectionist Reinforcement
 * Learning", Machine Learning, 1992.
 */
export function expectedCost(options: ExpectedCostOptions = {}): SampleLoss {
  requireObject(FN, "options", options);
  const scale = options.scale ?? "std";
  if (scale !== "std") {
    if (typeof scale !== "number")
      throw new RecedeError("type", FN, "scale", 'a number or "std"', scale);
    requirePositive(FN, "scale", scale);
  }
  return new ExpectedCost(scale === "std" ? 0 : scale);
}

class ExpectedCost implements SampleLoss {
  /** Scratch for {@link SampleLoss.weigh} (which returns what `weighInto` writes). */
  private readonly one: Float64Array = new Float64Array(1);
  readonly name = "expected-cost";
  readonly normalized = false;
  /** 0 means "use the sample standard deviation". */
  constructor(private readonly scale: number) {}

  weigh(costs: Float64Array, count: number, weights: Float64Array): number {
    this.weighInto(costs, count, weights, this.one);
    return this.one[0];
  }

  weighInto(costs: Float64Array, count: number, weights: Float64Array, out: Float64Array): void {
    let valid = 0;
    let sum = 0;
    for (let i = 0; i < count; i++) {
      const c = costs[i];
      if (Number.isFinite(c)) {
        valid++;
        sum += c;
      }
    }
    if (valid === 0) {
      out[0] = Number.NaN;
      return;
    }
    const b = sum / valid;
    let s = this.scale;
    if (s === 0) {
      let ss = 0;
      for (let i = 0; i < count; i++) {
        const c = costs[i];
        if (Number.isFinite(c)) ss += (c - b) * (c - b);
      }
      s = Math.sqrt(ss / valid);
    }
    const f = s > 0 && Number.isFinite(s) ? -1 / (valid * s) : 0;
    for (let i = 0; i < count; i++) {
      const c = costs[i];
      weights[i] = Number.isFinite(c) ? f * (c - b) : 0;
    }
    out[0] = b;
  }
}
