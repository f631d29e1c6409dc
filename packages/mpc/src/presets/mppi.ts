/**
 * MPPI as a preset of the generic controller.
 *
 * @module
 */
import { type ControlBounds, type CostModel, type Dynamics, requirePositive } from "@recede/core";
import { type Controller, createController } from "../controller.js";
import { gaussianPlan } from "../distributions/gaussian.js";
import { requireObject } from "../internal/input.js";
import { exponentialUtility } from "../losses/exponentialUtility.js";
import type { RolloutWorkers } from "../parallel/pool.js";
import { type MeanFill, shiftPlan } from "../shift.js";

/** Options of {@link mppi}. */
export interface MppiOptions {
  /** The planning model. */
  readonly dynamics: Dynamics;
  /** The planning cost. */
  readonly cost: CostModel;
  /** Horizon H. */
  readonly horizon: number;
  /** Samples K. @defaultValue 256 */
  readonly samples?: number;
  /** Temperature λ > 0. @defaultValue 1 */
  readonly temperature?: number;
  /** Exploration noise σ > 0 (number, length m, or H·m). @defaultValue 1 */
  readonly noise?: number | Float64Array | readonly number[];
  /** Initial / nominal plan μ₀ (number, length m, or H·m). @defaultValue 0 */
  readonly mean?: number | Float64Array | readonly number[];
  /** Noise correlation a ∈ [0, 1) between steps (see gaussianPlan). @defaultValue 0 */
  readonly correlation?: number;
  /** Keep sample 0 at the unperturbed mean. @defaultValue false */
  readonly keepMeanSample?: boolean;
  /** Mirror steps per control step. @defaultValue 1 */
  readonly iterations?: number;
  /** Tail fill of the shifted plan. @defaultValue "nominal" */
  readonly fill?: MeanFill;
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
 * Model predictive path integral control: the generic controller with a Gaussian plan of fixed
 * covariance, the exponential-utility loss and γ = 1 (MATH.md §3.5):
 *   w_i ∝ exp(−(C_i − min_j C_j)/λ),   μ ← Σ_i w_i U_i  (= μ + Σ_i w_i ε_i),  then shift.
 * This is the plain softmin-weighted average; the control-cost cross term λ u_hᵀΣ⁻¹ε_{i,h} of the
 * 2017 algorithm and its output smoothing filter are not included (add the former to the cost if
 * wanted). Symbols ↔ options: λ ↔ `temperature`, σ ↔ `noise`, K ↔ `samples`, H ↔ `horizon`.
 *
 * Exactly `createController({ name: "mppi", plan: gaussianPlan({ mean, std: noise, correlation,
 * keepMeanSample }), loss: exponentialUtility({ temperature }), geometry: "kl", stepSize: 1,
 * shift: shiftPlan({ fill }), … })` (a test checks bit-identity).
 *
 * Source: G. Williams, N. Wagener, B. Goldfain, P. Drews, J. M. Rehg, B. Boots, E. A. Theodorou,
 * "Information Theoretic MPC for Model-Based Reinforcement Learning", ICRA 2017.
 */
export function mppi(options: MppiOptions): Controller {
  requireObject("mppi", "options", options);
  const temperature = requirePositive("mppi", "temperature", options.temperature ?? 1);
  return createController({
    name: "mppi",
    dynamics: options.dynamics,
    cost: options.cost,
    horizon: options.horizon,
    samples: options.samples,
    plan: gaussianPlan({
      mean: options.mean,
      std: options.noise,
      correlation: options.correlation,
      keepMeanSample: options.keepMeanSample,
    }),
    loss: exponentialUtility({ temperature }),
    geometry: "kl",
    stepSize: 1,
    iterations: options.iterations,
    shift: shiftPlan({ fill: options.fill }),
    bounds: options.bounds,
    seed: options.seed,
    sliceSize: options.sliceSize,
    timing: options.timing,
    checkEveryStep: options.checkEveryStep,
    workers: options.workers,
  });
}
