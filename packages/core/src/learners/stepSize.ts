/**
 * Step-size schedules η_t for the mirror-descent learners.
 *
 * A schedule is a pure function of the round t ≥ 1 and of S_t = Σ_{s≤t} ‖g_s‖₂² (the learner keeps
 * S_t, so schedules hold no state and a failed update cannot disturb them). The learner checks
 * every value it receives: a non-finite or non-positive η_t is a typed error and the update does
 * not happen.
 *
 * @module
 */
import { RecedeError, requirePositive } from "../errors.js";

/** A step-size schedule. */
export interface StepSize {
  /** What kind of schedule this is. */
  readonly kind: "constant" | "inverse-sqrt" | "adagrad" | "custom";
  /**
   * η_t for round t ≥ 1, given S_t = Σ_{s≤t} ‖g_s‖₂² including the current round's gradient.
   */
  at(t: number, sumSquaredGradients: number): number;
}

/**
 * What the learners accept as `stepSize`: a positive number (constant), a {@link StepSize}, or a
 * function t ↦ η_t (wrapped by {@link scheduledStep}).
 */
export type StepSizeInput = number | StepSize | ((t: number) => number);

/**
 * Constant step size η_t = η.
 *
 * With η = D/(G√T) over T known rounds, online gradient descent has regret ≤ G·D·√T
 * (M. Zinkevich, "Online Convex Programming and Generalized Infinitesimal Gradient Ascent", ICML,
 * 2003; constant from MATH.md §1.3). Symbols ↔ arguments: η ↔ `eta`.
 *
 * @example
 * ```ts
 * const learner = mirrorDescent({ geometry: euclidean({ dimension: 2 }), initial: [0, 0], stepSize: constantStep(0.1) });
 * ```
 */
export function constantStep(eta: number): StepSize {
  const v = requirePositive("constantStep", "eta", eta);
  return { kind: "constant", at: () => v };
}

/**
 * Decreasing step size η_t = η₀/√t.
 *
 * With η₀ = D/G, online gradient descent over a set of diameter D with ‖g_t‖ ≤ G has regret
 * ≤ (3/2)·G·D·√T for every T (E. Hazan, "Introduction to Online Convex Optimization", 2016,
 * Thm 3.1). Symbols ↔ arguments: η₀ ↔ `eta0`.
 *
 * @example
 * ```ts
 * const schedule = inverseSqrtStep(2); // η_1 = 2, η_4 = 1, η_100 = 0.2
 * ```
 */
export function inverseSqrtStep(eta0: number): StepSize {
  const v = requirePositive("inverseSqrtStep", "eta0", eta0);
  return { kind: "inverse-sqrt", at: (t) => v / Math.sqrt(t) };
}

/**
 * AdaGrad-style (scalar, "AdaGrad-norm") step size η_t = η₀/√(δ + Σ_{s≤t} ‖g_s‖₂²).
 *
 * Adapts to the observed gradient scale without knowing G: with η₀ = D/√2, projected online
 * gradient descent over a set of diameter D has regret ≤ √2·D·√(δ + Σ_t ‖g_t‖²) (derived from the
 * core inequality of MATH.md §1.3 and Σ_t a_t/√(δ + Σ_{s≤t} a_s) ≤ 2√(δ + Σ_t a_t)). A scalar
 * instance of J. Duchi, E. Hazan, Y. Singer, "Adaptive Subgradient Methods for Online Learning and
 * Stochastic Optimization", JMLR, 2011, and H. B. McMahan, M. Streeter, "Adaptive Bound
 * Optimization for Online Convex Optimization", COLT, 2010. Symbols ↔ arguments: η₀ ↔ `eta0`,
 * δ ↔ `delta`.
 *
 * @param delta - δ > 0 keeps η_t finite while every gradient so far is zero.
 * @defaultValue delta = 1e-8
 * @example
 * ```ts
 * const schedule = adaGradStep(0.5); // η_t = 0.5 / √(1e-8 + Σ‖g_s‖²)
 * ```
 */
export function adaGradStep(eta0: number, delta = 1e-8): StepSize {
  const v = requirePositive("adaGradStep", "eta0", eta0);
  const dl = requirePositive("adaGradStep", "delta", delta);
  return { kind: "adagrad", at: (_t, s) => v / Math.sqrt(dl + s) };
}

/**
 * A user schedule t ↦ η_t. The function is called once per update with the 1-based round; the
 * learner rejects a non-finite or non-positive value (or a throw) with a typed error and leaves
 * its state untouched.
 *
 * @example
 * ```ts
 * const schedule = scheduledStep((t) => 1 / t); // η_t = 1/t, for strongly convex losses
 * ```
 */
export function scheduledStep(fn: (t: number) => number): StepSize {
  if (typeof fn !== "function") {
    throw new RecedeError("type", "scheduledStep", "fn", "a function (t) => number", fn);
  }
  return { kind: "custom", at: (t) => fn(t) };
}

/** Turn a {@link StepSizeInput} into a {@link StepSize}, validating it (for the factories). */
export function toStepSize(fn: string, arg: string, s: unknown): StepSize {
  if (typeof s === "number") {
    if (!Number.isFinite(s)) throw new RecedeError("non-finite", fn, arg, "a finite number > 0", s);
    if (s <= 0) throw new RecedeError("range", fn, arg, "> 0", s);
    return constantStep(s);
  }
  if (typeof s === "function") return scheduledStep(s as (t: number) => number);
  if (typeof s === "object" && s !== null && typeof (s as StepSize).at === "function") {
    return s as StepSize;
  }
  throw new RecedeError(
    "type",
    fn,
    arg,
    "a number > 0, a StepSize schedule or a function (t) => number",
    s,
  );
}
