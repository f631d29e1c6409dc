/**
 * Derived variant: the exponential-utility (MPPI) loss with its temperature chosen afresh at every
 * iteration so the weights reach a target effective sample size.
 *
 * @module
 */
import { kernels, RecedeError, requireInRange, requireInteger } from "@recede/core";
import { requireObject } from "../internal/input.js";
import type { SampleLoss } from "../losses/types.js";

/** Options of {@link essTemperature}. */
export interface EssTemperatureOptions {
  /**
   * Target fraction f ∈ (0, 1] of the usable samples: the temperature is set so that
   * ESS(λ) ≈ f·K_ok (clamped to [1, K_ok]).
   * @defaultValue 0.1
   */
  readonly targetFraction?: number;
  /**
   * Relative tolerance τ > 0 of the bisection: stop when |ESS(λ) − target| ≤ τ·target.
   * @defaultValue 0.01
   */
  readonly tolerance?: number;
  /**
   * Most bisection steps on ln λ per call (each costs one pass over the K costs).
   * @defaultValue 60
   */
  readonly maxSteps?: number;
}

/** The loss of {@link essTemperature}: a {@link SampleLoss} that also reports its last λ. */
export interface EssTemperatureLoss extends SampleLoss {
  /** The temperature λ chosen by the last `weigh` call (NaN before the first, or if it failed). */
  readonly temperature: number;
  /** The effective sample size the last call reached (NaN before the first, or if it failed). */
  readonly effectiveSampleSize: number;
}

const FN = "essTemperature";
const LN_MIN_LAMBDA = Math.log(1e-300);

/**
 * Exponential-utility weights w_i ∝ exp(−(C_i − ρ)/λ) (ρ = min_j C_j) with λ chosen per call so
 * that the Kish effective sample size hits a target:
 *   ESS(λ) = (Σ_i e^{−d_i/λ})² / Σ_i e^{−2d_i/λ},  d_i = C_i − ρ ≥ 0,
 *   find λ with ESS(λ) = f·K_ok  (K_ok = number of finite costs; target clamped to [1, K_ok]).
 * ESS is non-decreasing in λ (MATH.md §8.1), so the root is found by bisection on ln λ in
 * [max(10⁻⁹·D, 10⁻³⁰⁰), 10⁹·D], D = max_i d_i, stopping at relative tolerance τ or after `maxSteps` steps; every
 * exponent is ≤ 0, so nothing overflows. If all finite costs are equal the weights are uniform over
 * them and λ is reported as +∞. The weights and the loss estimate are then exactly those
 * of `exponentialUtility({ temperature: λ })` (a test checks bit-identity), so the mirror step is
 * MPPI's with an adaptive λ. Failed samples (C = +∞) get weight 0.
 * Why: a fixed λ that is right at the start of a swing-up (cost spreads of hundreds) collapses to a
 * single sample near the goal (spreads of units), or averages everything in the other direction;
 * holding the ESS fixed makes the step scale-free, which matters most at small K.
 * Symbols ↔ options: f ↔ `targetFraction`, τ ↔ `tolerance`.
 *
 * Derived variant ("derived here"): MATH.md §8.1 notes that λ can be set by bisection to hit a
 * target ESS; ESS is from A. Kong, "A Note on Importance Sampling using Standardized Weights", 1992,
 * and L. Kish, "Survey Sampling", 1965. Choosing an importance-sampling tempering exponent so that
 * the ESS hits a fixed fraction is common practice in adaptive sequential Monte Carlo (e.g.
 * Y. Zhou, A. M. Johansen, J. A. D. Aston, "Toward Automatic Model Comparison: An Adaptive
 * Sequential Monte Carlo Approach", JCGS 2016; from memory). Base loss: G. Williams et al.,
 * "Information Theoretic MPC for Model-Based Reinforcement Learning", ICRA 2017.
 *
 * @example
 * ```ts
 * const loss = essTemperature({ targetFraction: 0.2 });
 * const w = new Float64Array(4);
 * loss.weigh(new Float64Array([3, 1, 4, 1.5]), 4, w); // ESS(w) ≈ max(1, 0.2·4) = 1
 * loss.temperature; // the λ it chose
 * ```
 */
export function essTemperature(options: EssTemperatureOptions = {}): EssTemperatureLoss {
  requireObject(FN, "options", options);
  const f = requireInRange(FN, "targetFraction", options.targetFraction ?? 0.1, 0, 1, true);
  if (!(f > 0)) throw new RecedeError("range", FN, "targetFraction", "in (0, 1]", f);
  const tol = requireInRange(FN, "tolerance", options.tolerance ?? 0.01, 0, 1, true);
  if (!(tol > 0)) throw new RecedeError("range", FN, "tolerance", "in (0, 1]", tol);
  const steps = requireInteger(FN, "maxSteps", options.maxSteps ?? 60, 1);
  return new EssTemperature(f, tol, steps);
}

class EssTemperature implements EssTemperatureLoss {
  readonly name = "ess-temperature";
  readonly normalized = true;
  private scores = new Float64Array(0);
  /** [λ, ESS] of the last call, in a typed array so updates allocate nothing. */
  private readonly last = Float64Array.of(Number.NaN, Number.NaN);
  /** [β, ESS] handed to and from essInto without boxing. */
  private readonly io = new Float64Array(2);
  /** Scratch for {@link SampleLoss.weigh} (which returns what `weighInto` writes). */
  private readonly one = new Float64Array(1);

  constructor(
    readonly targetFraction: number,
    readonly tolerance: number,
    readonly maxSteps: number,
  ) {}

  get temperature(): number {
    return this.last[0];
  }

  get effectiveSampleSize(): number {
    return this.last[1];
  }

  weigh(costs: Float64Array, count: number, weights: Float64Array): number {
    this.weighInto(costs, count, weights, this.one);
    return this.one[0];
  }

  weighInto(costs: Float64Array, count: number, weights: Float64Array, out: Float64Array): void {
    if (this.scores.length < count) this.scores = new Float64Array(count);
    const a = this.scores;
    this.last[0] = Number.NaN;
    this.last[1] = Number.NaN;
    let rho = Number.POSITIVE_INFINITY;
    let spread = 0;
    let ok = 0;
    for (let i = 0; i < count; i++) {
      const c = costs[i];
      if (c < rho) rho = c; // NaN never compares less
    }
    if (!Number.isFinite(rho)) {
      out[0] = Number.NaN;
      return;
    }
    for (let i = 0; i < count; i++) {
      const c = costs[i];
      if (Number.isFinite(c)) {
        ok++;
        const d = c - rho;
        a[i] = d;
        if (d > spread) spread = d;
      } else a[i] = Number.POSITIVE_INFINITY;
    }
    let target = this.targetFraction * ok;
    if (target < 1) target = 1;
    let lambda: number;
    let ess: number;
    if (!(spread > 0)) {
      // All finite costs equal: uniform weights over the finite samples (the λ → ∞ limit).
      lambda = Number.POSITIVE_INFINITY;
      ess = ok;
    } else {
      if (spread > Number.MAX_VALUE) spread = Number.MAX_VALUE;
      // λ ≥ 10⁻³⁰⁰ keeps 1/λ finite (so (C_i − ρ)/λ is 0, not NaN, for the best sample).
      let lo = Math.max(Math.log(spread) - 9 * Math.LN10, LN_MIN_LAMBDA);
      let hi = Math.max(Math.log(spread) + 9 * Math.LN10, lo);
      const band = this.tolerance * target;
      const io = this.io;
      io[0] = Math.exp(-hi);
      essInto(a, count, io);
      ess = io[1];
      lambda = Math.exp(hi);
      if (ess > target + band) {
        io[0] = Math.exp(-lo);
        essInto(a, count, io);
        const essLo = io[1];
        if (essLo >= target - band) {
          lambda = Math.exp(lo);
          ess = essLo;
        } else {
          for (let s = 0; s < this.maxSteps; s++) {
            const mid = 0.5 * (lo + hi);
            io[0] = Math.exp(-mid);
            essInto(a, count, io);
            const e = io[1];
            lambda = Math.exp(mid);
            ess = e;
            if (e > target + band) hi = mid;
            else if (e < target - band) lo = mid;
            else break;
          }
        }
      }
    }
    // Final weights exactly as exponentialUtility({ temperature: λ }) computes them.
    const inv = 1 / lambda;
    for (let i = 0; i < count; i++) {
      const c = costs[i];
      a[i] = Number.isFinite(c) ? -(c - rho) * inv : Number.NEGATIVE_INFINITY;
    }
    kernels.expWeights(count, a, 0, weights, 0, out, 0);
    this.last[0] = lambda;
    this.last[1] = ess;
    if (lambda === Number.POSITIVE_INFINITY) out[0] = ok === count ? rho : Number.POSITIVE_INFINITY;
    else out[0] = rho - lambda * (out[0] - Math.log(count));
  }
}

/**
 * io[1] ← Kish ESS (Σe)²/Σe² of e_i = exp(−io[0]·d_i) (d = +∞ for failed samples, contributing 0).
 * β and the result travel through `io`: a double passed to or returned from a call V8 does not
 * inline would be boxed (allocated) on every bisection step.
 */
function essInto(d: Float64Array, count: number, io: Float64Array): void {
  const beta = io[0];
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < count; i++) {
    const e = Math.exp(-beta * d[i]);
    s1 += e;
    s2 += e * e;
  }
  io[1] = (s1 * s1) / s2;
}
