/**
 * @recede/mpc — model predictive control as dynamic mirror descent: a generic controller built
 * from a plan distribution, a loss, a geometry, a step size and a dynamic step, with MPPI, CEM and
 * LQR (Riccati, and as one Newton mirror step) as presets, a batched rollout engine and a
 * closed-loop runner.
 *
 * Safety: controllers can move real machines. Simulate first, enforce actuator limits in the
 * machine's own low-level controller, keep an independent emergency stop, and follow the safety
 * standards and practice that apply where the machine runs.
 *
 * @packageDocumentation
 */

export {
  type ClosedLoopOptions,
  type ClosedLoopResult,
  type ControlPolicy,
  closedLoop,
  type Disturbance,
  type Episode,
} from "./closedLoop.js";
export {
  type Controller,
  type ControllerParts,
  type ControllerSnapshot,
  type ControlStep,
  createController,
  type StepReport,
  type StepSize,
} from "./controller.js";
export { type CategoricalPlanOptions, categoricalPlan } from "./distributions/categorical.js";
export { type GaussianPlanOptions, gaussianPlan } from "./distributions/gaussian.js";
export { type PointPlanOptions, pointPlan } from "./distributions/point.js";
export type {
  PlanBlock,
  PlanConfig,
  PlanDistribution,
  PlanFamily,
} from "./distributions/types.js";
export { hessianMetric } from "./hessianMetric.js";
export type { MatrixLike } from "./internal/input.js";
export { type CustomLossOptions, customLoss } from "./losses/customLoss.js";
export {
  type EliteFractionOptions,
  eliteCount,
  eliteFraction,
} from "./losses/eliteFraction.js";
export { type ExpectedCostOptions, expectedCost } from "./losses/expectedCost.js";
export {
  type ExponentialUtilityOptions,
  exponentialUtility,
} from "./losses/exponentialUtility.js";
export type {
  GeometryFamily,
  ObjectiveConfig,
  ObjectiveFamily,
  PlanObjective,
} from "./losses/objective.js";
export {
  type QuadraticPlanLossOptions,
  quadraticPlanLoss,
} from "./losses/quadraticPlanLoss.js";
export type { SampleLoss } from "./losses/types.js";
export {
  type LinearDynamics,
  type LinearDynamicsOptions,
  type LinearQuadraticCost,
  type LinearQuadraticCostOptions,
  linearDynamics,
  linearQuadraticCost,
} from "./model.js";
export {
  type RolloutWorkers,
  type RolloutWorkersOptions,
  startRolloutWorkers,
} from "./parallel/pool.js";
export type { ModelRecipe } from "./parallel/recipe.js";
export { type CemOptions, cem } from "./presets/cem.js";
export { type LqrController, type LqrOptions, lqr } from "./presets/lqr.js";
export { type LqrNewtonOptions, lqrNewton } from "./presets/lqrNewton.js";
export { type MppiOptions, mppi } from "./presets/mppi.js";
export {
  closedLoopValue,
  type DareOptions,
  type DareSolution,
  dare,
  type FiniteHorizonLqrInput,
  type FiniteHorizonLqrSolution,
  finiteHorizonLqr,
  type LqrSystem,
  type MatrixSequence,
  type RiccatiWorkspace,
  riccatiStep,
  riccatiWorkspace,
} from "./riccati.js";
export { createRollout, type Rollout, type RolloutOptions } from "./rollout.js";
export {
  type CustomShiftOptions,
  customShift,
  type DynamicStep,
  type MeanFill,
  type ShiftPlanOptions,
  type SpreadFill,
  shiftPlan,
} from "./shift.js";
export { type AnnealNoiseOptions, annealNoise } from "./variants/annealNoise.js";
export {
  type EssTemperatureLoss,
  type EssTemperatureOptions,
  essTemperature,
} from "./variants/essTemperature.js";
export { type LeanMppiOptions, leanMppi } from "./variants/leanMppi.js";
export { type ReuseBestOptions, reuseBest } from "./variants/reuseBest.js";
