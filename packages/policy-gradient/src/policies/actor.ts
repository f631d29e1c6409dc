/**
 * Deployment: freeze a policy's parameters and act with its deterministic (mean) action.
 *
 * @module
 */
import { type MatrixInput, RecedeError, requireVector, toRowMajor } from "@recede/core";

import type { Actor, StochasticPolicy } from "./policy.js";

/** Options of {@link policyActor}. */
export interface PolicyActorOptions {
  /**
   * For a categorical policy: the control vector of each discrete action (N rows × m columns).
   * When omitted, `act` returns the action index as a one-entry array.
   * @defaultValue none (required for categorical policies)
   */
  readonly controls?: MatrixInput;
}

/** A deployed policy: `act(state)` returns the mean action μ_θ(s) (or the arg-max action). */
export interface PolicyActor extends Actor {
  /** The frozen parameters (a private copy). */
  readonly parameters: Float64Array;
  /** The action for `state`, written into `out` when given (otherwise into an internal buffer). */
  act(state: Float64Array, out?: Float64Array): Float64Array;
}

/**
 * Freeze θ and deploy the policy's deterministic action: u = μ_θ(s) for Gaussian families,
 * u = controls[argmax_a π_θ(a | s)] for categorical ones. θ is copied, so later updates to the
 * learner's θ do not move a deployed actor.
 *
 * @example
 * ```ts
 * const pi = linearGaussianPolicy({ stateSize: 2, actionSize: 1, initialGain: [[1, 2]] });
 * const actor = policyActor(pi, pi.initialParameters());
 * actor.act(new Float64Array([0.5, 0])); // [-0.5]
 * ```
 */
export function policyActor(
  policy: StochasticPolicy,
  theta: Float64Array,
  options: PolicyActorOptions = {},
): PolicyActor {
  const fn = "policyActor";
  const params = requireVector(fn, "theta", theta, policy.parameterCount).slice();
  const n = policy.stateSize;
  let table: Float64Array | null = null;
  let m = policy.actionSize;
  if (options.controls !== undefined) {
    if (policy.kind !== "categorical") {
      throw new RecedeError(
        "type",
        fn,
        "controls",
        "given only for a categorical policy",
        options.controls,
      );
    }
    const t = toRowMajor(fn, "controls", options.controls, policy.actionCount, -1);
    table = t.data;
    m = t.cols;
  }
  const rec = new Float64Array(policy.actionSize);
  const buf = new Float64Array(m);
  return {
    parameters: params,
    act(state: Float64Array, out?: Float64Array): Float64Array {
      if (!(state instanceof Float64Array) || state.length !== n) {
        throw new RecedeError(
          "dimension",
          "PolicyActor.act",
          "state",
          `a Float64Array of length ${n}`,
          state,
        );
      }
      const o = out ?? buf;
      if (table !== null) {
        policy.mean(params, state, 0, rec, 0);
        const a = rec[0];
        for (let j = 0; j < m; j++) o[j] = table[a * m + j];
      } else policy.mean(params, state, 0, o, 0);
      return o;
    },
  };
}
