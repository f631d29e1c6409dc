/**
 * The Hessian of a plan objective as the metric of a Mahalanobis geometry (Newton mirror step).
 *
 * @module
 */
import { type Geometry, mahalanobis, RecedeError } from "@recede/core";
import type { GeometryFamily, PlanObjective } from "./losses/objective.js";

/**
 * Geometry recipe D(U‖V) = ½(U − V)ᵀ𝐇(U − V) with 𝐇 = ∇²J the objective's constant Hessian, built
 * with `mahalanobis({ metric: 𝐇 })` of `@recede/core`. Its mirror step with step size γ is the
 * damped Newton step U⁺ = U − γ𝐇⁻¹∇J(U); with γ = 1 on a strictly convex quadratic it lands on the
 * minimizer from any U (MATH.md §2.3, §4.3).
 *
 * Source: A. Beck, M. Teboulle, "Mirror Descent and Nonlinear Projected Subgradient Methods for
 * Convex Optimization", Oper. Res. Lett., 2003 (Bregman steps; Newton as the Hessian-metric case).
 */
export function hessianMetric(): GeometryFamily {
  return {
    name: "hessian-metric",
    create(objective: PlanObjective): Geometry {
      const h = objective.hessian;
      if (h === null) {
        throw new RecedeError(
          "type",
          "hessianMetric",
          "objective.hessian",
          "a constant Hessian",
          null,
        );
      }
      const d = objective.dimension;
      return mahalanobis({ metric: { data: h, rows: d, cols: d } });
    },
  };
}
