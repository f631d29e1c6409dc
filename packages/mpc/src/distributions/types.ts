/**
 * The plan-distribution contract: a distribution π_θ over control sequences U = (u_0 … u_{H−1})
 * whose parameters θ the controller updates by a mirror step and carries forward by a dynamic step.
 *
 * @module
 */
import type { Stream } from "@recede/core";

/** What a {@link PlanFamily} needs to build a distribution for one controller. */
export interface PlanConfig {
  /** Horizon H (steps). */
  readonly horizon: number;
  /** Control size m. */
  readonly controlSize: number;
  /** Number of samples K drawn per iteration (sizes internal buffers). */
  readonly samples: number;
  /** Box bounds lower ≤ u ≤ upper (length m each; ±Infinity when unbounded). */
  readonly lower: Float64Array;
  /** Upper bounds (length m). */
  readonly upper: Float64Array;
  /** Name of the public function building the controller, for error messages. */
  readonly caller: string;
  /**
   * Put the parameter buffers that sampling reads on SharedArrayBuffers, so worker threads can
   * sample from the distribution in place (see `startRolloutWorkers`).
   * @defaultValue false
   */
  readonly sharedMemory?: boolean;
}

/**
 * One parameter block of a plan, laid out per time step: `data[t·width + j]`, t < H.
 * The dynamic step (shift.ts) shifts every block by one step and fills its tail.
 */
export interface PlanBlock {
  /**
   * Role of the block for the dynamic step: `"mean"` blocks are expectation parameters of the
   * control (Gaussian mean, categorical probabilities); `"spread"` blocks are dispersion parameters
   * (Gaussian variance).
   */
  readonly role: "mean" | "spread";
  /** Values per time step. */
  readonly width: number;
  /** The current values, H·width (the distribution's own buffer). */
  readonly data: Float64Array;
  /** The initial values, H·width (used by `reset()` and by the "nominal"/"initial" fills). */
  readonly initial: Float64Array;
  /** Whether an all-zero step is a valid value of this block (false for probabilities). */
  readonly zeroAllowed: boolean;
}

/**
 * A distribution over control sequences of horizon H and control size m, bound to one controller.
 *
 * Layout of a batch of samples: one Float64Array of K·H·m; sample k, step t, component j at
 * (k·H + t)·m + j.
 */
export interface PlanDistribution {
  /** Short name, e.g. `"gaussian"`. */
  readonly name: string;
  /** Horizon H. */
  readonly horizon: number;
  /** Control size m. */
  readonly controlSize: number;
  /** False for a deterministic (point) plan: every sample equals the mean. */
  readonly stochastic: boolean;
  /**
   * True when {@link PlanDistribution.mean} is itself a parameter that a geometry step may write
   * (Gaussian mean, point plan); false when it is derived (categorical mode).
   */
  readonly meanIsParameter: boolean;
  /** The plan to apply: H·m controls (mean for a Gaussian, most probable choice for a categorical). */
  readonly mean: Float64Array;
  /** Parameter blocks, for the dynamic step, snapshots and reset. */
  readonly blocks: readonly PlanBlock[];
  /**
   * Draw samples `first … first+count−1` into `out` (rows of H·m) from `stream`. Samples of one
   * slice must depend only on `stream` and the parameters, never on other slices.
   */
  sample(stream: Stream, first: number, count: number, out: Float64Array): void;
  /**
   * Mirror step in expectation parameters (MATH.md §3.3): with φ the sufficient statistic and
   * weights v over the K (clipped) samples,
   *  - `normalized` (Σv = 1, v ≥ 0):  m⁺ = (1−γ)m + γ Σ_i v_i φ(U_i);
   *  - otherwise (signed weights):    m⁺ = m + γ (Σ_i v_i φ(U_i) − (Σ_i v_i) m).
   * Samples with v_i = 0 are skipped.
   */
  update(
    samples: Float64Array,
    count: number,
    weights: Float64Array,
    normalized: boolean,
    gamma: number,
  ): void;
  /** Recompute derived values (e.g. `mean` of a categorical) after blocks were written. */
  sync(): void;
}

/** A recipe for a {@link PlanDistribution}; the controller calls `create` once at construction. */
export interface PlanFamily {
  /** Short name, e.g. `"gaussian"`. */
  readonly name: string;
  /** Build the distribution for a controller; throws a typed error for inconsistent options. */
  create(config: PlanConfig): PlanDistribution;
}
