/**
 * The plan-objective contract: a differentiable loss J(U) of a deterministic plan, for
 * gradient-type mirror steps (Euclidean, Mahalanobis/Newton) instead of sampling.
 *
 * @module
 */
import type { CostModel, Dynamics, Geometry } from "@recede/core";

/** What an {@link ObjectiveFamily} receives from the controller. */
export interface ObjectiveConfig {
  /** The controller's model. */
  readonly dynamics: Dynamics;
  /** The controller's cost. */
  readonly cost: CostModel;
  /** Horizon H. */
  readonly horizon: number;
  /** Name of the public function building the controller, for error messages. */
  readonly caller: string;
}

/** A differentiable loss of the plan U ∈ ℝ^{H·m} given the measured state x_t. */
export interface PlanObjective {
  /** Short name. */
  readonly name: string;
  /** H·m. */
  readonly dimension: number;
  /** The constant Hessian ∇²J (row-major (H·m)²) when J is quadratic in U, else null. */
  readonly hessian: Float64Array | null;
  /** out ← ∇J(U) at state x0; returns J(U). Allocates nothing. */
  gradient(x0: Float64Array, plan: Float64Array, out: Float64Array): number;
}

/** A recipe for a {@link PlanObjective}; the controller calls `create` once at construction. */
export interface ObjectiveFamily {
  /** Short name. */
  readonly name: string;
  /** Build the objective for a controller. */
  create(config: ObjectiveConfig): PlanObjective;
}

/** A recipe for a geometry that depends on the objective (e.g. its Hessian as metric). */
export interface GeometryFamily {
  /** Short name. */
  readonly name: string;
  /** Build the geometry on ℝ^{objective.dimension}. */
  create(objective: PlanObjective): Geometry;
}
