/**
 * KL geometry between Gaussians: the KL divergence in closed form (diagonal and full covariance)
 * and the mirror step in expectation (mean) parameters used by sampling MPC.
 *
 * Mirror step [Wagener, Cheng, Sacks & Boots, "An Online Learning Approach to Model Predictive
 * Control", RSS 2019; derivation in MATH.md §3.3–3.4]: with the log-partition's Bregman divergence
 * D_A(η‖η_t) = KL(π_{η_t}‖π_η), the step is a convex combination in mean parameters
 * m = (μ, Σ + μμᵀ): with weighted sample statistics μ̄ = Σ w_i U_i and
 * Σ_w = Σ w_i (U_i − μ̄)(U_i − μ̄)ᵀ,
 *   μ⁺ = (1−γ)μ + γμ̄,
 *   Σ⁺ = (1−γ)Σ + γΣ_w + γ(1−γ)(μ − μ̄)(μ − μ̄)ᵀ.
 *
 * @module
 */

/**
 * Diagonal expectation-parameter step, in place on `len` coordinates:
 * μ_i ← (1−γ)μ_i + γ μ̄_i,  σ²_i ← (1−γ)σ²_i + γ s²_i + γ(1−γ)(μ_i − μ̄_i)²,
 * where `targetMean` = μ̄ and `targetVariance` = s² (weighted variance about μ̄).
 * Pass `variance = null` to update the mean only (fixed covariance).
 */
export function gaussianDiagonalStep(
  len: number,
  gamma: number,
  mean: Float64Array,
  meanOffset: number,
  variance: Float64Array | null,
  varianceOffset: number,
  targetMean: Float64Array,
  targetMeanOffset: number,
  targetVariance: Float64Array | null,
  targetVarianceOffset: number,
): void {
  const g1 = 1 - gamma;
  for (let i = 0; i < len; i++) {
    const mu = mean[meanOffset + i];
    const mb = targetMean[targetMeanOffset + i];
    if (variance !== null && targetVariance !== null) {
      const d = mu - mb;
      variance[varianceOffset + i] =
        g1 * variance[varianceOffset + i] +
        gamma * targetVariance[targetVarianceOffset + i] +
        gamma * g1 * d * d;
    }
    mean[meanOffset + i] = g1 * mu + gamma * mb;
  }
}

/**
 * Full-covariance expectation-parameter step on a k-dimensional Gaussian, in place:
 * μ ← (1−γ)μ + γμ̄,  Σ ← (1−γ)Σ + γΣ_w + γ(1−γ)(μ − μ̄)(μ − μ̄)ᵀ (Σ, Σ_w row-major k×k).
 * The result is symmetrized.
 */
export function gaussianFullStep(
  k: number,
  gamma: number,
  mean: Float64Array,
  meanOffset: number,
  cov: Float64Array,
  covOffset: number,
  targetMean: Float64Array,
  targetMeanOffset: number,
  targetCov: Float64Array,
  targetCovOffset: number,
): void {
  const g1 = 1 - gamma;
  for (let i = 0; i < k; i++) {
    const di = mean[meanOffset + i] - targetMean[targetMeanOffset + i];
    for (let j = 0; j <= i; j++) {
      const dj = mean[meanOffset + j] - targetMean[targetMeanOffset + j];
      const v =
        g1 * 0.5 * (cov[covOffset + i * k + j] + cov[covOffset + j * k + i]) +
        gamma *
          0.5 *
          (targetCov[targetCovOffset + i * k + j] + targetCov[targetCovOffset + j * k + i]) +
        gamma * g1 * di * dj;
      cov[covOffset + i * k + j] = v;
      cov[covOffset + j * k + i] = v;
    }
  }
  for (let i = 0; i < k; i++) {
    mean[meanOffset + i] = g1 * mean[meanOffset + i] + gamma * targetMean[targetMeanOffset + i];
  }
}
