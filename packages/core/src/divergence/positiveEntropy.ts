/**
 * Unnormalized negative entropy on the positive orthant: D = generalized KL, mirror step =
 * multiplicative update without normalization.
 *
 * @module
 */
import { requireInteger } from "../errors.js";
import { generalizedKl } from "../internal/generalizedKl.js";
import { requireOptions } from "../internal/vectorInput.js";
import type { Geometry } from "./geometry.js";

/** Options of {@link positiveEntropy}. */
export interface PositiveEntropyOptions {
  /** Number N of coordinates, an integer ≥ 1. */
  readonly dimension: number;
}

/** The positive-orthant negative-entropy geometry. */
export interface PositiveEntropyGeometry extends Geometry {
  readonly name: "positive-entropy";
}

const FN = "positiveEntropy";

/**
 * Unnormalized negative entropy on the open positive orthant ℝᴺ₊₊.
 *
 * ψ(x) = Σᵢ xᵢ ln xᵢ − xᵢ, D(x‖y) = Σᵢ xᵢ ln(xᵢ/yᵢ) − xᵢ + yᵢ (generalized KL), ∇ψ(x)ᵢ = ln xᵢ,
 * ∇ψ*(θ)ᵢ = e^{θᵢ}. Mirror step (unnormalized exponentiated gradient):
 * x⁺ᵢ = xᵢ e^{−η gᵢ} = exp(ln xᵢ − η gᵢ), computed from the logarithm. Unlike the simplex version
 * ({@link entropy}) the result is not normalized, so a large negative η gᵢ can overflow to
 * +Infinity (the exact answer is larger than the largest double) and a large positive one can
 * underflow to 0 (outside the open orthant); {@link Geometry.contains} rejects both and the
 * learners then refuse the update. Symbols ↔ options: N ↔ `dimension`.
 *
 * Source: J. Kivinen, M. Warmuth, "Exponentiated Gradient versus Gradient Descent for Linear
 * Predictors", Information and Computation, 1997 (the EGU update).
 *
 * @example
 * ```ts
 * const geo = positiveEntropy({ dimension: 2 });
 * const x = new Float64Array([1, 2]);
 * geo.step(x, new Float64Array([Math.LN2, 0]), 1, x); // x = [0.5, 2]
 * ```
 */
export function positiveEntropy(options: PositiveEntropyOptions): PositiveEntropyGeometry {
  requireOptions(FN, options);
  const n = requireInteger(FN, "dimension", options.dimension, 1);
  return new PositiveEntropyImpl(n);
}

class PositiveEntropyImpl implements PositiveEntropyGeometry {
  readonly name = "positive-entropy" as const;
  constructor(readonly dimension: number) {}

  potential(x: Float64Array): number {
    let s = 0;
    for (let i = 0; i < this.dimension; i++) {
      const v = x[i];
      if (v > 0) s += v * Math.log(v) - v;
      else if (v < 0 || Number.isNaN(v)) return Number.NaN;
    }
    return s;
  }

  divergence(x: Float64Array, y: Float64Array): number {
    return generalizedKl(this.dimension, x, y);
  }

  mirrorMap(x: Float64Array, out: Float64Array): Float64Array {
    for (let i = 0; i < this.dimension; i++) out[i] = Math.log(x[i]);
    return out;
  }

  inverseMirrorMap(theta: Float64Array, out: Float64Array): Float64Array {
    for (let i = 0; i < this.dimension; i++) out[i] = Math.exp(theta[i]);
    return out;
  }

  step(xt: Float64Array, g: Float64Array, eta: number, out: Float64Array): Float64Array {
    for (let i = 0; i < this.dimension; i++) out[i] = Math.exp(Math.log(xt[i]) - eta * g[i]);
    return out;
  }

  contains(x: Float64Array): boolean {
    if (x.length !== this.dimension) return false;
    for (let i = 0; i < this.dimension; i++) {
      const v = x[i];
      if (!(v > 0) || !Number.isFinite(v)) return false;
    }
    return true;
  }
}
