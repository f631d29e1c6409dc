/**
 * LQR as one Newton (Hessian-metric Mahalanobis) mirror step of the generic controller.
 *
 * @module
 */
import type { ControlBounds, CostModel, Dynamics } from "@recede/core";
import { type Controller, createController } from "../controller.js";
import { pointPlan } from "../distributions/point.js";
import { hessianMetric } from "../hessianMetric.js";
import type { MatrixLike } from "../internal/input.js";
import { requireObject } from "../internal/input.js";
import { quadraticPlanLoss } from "../losses/quadraticPlanLoss.js";
import { type MeanFill, shiftPlan } from "../shift.js";

/** Options of {@link lqrNewton}. */
export interface LqrNewtonOptions {
  /** Linear model with Jacobians (e.g. {@link linearDynamics}). */
  readonly dynamics: Dynamics;
  /** The cost; its `q`, `r`, `s`, `qf` fields are used unless given below. */
  readonly cost: CostModel;
  /** Horizon H. */
  readonly horizon: number;
  /** Q (n×n). @defaultValue `cost.q` */
  readonly q?: MatrixLike;
  /** R (m×m). @defaultValue `cost.r` */
  readonly r?: MatrixLike;
  /** S (n×m). @defaultValue `cost.s` or zero */
  readonly s?: MatrixLike;
  /** Qf (n×n). @defaultValue `cost.qf` */
  readonly qf?: MatrixLike;
  /** Initial plan (irrelevant on LQ problems: one step lands on U* from anywhere). @defaultValue 0 */
  readonly mean?: number | Float64Array | readonly number[];
  /** Tail fill of the shifted plan. @defaultValue "zero" */
  readonly fill?: MeanFill;
  /** Control bounds (clipping after the step; exact only when inactive). @defaultValue unbounded */
  readonly bounds?: ControlBounds;
}

/**
 * LQR obtained as ONE mirror step of the generic machinery (MATH.md §4.3): a deterministic plan,
 * the quadratic open-loop loss J(U) = 𝐔ᵀ𝐇𝐔/2 + 𝐠ᵀ𝐔 + const from the measured state, the
 * Mahalanobis geometry with the Hessian 𝐇 as metric, and γ = 1:
 *   U⁺ = U − 𝐇⁻¹∇J(U) = −𝐇⁻¹𝐠 = U*   for every U,
 * which equals the finite-horizon Riccati solution u_t = −K_t x_t along the predicted path, so the
 * applied control is −K_0 x (exact on linear-quadratic problems; cost O((Hm)³) once, then O((Hm)²)
 * per step, versus O(H(n³ + m³)) for Riccati — use {@link lqr} in production).
 *
 * Exactly `createController({ name: "lqrNewton", samples: 1, plan: pointPlan({ mean }),
 * loss: quadraticPlanLoss({ q, r, s, qf }), geometry: hessianMetric(), stepSize: 1,
 * shift: shiftPlan({ fill }), … })` (a test checks bit-identity).
 *
 * Source: derivation and numerical check in MATH.md §4.3; the batch LQ solution as in B. D. O.
 * Anderson, J. B. Moore, "Optimal Control: Linear Quadratic Methods", 1990.
 */
export function lqrNewton(options: LqrNewtonOptions): Controller {
  requireObject("lqrNewton", "options", options);
  return createController({
    name: "lqrNewton",
    dynamics: options.dynamics,
    cost: options.cost,
    horizon: options.horizon,
    samples: 1,
    plan: pointPlan({ mean: options.mean }),
    loss: quadraticPlanLoss({ q: options.q, r: options.r, s: options.s, qf: options.qf }),
    geometry: hessianMetric(),
    stepSize: 1,
    shift: shiftPlan({ fill: options.fill ?? "zero" }),
    bounds: options.bounds,
  });
}
