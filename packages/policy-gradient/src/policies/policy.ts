/**
 * The stochastic-policy contract shared by every policy family, estimator and update in this
 * package.
 *
 * A policy π_θ(a | s) is a *family*: the object holds the architecture and scratch buffers, and
 * every method takes the parameter vector θ explicitly as one flat Float64Array. That is what lets
 * an update evaluate the old and the new policy side by side (KL, importance ratios) without
 * copying objects, and what lets the parameters be the decision of an online learner.
 *
 * Batches are flat row-major arrays: state k of a batch at `states[so + k·n ..]`, action records
 * at `actions[ao + k·a ..]` with a = {@link StochasticPolicy.actionSize}. A categorical policy's
 * action record is one number holding the action index.
 *
 * The per-sample methods trust their inputs (no validation, no allocation): validate once at the
 * boundary, as the higher-level functions of this package do.
 *
 * @module
 */
import type { Stream } from "@recede/core";

/** Continuous actions with a Gaussian law, or discrete actions with a categorical law. */
export type PolicyKind = "gaussian" | "categorical";

/** A named contiguous block of the flat parameter vector, e.g. `{ name: "gain", offset: 0, length: 4 }`. */
export interface ParameterBlock {
  /** Block name, e.g. `"gain"`, `"bias"`, `"logStd"`, `"layer1.weight"`. */
  readonly name: string;
  /** Index of the block's first entry in θ. */
  readonly offset: number;
  /** Number of entries. */
  readonly length: number;
  /** Row-major shape of the block (rows × cols, or [length] for vectors). */
  readonly shape: readonly number[];
}

/**
 * A differentiable stochastic policy π_θ(a | s) with parameters in one flat Float64Array.
 *
 * Every family gives: sampling from a seeded stream, the log-probability, its gradient w.r.t. θ,
 * the mean (deployment) action, Fisher-vector products and the mean KL divergence over a batch of
 * states, all in closed form for the family.
 */
export interface StochasticPolicy {
  /** Family name, e.g. `"linear-gaussian"`. */
  readonly name: string;
  /** Continuous (Gaussian) or discrete (categorical). */
  readonly kind: PolicyKind;
  /** State size n. */
  readonly stateSize: number;
  /** Length of one action record: the control size m (Gaussian) or 1 (categorical index). */
  readonly actionSize: number;
  /** Number of discrete actions (categorical), 0 for continuous policies. */
  readonly actionCount: number;
  /** Length of θ. */
  readonly parameterCount: number;
  /** The layout of θ, block by block. */
  readonly blocks: readonly ParameterBlock[];
  /** A fresh θ with the family's initial values (deterministic: seeded from the options). */
  initialParameters(): Float64Array;
  /** Draw a ~ π_θ(· | s) into `action[ao ..]` using `stream`. */
  sample(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    stream: Stream,
    action: Float64Array,
    ao: number,
  ): void;
  /** The deterministic deployment action: the mean (Gaussian) or the most probable index (categorical). */
  mean(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
  ): void;
  /** ln π_θ(a | s). */
  logProb(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
  ): number;
  /**
   * out ← out + w · ∇_θ ln π_θ(a | s) (accumulates; `out` has length {@link parameterCount}).
   * Returns ln π_θ(a | s).
   */
  addGradLogProb(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
    weight: number,
    out: Float64Array,
  ): number;
  /**
   * out ← F(θ) v with the Fisher information averaged over `count` states,
   * F(θ) = (1/count) Σ_k E_{a∼π_θ(·|s_k)}[∇ ln π ∇ ln πᵀ], computed analytically for the family.
   * `out` must not alias `v`. Returns `out`.
   */
  fisherVectorProduct(
    theta: Float64Array,
    states: Float64Array,
    so: number,
    count: number,
    v: Float64Array,
    out: Float64Array,
  ): Float64Array;
  /** Mean KL divergence (1/count) Σ_k KL(π_old(·|s_k) ‖ π_new(·|s_k)), in closed form. */
  meanKl(
    thetaOld: Float64Array,
    thetaNew: Float64Array,
    states: Float64Array,
    so: number,
    count: number,
  ): number;
}

/**
 * What an actor returns: the control vector itself, or a record holding it in `control` (the
 * shape of an MPC controller's step, `{ control, report }`).
 */
export type ActorOutput = ArrayLike<number> | { readonly control: ArrayLike<number> };

/**
 * Anything that maps a state to a control: a deployed policy, an MPC controller of `@recede/mpc`
 * (its `act` returns `{ control, report }`), an LQR gain, a human interface.
 */
export interface Actor {
  /** The control for `state` (also for discrete problems: a control vector). */
  act(state: Float64Array): ActorOutput;
}

/** The control vector of an {@link ActorOutput}. */
export function controlOf(out: ActorOutput): ArrayLike<number> {
  const c = (out as { control?: ArrayLike<number> }).control;
  return c !== undefined ? c : (out as ArrayLike<number>);
}
