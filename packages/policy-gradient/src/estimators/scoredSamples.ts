/**
 * The hand-off between gradient estimators and policy updates: (state, action) samples with the
 * behaviour log-probability and a cost weight each.
 *
 * @module
 */
import type { StochasticPolicy } from "../policies/policy.js";

/**
 * Samples scored for a likelihood-ratio gradient.
 *
 * The surrogate loss of a candidate θ′ and its gradient at θ′ are
 *   L(θ′) = (1/Z) Σ_i w_i · π_θ′(a_i | s_i) / π_b(a_i | s_i),
 *   ∇L(θ′) = (1/Z) Σ_i w_i · ρ_i ∇ ln π_θ′(a_i | s_i),  ρ_i = π_θ′/π_b,
 * so at the behaviour parameters (ρ = 1) ∇L is the REINFORCE / GAE estimate of ∇J (Williams 1992;
 * Schulman et al. 2015, the surrogate of TRPO), where w_i is the sample's cost weight (a discounted
 * return minus a baseline, or an advantage), π_b the behaviour policy and Z the normalizer (the
 * number of episodes).
 */
export interface ScoredSamples {
  /** Number of samples N. */
  readonly count: number;
  /** N·n states. */
  readonly states: Float64Array;
  /** N·a action records. */
  readonly actions: Float64Array;
  /** N values ln π_b(a_i | s_i) under the behaviour policy. */
  readonly logProbs: Float64Array;
  /** N cost weights w_i (lower is better: costs are minimized). */
  readonly weights: Float64Array;
  /** The normalizer Z > 0. */
  readonly normalizer: number;
}

/**
 * L(θ) and, when `grad` is given, grad ← ∇L(θ) (see {@link ScoredSamples}). Returns L(θ).
 * Samples whose weight is 0 are skipped.
 *
 * L(θ) = (1/Z) Σ_i w_i ρ_i, ∇L(θ) = (1/Z) Σ_i w_i ρ_i ∇ln π_θ(a_i | s_i), ρ_i = π_θ(a_i|s_i)/π_b(a_i|s_i)
 * (Schulman et al., "Trust Region Policy Optimization", ICML 2015; at ρ = 1 the REINFORCE
 * estimate of Williams 1992).
 */
export function surrogateLoss(
  policy: StochasticPolicy,
  theta: Float64Array,
  samples: ScoredSamples,
  grad: Float64Array | null,
): number {
  const n = policy.stateSize;
  const a = policy.actionSize;
  const inv = 1 / samples.normalizer;
  if (grad !== null) grad.fill(0);
  let s = 0;
  for (let i = 0; i < samples.count; i++) {
    const w = samples.weights[i];
    if (w === 0) continue;
    const lp = policy.logProb(theta, samples.states, i * n, samples.actions, i * a);
    const rho = Math.exp(lp - samples.logProbs[i]);
    s += w * rho;
    if (grad !== null) {
      policy.addGradLogProb(
        theta,
        samples.states,
        i * n,
        samples.actions,
        i * a,
        w * rho * inv,
        grad,
      );
    }
  }
  return s * inv;
}
