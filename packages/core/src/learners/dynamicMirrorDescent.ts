/**
 * Dynamic mirror descent: a mirror step followed by a dynamic step Φ_t.
 *
 * @module
 */
import { RecedeError } from "../errors.js";
import { MirrorLearner } from "../internal/mirrorLearner.js";
import {
  type MirrorDescentLearner,
  type MirrorDescentOptions,
  validateMirrorOptions,
} from "./mirrorDescent.js";

/**
 * The dynamic step Φ_t: write Φ_t(x) into `out` (length = the geometry's dimension). `round` is the
 * 1-based index t of the round just completed. `x` must not be modified; `out` is pre-filled with
 * NaN, so a Φ that forgets to write is caught. The result must be finite and in the geometry's
 * domain.
 */
export type DynamicStep = (x: Float64Array, round: number, out: Float64Array) => void;

/** Options of {@link dynamicMirrorDescent}. */
export interface DynamicMirrorDescentOptions extends MirrorDescentOptions {
  /** The dynamic step Φ_t applied after every mirror step. */
  readonly dynamic: DynamicStep;
}

/**
 * Dynamic mirror descent (DMD).
 *
 * Each update:  x̃_{t+1} = argmin_{x ∈ X} η_t⟨g_t, x⟩ + D_ψ(x‖x_t),  x_{t+1} = Φ_t(x̃_{t+1}).
 * With Φ_t = identity it is {@link mirrorDescent}, bit for bit. When the comparator sequence moves
 * as Φ predicts, the dynamic regret bound grows with V_Φ = Σ_t‖u_{t+1} − Φ_t(u_t)‖ instead of the
 * path length. Symbols ↔ options: Φ_t ↔ `dynamic`, the rest as in {@link mirrorDescent}.
 *
 * A Φ that throws, leaves `out` unwritten, or yields non-finite or out-of-domain values makes the
 * update fail with a {@link RecedeError}; the learner's state is then unchanged.
 *
 * Source: E. Hall, R. Willett, "Online Convex Optimization in Dynamic Environments", IEEE J. Sel.
 * Topics Signal Process., 2015 (and "Dynamical Models and Tracking Regret in Online Convex
 * Programming", ICML, 2013).
 *
 * @example
 * ```ts
 * // Track a target that drifts by +0.1 per round: Φ_t(x) = x + 0.1.
 * const learner = dynamicMirrorDescent({
 *   geometry: euclidean({ dimension: 1 }),
 *   initial: [0],
 *   stepSize: 0.5,
 *   dynamic: (x, _t, out) => { out[0] = x[0] + 0.1; },
 * });
 * learner.update({ gradient: new Float64Array([-1]) }); // x = 0 + 0.5 + 0.1 = 0.6
 * ```
 */
export function dynamicMirrorDescent(options: DynamicMirrorDescentOptions): MirrorDescentLearner {
  const fn = "dynamicMirrorDescent";
  const { geometry, initial, schedule } = validateMirrorOptions(fn, options);
  if (typeof options.dynamic !== "function") {
    throw new RecedeError(
      "type",
      fn,
      "dynamic",
      "a function (x, round, out) => void",
      options.dynamic,
    );
  }
  return new MirrorLearner(fn, geometry, initial, schedule, options.dynamic);
}
