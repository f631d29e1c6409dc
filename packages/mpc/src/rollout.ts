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
  /**
   * Test every state for non-finite values after every step, instead of only the final states and
   * the summed cost of each sample.
   *
   * Without it (the default), a sample is marked failed when its final state x_H or its total cost
   * C_k is non-finite. NaN and ±∞ propagate through arithmetic, so a non-finite state at an inner
   * step reaches x_H or C_k — through the next steps of the model, or through the cost of that
   * state (every term of the problems' costs reads every state component) — and the flags are the
   * same as with the per-step test. Turn this on for a model *and* cost that can launder a
   * non-finite state back into a finite one (e.g. a model that maps NaN to a finite value, with a
   * cost that does not read that component): the per-step test then still flags the sample.
   * It costs one pass over the slice's states per step: about 4–5 % of the rollout time on the
   * bicycle and cart-pole of @recede/problems (K = 2000, H = 50; bench/RESULTS.md §4).
   * @defaultValue false
   */
  readonly checkEveryStep?: boolean;
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
  /** Whether every intermediate state is checked for non-finite values ({@link RolloutOptions}). */
  readonly checkEveryStep: boolean;
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
 * Non-finite states are found from x_H and C_k, through which they propagate (or after every step
 * with `checkEveryStep`, for models and costs that can turn a non-finite state finite again).
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
  const everyStep = options.checkEveryStep ?? false;
  if (typeof everyStep !== "boolean")
    throw new RecedeError("type", FN, "checkEveryStep", "a boolean", everyStep);
  return new RolloutEngine(dyn, cost, n, m, k, h, lower, upper, shared, everyStep);
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
  checkEveryStep = false,
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
    checkEveryStep,
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
    readonly checkEveryStep: boolean,
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
    // Compare-and-select (as the C reference does; NaN stays NaN as with Math.min/max), stored on
    // every value: a store reached only when a value leaves the box has no type feedback until it
    // first runs, and V8 then deoptimizes the compiled loop.
    if (m === 1) {
      const l = lo[0];
      const h = hi[0];
      for (let p = start; p < end; p++) {
        const v = samples[p];
        samples[p] = clampTo(v, l, h);
      }
      return;
    }
    if (m === 2) {
      // Unrolled: the generic loop below costs about twice as much per value (bench/RESULTS.md §4).
      const l0 = lo[0];
      const l1 = lo[1];
      const h0 = hi[0];
      const h1 = hi[1];
      for (let p = start; p < end; p += 2) {
        const v0 = samples[p];
        const v1 = samples[p + 1];
        samples[p] = clampTo(v0, l0, h0);
        samples[p + 1] = clampTo(v1, l1, h1);
      }
      return;
    }
    for (let p = start; p < end; p += m) {
      for (let j = 0; j < m; j++) {
        const v = samples[p + j];
        samples[p + j] = clampTo(v, lo[j], hi[j]);
      }
    }
  }

  run(x0: Float64Array, samples: Float64Array, first: number, count: number): number {
    try {
      this.runBatch(x0, samples, first, count);
    } catch {
      // A batched call threw: isolate the throwing samples one at a time (the others keep their
      // exact costs).
      for (let k = first; k < first + count; k++) {
        try {
          this.runBatch(x0, samples, k, 1);
        } catch {
          this.failed[k] = 1;
        }
      }
    }
    return this.settle(first, count);
  }

  /**
   * Fail the samples of the slice that threw, or whose total cost or final state is non-finite
   * (x·0 is NaN exactly for non-finite x; a non-finite inner state propagates to one of the two);
   * returns the number of failures.
   */
  private settle(first: number, count: number): number {
    const n = this.stateSize;
    const x = this.states;
    const costs = this.costs;
    const failed = this.failed;
    let nf = 0;
    for (let k = first; k < first + count; k++) {
      const b = k * n;
      let z = 0;
      for (let i = 0; i < n; i++) z += x[b + i] * 0;
      const c = costs[k];
      // Stores on every pass, not only on failure (a store first reached long after warm-up
      // deoptimizes the compiled loop).
      const bad = failed[k] === 1 || z !== 0 || !(Math.abs(c) < Number.POSITIVE_INFINITY);
      failed[k] = bad ? 1 : 0;
      costs[k] = bad ? Number.POSITIVE_INFINITY : c;
      nf += bad ? 1 : 0;
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
    const everyStep = this.checkEveryStep;
    const xo = first * n;
    const uo = first * m;
    const hm = h * m;
    for (let t = 0; t < h; t++) {
      // Gather u_{k,t} for the slice into contiguous rows.
      gather(samples, u, first, count, t * m, hm, m);
      cost.running(x, xo, u, uo, count, t, costs, first);
      dyn.step(x, xo, u, uo, count, t);
      if (everyStep) {
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
}

/**
 * v clipped to [l, h] by compare-and-select; NaN stays NaN. (Not Math.min/Math.max: those differ
 * on signed zeros; these are the C reference's comparisons, so clipped controls match it bit for bit.)
 */
function clampTo(v: number, l: number, h: number): number {
  // biome-ignore lint/complexity/useMathMinMax: bit-identical compare-and-select (see above).
  return v < l ? l : v > h ? h : v;
}

/** u[k·m + j] ← samples[k·hm + tm + j] for the slice's samples k. */
function gather(
  samples: Float64Array,
  u: Float64Array,
  first: number,
  count: number,
  tm: number,
  hm: number,
  m: number,
): void {
  if (m === 1) {
    for (let k = first; k < first + count; k++) u[k] = samples[k * hm + tm];
    return;
  }
  if (m === 2) {
    for (let k = first; k < first + count; k++) {
      const src = k * hm + tm;
      u[2 * k] = samples[src];
      u[2 * k + 1] = samples[src + 1];
    }
    return;
  }
  for (let k = first; k < first + count; k++) {
    const src = k * hm + tm;
    const dst = k * m;
    for (let j = 0; j < m; j++) u[dst + j] = samples[src + j];
  }
}

/** The buffers of a rollout engine built here (internal, for handing them to worker threads). */
export function rolloutBuffers(rollout: Rollout): RolloutBuffers {
  const e = rollout as unknown as RolloutBuffers;
  return { costs: e.costs, failed: e.failed, states: e.states, controls: e.controls };
}
