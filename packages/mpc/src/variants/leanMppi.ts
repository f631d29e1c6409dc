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
   * Refit the variance by the KL mirror step (σ shrinks where the samples agree); the shift
   * re-widens the new last step to σ₀.
   * @defaultValue true
   */
  readonly adaptVariance?: boolean;
  /** Floor σ_min on the refitted σ. @defaultValue 0.1 × the smallest σ₀ entry */
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
  /** Measure `report.wallTimeMs`. @defaultValue true */
  readonly timing?: boolean;
}

const FN = "leanMppi";

/**
 * MPPI for small sample budgets: the generic controller with
 *   plan  = reuseBest(gaussianPlan({ std: σ₀, correlation: a, adaptVariance, minStd }), { keep: r }),
 *   loss  = essTemperature({ targetFraction: f }),   geometry "kl", γ = 1,
 *   iterations mirror steps per control step, shift = shiftPlan({ fill }) (variance tail reset to σ₀²).
 * Each part addresses one waste of plain MPPI at small K: smooth AR(1) noise explores at the time
 * scale of the dynamics instead of averaging white noise away; the best sequences of the last
 * iteration are kept (shifted) instead of redrawn; λ follows the cost spread (which shrinks by
 * orders of magnitude during a swing-up) instead of being fixed; the variance shrinks where the
 * samples agree. (No separate mean sample: reuseBest's rows 0 … r−1 would overwrite it.) On the reference pendulum and
 * cart-pole swing-ups this reaches the closed-loop cost of tuned MPPI at K = 2048 with tens of
 * samples per step (bench/RESULTS.md, "Sample efficiency", with the defaults σ₀ = 0.5·bound).
 * Symbols ↔ options: σ₀ ↔ `noise`, a ↔ `correlation`, r ↔ `keep`, f ↔ `targetFraction`.
 *
 * Exactly `createController({ name: "lean-mppi", plan: reuseBest(gaussianPlan({ mean, std: noise,
 * correlation, adaptVariance, minStd }), { keep }), loss: essTemperature({
 * targetFraction }), geometry: "kl", stepSize: 1, iterations, shift: shiftPlan({ fill }), … })`
 * (a test checks bit-identity).
 *
 * Derived variant ("derived here"); its parts' sources: G. Williams et al., "Information Theoretic
 * MPC for Model-Based Reinforcement Learning", ICRA 2017 (MPPI); N. Wagener, C.-A. Cheng, J. Sacks,
 * B. Boots, "An Online Learning Approach to Model Predictive Control", RSS 2019 (mirror steps,
 * variance refit, shift); C. Pinneri et al., "Sample-efficient Cross-Entropy Method for Real-time
 * Planning", CoRL 2020 (colored noise, kept and shifted elites).
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
      gaussianPlan({
        mean: options.mean,
        std: noise,
        correlation: options.correlation ?? 0.8,
        adaptVariance: options.adaptVariance ?? true,
        minStd,
      }),
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
  });
}
