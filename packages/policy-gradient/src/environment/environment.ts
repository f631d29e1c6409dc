/**
 * A batched episodic environment built on the model contracts of `@recede/core` (and so on the
 * reference problems of `@recede/problems`): E episodes advance together, one batched
 * `dynamics.step` and one batched `cost.running` call per time step.
 *
 * @module
 */
import {
  type ControlBounds,
  type CostModel,
  type Dynamics,
  type MatrixInput,
  RecedeError,
  requireControlBounds,
  requireInteger,
  requireVector,
  type Stream,
  toRowMajor,
} from "@recede/core";
import type { Problem } from "@recede/problems";
import { requireInterface, requireOptionsObject } from "../internal/validate.js";
import { type Actor, controlOf, type StochasticPolicy } from "../policies/policy.js";
import { EpisodeBatch } from "./episodeBatch.js";

/** Draw one initial state into `out[offset .. offset+n)`. */
export type InitialStateSampler = (stream: Stream, out: Float64Array, offset: number) => void;

/**
 * Chooses the action record at each step of a rollout (a policy sampling, an expert, a mixture).
 */
export interface StepDecider {
  /**
   * Write the action record for episode `e` at step `t` (state at `states[so ..]`) into
   * `actions[ao ..]`, and return ln π(a | s) under the behaviour law (NaN when not stochastic).
   */
  decide(
    e: number,
    t: number,
    states: Float64Array,
    so: number,
    actions: Float64Array,
    ao: number,
    stream: Stream,
  ): number;
}

/** Options of {@link rolloutEnvironment}. */
export interface RolloutEnvironmentOptions {
  /** Batched dynamics x_{t+1} = f(x_t, u_t, t). */
  readonly dynamics: Dynamics;
  /** Batched running and terminal costs. */
  readonly cost: CostModel;
  /**
   * Box bounds on the control; every applied control is clipped to them.
   * @defaultValue none
   */
  readonly bounds?: ControlBounds;
  /** Steps per episode T. */
  readonly horizon: number;
  /** The initial state x₀ (spread by `initialStateStd`), or a sampler of x₀. */
  readonly initialState: Float64Array | InitialStateSampler;
  /**
   * Standard deviation of a Gaussian spread added to a fixed `initialState` (one value, or one per
   * component).
   * @defaultValue 0
   */
  readonly initialStateStd?: number | Float64Array;
  /**
   * Standard deviation of an additive Gaussian disturbance w_t on the state after every step,
   * x_{t+1} = f(x_t, u_t) + w_t (one value, or one per component).
   * @defaultValue 0
   */
  readonly disturbanceStd?: number | Float64Array;
  /**
   * For categorical policies: the control vector applied for each discrete action (N×m rows).
   * @defaultValue none (continuous actions are the controls)
   */
  readonly controls?: MatrixInput;
  /**
   * Early termination: called on the state after every step (`states[offset ..]`); when it
   * returns true the episode ends there — the terminal cost is charged at that state and the
   * remaining steps are padding (see {@link EpisodeBatch}).
   * @defaultValue none (every episode runs T steps)
   */
  readonly terminate?: TerminationTest;
}

/** Whether the state at `states[offset ..]` ends the episode. */
export type TerminationTest = (states: Float64Array, offset: number) => boolean;

/** Closed-loop costs of a deterministic actor over several episodes. */
export interface Evaluation {
  /** Total (undiscounted) cost of each episode, Σ_t c_t + c_H. */
  readonly costs: Float64Array;
  /** Mean of `costs`. */
  readonly mean: number;
  /** Sample standard deviation of `costs` (0 for one episode). */
  readonly std: number;
}

function perComponent(
  fn: string,
  arg: string,
  x: number | Float64Array | undefined,
  n: number,
): Float64Array {
  const out = new Float64Array(n);
  if (x === undefined) return out;
  if (typeof x === "number") {
    if (!Number.isFinite(x) || x < 0)
      throw new RecedeError("range", fn, arg, "a finite number >= 0", x);
    out.fill(x);
    return out;
  }
  requireVector(fn, arg, x, n);
  for (let i = 0; i < n; i++) {
    if (x[i] < 0) throw new RecedeError("range", fn, `${arg}[${i}]`, ">= 0", x[i]);
    out[i] = x[i];
  }
  return out;
}

/**
 * The batched episodic environment. Create with {@link rolloutEnvironment} or
 * {@link environmentFromProblem}.
 */
export class RolloutEnvironment {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** Steps per episode T. */
  readonly horizon: number;
  /** The discrete control table (N×m), or null for continuous actions. */
  readonly discreteControls: Float64Array | null;
  /** Number of discrete actions N (0 when continuous). */
  readonly actionCount: number;
  /** The dynamics. */
  readonly dynamics: Dynamics;
  /** The costs. */
  readonly cost: CostModel;
  private readonly lower: Float64Array;
  private readonly upper: Float64Array;
  private readonly x0: Float64Array | null;
  private readonly x0Std: Float64Array;
  private readonly sampler: InitialStateSampler | null;
  private readonly wStd: Float64Array;
  private readonly hasDisturbance: boolean;
  /** The early-termination test, or null. */
  readonly terminate: TerminationTest | null;

  /** Use {@link rolloutEnvironment}; the constructor trusts validated options. */
  constructor(
    dynamics: Dynamics,
    cost: CostModel,
    lower: Float64Array,
    upper: Float64Array,
    horizon: number,
    x0: Float64Array | null,
    x0Std: Float64Array,
    sampler: InitialStateSampler | null,
    wStd: Float64Array,
    table: Float64Array | null,
    terminate: TerminationTest | null = null,
  ) {
    this.terminate = terminate;
    this.dynamics = dynamics;
    this.cost = cost;
    this.stateSize = dynamics.stateSize;
    this.controlSize = dynamics.controlSize;
    this.lower = lower;
    this.upper = upper;
    this.horizon = horizon;
    this.x0 = x0;
    this.x0Std = x0Std;
    this.sampler = sampler;
    this.wStd = wStd;
    this.hasDisturbance = wStd.some((v) => v > 0);
    this.discreteControls = table;
    this.actionCount = table === null ? 0 : table.length / this.controlSize;
  }

  /** Allocate a batch of `episodes` episodes for actions of record length `actionSize`. */
  createBatch(episodes: number, actionSize?: number): EpisodeBatch {
    requireInteger("RolloutEnvironment.createBatch", "episodes", episodes, 1);
    const a = actionSize ?? (this.discreteControls === null ? this.controlSize : 1);
    requireInteger("RolloutEnvironment.createBatch", "actionSize", a, 1);
    return new EpisodeBatch(episodes, this.horizon, this.stateSize, a, this.controlSize);
  }

  /** Write a fresh initial state into `out[offset ..]`. */
  sampleInitialState(stream: Stream, out: Float64Array, offset: number): void {
    const n = this.stateSize;
    if (this.sampler !== null) {
      this.sampler(stream, out, offset);
      return;
    }
    const x0 = this.x0 as Float64Array;
    for (let i = 0; i < n; i++) {
      const s = this.x0Std[i];
      out[offset + i] = x0[i] + (s > 0 ? s * stream.normal() : 0);
    }
  }

  /** Map an action record to a control (table lookup for discrete actions) and clip to the bounds. */
  private toControl(actions: Float64Array, ao: number, u: Float64Array, uo: number): void {
    const m = this.controlSize;
    const table = this.discreteControls;
    if (table !== null) {
      const a = actions[ao];
      for (let j = 0; j < m; j++) u[uo + j] = table[a * m + j];
    } else for (let j = 0; j < m; j++) u[uo + j] = actions[ao + j];
    for (let j = 0; j < m; j++) {
      const v = u[uo + j];
      if (v < this.lower[j]) u[uo + j] = this.lower[j];
      else if (v > this.upper[j]) u[uo + j] = this.upper[j];
    }
  }

  /**
   * Roll out every episode of `batch` with actions chosen by `decider`, drawing initial states,
   * disturbances (and whatever the decider draws) from `stream`. Returns `batch`.
   */
  collectWith(decider: StepDecider, stream: Stream, batch: EpisodeBatch): EpisodeBatch {
    const fn = "RolloutEnvironment.collectWith";
    if (!(batch instanceof EpisodeBatch))
      throw new RecedeError("type", fn, "batch", "an EpisodeBatch", batch);
    if (
      batch.horizon !== this.horizon ||
      batch.stateSize !== this.stateSize ||
      batch.controlSize !== this.controlSize
    ) {
      throw new RecedeError(
        "dimension",
        fn,
        "batch",
        `created by this environment (T=${this.horizon}, n=${this.stateSize}, m=${this.controlSize})`,
        `T=${batch.horizon}, n=${batch.stateSize}, m=${batch.controlSize}`,
      );
    }
    const E = batch.episodes;
    const T = this.horizon;
    const n = this.stateSize;
    const m = this.controlSize;
    const a = batch.actionSize;
    const x = new Float64Array(E * n);
    const u = new Float64Array(E * m);
    const c = new Float64Array(E);
    const term = this.terminate;
    const alive = new Uint8Array(E).fill(1);
    let living = E;
    batch.lengths.fill(T);
    batch.terminated.fill(0);
    for (let e = 0; e < E; e++) this.sampleInitialState(stream, x, e * n);
    for (let t = 0; t < T; t++) {
      for (let e = 0; e < E; e++) {
        const i = e * T + t;
        for (let k = 0; k < n; k++) batch.states[i * n + k] = x[e * n + k];
        if (alive[e] === 1) {
          batch.logProbs[i] = decider.decide(
            e,
            t,
            batch.states,
            i * n,
            batch.actions,
            i * a,
            stream,
          );
          this.toControl(batch.actions, i * a, u, e * m);
        } else {
          batch.logProbs[i] = 0;
          for (let j = 0; j < a; j++) batch.actions[i * a + j] = 0;
          for (let j = 0; j < m; j++) u[e * m + j] = 0;
        }
        for (let j = 0; j < m; j++) batch.controls[i * m + j] = u[e * m + j];
      }
      c.fill(0);
      this.cost.running(x, 0, u, 0, E, t, c, 0);
      for (let e = 0; e < E; e++) batch.costs[e * T + t] = alive[e] === 1 ? c[e] : 0;
      if (living < E) {
        // Freeze ended episodes: remember their state, step the batch, put it back.
        for (let e = 0; e < E; e++) {
          if (alive[e] === 0)
            for (let k = 0; k < n; k++) batch.finalStates[e * n + k] = x[e * n + k];
        }
      }
      this.dynamics.step(x, 0, u, 0, E, t);
      if (this.hasDisturbance) {
        for (let e = 0; e < E; e++) {
          for (let k = 0; k < n; k++) {
            const s = this.wStd[k];
            if (s > 0) x[e * n + k] += s * stream.normal();
          }
        }
      }
      if (living < E) {
        for (let e = 0; e < E; e++) {
          if (alive[e] === 0)
            for (let k = 0; k < n; k++) x[e * n + k] = batch.finalStates[e * n + k];
        }
      }
      if (term !== null) {
        for (let e = 0; e < E; e++) {
          if (alive[e] === 1 && term(x, e * n)) {
            alive[e] = 0;
            living--;
            batch.lengths[e] = t + 1;
            batch.terminated[e] = 1;
            for (let k = 0; k < n; k++) batch.finalStates[e * n + k] = x[e * n + k];
          }
        }
      }
    }
    c.fill(0);
    this.cost.terminal(x, 0, E, c, 0);
    batch.finalStates.set(x);
    batch.terminalCosts.set(c);
    return batch;
  }

  /**
   * Roll out the stochastic policy π_θ: a_t ∼ π_θ(· | s_t), recording ln π_θ(a_t | s_t).
   * Returns `batch`.
   */
  collect(
    policy: StochasticPolicy,
    theta: Float64Array,
    stream: Stream,
    batch: EpisodeBatch,
  ): EpisodeBatch {
    const fn = "RolloutEnvironment.collect";
    this.checkPolicy(fn, policy);
    requireVector(fn, "theta", theta, policy.parameterCount);
    if (batch.actionSize !== policy.actionSize) {
      throw new RecedeError(
        "dimension",
        fn,
        "batch.actionSize",
        `${policy.actionSize} (the policy's)`,
        batch.actionSize,
      );
    }
    return this.collectWith(
      {
        decide(_e, _t, s, so, act, ao, str): number {
          policy.sample(theta, s, so, str, act, ao);
          return policy.logProb(theta, s, so, act, ao);
        },
      },
      stream,
      batch,
    );
  }

  /** Throw unless `policy` fits this environment's state and action spaces. */
  checkPolicy(fn: string, policy: StochasticPolicy): void {
    if (policy.stateSize !== this.stateSize) {
      throw new RecedeError(
        "dimension",
        fn,
        "policy.stateSize",
        `${this.stateSize}`,
        policy.stateSize,
      );
    }
    if (policy.kind === "categorical") {
      if (this.discreteControls === null || policy.actionCount !== this.actionCount) {
        throw new RecedeError(
          "dimension",
          fn,
          "policy.actionCount",
          `equal to the environment's discrete control count (${this.actionCount})`,
          policy.actionCount,
        );
      }
    } else if (this.discreteControls !== null || policy.actionSize !== this.controlSize) {
      throw new RecedeError(
        "dimension",
        fn,
        "policy.actionSize",
        this.discreteControls !== null
          ? "a categorical policy for this discrete environment"
          : `${this.controlSize}`,
        policy.actionSize,
      );
    }
  }

  /**
   * Closed-loop costs of a deterministic actor (e.g. a deployed policy or an expert) over
   * `episodes` episodes with initial states and disturbances drawn from `stream`. Episodes run one
   * after the other, and `actor.reset()` (when the actor has one, as an MPC controller does) is
   * called before each, so a stateful actor sees each trajectory in order.
   * Non-finite costs (a diverged episode) are reported as +Infinity.
   */
  evaluate(actor: Actor, episodes: number, stream: Stream): Evaluation {
    const fn = "RolloutEnvironment.evaluate";
    requireInteger(fn, "episodes", episodes, 1);
    requireInterface(fn, "actor", actor, "act", "an object with act(state)");
    const m = this.controlSize;
    const n = this.stateSize;
    const batch = new EpisodeBatch(1, this.horizon, n, m, m);
    const s = new Float64Array(n);
    // The actor returns controls, so bypass the discrete table during evaluation.
    const run = this.discreteControls === null ? this : this.withoutTable();
    const reset = (actor as { reset?: unknown }).reset;
    const decider: StepDecider = {
      decide(_e, _t, states, so, act, ao): number {
        for (let k = 0; k < n; k++) s[k] = states[so + k];
        const r = controlOf(actor.act(s));
        for (let j = 0; j < m; j++) act[ao + j] = r[j];
        return Number.NaN;
      },
    };
    const costs = new Float64Array(episodes);
    let sum = 0;
    for (let e = 0; e < episodes; e++) {
      if (typeof reset === "function") reset.call(actor);
      run.collectWith(decider, stream, batch);
      const v = batch.episodeCost(0);
      costs[e] = Number.isFinite(v) ? v : Number.POSITIVE_INFINITY;
      sum += costs[e];
    }
    const mean = sum / episodes;
    let ss = 0;
    for (let e = 0; e < episodes; e++) ss += (costs[e] - mean) ** 2;
    const std = episodes > 1 && Number.isFinite(mean) ? Math.sqrt(ss / (episodes - 1)) : 0;
    return { costs, mean, std };
  }

  /** The same environment with continuous (control-valued) actions. */
  withoutTable(): RolloutEnvironment {
    return new RolloutEnvironment(
      this.dynamics,
      this.cost,
      this.lower,
      this.upper,
      this.horizon,
      this.x0,
      this.x0Std,
      this.sampler,
      this.wStd,
      null,
      this.terminate,
    );
  }

  /** Clip a control vector to the bounds in place. */
  clip(u: Float64Array, uo: number): void {
    for (let j = 0; j < this.controlSize; j++) {
      const v = u[uo + j];
      if (v < this.lower[j]) u[uo + j] = this.lower[j];
      else if (v > this.upper[j]) u[uo + j] = this.upper[j];
    }
  }
}

/**
 * Create a batched episodic environment from dynamics, costs and bounds.
 *
 * One episode: x₀ ∼ initial law; for t = 0..T−1: a_t from the policy, u_t = clip(map(a_t)),
 * c_t = c(x_t, u_t, t), x_{t+1} = f(x_t, u_t, t) + w_t; then c_H(x_T). Symbols ↔ options:
 * f ↔ `dynamics`, c, c_H ↔ `cost`, T ↔ `horizon`, w_t ↔ `disturbanceStd`. The episodic,
 * finite-horizon setting is the usual one (common practice; R. S. Sutton, A. G. Barto,
 * "Reinforcement Learning: An Introduction", 2nd ed., 2018, §3.4), written with costs.
 *
 * @example
 * ```ts
 * const p = doubleIntegrator();
 * const env = rolloutEnvironment({ dynamics: p.dynamics, cost: p.cost, horizon: 50,
 *   initialState: p.initialState(), initialStateStd: 0.1 });
 * ```
 */
export function rolloutEnvironment(options: RolloutEnvironmentOptions): RolloutEnvironment {
  const fn = "rolloutEnvironment";
  requireOptionsObject(fn, options);
  const { dynamics, cost } = options;
  requireInterface(fn, "dynamics", dynamics, "step", "a Dynamics object");
  requireInterface(fn, "cost", cost, "running", "a CostModel object");
  const n = dynamics.stateSize;
  const m = dynamics.controlSize;
  if (cost.stateSize !== n || cost.controlSize !== m) {
    throw new RecedeError(
      "dimension",
      fn,
      "cost",
      `sized n=${n}, m=${m} like the dynamics`,
      `n=${cost.stateSize}, m=${cost.controlSize}`,
    );
  }
  const horizon = requireInteger(fn, "horizon", options.horizon, 1);
  const { lower, upper } =
    options.bounds === undefined
      ? {
          lower: new Float64Array(m).fill(Number.NEGATIVE_INFINITY),
          upper: new Float64Array(m).fill(Number.POSITIVE_INFINITY),
        }
      : requireControlBounds(fn, "bounds", options.bounds, m);
  let x0: Float64Array | null = null;
  let sampler: InitialStateSampler | null = null;
  if (typeof options.initialState === "function") sampler = options.initialState;
  else x0 = requireVector(fn, "initialState", options.initialState, n).slice();
  const x0Std = perComponent(fn, "initialStateStd", options.initialStateStd, n);
  const wStd = perComponent(fn, "disturbanceStd", options.disturbanceStd, n);
  let table: Float64Array | null = null;
  if (options.controls !== undefined) {
    const t = toRowMajor(fn, "controls", options.controls, -1, m);
    if (t.rows < 2)
      throw new RecedeError("dimension", fn, "controls", "at least 2 rows", `${t.rows} rows`);
    table = t.data;
  }
  const terminate = options.terminate ?? null;
  if (terminate !== null && typeof terminate !== "function") {
    throw new RecedeError(
      "type",
      fn,
      "terminate",
      "a function (states, offset) => boolean",
      terminate,
    );
  }
  return new RolloutEnvironment(
    dynamics,
    cost,
    lower,
    upper,
    horizon,
    x0,
    x0Std,
    sampler,
    wStd,
    table,
    terminate,
  );
}

/** Options of {@link environmentFromProblem}: everything of {@link RolloutEnvironmentOptions} but the model. */
export interface ProblemEnvironmentOptions {
  /**
   * Steps per episode T.
   * @defaultValue the problem's `episodeLength`
   */
  readonly horizon?: number;
  /**
   * Initial state or sampler.
   * @defaultValue the problem's `initialState()`
   */
  readonly initialState?: Float64Array | InitialStateSampler;
  /** See {@link RolloutEnvironmentOptions.initialStateStd}. @defaultValue 0 */
  readonly initialStateStd?: number | Float64Array;
  /** See {@link RolloutEnvironmentOptions.disturbanceStd}. @defaultValue 0 */
  readonly disturbanceStd?: number | Float64Array;
  /** See {@link RolloutEnvironmentOptions.controls}. @defaultValue none */
  readonly controls?: MatrixInput;
  /** See {@link RolloutEnvironmentOptions.terminate}. @defaultValue none */
  readonly terminate?: TerminationTest;
}

/**
 * A batched episodic environment on a reference problem of `@recede/problems`: its dynamics,
 * cost, control bounds (controls are clipped), start state and episode length — the episode of
 * {@link rolloutEnvironment} with f, c, c_H, bounds and T taken from `problem`.
 *
 * @example
 * ```ts
 * const env = environmentFromProblem(pendulum(), { initialStateStd: 0.05 });
 * ```
 */
export function environmentFromProblem(
  problem: Problem,
  options: ProblemEnvironmentOptions = {},
): RolloutEnvironment {
  if (
    typeof problem !== "object" ||
    problem === null ||
    typeof problem.initialState !== "function"
  ) {
    throw new RecedeError("type", "environmentFromProblem", "problem", "a Problem", problem);
  }
  return rolloutEnvironment({
    dynamics: problem.dynamics,
    cost: problem.cost,
    bounds: problem.bounds,
    horizon: options.horizon ?? problem.episodeLength,
    initialState: options.initialState ?? problem.initialState(),
    initialStateStd: options.initialStateStd,
    disturbanceStd: options.disturbanceStd,
    controls: options.controls,
    terminate: options.terminate,
  });
}
