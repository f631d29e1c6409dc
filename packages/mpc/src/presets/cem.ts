/**
 * The cross-entropy method as a preset of the generic controller.
 *
 * @module
 */
import {
  type ControlBounds,
  type CostModel,
  type Dynamics,
  RecedeError,
  requireInRange,
} from "@recede/core";
import { type Controller, createController } from "../controller.js";
import { gaussianPlan } from "../distributions/gaussian.js";
import { requireObject } from "../internal/input.js";
import { eliteFraction } from "../losses/eliteFraction.js";
import type { RolloutWorkers } from "../parallel/pool.js";
import { type MeanFill, type SpreadFill, shiftPlan } from "../shift.js";

/** Options of {@link cem}. */
export interface CemOptions {
  /** The planning model. */
  readonly dynamics: Dynamics;
  /** The planning cost. */
  readonly cost: CostModel;
  /** Horizon H. */
  readonly horizon: number;
  /** Samples K per iteration. @defaultValue 256 */
  readonly samples?: number;
  /** Elite fraction ρ ∈ (0, 1]. @defaultValue 0.1 */
  readonly eliteFraction?: number;
  /** Initial standard deviation σ₀ > 0 (number, length m, or H·m). @defaultValue 1 */
  readonly std?: number | Float64Array | readonly number[];
  /** Floor σ_min ≥ 0 on the refitted standard deviation. @defaultValue 0.01 */
  readonly minStd?: number;
  /** Initial / nominal plan μ₀. @defaultValue 0 */
  readonly mean?: number | Float64Array | readonly number[];
  /** Noise correlation a ∈ [0, 1). @defaultValue 0 */
  readonly correlation?: number;
  /** Keep sample 0 at the unperturbed mean. @defaultValue false */
  readonly keepMeanSample?: boolean;
  /** CEM iterations (refits) per control step. @defaultValue 3 */
  readonly iterations?: number;
  /** Tail fill of the shifted mean. @defaultValue "nominal" */
  readonly fill?: MeanFill;
  /** How the variance is carried to the next control step. @defaultValue "reset" */
  readonly spreadFill?: SpreadFill;
  /** Control bounds. @defaultValue unbounded */
  readonly bounds?: ControlBounds;
  /** Seed. @defaultValue 0 */
  readonly seed?: number | string;
  /** Samples per random-stream slice. @defaultValue 64 */
  readonly sliceSize?: number;
  /** Measure `report.wallTimeMs` (two clock reads, 32 bytes per step; see ControllerParts.timing). @defaultValue false */
  readonly timing?: boolean;
  /** Check every intermediate rollout state for non-finite values (see ControllerParts.checkEveryStep). @defaultValue false */
  readonly checkEveryStep?: boolean;
  /** Rollout worker threads (see ControllerParts.workers). @defaultValue none */
  readonly workers?: RolloutWorkers;
}

/**
 * Cross-entropy method MPC: the generic controller with a Gaussian plan whose mean and variance
 * are refitted, the elite-fraction loss and γ = 1 (MATH.md §3.6):
 *   E = the ⌊ρK⌉ lowest-cost samples,  μ ← mean(U_E),  σ² ← max(var(U_E), σ_min²),
 * repeated `iterations` times per control step, then shift (variance reset by default).
 * Symbols ↔ options: ρ ↔ `eliteFraction`, σ₀ ↔ `std`, σ_min ↔ `minStd`.
 *
 * Exactly `createController({ name: "cem", plan: gaussianPlan({ adaptVariance: true, … }),
 * loss: eliteFraction({ fraction }), geometry: "kl", stepSize: 1, shift: shiftPlan({ fill,
 * spreadFill }), … })` (a test checks bit-identity).
 *
 * Source: R. Y. Rubinstein, "The Cross-Entropy Method for Combinatorial and Continuous
 * Optimization", Methodology and Computing in Applied Probability, 1999.
 */
export function cem(options: CemOptions): Controller {
  requireObject("cem", "options", options);
  const fraction = options.eliteFraction ?? 0.1;
  requireInRange("cem", "eliteFraction", fraction, 0, 1, true);
  if (!(fraction > 0))
    throw new RecedeError("range", "cem", "eliteFraction", "in (0, 1]", fraction);
  return createController({
    name: "cem",
    dynamics: options.dynamics,
    cost: options.cost,
    horizon: options.horizon,
    samples: options.samples,
    plan: gaussianPlan({
      mean: options.mean,
      std: options.std,
      adaptVariance: true,
      minStd: options.minStd ?? 0.01,
      correlation: options.correlation,
      keepMeanSample: options.keepMeanSample,
    }),
    loss: eliteFraction({ fraction }),
    geometry: "kl",
    stepSize: 1,
    iterations: options.iterations ?? 3,
    shift: shiftPlan({ fill: options.fill, spreadFill: options.spreadFill ?? "reset" }),
    bounds: options.bounds,
    seed: options.seed,
    sliceSize: options.sliceSize,
    timing: options.timing,
    checkEveryStep: options.checkEveryStep,
    workers: options.workers,
  });
}
