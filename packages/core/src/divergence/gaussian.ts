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
import { RecedeError } from "../errors.js";
import { cholesky, choleskyLogDet, forwardSubstitute } from "../kernels/matrix.js";
import { type MatrixInput, toRowMajor } from "../matrixInput.js";

/**
 * Diagonal expectation-parameter step, in place on `len` coordinates:
 * μ_i ← (1−γ)μ_i + γ μ̄_i,  σ²_i ← (1−γ)σ²_i + γ s²_i + γ(1−γ)(μ_i − μ̄_i)²,
 * where `targetMean` = μ̄ and `targetVariance` = s² (weighted variance about μ̄).
 * Pass `variance = null` to update the mean only (fixed covariance). Symbols ↔ arguments:
 * γ ↔ `gamma`, μ ↔ `mean`, σ² ↔ `variance`, μ̄ ↔ `targetMean`, s² ↔ `targetVariance`; each array
 * is read from its offset over `len` entries. No validation, no allocation.
 *
 * Source: N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning Approach to Model
 * Predictive Control", RSS, 2019 (the KL mirror step in expectation parameters; the rank-one
 * term derived in MATH.md §3.4).
 *
 * @example
 * ```ts
 * const mean = new Float64Array([0]);
 * const variance = new Float64Array([1]);
 * gaussianDiagonalStep(1, 0.5, mean, 0, variance, 0, new Float64Array([2]), 0, new Float64Array([0.5]), 0);
 * // mean = [1], variance = 0.5·1 + 0.5·0.5 + 0.25·4 = [1.75]
 * ```
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
 * The result is symmetrized. Symbols ↔ arguments: γ ↔ `gamma`, μ ↔ `mean`, Σ ↔ `cov`,
 * μ̄ ↔ `targetMean`, Σ_w ↔ `targetCov`. No validation, no allocation. Σ⁺ ⪰ 0 for γ ∈ [0, 1].
 *
 * Source: Wagener, Cheng, Sacks & Boots, RSS 2019 (as for {@link gaussianDiagonalStep}).
 *
 * @example
 * ```ts
 * const mean = new Float64Array([0, 0]);
 * const cov = new Float64Array([1, 0, 0, 1]);
 * gaussianFullStep(2, 1, mean, 0, cov, 0, new Float64Array([1, 2]), 0, new Float64Array([2, 1, 1, 2]), 0);
 * // γ = 1 is moment matching: mean = [1, 2], cov = [2, 1, 1, 2]
 * ```
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

function readVector(fn: string, arg: string, v: unknown, k: number): ArrayLike<number> {
  if (!(v instanceof Float64Array) && !Array.isArray(v)) {
    throw new RecedeError("type", fn, arg, "a Float64Array or number[]", v);
  }
  const a = v as ArrayLike<number>;
  if (k >= 0 && a.length !== k) throw new RecedeError("dimension", fn, arg, `of length ${k}`, v);
  for (let i = 0; i < a.length; i++) {
    if (typeof a[i] !== "number" || !Number.isFinite(a[i])) {
      throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "finite", a[i]);
    }
  }
  return a;
}

/**
 * KL divergence between two Gaussians with diagonal covariances, in closed form:
 *
 * KL(N(μ₀, diag σ₀²) ‖ N(μ₁, diag σ₁²)) = ½ Σᵢ [ σ₀ᵢ²/σ₁ᵢ² − 1 − ln(σ₀ᵢ²/σ₁ᵢ²) + (μ₁ᵢ − μ₀ᵢ)²/σ₁ᵢ² ],
 *
 * with r − 1 − ln r evaluated as u − log1p(u), u = r − 1, so nearly equal variances keep their
 * relative accuracy. Symbols ↔ arguments: μ₀ ↔ `mean0`, σ₀² ↔ `variance0`, μ₁ ↔ `mean1`,
 * σ₁² ↔ `variance1` (variances, not standard deviations). All four must have the same length k;
 * variances must be finite and > 0 (typed errors otherwise). Allocates nothing.
 *
 * Source: S. Kullback, "Information Theory and Statistics", 1959 (the Gaussian case); checked
 * against scipy quadrature and Monte Carlo (scripts/reference/core_gaussian_kl.py).
 *
 * @example
 * ```ts
 * klDiagonalGaussian([0], [1], [1], [1]); // 0.5
 * ```
 */
export function klDiagonalGaussian(
  mean0: Float64Array | readonly number[],
  variance0: Float64Array | readonly number[],
  mean1: Float64Array | readonly number[],
  variance1: Float64Array | readonly number[],
): number {
  const fn = "klDiagonalGaussian";
  const m0 = readVector(fn, "mean0", mean0, -1);
  const k = m0.length;
  const v0 = readVector(fn, "variance0", variance0, k);
  const m1 = readVector(fn, "mean1", mean1, k);
  const v1 = readVector(fn, "variance1", variance1, k);
  let s = 0;
  for (let i = 0; i < k; i++) {
    if (!(v0[i] > 0)) throw new RecedeError("domain", fn, `variance0[${i}]`, "> 0", v0[i]);
    if (!(v1[i] > 0)) throw new RecedeError("domain", fn, `variance1[${i}]`, "> 0", v1[i]);
    const u = v0[i] / v1[i] - 1;
    const dm = m1[i] - m0[i];
    s += u - Math.log1p(u) + (dm * dm) / v1[i];
  }
  return Math.max(0, 0.5 * s);
}

/**
 * KL divergence between two Gaussians with full covariances, in closed form via Cholesky factors
 * Σ₀ = L₀L₀ᵀ, Σ₁ = L₁L₁ᵀ:
 *
 * KL(N(μ₀, Σ₀) ‖ N(μ₁, Σ₁)) = ½ [ ‖L₁⁻¹L₀‖_F² + ‖L₁⁻¹(μ₁ − μ₀)‖² − k + 2Σᵢ ln(L₁)ᵢᵢ − 2Σᵢ ln(L₀)ᵢᵢ ],
 *
 * i.e. ½[tr(Σ₁⁻¹Σ₀) + (μ₁ − μ₀)ᵀΣ₁⁻¹(μ₁ − μ₀) − k + ln det Σ₁ − ln det Σ₀] with no inverse and the
 * log-determinants from the factors. Symbols ↔ arguments: μ₀ ↔ `mean0`, Σ₀ ↔ `cov0`, μ₁ ↔ `mean1`,
 * Σ₁ ↔ `cov1`. Covariances are an `ndarray` view, `{ data, rows, cols }`, an array of rows, or a
 * row-major Float64Array of length k². A covariance that is not symmetric (beyond 1e-10 relative)
 * or not positive definite throws a {@link RecedeError} with code `"not-spd"`. Allocates O(k²)
 * scratch per call.
 *
 * Source: S. Kullback, "Information Theory and Statistics", 1959; Cholesky evaluation: common
 * practice (G. Golub, C. Van Loan, "Matrix Computations", 2013). Checked against scipy quadrature
 * (k = 1, 2) and Monte Carlo (k = 3…8) in scripts/reference/core_gaussian_kl.py.
 *
 * @example
 * ```ts
 * klGaussian([0, 0], [[1, 0], [0, 1]], [1, 0], [[2, 0], [0, 2]]); // ½(1 + 0.5 − 2 + 2 ln 2) ≈ 0.4431
 * ```
 */
export function klGaussian(
  mean0: Float64Array | readonly number[],
  cov0: MatrixInput | Float64Array,
  mean1: Float64Array | readonly number[],
  cov1: MatrixInput | Float64Array,
): number {
  const fn = "klGaussian";
  const m0 = readVector(fn, "mean0", mean0, -1);
  const k = m0.length;
  if (k < 1) throw new RecedeError("dimension", fn, "mean0", "of length >= 1", mean0);
  const m1 = readVector(fn, "mean1", mean1, k);
  const l0 = covFactor(fn, "cov0", cov0, k);
  const l1 = covFactor(fn, "cov1", cov1, k);
  const w = new Float64Array(k);
  // tr(Σ₁⁻¹Σ₀) = Σ_j ‖L₁⁻¹ L₀[:, j]‖²; column j of L₀ is zero above row j.
  let tr = 0;
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < k; i++) w[i] = l0[i * k + j];
    forwardSubstitute(k, l1, 0, w, 0);
    for (let i = 0; i < k; i++) tr += w[i] * w[i];
  }
  for (let i = 0; i < k; i++) w[i] = m1[i] - m0[i];
  forwardSubstitute(k, l1, 0, w, 0);
  let q = 0;
  for (let i = 0; i < k; i++) q += w[i] * w[i];
  const logDet = choleskyLogDet(k, l1, 0) - choleskyLogDet(k, l0, 0);
  return Math.max(0, 0.5 * (tr + q - k + logDet));
}

function covFactor(fn: string, arg: string, c: unknown, k: number): Float64Array {
  let a: Float64Array;
  if (c instanceof Float64Array) {
    if (c.length !== k * k)
      throw new RecedeError("dimension", fn, arg, `of length ${k}·${k} = ${k * k}`, c);
    a = c.slice();
    for (let i = 0; i < a.length; i++) {
      if (!Number.isFinite(a[i])) {
        throw new RecedeError(
          "non-finite",
          fn,
          `${arg}[${Math.floor(i / k)}][${i % k}]`,
          "finite",
          a[i],
        );
      }
    }
  } else {
    a = toRowMajor(fn, arg, c as MatrixInput, k, k).data;
  }
  let amax = 0;
  for (let i = 0; i < k * k; i++) amax = Math.max(amax, Math.abs(a[i]));
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < i; j++) {
      if (Math.abs(a[i * k + j] - a[j * k + i]) > 1e-10 * amax) {
        throw new RecedeError(
          "not-spd",
          fn,
          arg,
          "symmetric",
          `${arg}[${i}][${j}] ≠ ${arg}[${j}][${i}]`,
        );
      }
    }
  }
  const l = new Float64Array(k * k);
  if (!cholesky(k, a, 0, l, 0)) {
    throw new RecedeError(
      "not-spd",
      fn,
      arg,
      "symmetric positive definite",
      `a ${k}×${k} matrix whose Cholesky factorization fails`,
    );
  }
  return l;
}
