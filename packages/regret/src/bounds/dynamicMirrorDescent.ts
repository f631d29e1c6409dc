/**
 * Tracking-regret bound of dynamic mirror descent (Hall & Willett; MATH.md §1.6):
 *   x̃_{t+1} = argmin_{x∈X} η_t⟨g_t, x⟩ + D_ψ(x‖x̂_t),   x̂_{t+1} = Φ_t(x̃_{t+1}).
 * Assumptions: Φ_t non-expansive in D_ψ; D_ψ(·‖z) K-Lipschitz in its first argument;
 * D_ψ ≤ D_max on X; ‖g_t‖_* ≤ G; η_t non-increasing; ψ σ-strongly convex.
 *
 * Symbols ↔ options: D_max ↔ `maxDivergence`, K ↔ `lipschitz`, M ↔ `mirrorBound`,
 * σ ↔ `strongConvexity`, G ↔ `gradientBound`, T ↔ `rounds`, V_Φ ↔ `phiPathLength`
 * (= Σ_{t=1}^{T−1} ‖u_{t+1} − Φ_t(u_t)‖, see the tracker), η_t ↔ `schedule`.
 *
 * @module
 */

import { RecedeError } from "@recede/core";
import { nonNegative, positive, roundsArg } from "./checks.js";

/** A step-size schedule: constant η, or η_t = c/√t. */
export type StepSchedule =
  | { readonly kind: "constant"; readonly stepSize: number }
  | { readonly kind: "inverse-sqrt"; readonly scale: number };

/** Which constant form of the bound to evaluate. */
export type DmdBoundForm = "derived" | "hall-willett";

/** Parameters of {@link dynamicMirrorDescentRegretBound}. */
export interface DmdBoundParameters {
  /** D_max ≥ sup_{x,y∈X} D_ψ(x‖y). */
  readonly maxDivergence: number;
  /** K: D_ψ(x‖z) − D_ψ(y‖z) ≤ K‖x − y‖ (the `"derived"` form). */
  readonly lipschitz?: number;
  /** M: the paper's constant, entering as 4M (the `"hall-willett"` form). */
  readonly mirrorBound?: number;
  /** σ > 0. @defaultValue 1 */
  readonly strongConvexity?: number;
  /** G ≥ max_t ‖g_t‖_*. */
  readonly gradientBound: number;
  /** T ≥ 1. */
  readonly rounds: number;
  /** V_Φ(u_{1:T}) ≥ 0. */
  readonly phiPathLength: number;
  readonly schedule: StepSchedule;
  /** @defaultValue "derived" */
  readonly form?: DmdBoundForm;
}

/**
 * R_T(u_{1:T}) = Σ_t ℓ_t(x̂_t) − Σ_t ℓ_t(u_t) is at most
 *
 * - `form: "derived"` (default; MATH.md §1.6, derived and safe to test against):
 *     D_max/η_T + K V_Φ/η_T + (G²/(2σ)) Σ_{t=1}^T η_t;
 * - `form: "hall-willett"` (the paper's constant form, recalled — MATH.md marks the 4M constant and
 *   the η_{T+1} index as not re-read):
 *     D_max/η_{T+1} + 4M V_Φ/η_T + (G²/(2σ)) Σ_{t=1}^T η_t.
 *
 * For `inverse-sqrt` schedules Σ_{t≤T} c/√t is replaced by its upper bound c(2√T − 1), so the
 * value stays a valid bound. Source: E. C. Hall, R. M. Willett, "Dynamical Models and Tracking
 * Regret in Online Convex Programming", ICML 2013; "Online Convex Optimization in Dynamic
 * Environments", IEEE J. Sel. Topics Signal Process. 9(4), 2015. Sanity check (MATH.md §1.6):
 * ψ = ½‖x‖², Φ = id gives K = D, D_max = D²/2 and the OGD dynamic bound's structure.
 */
export function dynamicMirrorDescentRegretBound(p: DmdBoundParameters): number {
  const fn = "dynamicMirrorDescentRegretBound";
  const Dmax = nonNegative(fn, "maxDivergence", p.maxDivergence);
  const sigma =
    p.strongConvexity === undefined ? 1 : positive(fn, "strongConvexity", p.strongConvexity);
  const G = nonNegative(fn, "gradientBound", p.gradientBound);
  const T = roundsArg(fn, p.rounds);
  const V = nonNegative(fn, "phiPathLength", p.phiPathLength);
  const form = p.form ?? "derived";
  let etaT: number;
  let etaT1: number;
  let sumEta: number;
  const s = p.schedule;
  if (s === null || typeof s !== "object") {
    throw new RecedeError("type", fn, "schedule", "a step schedule", s);
  }
  if (s.kind === "constant") {
    const eta = positive(fn, "schedule.stepSize", s.stepSize);
    etaT = eta;
    etaT1 = eta;
    sumEta = T * eta;
  } else if (s.kind === "inverse-sqrt") {
    const c = positive(fn, "schedule.scale", s.scale);
    etaT = c / Math.sqrt(T);
    etaT1 = c / Math.sqrt(T + 1);
    sumEta = c * (2 * Math.sqrt(T) - 1);
  } else {
    throw new RecedeError(
      "range",
      fn,
      "schedule.kind",
      '"constant" or "inverse-sqrt"',
      (s as { kind: unknown }).kind,
    );
  }
  const last = (G * G * sumEta) / (2 * sigma);
  if (form === "derived") {
    const K = nonNegative(fn, "lipschitz", p.lipschitz);
    return Dmax / etaT + (K * V) / etaT + last;
  }
  if (form === "hall-willett") {
    const M = nonNegative(fn, "mirrorBound", p.mirrorBound);
    return Dmax / etaT1 + (4 * M * V) / etaT + last;
  }
  throw new RecedeError("range", fn, "form", '"derived" or "hall-willett"', form);
}
