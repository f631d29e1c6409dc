/**
 * The {@link Problem} record every reference problem returns, and the small value types it uses.
 *
 * A problem bundles a batched discrete-time model (the {@link Dynamics} contract of
 * `@recede/core`), a batched cost ({@link CostModel}), box bounds on the control, a start state, a
 * goal, suggested horizon and episode length, and a success test with documented thresholds. Problems
 * whose model is (or can be linearized to) a linear-quadratic one also carry the matrices
 * (A, B, Q, R, Qf) in {@link LinearQuadratic}.
 *
 * @module
 */
import type { ControlBounds, CostModel, Dynamics } from "@recede/core";

/**
 * Discrete-time linear-quadratic data about an operating point (x̄, ū):
 * δx_{t+1} = A δx_t + B δu_t with δx = x − x̄, δu = u − ū, and cost
 * Σ_t (δx_tᵀ Q δx_t + δu_tᵀ R δu_t) + δx_Hᵀ Qf δx_H (no factor ½, as in MATH.md §4.1).
 *
 * All matrices are row-major Float64Array: A n×n, B n×m, Q n×n, R m×m, Qf n×n. For a nonlinear
 * problem A and B are the exact Jacobians of the discrete step (RK4) at (x̄, ū), and
 * `continuousA`/`continuousB` are ∂f/∂x, ∂f/∂u of the continuous-time vector field there.
 */
export interface LinearQuadratic {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** A = ∂x_{t+1}/∂x_t (n×n). */
  readonly a: Float64Array;
  /** B = ∂x_{t+1}/∂u_t (n×m). */
  readonly b: Float64Array;
  /** Running state weight Q (n×n, symmetric positive semidefinite). */
  readonly q: Float64Array;
  /** Running control weight R (m×m, symmetric positive definite). */
  readonly r: Float64Array;
  /** Terminal state weight Qf (n×n, symmetric positive semidefinite). */
  readonly qf: Float64Array;
  /** Operating state x̄ (the goal). */
  readonly state: Float64Array;
  /** Operating control ū (the control that holds x̄ at rest). */
  readonly control: Float64Array;
  /** Continuous-time ∂f/∂x at (x̄, ū) for ẋ = f(x, u) (n×n); null for a model defined in discrete time. */
  readonly continuousA: Float64Array | null;
  /** Continuous-time ∂f/∂u at (x̄, ū) (n×m); null for a model defined in discrete time. */
  readonly continuousB: Float64Array | null;
  /** True when the dynamics are exactly linear, so the LQ data is the problem itself, not an approximation. */
  readonly exact: boolean;
}

/** Detailed outcome of a success test. */
export interface SuccessReport {
  /** Whether the trajectory meets the problem's success criterion. */
  readonly success: boolean;
  /** Number of consecutive states at the end of the trajectory that are within tolerance. */
  readonly heldSteps: number;
  /** Number of consecutive final states that must be within tolerance. */
  readonly requiredSteps: number;
  /** The criterion in words, with its thresholds (e.g. `"|θ−π| ≤ 0.1 rad and |θ̇| ≤ 0.5 rad/s for the last 40 states"`). */
  readonly criterion: string;
  /** Why the test failed, or `"ok"`. */
  readonly reason: string;
}

/**
 * A reference control problem. Every field is fixed at construction; `initialState()` returns a
 * fresh copy each call.
 *
 * Conventions: a trajectory passed to {@link Problem.success} is a flat row-major Float64Array of
 * `count` states x_0 … x_{count−1} (n numbers each), as produced by a closed-loop run.
 */
export interface Problem {
  /** Registry name, e.g. `"cart-pole"`. */
  readonly name: string;
  /** One-paragraph description of the task. */
  readonly description: string;
  /** Published source of the model and its parameters (authors, title, year). */
  readonly source: string;
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** Names of the state components, length n (for reports and plots). */
  readonly stateNames: readonly string[];
  /** Names of the control components, length m. */
  readonly controlNames: readonly string[];
  /** Indices of state components that are angles (errors to them are wrapped into (−π, π]). */
  readonly angleIndices: readonly number[];
  /** Control period Δt in seconds: one `dynamics.step` advances the state by Δt. */
  readonly dt: number;
  /**
   * The batched discrete-time model x_{t+1} = f(x_t, u_t, t), with analytic Jacobians (of the
   * discrete step itself). `step` works sample by sample, keeping the integrator stages in local
   * variables (or, for model variants on the generic RK4 loop such as the cart-pole with friction,
   * in a 5n scratch made at construction), so it allocates nothing per call and needs no capacity:
   * any `count` works without growing a buffer.
   */
  readonly dynamics: Dynamics;
  /** The batched running + terminal cost the problem is scored with. */
  readonly cost: CostModel;
  /** Box bounds on the control. */
  readonly bounds: ControlBounds;
  /** The goal state (read-only by convention; copy before changing). */
  readonly goal: Float64Array;
  /** The control that holds the goal at rest (zero, or hover thrust). */
  readonly goalControl: Float64Array;
  /** Suggested MPC horizon H (steps). */
  readonly horizon: number;
  /** Suggested episode length (steps). */
  readonly episodeLength: number;
  /** LQ data at the goal (exact for linear problems, a linearization otherwise); null if not LQ-able. */
  readonly linearQuadratic: LinearQuadratic | null;
  /** A fresh copy of the start state. */
  initialState(): Float64Array;
  /** Whether the trajectory (flat, `count` states; default all) meets the success criterion. */
  success(states: Float64Array, count?: number): boolean;
  /** The success test with its details. */
  assess(states: Float64Array, count?: number): SuccessReport;
}

/** Wrap an angle into (−π, π]. */
export function wrapAngle(a: number): number {
  if (a > -Math.PI && a <= Math.PI) return a;
  const twoPi = 2 * Math.PI;
  let r = a - twoPi * Math.floor((a + Math.PI) / twoPi);
  if (r <= -Math.PI) r += twoPi;
  if (r > Math.PI) r -= twoPi;
  return r;
}
