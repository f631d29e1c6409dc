/**
 * Derived variant: a per-iteration schedule on the exploration scale — wide samples in the first
 * mirror step of a control step, narrow ones in the last.
 *
 * @module
 */
import { RecedeError, type Stream } from "@recede/core";
import type {
  PlanBlock,
  PlanConfig,
  PlanDistribution,
  PlanFamily,
} from "../distributions/types.js";
import { requireObject } from "../internal/input.js";

/** Options of {@link annealNoise}. */
export interface AnnealNoiseOptions {
  /**
   * Scales s_0, s_1, … > 0 (finite) of the sample deviations at iterations 0, 1, … of each control
   * step; iterations beyond the list use its last entry. `[1]` leaves the family unchanged.
   * @defaultValue [1, 0.1]
   */
  readonly scales?: readonly number[];
}

const FN = "annealNoise";

/**
 * Wrap a plan family so that the i-th draw of a control step has its deviations from the mean
 * scaled by s_i:
 *   U_k = μ + s_i · (Ũ_k − μ),   Ũ_k ∼ π_θ (the wrapped family, same stream),
 *   i = number of updates since the last dynamic step (or reset / restore), capped at the last
 *   entry of the schedule.
 * For a Gaussian plan N(μ, σ²) with AR(1) noise of correlation a this draws exactly from
 * N(μ, s_i² σ²) with the same correlation: the i-th mirror step samples a Gaussian s_i times as
 * wide. The update is the wrapped family's own mirror step on the samples actually drawn (for the
 * mean, the MPPI / CEM weighted average). Meant for plans with a fixed σ (`adaptVariance: false`):
 * with a variance refit the refitted σ² is that of the scaled samples.
 * The counter is plain state outside the parameter blocks: `sync()` (called by every dynamic step,
 * by reset, restore and the rollback of a failed step) resets it to 0, and an iteration whose
 * update was skipped (no usable sample) does not advance it.
 *
 * Why: at a small sample budget a fixed σ must serve two purposes that conflict. A wide σ finds
 * the large moves a swing-up needs (bang-bang pumping, a committed first push); a narrow σ is what
 * makes the applied first control precise once the goal is reached (the hold tests of the
 * reference problems fail on a mean that carries σ/√ESS of noise). A variance refit resolves the
 * conflict only slowly and shrinks σ during the swing-up too (selection shrinks the weighted
 * spread even on an uninformative cost, by the factor 1 − Σw² per step in expectation), which
 * makes the swing-up hesitant. The schedule gives each control step one wide look and one narrow
 * refinement around the result. Symbols ↔ options: s_i ↔ `scales[i]`.
 *
 * Derived variant. Published sources of the idea (shrinking the sampling covariance across the
 * optimization iterations of one control step): the iteration-wise variance decrease of the
 * cross-entropy method (R. Y. Rubinstein, "The Cross-Entropy Method for Combinatorial and
 * Continuous Optimization", 1999), and a fixed geometric schedule of the noise scale over MPPI
 * iterations in H. Xue, C. Pan, Z. Yi, G. Qu, G. Shi, "Full-Order Sampling-Based MPC for
 * Torque-Level Locomotion Control via Diffusion-Style Annealing", 2024 (from memory). Here the
 * schedule is a wrapper on any plan family, composed with any sample loss and dynamic step.
 *
 * @example
 * ```ts
 * const plan = annealNoise(gaussianPlan({ std: 10, correlation: 0.8 }), { scales: [1, 0.1] });
 * const ctrl = createController({ dynamics, cost, horizon: 50, samples: 32, iterations: 2, plan,
 *   loss: essTemperature({ targetFraction: 0.03 }) });
 * ```
 */
export function annealNoise(base: PlanFamily, options: AnnealNoiseOptions = {}): PlanFamily {
  if (base === null || typeof base !== "object" || typeof base.create !== "function") {
    throw new RecedeError("type", FN, "base", "a plan family (gaussianPlan, …)", base);
  }
  requireObject(FN, "options", options);
  const scalesIn = options.scales ?? [1, 0.1];
  if (!Array.isArray(scalesIn) || scalesIn.length === 0) {
    throw new RecedeError("type", FN, "scales", "a non-empty array of numbers", scalesIn);
  }
  for (let i = 0; i < scalesIn.length; i++) {
    const s: unknown = scalesIn[i];
    if (typeof s !== "number" || !(s > 0 && Number.isFinite(s))) {
      throw new RecedeError("range", FN, `scales[${i}]`, "finite and > 0", s);
    }
  }
  const scales = Float64Array.from(scalesIn);
  return {
    name: `anneal(${base.name})`,
    create(config: PlanConfig): PlanDistribution {
      const inner = base.create(config);
      if (!inner.stochastic) {
        throw new RecedeError(
          "type",
          config.caller,
          "plan",
          "a stochastic plan family to wrap with annealNoise",
          inner.name,
        );
      }
      if (!inner.meanIsParameter) {
        throw new RecedeError(
          "type",
          config.caller,
          "plan",
          "a plan family whose mean is a parameter (gaussianPlan) to wrap with annealNoise",
          inner.name,
        );
      }
      return new AnnealNoise(inner, scales);
    },
  };
}

class AnnealNoise implements PlanDistribution {
  readonly name: string;
  readonly horizon: number;
  readonly controlSize: number;
  readonly stochastic = true;
  readonly meanIsParameter = true;
  readonly mean: Float64Array;
  readonly blocks: readonly PlanBlock[];
  /** [updates since the last sync], unboxed. */
  private readonly count = new Int32Array(1);

  constructor(
    private readonly inner: PlanDistribution,
    private readonly scales: Float64Array,
  ) {
    this.name = `anneal(${inner.name})`;
    this.horizon = inner.horizon;
    this.controlSize = inner.controlSize;
    this.mean = inner.mean;
    this.blocks = inner.blocks;
  }

  sample(stream: Stream, first: number, count: number, out: Float64Array): void {
    this.inner.sample(stream, first, count, out);
    // The scale index is passed, not the scale: a double argument to a call V8 does not inline
    // would be boxed (allocated).
    const i = Math.min(this.count[0], this.scales.length - 1);
    if (this.scales[i] === 1) return;
    scaleRows(out, this.mean, this.horizon * this.controlSize, first, count, this.scales, i);
  }

  update(
    samples: Float64Array,
    count: number,
    weights: Float64Array,
    normalized: boolean,
    gamma: number,
  ): void {
    this.inner.update(samples, count, weights, normalized, gamma);
    if (this.count[0] < this.scales.length) this.count[0]++;
  }

  sync(): void {
    this.inner.sync();
    this.count[0] = 0;
  }
}

/**
 * Rows first … first+count−1 of `out` (length `len` each) ← μ + s·(row − μ), s = scales[index]. A module function, so
 * the loop is compiled on its own (as the Gaussian plan's loops are) and the caller keeps its type
 * feedback.
 */
function scaleRows(
  out: Float64Array,
  mu: Float64Array,
  len: number,
  first: number,
  count: number,
  scales: Float64Array,
  index: number,
): void {
  const s = scales[index];
  for (let k = first; k < first + count; k++) {
    const base = k * len;
    for (let p = 0; p < len; p++) out[base + p] = mu[p] + s * (out[base + p] - mu[p]);
  }
}
