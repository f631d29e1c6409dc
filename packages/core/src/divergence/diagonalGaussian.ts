/**
 * The KL geometry of the diagonal-Gaussian family, in expectation or natural parameters.
 *
 * @module
 */
import { RecedeError, requireInteger } from "../errors.js";
import { requireOptions } from "../internal/vectorInput.js";
import type { Geometry } from "./geometry.js";

/** Options of {@link diagonalGaussian}. */
export interface DiagonalGaussianOptions {
  /** Number k of Gaussian coordinates; the decision vector has length 2k. */
  readonly dimension: number;
  /**
   * Which coordinates the decision vector holds:
   * `"expectation"` x = (μ, μ² + σ²) with ψ = negative entropy, D(x‖y) = KL(N_x‖N_y), and a step
   * that tilts the distribution exponentially; or `"natural"` x = (μ/σ², −1/(2σ²)) with ψ = the
   * log-partition A, D(x‖y) = KL(N_y‖N_x), and a step that is a convex combination of expectation
   * parameters (the sampling-MPC update).
   * @defaultValue "expectation"
   */
  readonly parameters?: "expectation" | "natural";
}

/** The diagonal-Gaussian KL geometry, with conversions to and from (μ, σ²). */
export interface DiagonalGaussianGeometry extends Geometry {
  readonly name: "diagonal-gaussian";
  /** Which coordinates the decision vector holds. */
  readonly parameters: "expectation" | "natural";
  /** Number k of Gaussian coordinates (`dimension` = 2k). */
  readonly size: number;
  /** out ← the decision vector of N(μ, diag σ²) in this geometry's coordinates. Returns `out`. */
  fromMeanVariance(mean: Float64Array, variance: Float64Array, out: Float64Array): Float64Array;
  /** mean ← μ, variance ← σ² from a decision vector x. */
  toMeanVariance(x: Float64Array, mean: Float64Array, variance: Float64Array): void;
}

const FN = "diagonalGaussian";
const LOG_2PI = Math.log(2 * Math.PI);

/**
 * The diagonal-Gaussian family N(μ, diag σ²) on ℝᵏ as a Bregman geometry, in one of its two dual
 * coordinate systems (decision length 2k: k first-block entries, then k second-block entries).
 *
 * **Expectation parameters** (default): x = (m, s) with mᵢ = E zᵢ = μᵢ, sᵢ = E zᵢ² = μᵢ² + σᵢ²
 * (domain sᵢ > mᵢ²). ψ(x) = −H(N_x) = −½Σᵢ ln(2πe σᵢ²), the conjugate of the log-partition, so
 * D_ψ(x‖y) = KL(N_x‖N_y); ∇ψ(x) = (μ/σ², −1/(2σ²)) (natural parameters); ∇ψ* = ∇A.
 * Mirror step with g = ∇ₓℓ: θ⁺ = ∇ψ(x_t) − ηg, x⁺ = ∇A(θ⁺), the exact exponential tilt
 * N⁺(z) ∝ N_t(z)·exp(−η⟨g, (z, z²)⟩).
 *
 * **Natural parameters**: x = θ = (μ/σ², −1/(2σ²)) (domain θ_{k+i} < 0). ψ(θ) = A(θ) =
 * Σᵢ −θᵢ²/(4θ_{k+i}) − ½ln(−2θ_{k+i}) + ½ln 2π, so D_ψ(x‖y) = KL(N_y‖N_x); ∇ψ = ∇A maps to the
 * expectation parameters. Mirror step with g = ∇_θℓ: m⁺ = ∇A(θ_t) − ηg, θ⁺ = (∇A)⁻¹(m⁺). For the
 * log-utility loss of sampling MPC, ∇_θℓ = m_t − m̂ (m̂ = weighted sample moments), and the step is
 * the convex combination m⁺ = (1−η)m_t + ηm̂ — exactly {@link gaussianDiagonalStep} with γ = η.
 *
 * In either system a step whose result leaves the domain (a non-positive variance or precision)
 * writes NaN, and the learners reject it. Convert with
 * {@link DiagonalGaussianGeometry.fromMeanVariance} / {@link DiagonalGaussianGeometry.toMeanVariance}.
 * In expectation parameters σ² is recovered as s − μ², which loses about log₁₀(μ²/σ²) digits:
 * keep plans centred when σ ≪ |μ|. Symbols ↔ options: k ↔ `dimension`.
 *
 * Source: M. Wainwright, M. Jordan, "Graphical Models, Exponential Families, and Variational
 * Inference", Foundations and Trends in ML, 2008, §3 (conjugate duality; KL as a Bregman
 * divergence); G. Raskutti, S. Mukherjee, "The Information Geometry of Mirror Descent", IEEE Trans.
 * Inf. Theory, 2015; N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning Approach to
 * Model Predictive Control", RSS, 2019 (the natural-parameter step).
 *
 * @example
 * ```ts
 * const geo = diagonalGaussian({ dimension: 1 });
 * const p = geo.fromMeanVariance(new Float64Array([0]), new Float64Array([1]), new Float64Array(2));
 * const q = geo.fromMeanVariance(new Float64Array([1]), new Float64Array([1]), new Float64Array(2));
 * geo.divergence(p, q); // 0.5 = KL(N(0,1) ‖ N(1,1))
 * ```
 */
export function diagonalGaussian(options: DiagonalGaussianOptions): DiagonalGaussianGeometry {
  requireOptions(FN, options);
  const k = requireInteger(FN, "dimension", options.dimension, 1);
  const p = options.parameters ?? "expectation";
  if (p !== "expectation" && p !== "natural") {
    throw new RecedeError("type", FN, "parameters", '"expectation" or "natural"', p);
  }
  return new DiagonalGaussianImpl(k, p);
}

/** ½Σ [r − 1 − ln r + (μ₁ − μ₀)²/v₁], r = v₀/v₁: KL(N(μ₀, v₀) ‖ N(μ₁, v₁)) for one coordinate. */
function kl1(m0: number, v0: number, m1: number, v1: number): number {
  const u = v0 / v1 - 1;
  const dm = m1 - m0;
  return u - Math.log1p(u) + (dm * dm) / v1;
}

class DiagonalGaussianImpl implements DiagonalGaussianGeometry {
  readonly name = "diagonal-gaussian" as const;
  readonly dimension: number;
  private readonly natural: boolean;

  constructor(
    readonly size: number,
    readonly parameters: "expectation" | "natural",
  ) {
    this.dimension = 2 * size;
    this.natural = parameters === "natural";
  }

  /** (μ, σ²) of coordinate i of x; σ² ≤ 0 or NaN when x is outside the domain. */
  private mean(x: Float64Array, i: number): number {
    return this.natural ? (x[i] * -0.5) / x[this.size + i] : x[i];
  }

  private variance(x: Float64Array, i: number): number {
    const k = this.size;
    return this.natural ? -0.5 / x[k + i] : x[k + i] - x[i] * x[i];
  }

  potential(x: Float64Array): number {
    const k = this.size;
    let s = 0;
    if (this.natural) {
      for (let i = 0; i < k; i++) {
        const t1 = x[i];
        const t2 = x[k + i];
        s += (-t1 * t1) / (4 * t2) - 0.5 * Math.log(-2 * t2) + 0.5 * LOG_2PI;
      }
      return s;
    }
    for (let i = 0; i < k; i++) s += Math.log(x[k + i] - x[i] * x[i]) + LOG_2PI + 1;
    return -0.5 * s;
  }

  divergence(x: Float64Array, y: Float64Array): number {
    const k = this.size;
    // Expectation: KL(N_x‖N_y). Natural: KL(N_y‖N_x).
    const a = this.natural ? y : x;
    const b = this.natural ? x : y;
    let s = 0;
    for (let i = 0; i < k; i++) {
      const v0 = this.variance(a, i);
      const v1 = this.variance(b, i);
      if (!(v0 > 0) || !(v1 > 0)) return Number.NaN;
      s += kl1(this.mean(a, i), v0, this.mean(b, i), v1);
    }
    return Math.max(0, 0.5 * s);
  }

  mirrorMap(x: Float64Array, out: Float64Array): Float64Array {
    return this.natural ? this.toExpectation(x, out) : this.toNatural(x, out);
  }

  inverseMirrorMap(theta: Float64Array, out: Float64Array): Float64Array {
    return this.natural ? this.toNatural(theta, out) : this.toExpectation(theta, out);
  }

  /** out ← expectation parameters (μ, μ² + σ²) from natural θ (NaN where θ₂ ≥ 0). */
  private toExpectation(theta: Float64Array, out: Float64Array): Float64Array {
    const k = this.size;
    for (let i = 0; i < k; i++) {
      const t2 = theta[k + i];
      if (!(t2 < 0)) {
        out[i] = Number.NaN;
        out[k + i] = Number.NaN;
        continue;
      }
      const v = -0.5 / t2;
      const mu = theta[i] * v;
      out[i] = mu;
      out[k + i] = mu * mu + v;
    }
    return out;
  }

  /** out ← natural parameters (μ/σ², −1/(2σ²)) from expectation (m, s) (NaN where s ≤ m²). */
  private toNatural(x: Float64Array, out: Float64Array): Float64Array {
    const k = this.size;
    for (let i = 0; i < k; i++) {
      const mu = x[i];
      const v = x[k + i] - mu * mu;
      if (!(v > 0)) {
        out[i] = Number.NaN;
        out[k + i] = Number.NaN;
        continue;
      }
      out[i] = mu / v;
      out[k + i] = -0.5 / v;
    }
    return out;
  }

  step(xt: Float64Array, g: Float64Array, eta: number, out: Float64Array): Float64Array {
    const k = this.size;
    for (let i = 0; i < k; i++) {
      // Dual coordinates of x_t, moved against ηg, mapped back.
      let d1: number;
      let d2: number;
      if (this.natural) {
        const v = -0.5 / xt[k + i];
        const mu = xt[i] * v;
        d1 = mu - eta * g[i];
        d2 = mu * mu + v - eta * g[k + i];
        const vn = d2 - d1 * d1;
        if (!(vn > 0)) {
          out[i] = Number.NaN;
          out[k + i] = Number.NaN;
          continue;
        }
        out[i] = d1 / vn;
        out[k + i] = -0.5 / vn;
      } else {
        const mu = xt[i];
        const v = xt[k + i] - mu * mu;
        d1 = mu / v - eta * g[i];
        d2 = -0.5 / v - eta * g[k + i];
        if (!(d2 < 0)) {
          out[i] = Number.NaN;
          out[k + i] = Number.NaN;
          continue;
        }
        const vn = -0.5 / d2;
        const mn = d1 * vn;
        out[i] = mn;
        out[k + i] = mn * mn + vn;
      }
    }
    return out;
  }

  contains(x: Float64Array): boolean {
    const k = this.size;
    if (x.length !== 2 * k) return false;
    for (let i = 0; i < k; i++) {
      const a = x[i];
      const b = x[k + i];
      if (!Number.isFinite(a) || !Number.isFinite(b)) return false;
      if (this.natural ? !(b < 0) : !(b - a * a > 0)) return false;
    }
    return true;
  }

  fromMeanVariance(mean: Float64Array, variance: Float64Array, out: Float64Array): Float64Array {
    const k = this.size;
    for (let i = 0; i < k; i++) {
      const v = variance[i];
      const m = mean[i];
      if (!(v > 0) || !Number.isFinite(v) || !Number.isFinite(m)) {
        throw new RecedeError(
          "domain",
          "diagonalGaussian.fromMeanVariance",
          `variance[${i}]`,
          "finite and > 0 (with a finite mean)",
          v,
        );
      }
      if (this.natural) {
        out[i] = m / v;
        out[k + i] = -0.5 / v;
      } else {
        out[i] = m;
        out[k + i] = m * m + v;
      }
    }
    return out;
  }

  toMeanVariance(x: Float64Array, mean: Float64Array, variance: Float64Array): void {
    for (let i = 0; i < this.size; i++) {
      mean[i] = this.mean(x, i);
      variance[i] = this.variance(x, i);
    }
  }
}
