/**
 * Negative entropy on the probability simplex: D = KL, mirror step = exponentiated gradient.
 *
 * @module
 */
import { RecedeError, requireInteger } from "../errors.js";
import { generalizedKl } from "../internal/generalizedKl.js";
import { requireOptions } from "../internal/vectorInput.js";
import { expWeights } from "../kernels/logsumexp.js";
import type { Geometry } from "./geometry.js";

/** Options of {@link entropy}. */
export interface EntropyOptions {
  /** Number N of coordinates (experts, actions), an integer ≥ 1. */
  readonly dimension: number;
  /**
   * Slack of {@link Geometry.contains}: x is on the simplex when every xᵢ ≥ 0 is finite and
   * |Σᵢ xᵢ − 1| ≤ tolerance.
   * @defaultValue 1e-9
   */
  readonly tolerance?: number;
}

/** The simplex negative-entropy geometry. */
export interface EntropyGeometry extends Geometry {
  readonly name: "entropy";
}

const FN = "entropy";

/**
 * Negative entropy on the probability simplex Δ_N = {x ≥ 0 : Σ xᵢ = 1}.
 *
 * ψ(x) = Σᵢ xᵢ ln xᵢ (0 ln 0 = 0), D(x‖y) = Σᵢ xᵢ ln(xᵢ/yᵢ) − xᵢ + yᵢ (= KL(x‖y) on Δ_N),
 * ∇ψ(x)ᵢ = ln xᵢ + 1, ∇ψ*(θ) = softmax(θ) (the conjugate of ψ restricted to Δ_N is log-sum-exp).
 * Mirror step (exponentiated gradient / Hedge):  x⁺ᵢ = xᵢ e^{−η gᵢ} / Σⱼ xⱼ e^{−η gⱼ},
 * computed in the log domain as aᵢ = ln xᵢ − η gᵢ, x⁺ = exp(a − lse(a)) with the maximum
 * subtracted, so gradients of ±1e6 neither overflow nor leave the simplex: the iterate is
 * non-negative and sums to 1 within N·2⁻⁵³ (1e-12 for N up to about 4000). Coordinates at 0 stay
 * at 0. Symbols ↔ options: N ↔ `dimension`.
 *
 * Source: J. Kivinen, M. Warmuth, "Exponentiated Gradient versus Gradient Descent for Linear
 * Predictors", Information and Computation, 1997; N. Cesa-Bianchi, G. Lugosi, "Prediction,
 * Learning, and Games", 2006, §2.1 (Hedge); A. Beck, M. Teboulle, Oper. Res. Lett., 2003 (entropic
 * mirror descent).
 *
 * @example
 * ```ts
 * const geo = entropy({ dimension: 3 });
 * const p = new Float64Array([1 / 3, 1 / 3, 1 / 3]);
 * geo.step(p, new Float64Array([1e6, 0, -1e6]), 1, p); // p = [0, 0, 1], still on the simplex
 * ```
 */
export function entropy(options: EntropyOptions): EntropyGeometry {
  requireOptions(FN, options);
  const n = requireInteger(FN, "dimension", options.dimension, 1);
  const tol = options.tolerance === undefined ? 1e-9 : options.tolerance;
  if (typeof tol !== "number" || !(tol >= 0) || !Number.isFinite(tol)) {
    throw new RecedeError("range", FN, "tolerance", "a finite number >= 0", tol);
  }
  return new EntropyImpl(n, tol);
}

class EntropyImpl implements EntropyGeometry {
  readonly name = "entropy" as const;
  private readonly work: Float64Array;

  constructor(
    readonly dimension: number,
    private readonly tol: number,
  ) {
    this.work = new Float64Array(dimension);
  }

  potential(x: Float64Array): number {
    let s = 0;
    for (let i = 0; i < this.dimension; i++) {
      const v = x[i];
      if (v > 0) s += v * Math.log(v);
      else if (v < 0 || Number.isNaN(v)) return Number.NaN;
    }
    return s;
  }

  divergence(x: Float64Array, y: Float64Array): number {
    return generalizedKl(this.dimension, x, y);
  }

  mirrorMap(x: Float64Array, out: Float64Array): Float64Array {
    for (let i = 0; i < this.dimension; i++) out[i] = Math.log(x[i]) + 1;
    return out;
  }

  inverseMirrorMap(theta: Float64Array, out: Float64Array): Float64Array {
    const n = this.dimension;
    if (expWeights(n, theta, 0, out, 0) === Number.NEGATIVE_INFINITY) out.fill(Number.NaN, 0, n);
    return out;
  }

  step(xt: Float64Array, g: Float64Array, eta: number, out: Float64Array): Float64Array {
    const n = this.dimension;
    const a = this.work;
    for (let i = 0; i < n; i++) a[i] = Math.log(xt[i]) - eta * g[i];
    if (expWeights(n, a, 0, out, 0) === Number.NEGATIVE_INFINITY) out.fill(Number.NaN, 0, n);
    return out;
  }

  contains(x: Float64Array): boolean {
    const n = this.dimension;
    if (x.length !== n) return false;
    let s = 0;
    for (let i = 0; i < n; i++) {
      const v = x[i];
      if (!(v >= 0) || !Number.isFinite(v)) return false;
      s += v;
    }
    return Math.abs(s - 1) <= this.tol;
  }
}
