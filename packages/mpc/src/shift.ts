/**
 * Dynamic steps Φ: carry the plan forward one control step (MATH.md §3.7).
 *
 * @module
 */
import { RecedeError } from "@recede/core";
import type { PlanDistribution } from "./distributions/types.js";
import { requireObject } from "./internal/input.js";

/** How the new last step of a mean block is filled: μ_{H−1}, zero, or the nominal μ₀ value. */
export type MeanFill = "repeat" | "zero" | "nominal";
/**
 * How a spread (variance) block is carried forward: shift and repeat the last step, shift and fill
 * with the initial value, or reset every step to its initial value.
 */
export type SpreadFill = "repeat" | "initial" | "reset";

/** A dynamic step Φ_t applied to the plan after each control step. */
export interface DynamicStep {
  /** Short name. */
  readonly name: string;
  /** Throw a typed error (naming `caller`) if this step cannot act on `plan`. */
  check(plan: PlanDistribution, caller: string): void;
  /** θ ← Φ_t(θ) in place on the plan's blocks; `round` is the control step just completed (≥ 1). */
  apply(plan: PlanDistribution, round: number): void;
}

/** Options of {@link shiftPlan}. */
export interface ShiftPlanOptions {
  /** Tail fill of mean blocks (Gaussian mean, point plan, categorical probabilities). @defaultValue "nominal" */
  readonly fill?: MeanFill;
  /** Tail fill of spread blocks (Gaussian variance). @defaultValue "initial" */
  readonly spreadFill?: SpreadFill;
}

const FN = "shiftPlan";

/**
 * Shift by one step and fill the tail, block by block:
 *   Φ(θ) = (θ_1, …, θ_{H−1}, θ_fill),
 * θ_fill ∈ {θ_{H−1} ("repeat"), 0 ("zero"), θ₀,H−1 ("nominal": the initial plan's last step)} for
 * mean blocks and {θ_{H−1} ("repeat"), the initial value ("initial")} for spread blocks; "reset"
 * sets the whole spread block back to its initial value (common practice for CEM planners, which
 * re-widen the search at every control step).
 * With a fixed fill (zero, nominal, initial) the block-diagonal KL between two plans cannot grow
 * (the contraction assumption of dynamic mirror descent); "repeat" gives no such guarantee
 * (MATH.md §3.7). No allocation.
 * Symbols ↔ options: θ_fill ↔ `fill` / `spreadFill`.
 *
 * Source: E. C. Hall, R. M. Willett, "Online Convex Optimization in Dynamic Environments",
 * IEEE J. Sel. Topics Signal Process., 2015 (dynamic step Φ); the shift as Φ for MPC:
 * N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning Approach to Model Predictive
 * Control", RSS 2019.
 */
export function shiftPlan(options: ShiftPlanOptions = {}): DynamicStep {
  requireObject(FN, "options", options);
  const fill = options.fill ?? "nominal";
  if (fill !== "repeat" && fill !== "zero" && fill !== "nominal") {
    throw new RecedeError("range", FN, "fill", '"repeat", "zero" or "nominal"', fill);
  }
  const spreadFill = options.spreadFill ?? "initial";
  if (spreadFill !== "repeat" && spreadFill !== "initial" && spreadFill !== "reset") {
    throw new RecedeError("range", FN, "spreadFill", '"repeat", "initial" or "reset"', spreadFill);
  }
  return {
    name: `shift(${fill}, ${spreadFill})`,
    check(plan: PlanDistribution, caller: string): void {
      if (fill !== "zero") return;
      for (const b of plan.blocks) {
        if (b.role === "mean" && !b.zeroAllowed) {
          throw new RecedeError(
            "domain",
            caller,
            "shift",
            `a fill other than "zero" for a ${plan.name} plan (zero is not a valid value of its parameters)`,
            "zero",
          );
        }
      }
    },
    apply(plan: PlanDistribution): void {
      const h = plan.horizon;
      const blocks = plan.blocks;
      for (let bi = 0; bi < blocks.length; bi++) {
        const b = blocks[bi];
        const w = b.width;
        const d = b.data;
        const last = (h - 1) * w;
        d.copyWithin(0, w, h * w);
        if (b.role === "mean") {
          if (fill === "zero") d.fill(0, last, h * w);
          else if (fill === "nominal")
            for (let j = 0; j < w; j++) d[last + j] = b.initial[last + j];
          // "repeat": the shift left the old last step in place.
        } else if (spreadFill === "initial") {
          for (let j = 0; j < w; j++) d[last + j] = b.initial[last + j];
        } else if (spreadFill === "reset") {
          d.set(b.initial);
        }
      }
      plan.sync();
    },
  };
}

/** Options of {@link customShift}. */
export interface CustomShiftOptions {
  /** Name shown in reports. @defaultValue "custom" */
  readonly name?: string;
  /**
   * θ ← Φ_t(θ): write the plan's blocks (`plan.blocks[i].data`) in place. Called once per control
   * step after the control is chosen; `round` is the control step just completed.
   */
  readonly map: (plan: PlanDistribution, round: number) => void;
}

/**
 * A user-defined dynamic step Φ_t (e.g. a model-based warm start). The plan's derived values are
 * recomputed after the map. Source: E. C. Hall, R. M. Willett, "Online Convex Optimization in
 * Dynamic Environments", 2015 (any dynamic step Φ_t; regret bounds need Φ_t to be a contraction).
 */
export function customShift(options: CustomShiftOptions): DynamicStep {
  requireObject("customShift", "options", options);
  if (typeof options.map !== "function") {
    throw new RecedeError(
      "type",
      "customShift",
      "map",
      "a function (plan, round) => void",
      options.map,
    );
  }
  const map = options.map;
  return {
    name: options.name ?? "custom",
    check(): void {},
    apply(plan: PlanDistribution, round: number): void {
      map(plan, round);
      plan.sync();
    },
  };
}
