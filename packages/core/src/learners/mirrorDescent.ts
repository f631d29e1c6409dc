/**
 * Online mirror descent with any geometry and step-size schedule.
 *
 * @module
 */
import type { Geometry } from "../divergence/geometry.js";
import { RecedeError } from "../errors.js";
import { MirrorLearner } from "../internal/mirrorLearner.js";
import { requireOptions, toVector, type VectorInput } from "../internal/vectorInput.js";
import type { Feedback, OnlineLearner } from "../protocol.js";
import { type StepSize, type StepSizeInput, toStepSize } from "./stepSize.js";

/** Options of {@link mirrorDescent}. */
export interface MirrorDescentOptions {
  /** The Bregman geometry ψ (and feasible set X) of the step. */
  readonly geometry: Geometry;
  /** The first decision x₁, in the geometry's domain. It is copied. */
  readonly initial: VectorInput;
  /**
   * η_t: a number (constant), a {@link StepSize} ({@link constantStep}, {@link inverseSqrtStep},
   * {@link adaGradStep}, {@link scheduledStep}) or a function t ↦ η_t.
   */
  readonly stepSize: StepSizeInput;
}

/** The state captured by {@link MirrorDescentLearner.snapshot}. */
export interface MirrorDescentSnapshot {
  /** Completed rounds. */
  readonly round: number;
  /** The decision x_{round+1} (a copy). */
  readonly decision: Float64Array;
  /** S = Σ_s ‖g_s‖₂², the input of AdaGrad-style schedules. */
  readonly sumSquaredGradients: number;
  /** The step size of the last completed round (NaN before the first). */
  readonly lastStepSize: number;
}

/** A mirror-descent learner. */
export interface MirrorDescentLearner extends OnlineLearner<Feedback, MirrorDescentSnapshot> {
  /** The geometry it steps in. */
  readonly geometry: Geometry;
  /** η of the last completed round (NaN before the first). */
  readonly lastStepSize: number;
  /** S = Σ_s ‖g_s‖₂² over the completed rounds. */
  readonly sumSquaredGradients: number;
}

/** Validate the options shared by both mirror-descent factories. */
export function validateMirrorOptions(
  fn: string,
  options: MirrorDescentOptions,
): { geometry: Geometry; initial: Float64Array; schedule: StepSize } {
  requireOptions(fn, options);
  const geo = options.geometry as Geometry | undefined;
  if (
    typeof geo !== "object" ||
    geo === null ||
    typeof geo.step !== "function" ||
    typeof geo.contains !== "function" ||
    !Number.isInteger(geo.dimension) ||
    geo.dimension < 1
  ) {
    throw new RecedeError(
      "type",
      fn,
      "geometry",
      "a Geometry (e.g. euclidean({ dimension }))",
      geo,
    );
  }
  const initial = toVector(fn, "initial", options.initial, geo.dimension);
  if (!geo.contains(initial)) {
    throw new RecedeError("domain", fn, "initial", `in the ${geo.name} geometry's domain`, initial);
  }
  const schedule = toStepSize(fn, "stepSize", options.stepSize);
  return { geometry: geo, initial, schedule };
}

/**
 * Online mirror descent.
 *
 * Each update:  x_{t+1} = argmin_{x ∈ X} η_t⟨g_t, x⟩ + D_ψ(x‖x_t)  (the geometry's `step`), with
 * g_t the feedback gradient, or the gradient of the feedback's loss object at x_t. With the
 * Euclidean geometry this is online (projected) gradient descent; with {@link entropy} it is
 * exponentiated gradient / Hedge. Symbols ↔ options: ψ, X ↔ `geometry`, x₁ ↔ `initial`,
 * η_t ↔ `stepSize`. Regret against any u ∈ X with constant η: ≤ D_ψ(u‖x₁)/η + (η/2σ)Σ_t‖g_t‖²_*
 * for σ-strongly convex ψ.
 *
 * Every update validates the feedback, the step size and the new decision (finite, in the
 * domain) before committing; on a typed error the learner's state is unchanged. After each
 * update every observer receives a {@link RoundRecord}: `decision` = the x_t that was played,
 * `gradient` = the g_t used (evaluated from the loss object when the feedback had none), `loss` =
 * the feedback's `loss`, else ℓ_t(x_t) from the loss object, else NaN. A round allocates nothing.
 *
 * Source: A. Nemirovski, D. Yudin, "Problem Complexity and Method Efficiency in Optimization",
 * 1983; A. Beck, M. Teboulle, Oper. Res. Lett., 2003; regret bound: T. Lattimore, C. Szepesvári,
 * "Bandit Algorithms", 2020, Thm 28.4.
 *
 * @example
 * ```ts
 * const learner = mirrorDescent({
 *   geometry: euclidean({ dimension: 2, feasible: { kind: "ball", radius: 1 } }),
 *   initial: [0, 0],
 *   stepSize: inverseSqrtStep(1),
 * });
 * learner.update({ gradient: new Float64Array([1, -1]), loss: 0 });
 * learner.decision(); // [-1/√2, 1/√2]: the step [−1, 1] projected onto the unit ball
 * ```
 */
export function mirrorDescent(options: MirrorDescentOptions): MirrorDescentLearner {
  const { geometry, initial, schedule } = validateMirrorOptions("mirrorDescent", options);
  return new MirrorLearner("mirrorDescent", geometry, initial, schedule, null);
}
