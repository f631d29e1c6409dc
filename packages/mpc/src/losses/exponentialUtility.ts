/**
 * Exponential-utility (path-integral / free-energy) loss: the MPPI weights.
 *
 * @module
 */
import { kernels, requirePositive } from "@recede/core";
import { requireObject } from "../internal/input.js";
import type { SampleLoss } from "./types.js";

/** Options of {@link exponentialUtility}. */
export interface ExponentialUtilityOptions {
  /** Temperature λ > 0: small λ concentrates on the best samples, large λ averages. */
  readonly temperature: number;
}

const FN = "exponentialUtility";

/**
 * Exponential utility S(C) = exp(−C/λ) with its self-normalized weights, in the log domain:
 *   ρ = min_j C_j,  a_i = −(C_i − ρ)/λ,  w_i = exp(a_i − lse(a)),
 * and the loss estimate (free energy, cost units)
 *   ℓ̂_t = −λ ln((1/K) Σ_i exp(−C_i/λ)) = ρ − λ (lse(a) − ln K),
 * with failed samples (C = +∞) counted in K with zero utility. Subtracting ρ keeps every score
 * finite for finite costs (|C| ≤ 1e300) and gives the best sample weight e⁰ before normalization.
 * λ → 0 gives the argmin (one-hot), λ → ∞ the uniform average.
 * Symbols ↔ options: λ ↔ `temperature`.
 *
 * Source: G. Williams, N. Wagener, B. Goldfain, P. Drews, J. M. Rehg, B. Boots, E. A. Theodorou,
 * "Information Theoretic MPC for Model-Based Reinforcement Learning", ICRA 2017; loss form as in
 * N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning Approach to Model Predictive
 * Control", RSS 2019 (MATH.md §3.2, §3.5, §8.1).
 *
 * @example
 * ```ts
 * const loss = exponentialUtility({ temperature: 0.5 });
 * const w = new Float64Array(3);
 * loss.weigh(new Float64Array([1, 2, 3]), 3, w); // w ∝ [1, e^-2, e^-4]
 * ```
 */
export function exponentialUtility(options: ExponentialUtilityOptions): SampleLoss {
  requireObject(FN, "options", options);
  const lambda = requirePositive(FN, "temperature", options.temperature);
  return new ExponentialUtility(lambda);
}

class ExponentialUtility implements SampleLoss {
  /** Scratch for {@link SampleLoss.weigh} (which returns what `weighInto` writes). */
  private readonly one: Float64Array = new Float64Array(1);
  readonly name = "exponential-utility";
  readonly normalized = true;
  private scores = new Float64Array(0);
  constructor(readonly temperature: number) {}

  weigh(costs: Float64Array, count: number, weights: Float64Array): number {
    this.weighInto(costs, count, weights, this.one);
    return this.one[0];
  }

  weighInto(costs: Float64Array, count: number, weights: Float64Array, out: Float64Array): void {
    if (this.scores.length < count) this.scores = new Float64Array(count);
    const a = this.scores;
    let rho = Number.POSITIVE_INFINITY;
    for (let i = 0; i < count; i++) {
      const c = costs[i];
      if (c < rho) rho = c; // NaN never compares less
    }
    if (!Number.isFinite(rho)) {
      out[0] = Number.NaN;
      return;
    }
    const inv = 1 / this.temperature;
    for (let i = 0; i < count; i++) {
      const c = costs[i];
      // Non-finite cost → −∞ score → weight 0; (c − ρ)·inv may overflow to +∞ → weight 0 (exact limit).
      a[i] = Number.isFinite(c) ? -(c - rho) * inv : Number.NEGATIVE_INFINITY;
    }
    // lse(a) comes back through out[0], not as a return value (which V8 boxes when the kernel is
    // not inlined: 16 bytes per control step, traced by the sampling heap profiler).
    kernels.expWeights(count, a, 0, weights, 0, out, 0);
    out[0] = rho - this.temperature * (out[0] - Math.log(count));
  }
}
