/**
 * Derived variant: MPPI composed for small sample budgets (tens of samples per control step).
 *
 * @module
 */
import {
  type ControlBounds,
  type CostModel,
  type Dynamics,
  RecedeError,
  requireInteger,
} from "@recede/core";
import { type Controller, createController } from "../controller.js";
import { gaussianPlan } from "../distributions/gaussian.js";
import { requireObject } from "../internal/input.js";
import { type MeanFill, shiftPlan } from "../shift.js";
import { annealNoise } from "./annealNoise.js";
import { essTemperature } from "./essTemperature.js";
import { reuseBest } from "./reuseBest.js";

/** Options of {@link leanMppi}. */
export interface LeanMppiOptions {
  /** The planning model. */
  readonly dynamics: Dynamics;
  /** The planning cost. */
  readonly cost: CostModel;
  /** Horizon H. */
  readonly horizon: number;
  /** Samples K per iteration (samples per control step = K × iterations). @defaultValue 16 */
  readonly samples?: number;
  /** Mirror steps per control step. @defaultValue 2 */
  readonly iterations?: number;
  /** Initial exploration σ₀ > 0 (number, length m, or H·m). @defaultValue 1 */
  readonly noise?: number | Float64Array | readonly number[];
  /**
   * Scales s_i of the sample deviations at iteration i of each control step (annealNoise): wide
   * first, narrow last. `[1]` switches the schedule off.
   * @defaultValue [1, 0.1]
   */
  readonly anneal?: readonly number[];
  /**
   * Also refit the variance by the KL mirror step (σ shrinks where the samples agree; the shift
   * re-widens the new last step to σ₀). Off by default: at small K the refit shrinks σ during the
   * swing-up as well (bench/RESULTS.md, "Sample efficiency").
   * @defaultValue false
   */
  readonly adaptVariance?: boolean;
  /** Floor σ_min on the refitted σ (with `adaptVariance`). @defaultValue 0.1 × the smallest σ₀ entry */
  readonly minStd?: number;
  /** AR(1) noise correlation a ∈ [0, 1). @defaultValue 0.8 */
  readonly correlation?: number;
  /** Sequences r carried to the next iteration / control step (reuseBest). @defaultValue 4 */
  readonly keep?: number;
  /** Target ESS fraction f of essTemperature. @defaultValue 0.03 */
  readonly targetFraction?: number;
  /** Initial / nominal plan μ₀. @defaultValue 0 */
  readonly mean?: number | Float64Array | readonly number[];
  /** Tail fill of the shifted plan. @defaultValue "nominal" */
  readonly fill?: MeanFill;
  /** Control bounds. @defaultValue unbounded */
  readonly bounds?: ControlBounds;
  /** Seed. @defaultValue 0 */
  readonly seed?: number | string;
  /** Samples per random-stream slice. @defaultValue 64 */
  readonly sliceSize?: number;
  /**
   * Measure `report.wallTimeMs` (two clock reads, 32 bytes per step; see ControllerParts.timing).
   * @defaultValue false (as in the presets: the step then allocates nothing after warm-up)
   */
  readonly timing?: boolean;
  /**
   * Check every intermediate rollout state for non-finite values (see
   * ControllerParts.checkEveryStep).
   * @defaultValue false
   */
  readonly checkEveryStep?: boolean;
}

const FN = "leanMppi";

/**
 * MPPI for small sample budgets: the generic controller with
 *   plan  = reuseBest(annealNoise(gaussianPlan({ std: σ₀, correlation: a, adaptVariance, minStd }),
 *             { scales: s }), { keep: r }),
 *   loss  = essTemperature({ targetFraction: f }),   geometry "kl", γ = 1,
 *   iterations mirror steps per control step, shift = shiftPlan({ fill }) (variance tail reset to σ₀²).
 * Iteration i of a control step samples U = μ + s_i σ₀ ⊙ e (AR(1) noise e), keeps the r best
 * sequences of the previous iteration as its first r samples, weighs all K by exp(−(C − C_min)/λ)
 * with λ set for ESS ≈ max(1, f·K), and moves μ to the weighted average.
 * Each part addresses one waste of plain MPPI at small K: smooth AR(1) noise explores at the time
 * scale of the dynamics instead of averaging white noise away; the best sequences of the last
 * iteration are kept (shifted) instead of redrawn; λ follows the cost spread (which shrinks by
 * orders of magnitude during a swing-up) instead of being fixed; the noise schedule gives every
 * control step one wide look (large moves, e.g. a committed first push of a swing-up) and one
 * narrow refinement (a precise applied control near the goal). (No separate mean sample: reuseBest's
 * rows 0 … r−1 would overwrite it.) On the reference swing-ups it matches tuned MPPI at K = 2048
 * (within 5 %, ≥ 7/8 successes, 16 held-out seeds) with 40 samples per step on the pendulum and 16
 * on the cart-pole, where it is 18 % below MPPI's cost at 64 (bench/RESULTS.md, "Sample
 * efficiency"; σ₀ = 1·bound on the pendulum and 0.5·bound on the cart-pole, chosen on tuning
 * seeds).
 * Symbols ↔ options: σ₀ ↔ `noise`, a ↔ `correlation`, r ↔ `keep`, f ↔ `targetFraction`,
 * s ↔ `anneal`.
 *
 * Exactly `createController({ name: "lean-mppi", plan: reuseBest(annealNoise(gaussianPlan({ mean,
 * std: noise, correlation, adaptVariance, minStd }), { scales: anneal }), { keep }), loss:
 * essTemperature({ targetFraction }), geometry: "kl", stepSize: 1, iterations, shift:
 * shiftPlan({ fill }), … })` (a test checks bit-identity).
 *
 * Derived variant ("derived here"); its parts' sources: G. Williams et al., "Information Theoretic
 * MPC for Model-Based Reinforcement Learning", ICRA 2017 (MPPI); N. Wagener, C.-A. Cheng, J. Sacks,
 * B. Boots, "An Online Learning Approach to Model Predictive Control", RSS 2019 (mirror steps,
 * variance refit, shift); C. Pinneri et al., "Sample-efficient Cross-Entropy Method for Real-time
 * Planning", CoRL 2020 (colored noise, kept and shifted elites); H. Xue et al., "Full-Order
 * Sampling-Based MPC for Torque-Level Locomotion Control via Diffusion-Style Annealing", 2024
 * (noise scale annealed over the iterations; from memory).
 *
 * @example
 * ```ts
 * const ctrl = leanMppi({ dynamics, cost, horizon: 40, samples: 16, noise: 2.5,
 *   bounds: { lower: new Float64Array([-5]), upper: new Float64Array([5]) } });
 * const { control } = ctrl.act(state);
 * ```
 */
export function leanMppi(options: LeanMppiOptions): Controller {
  requireObject(FN, "options", options);
  const samples = requireInteger(FN, "samples", options.samples ?? 16, 2);
  const noise = options.noise ?? 1;
  let minStd = options.minStd;
  if (minStd === undefined) {
    let smallest = Number.POSITIVE_INFINITY;
    if (typeof noise === "number") smallest = noise;
    else if (noise instanceof Float64Array || Array.isArray(noise)) {
      const a = noise as ArrayLike<number>;
      for (let i = 0; i < a.length; i++) if (a[i] < smallest) smallest = a[i];
    }
    if (!(smallest > 0 && Number.isFinite(smallest))) {
      throw new RecedeError("range", FN, "noise", "finite and > 0", noise);
    }
    minStd = 0.1 * smallest;
  }
  const keep = options.keep ?? 4;
  return createController({
    name: "lean-mppi",
    dynamics: options.dynamics,
    cost: options.cost,
    horizon: options.horizon,
    samples,
    plan: reuseBest(
      annealNoise(
        gaussianPlan({
          mean: options.mean,
          std: noise,
          correlation: options.correlation ?? 0.8,
          adaptVariance: options.adaptVariance ?? false,
          minStd,
        }),
        { scales: options.anneal ?? [1, 0.1] },
      ),
      { keep },
    ),
    loss: essTemperature({ targetFraction: options.targetFraction ?? 0.03 }),
    geometry: "kl",
    stepSize: 1,
    iterations: options.iterations ?? 2,
    shift: shiftPlan({ fill: options.fill }),
    bounds: options.bounds,
    seed: options.seed,
    sliceSize: options.sliceSize,
    timing: options.timing,
    checkEveryStep: options.checkEveryStep,
  });
}
