/**
 * Online (projected) gradient descent as a one-line composition: mirror descent in the Euclidean
 * geometry.
 *
 * @module
 */
import { type EuclideanFeasibleSet, euclidean } from "../divergence/euclidean.js";
import { RecedeError } from "../errors.js";
import { requireOptions, toVector, type VectorInput } from "../internal/vectorInput.js";
import { type MirrorDescentLearner, mirrorDescent } from "./mirrorDescent.js";
import type { StepSizeInput } from "./stepSize.js";

/** Options of {@link onlineGradientDescent}. */
export interface OnlineGradientDescentOptions {
  /** The first decision x₁ (its length is the dimension d). */
  readonly initial: VectorInput;
  /** η_t, as for {@link mirrorDescent}; η_t = D/(G√t) ({@link inverseSqrtStep}) is the anytime choice. */
  readonly stepSize: StepSizeInput;
  /**
   * The feasible set X (ball, box or simplex).
   * @defaultValue none (X = ℝᵈ)
   */
  readonly feasible?: EuclideanFeasibleSet;
}

/**
 * Online projected gradient descent: x_{t+1} = Π_X(x_t − η_t g_t), i.e. `mirrorDescent` with
 * `euclidean({ dimension, feasible })`. Over a set of diameter D with ‖g_t‖ ≤ G, η_t = D/(G√t)
 * gives regret ≤ (3/2)·G·D·√T. Symbols ↔ options: x₁ ↔ `initial`, η_t ↔ `stepSize`,
 * X ↔ `feasible`.
 *
 * Source: M. Zinkevich, "Online Convex Programming and Generalized Infinitesimal Gradient Ascent",
 * ICML, 2003; E. Hazan, "Introduction to Online Convex Optimization", 2016, Thm 3.1.
 *
 * @example
 * ```ts
 * const learner = onlineGradientDescent({
 *   initial: [0, 0],
 *   stepSize: inverseSqrtStep(2 / 5), // D = 2 (unit ball), G = 5
 *   feasible: { kind: "ball", radius: 1 },
 * });
 * learner.update({ gradient: new Float64Array([3, -4]) });
 * ```
 */
export function onlineGradientDescent(options: OnlineGradientDescentOptions): MirrorDescentLearner {
  const fn = "onlineGradientDescent";
  requireOptions(fn, options);
  const initial = toVector(fn, "initial", options.initial, -1);
  if (initial.length < 1)
    throw new RecedeError("dimension", fn, "initial", "of length >= 1", initial);
  const geometry = euclidean({ dimension: initial.length, feasible: options.feasible });
  if (!geometry.contains(initial)) {
    throw new RecedeError(
      "domain",
      fn,
      "initial",
      `in the feasible ${geometry.feasibleKind}`,
      initial,
    );
  }
  return mirrorDescent({ geometry, initial, stepSize: options.stepSize });
}
