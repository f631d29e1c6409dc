/**
 * The KL geometry of the diagonal-Gaussian family, in expectation (mean) parameters.
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
}

/** The diagonal-Gaussian KL geometry, with conversions to and from (μ, σ²). */
export interface DiagonalGaussianGeometry extends Geometry {
  readonly name: "diagonal-gaussian";
  /** Number k of Gaussian coordinates (`dimension` = 2k). */
  readonly coordinates: number;
  /** out ← (μ, μ² + σ²), the expectation parameters of N(μ, diag σ²). Returns `out`. */
  fromMeanVariance(mean: Float64Array, variance: Float64Array, out: Float64Array): Float64Array;
  /** mean ← μ, variance ← σ² = s − μ² from expectation parameters x = (μ, s). */
  toMeanVariance(x: Float64Array, mean: Float64Array, variance: Float64Array): void;
}

const FN = "diagonalGaussian";
const LOG_2PI_E = Math.log(2 * Math.PI) + 1;

/**
 * The diagonal-Gaussian family N(μ, diag σ²) on ℝᵏ as a Bregman geometry.
 *
 * Parametrization: the decision is the expectation-parameter vector
 * x = (m₁…m_k, s₁…s_k) with mᵢ = E[zᵢ] = μᵢ and sᵢ = E[zᵢ²] = μᵢ² + σᵢ² (length 2k; domain
 * sᵢ > mᵢ²). Use {@link DiagonalGaussianGeometry.fromMeanVariance} and
 * {@link DiagonalGaussianGeometry.toMeanVariance} to convert (σ² is recovered as s − μ², which
 * loses about log₁₀(μ²/σ²) digits: keep plans centred when σ ≪ |μ|). In these coordinates the family's
 * KL divergence is exactly a Bregman divergence:
 *
 * ψ(x) = −H = −½ Σᵢ ln(2πe σᵢ²) (the negative entropy, the convex conjugate of the log-partition),
 * D_ψ(x‖y) = KL(N_x ‖ N_y),  ∇ψ(x) = the natural parameters (μᵢ/σᵢ², −1/(2σᵢ²)),
 * ∇ψ*(θ) = ∇A(θ): σᵢ² = −1/(2θ_{k+i}), μᵢ = θᵢ σᵢ², sᵢ = μᵢ² + σᵢ².
 *
 * Mirror step: natural parameters move against g = ∇ₓℓ (the gradient with respect to the
 * expectation parameters), θ⁺ = ∇ψ(x_t) − η g, x⁺ = ∇ψ*(θ⁺). For a loss that is linear in
 * (z, z²) this is the exact exponential tilt N⁺(z) ∝ N_t(z)·exp(−η⟨g, (z, z²)⟩). When
 * θ⁺_{k+i} ≥ 0 (a step that would make a variance infinite or negative) the step writes NaN and
 * the learners reject it.
 *
 * Relation to sampling MPC: the convex combination in expectation parameters of
 * {@link gaussianDiagonalStep} (MATH §3.3) is the mirror step of the *same* KL with its arguments
 * swapped — mirror descent on the natural parameters with ψ = A, D_A(η‖η_t) = KL(N_{η_t}‖N_η) —
 * which is why it is offered there as a kernel and not as this geometry's step.
 *
 * Source: M. Wainwright, M. Jordan, "Graphical Models, Exponential Families, and Variational
 * Inference", Foundations and Trends in ML, 2008, §3.6 (conjugate duality; KL as a Bregman
 * divergence of the conjugate); G. Raskutti, S. Mukherjee, "The Information Geometry of Mirror
 * Descent", IEEE Trans. Inf. Theory, 2015.
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
  return new DiagonalGaussianImpl(k);
}

class DiagonalGaussianImpl implements DiagonalGaussianGeometry {
  readonly name = "diagonal-gaussian" as const;
  readonly dimension: number;

  constructor(readonly coordinates: number) {
    this.dimension = 2 * coordinates;
  }

  potential(x: Float64Array): number {
    const k = this.coordinates;
    let s = 0;
    for (let i = 0; i < k; i++) {
      const v = x[k + i] - x[i] * x[i];
      s += Math.log(v) + LOG_2PI_E;
    }
    return -0.5 * s;
  }

  divergence(x: Float64Array, y: Float64Array): number {
    const k = this.coordinates;
    let s = 0;
    for (let i = 0; i < k; i++) {
      const v0 = x[k + i] - x[i] * x[i];
      const v1 = y[k + i] - y[i] * y[i];
      if (!(v0 > 0) || !(v1 > 0)) return Number.NaN;
      const u = v0 / v1 - 1;
      const dm = y[i] - x[i];
      s += u - Math.log1p(u) + (dm * dm) / v1;
    }
    return Math.max(0, 0.5 * s);
  }

  mirrorMap(x: Float64Array, out: Float64Array): Float64Array {
    const k = this.coordinates;
    for (let i = 0; i < k; i++) {
      const mu = x[i];
      const v = x[k + i] - mu * mu;
      out[i] = mu / v;
      out[k + i] = -0.5 / v;
    }
    return out;
  }

  inverseMirrorMap(theta: Float64Array, out: Float64Array): Float64Array {
    const k = this.coordinates;
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

  step(xt: Float64Array, g: Float64Array, eta: number, out: Float64Array): Float64Array {
    const k = this.coordinates;
    for (let i = 0; i < k; i++) {
      const mu = xt[i];
      const v = xt[k + i] - mu * mu;
      const t1 = mu / v - eta * g[i];
      const t2 = -0.5 / v - eta * g[k + i];
      if (!(t2 < 0)) {
        out[i] = Number.NaN;
        out[k + i] = Number.NaN;
        continue;
      }
      const vn = -0.5 / t2;
      const mn = t1 * vn;
      out[i] = mn;
      out[k + i] = mn * mn + vn;
    }
    return out;
  }

  contains(x: Float64Array): boolean {
    const k = this.coordinates;
    if (x.length !== 2 * k) return false;
    for (let i = 0; i < k; i++) {
      const m = x[i];
      const s = x[k + i];
      if (!Number.isFinite(m) || !Number.isFinite(s) || !(s - m * m > 0)) return false;
    }
    return true;
  }

  fromMeanVariance(mean: Float64Array, variance: Float64Array, out: Float64Array): Float64Array {
    const k = this.coordinates;
    for (let i = 0; i < k; i++) {
      if (!(variance[i] > 0) || !Number.isFinite(variance[i]) || !Number.isFinite(mean[i])) {
        throw new RecedeError(
          "domain",
          "diagonalGaussian.fromMeanVariance",
          `variance[${i}]`,
          "finite and > 0 (with a finite mean)",
          variance[i],
        );
      }
      out[i] = mean[i];
      out[k + i] = mean[i] * mean[i] + variance[i];
    }
    return out;
  }

  toMeanVariance(x: Float64Array, mean: Float64Array, variance: Float64Array): void {
    const k = this.coordinates;
    for (let i = 0; i < k; i++) {
      const m = x[i];
      mean[i] = m;
      variance[i] = x[k + i] - m * m;
    }
  }
}
