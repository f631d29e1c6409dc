/**
 * Point (deterministic) plan: the decision is the control sequence itself.
 *
 * @module
 */
import { RecedeError, type Stream } from "@recede/core";
import { broadcast, requireObject } from "../internal/input.js";
import type { PlanBlock, PlanConfig, PlanDistribution, PlanFamily } from "./types.js";

/** Options of {@link pointPlan}. */
export interface PointPlanOptions {
  /**
   * Initial plan U₀ (and "nominal" tail fill): a number, one control (length m), or H·m values.
   * @defaultValue 0
   */
  readonly mean?: number | Float64Array | readonly number[];
}

const FN = "pointPlan";

/**
 * A deterministic plan: the Dirac distribution δ_U on one control sequence U ∈ ℝ^{H·m}.
 *
 * Every "sample" equals U. It is the decision of gradient-type mirror steps
 * U⁺ = argmin γ⟨∇J(U), V⟩ + D(V‖U) in a chosen geometry D (Euclidean, Mahalanobis), e.g. the
 * Newton/LQR step of MATH.md §4.3. With a sampling loss it degenerates (all samples equal).
 * Symbols ↔ options: U₀ ↔ `mean`.
 */
export function pointPlan(options: PointPlanOptions = {}): PlanFamily {
  requireObject(FN, "options", options);
  const meanIn = options.mean ?? 0;
  return {
    name: "point",
    create(config: PlanConfig): PlanDistribution {
      const h = config.horizon;
      const m = config.controlSize;
      const mean = broadcast(FN, "mean", meanIn, m, h, Number.isFinite, "finite");
      for (let i = 0; i < h * m; i++) {
        const j = i % m;
        if (mean[i] < config.lower[j] || mean[i] > config.upper[j]) {
          throw new RecedeError("range", FN, `mean[${i}]`, "within the control bounds", mean[i]);
        }
      }
      return new PointPlan(h, m, mean);
    },
  };
}

class PointPlan implements PlanDistribution {
  readonly name = "point";
  readonly stochastic = false;
  readonly meanIsParameter = true;
  readonly mean: Float64Array;
  readonly blocks: readonly PlanBlock[];
  private readonly len: number;

  constructor(
    readonly horizon: number,
    readonly controlSize: number,
    initial: Float64Array,
  ) {
    this.len = horizon * controlSize;
    this.mean = new Float64Array(initial);
    this.blocks = [
      { role: "mean", width: controlSize, data: this.mean, initial, zeroAllowed: true },
    ];
  }

  sample(_stream: Stream, first: number, count: number, out: Float64Array): void {
    const len = this.len;
    for (let k = first; k < first + count; k++) out.set(this.mean, k * len);
  }

  update(
    samples: Float64Array,
    count: number,
    weights: Float64Array,
    normalized: boolean,
    gamma: number,
  ): void {
    // m⁺ = (1−γ)m + γ Σ v U  (normalized) or m + γ(Σ v U − (Σ v) m) (signed); φ(U) = U.
    const len = this.len;
    const mean = this.mean;
    let wsum = 0;
    for (let k = 0; k < count; k++) wsum += weights[k];
    for (let p = 0; p < len; p++) {
      let t = 0;
      for (let k = 0; k < count; k++) if (weights[k] !== 0) t += weights[k] * samples[k * len + p];
      mean[p] = normalized
        ? (1 - gamma) * mean[p] + gamma * t
        : mean[p] + gamma * (t - wsum * mean[p]);
    }
  }

  sync(): void {}
}
