/**
 * Batched rollout engine: clip sampled control sequences to the box bounds, roll the model out from
 * the measured state, and sum running + terminal costs per sample. Zero allocation after construction.
 *
 * @module
 */
import type { CostModel, Dynamics } from "@recede/core";
import { RecedeError, requireInteger } from "@recede/core";
import { float64Buffer } from "./internal/shared.js";

/** Options of {@link createRollout}. */
export interface RolloutOptions {
  /** The model x_{t+1} = f(x_t, u_t, t) (batched). */
  readonly dynamics: Dynamics;
  /** Running and terminal costs (batched). */
  readonly cost: CostModel;
  /** Number of samples K ≥ 1. */
  readonly samples: number;
  /** Horizon H ≥ 1. */
  readonly horizon: number;
  /** Lower control bounds (length m; −Infinity for none). @defaultValue unbounded */
  readonly lower?: Float64Array;
  /** Upper control bounds (length m; +Infinity for none). @defaultValue unbounded */
  readonly upper?: Float64Array;
  /**
   * Allocate the costs, failure flags and states on a SharedArrayBuffer, so worker threads can
   * write their slices in place.
   * @defaultValue false
   */
  readonly sharedMemory?: boolean;
}

/**
 * A rollout engine bound to one model, cost, K and H.
 *
 * Buffers (flat, row-major): samples K·H·m with sample k, step t at (k·H + t)·m; states K·n;
 * controls of one step K·m (gathered from the samples, so the batched model sees contiguous rows);
 * costs K. Every method works on a slice [first, first + count) of the samples and touches only that
 * slice's rows, so slices can run independently (e.g. on worker threads sharing the buffers).
 */
export interface Rollout {
  /** K. */
  readonly samples: number;
  /** H. */
  readonly horizon: number;
  /** n. */
  readonly stateSize: number;
  /** m. */
  readonly controlSize: number;
  /** Per-sample total cost C_k = Σ_t c(x_t, u_t, t) + c_H(x_H); +∞ for failed samples. */
  readonly costs: Float64Array;
  /** 1 where sample k failed (non-finite state or cost, or the model threw), else 0. */
  readonly failed: Uint8Array;
  /** Working states, K·n (after `run`, the final states x_H). */
  readonly states: Float64Array;
  /** Clip samples of the slice to lower ≤ u ≤ upper, in place. */
  clip(samples: Float64Array, first: number, count: number): void;
  /** Roll out samples of the slice from `x0`; fills `costs` and `failed`; returns the failures. */
  run(x0: Float64Array, samples: Float64Array, first: number, count: number): number;
}

const FN = "createRollout";

/**
 * Build a batched rollout engine.
 *
 * For each sample k of a slice: x_0 = x0; for t = 0 … H−1: gather u_{k,t}, C_k += c(x_t, u_t, t),
 * x_{t+1} = f(x_t, u_t, t); then C_k += c_H(x_H). A sample whose state turns non-finite at any step,
 * whose cost is non-finite, or for which the model or cost throws, is marked failed with C_k = +∞.
 * A throw inside a batched call fails the whole call, so the slice is then re-run one sample at a
 * time to isolate the throwing samples (the others keep their exact costs).
 * Source: the sampling-MPC rollout of G. Williams et al., "Information Theoretic MPC for
 * Model-Based Reinforcement Learning", ICRA 2017 (batched form: ours).
 */
export function createRollout(options: RolloutOptions): Rollout {
  const dyn = options.dynamics;
  const cost = options.cost;
  if (dyn === null || typeof dyn !== "object" || typeof dyn.step !== "function") {
    throw new RecedeError("type", FN, "dynamics", "a Dynamics object with a step method", dyn);
  }
  if (
    cost === null ||
    typeof cost !== "object" ||
    typeof cost.running !== "function" ||
    typeof cost.terminal !== "function"
  ) {
    throw new RecedeError(
      "type",
      FN,
      "cost",
      "a CostModel with running and terminal methods",
      cost,
    );
  }
  const n = requireInteger(FN, "dynamics.stateSize", dyn.stateSize, 1);
  const m = requireInteger(FN, "dynamics.controlSize", dyn.controlSize, 1);
  if (cost.stateSize !== n)
    throw new RecedeError("dimension", FN, "cost.stateSize", `${n} (the model's)`, cost.stateSize);
  if (cost.controlSize !== m) {
    throw new RecedeError(
      "dimension",
      FN,
      "cost.controlSize",
      `${m} (the model's)`,
      cost.controlSize,
    );
  }
  const k = requireInteger(FN, "samples", options.samples, 1);
  const h = requireInteger(FN, "horizon", options.horizon, 1);
  const lower = options.lower ?? new Float64Array(m).fill(Number.NEGATIVE_INFINITY);
  const upper = options.upper ?? new Float64Array(m).fill(Number.POSITIVE_INFINITY);
  const shared = options.sharedMemory ?? false;
  if (typeof shared !== "boolean")
    throw new RecedeError("type", FN, "sharedMemory", "a boolean", shared);
  return new RolloutEngine(dyn, cost, n, m, k, h, lower, upper, shared);
}

/** The buffers a rollout engine works in (internal: worker threads adopt the controller's). */
export interface RolloutBuffers {
  readonly costs: Float64Array;
  readonly failed: Uint8Array;
  readonly states: Float64Array;
  readonly controls: Float64Array;
}

/**
 * A rollout engine working in the given (shared) buffers, for a worker thread that processes its
 * slices of the controller's rollout in place. Trusts its inputs (internal; validated by the
 * controller that made the buffers).
 */
export function adoptRollout(
  dynamics: Dynamics,
  cost: CostModel,
  samples: number,
  horizon: number,
  lower: Float64Array,
  upper: Float64Array,
  buffers: RolloutBuffers,
): Rollout {
  return new RolloutEngine(
    dynamics,
    cost,
    dynamics.stateSize,
    dynamics.controlSize,
    samples,
    horizon,
    lower,
    upper,
    false,
    buffers,
  );
}

class RolloutEngine implements Rollout {
  readonly costs: Float64Array;
  readonly failed: Uint8Array;
  readonly states: Float64Array;
  readonly controls: Float64Array;
  private readonly bounded: boolean;

  constructor(
    private readonly dynamics: Dynamics,
    private readonly cost: CostModel,
    readonly stateSize: number,
    readonly controlSize: number,
    readonly samples: number,
    readonly horizon: number,
    private readonly lower: Float64Array,
    private readonly upper: Float64Array,
    shared: boolean,
    buffers?: RolloutBuffers,
  ) {
    this.costs = buffers?.costs ?? float64Buffer(samples, shared);
    this.failed =
      buffers?.failed ??
      (shared ? new Uint8Array(new SharedArrayBuffer(samples)) : new Uint8Array(samples));
    this.states = buffers?.states ?? float64Buffer(samples * stateSize, shared);
    this.controls = buffers?.controls ?? float64Buffer(samples * controlSize, shared);
    let bounded = false;
    for (let j = 0; j < controlSize; j++) {
      if (lower[j] > Number.NEGATIVE_INFINITY || upper[j] < Number.POSITIVE_INFINITY)
        bounded = true;
    }
    this.bounded = bounded;
  }

  clip(samples: Float64Array, first: number, count: number): void {
    if (!this.bounded) return;
    const m = this.controlSize;
    const lo = this.lower;
    const hi = this.upper;
    const start = first * this.horizon * m;
    const end = (first + count) * this.horizon * m;
    if (m === 1) {
      const l = lo[0];
      const u = hi[0];
      for (let p = start; p < end; p++) {
        const v = samples[p];
        // Compare-and-select (as the C reference does); NaN stays NaN as with Math.min/max.
        if (v < l) samples[p] = l;
        else if (v > u) samples[p] = u;
      }
      return;
    }
    for (let p = start; p < end; p += m) {
      for (let j = 0; j < m; j++) {
        const v = samples[p + j];
        if (v < lo[j]) samples[p + j] = lo[j];
        else if (v > hi[j]) samples[p + j] = hi[j];
      }
    }
  }

  run(x0: Float64Array, samples: Float64Array, first: number, count: number): number {
    try {
      this.runBatch(x0, samples, first, count);
    } catch {
      for (let k = first; k < first + count; k++) {
        try {
          this.runBatch(x0, samples, k, 1);
        } catch {
          this.failed[k] = 1;
        }
      }
    }
    const costs = this.costs;
    const failed = this.failed;
    let nf = 0;
    for (let k = first; k < first + count; k++) {
      if (failed[k] === 1 || !(Math.abs(costs[k]) < Number.POSITIVE_INFINITY)) {
        failed[k] = 1;
        costs[k] = Number.POSITIVE_INFINITY;
        nf++;
      }
    }
    return nf;
  }

  private runBatch(x0: Float64Array, samples: Float64Array, first: number, count: number): void {
    const n = this.stateSize;
    const x = this.states;
    const costs = this.costs;
    const failed = this.failed;
    const cost = this.cost;
    const xo = first * n;
    for (let k = first; k < first + count; k++) {
      costs[k] = 0;
      failed[k] = 0;
      const b = k * n;
      for (let i = 0; i < n; i++) x[b + i] = x0[i];
    }
    // The horizon loop is its own method: compiled on its own, it leaves this method with type
    // feedback for the terminal call (an on-stack-replaced loop here deoptimized at that call at
    // the end of every run).
    this.horizonSteps(samples, first, count);
    cost.terminal(x, xo, count, costs, first);
  }

  private horizonSteps(samples: Float64Array, first: number, count: number): void {
    const n = this.stateSize;
    const m = this.controlSize;
    const h = this.horizon;
    const x = this.states;
    const u = this.controls;
    const costs = this.costs;
    const failed = this.failed;
    const dyn = this.dynamics;
    const cost = this.cost;
    const xo = first * n;
    const uo = first * m;
    const hm = h * m;
    for (let t = 0; t < h; t++) {
      // Gather u_{k,t} for the slice into contiguous rows.
      for (let k = first; k < first + count; k++) {
        const src = k * hm + t * m;
        const dst = k * m;
        for (let j = 0; j < m; j++) u[dst + j] = samples[src + j];
      }
      cost.running(x, xo, u, uo, count, t, costs, first);
      dyn.step(x, xo, u, uo, count, t);
      // Mark samples whose state became non-finite (x·0 is NaN exactly for non-finite x): one
      // flat pass over the slice's states, and a per-sample pass only when it finds something.
      let z = 0;
      for (let i = xo; i < xo + count * n; i++) z += x[i] * 0;
      if (z !== 0) {
        for (let k = first; k < first + count; k++) {
          const b = k * n;
          let zk = 0;
          for (let i = 0; i < n; i++) zk += x[b + i] * 0;
          if (zk !== 0) failed[k] = 1;
        }
      }
    }
  }
}

/** The buffers of a rollout engine built here (internal, for handing them to worker threads). */
export function rolloutBuffers(rollout: Rollout): RolloutBuffers {
  const e = rollout as unknown as RolloutBuffers;
  return { costs: e.costs, failed: e.failed, states: e.states, controls: e.controls };
}
