/**
 * @recede/problems — reference control problems with batched dynamics, costs, bounds, start states
 * and success tests, each with its published source: double integrator, pendulum swing-up,
 * cart-pole swing-up, planar quadrotor (with an optional disturbance for plant/model mismatch) and
 * a kinematic-bicycle mobile robot. Also the batched cost atoms the controllers reuse (quadratic
 * tracking cost, soft state limits, circular obstacles, sums).
 *
 * @packageDocumentation
 */

export {
  type BicycleOptions,
  type BicycleParameters,
  type BicycleProblem,
  bicycle,
} from "./bicycle.js";
export {
  type CartPoleOptions,
  type CartPoleParameters,
  type CartPoleProblem,
  cartPole,
} from "./cartPole.js";
export {
  type CircleObstacle,
  type CircleObstaclesCost,
  type CircleObstaclesOptions,
  circleObstacles,
} from "./costs/circleObstacles.js";
export {
  type QuadraticCost,
  type QuadraticCostOptions,
  quadraticCost,
} from "./costs/quadraticCost.js";
export {
  type StateLimit,
  type StateLimitPenaltyOptions,
  stateLimitPenalty,
} from "./costs/stateLimitPenalty.js";
export { sumCosts } from "./costs/sumCosts.js";
export { type DoubleIntegratorOptions, doubleIntegrator } from "./doubleIntegrator.js";
export type { WeightInput } from "./internal/options.js";
export {
  type PendulumOptions,
  type PendulumParameters,
  type PendulumProblem,
  pendulum,
} from "./pendulum.js";
export {
  type PlanarQuadrotorOptions,
  type PlanarQuadrotorParameters,
  type PlanarQuadrotorProblem,
  planarQuadrotor,
  type QuadrotorDisturbance,
} from "./planarQuadrotor.js";
export {
  type LinearQuadratic,
  type Problem,
  type SuccessReport,
  wrapAngle,
} from "./problem.js";
export {
  getProblem,
  type ProblemByName,
  type ProblemFactory,
  type ProblemName,
  type ProblemOptionsByName,
  problemNames,
  problems,
} from "./registry.js";
