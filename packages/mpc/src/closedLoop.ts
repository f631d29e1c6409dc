/**
 * Closed-loop simulation: a controller acting on a plant (which may differ from the controller's
 * model), with optional disturbances, over episodes of N steps.
 *
 * @module
 */
import { type CostModel, type Dynamics, RecedeError, requireInteger } from "@recede/core";
import type { ControlStep, StepReport } from "./controller.js";
import { requireObject } from "./internal/input.js";

/** Anything that maps a measured state to a control step: every controller and preset here. */
export interface ControlPolicy {
  /** Name for reports. */
  readonly name: string;
  /** n. */
  readonly stateSize: number;
  /** m. */
  readonly controlSize: number;
  /** Compute u_t for the measured state x_t. */
  act(state: Float64Array): ControlStep;
  /** Return to the initial state (called before each episode). */
  reset(): void;
}

/** A disturbance w_t added to the plant's next state: x_{t+1} = f(x_t, u_t, t) + w_t. */
export type Disturbance = (
  step: number,
  state: Float64Array,
  out: Float64Array,
  episode: number,
) => void;

/** Options of {@link closedLoop}. */
export interface ClosedLoopOptions {
  /** The controller. */
  readonly controller: ControlPolicy;
  /** The true system (may differ from the controller's model). Called with count = 1. */
  readonly plant: Dynamics;
  /** Cost the run is scored with: Σ_t c(x_t, u_t, 0) + c_H(x_N) (horizon index 0 at every step). */
  readonly cost: CostModel;
  /** Start state x_0 (length n), or a function of the episode index. */
  readonly initialState: Float64Array | ((episode: number) => Float64Array);
  /** Steps N per episode. */
  readonly steps: number;
  /** Episodes (the controller is reset before each). @defaultValue 1 */
  readonly episodes?: number;
  /**
   * Additive disturbance: write w_t (length n, zeroed before the call) into `out`.
   * @defaultValue none
   */
  readonly disturbance?: Disturbance;
  /** Include the terminal cost c_H(x_N) in the total. @defaultValue true */
  readonly terminalCost?: boolean;
}

/** One episode of a closed-loop run. */
export interface Episode {
  /** States x_0 … x_N, (N+1)·n (fewer rows if the plant diverged: see `steps`). */
  readonly states: Float64Array;
  /** Controls u_0 … u_{N−1}, N·m. */
  readonly controls: Float64Array;
  /** Running cost c(x_t, u_t) per step, N. */
  readonly stepCosts: Float64Array;
  /** Σ_t c(x_t, u_t). */
  readonly runningCost: number;
  /** c_H(x_N) (0 when `terminalCost` is false). */
  readonly terminalCost: number;
  /** runningCost + terminalCost (+∞ if the plant diverged). */
  readonly totalCost: number;
  /** Controller reports, one copy per step. */
  readonly reports: readonly StepReport[];
  /** Wall time of each `act` call, ms (measured here, around the call). */
  readonly actTimesMs: Float64Array;
  /** Steps actually run (< N only if the plant state became non-finite). */
  readonly steps: number;
  /** Whether the plant state became non-finite. */
  readonly diverged: boolean;
}

/** Result of {@link closedLoop}. */
export interface ClosedLoopResult {
  /** The episodes in order. */
  readonly episodes: readonly Episode[];
  /** Mean total cost over episodes. */
  readonly meanCost: number;
  /** Mean act time over all steps, ms. */
  readonly meanActTimeMs: number;
}

const FN = "closedLoop";

/**
 * Run a controller in closed loop: for t = 0 … N−1, u_t = controller.act(x_t).control,
 * x_{t+1} = f_plant(x_t, u_t, t) + w_t, scoring Σ_t c(x_t, u_t) + c_H(x_N). The plant may differ
 * from the controller's model (model mismatch); w_t comes from `disturbance`.
 * Symbols ↔ options: N ↔ `steps`, f_plant ↔ `plant`, w ↔ `disturbance`.
 * Source: the receding-horizon loop (J. B. Rawlings, D. Q. Mayne, M. M. Diehl, "Model Predictive
 * Control: Theory, Computation, and Design", 2nd ed., 2017, ch. 1; from memory).
 */
export function closedLoop(options: ClosedLoopOptions): ClosedLoopResult {
  requireObject(FN, "options", options);
  const ctrl = options.controller;
  if (ctrl === null || typeof ctrl !== "object" || typeof ctrl.act !== "function") {
    throw new RecedeError("type", FN, "controller", "an object with act(state)", ctrl);
  }
  const plant = options.plant;
  if (plant === null || typeof plant !== "object" || typeof plant.step !== "function") {
    throw new RecedeError("type", FN, "plant", "a Dynamics object", plant);
  }
  const cost = options.cost;
  if (cost === null || typeof cost !== "object" || typeof cost.running !== "function") {
    throw new RecedeError("type", FN, "cost", "a CostModel", cost);
  }
  const n = ctrl.stateSize;
  const m = ctrl.controlSize;
  if (plant.stateSize !== n || plant.controlSize !== m) {
    throw new RecedeError(
      "dimension",
      FN,
      "plant",
      `n = ${n}, m = ${m} (the controller's)`,
      `n = ${plant.stateSize}, m = ${plant.controlSize}`,
    );
  }
  const steps = requireInteger(FN, "steps", options.steps, 1);
  const episodes = requireInteger(FN, "episodes", options.episodes ?? 1, 1);
  const withTerminal = options.terminalCost ?? true;
  const dist = options.disturbance;
  if (dist !== undefined && typeof dist !== "function") {
    throw new RecedeError(
      "type",
      FN,
      "disturbance",
      "a function (step, state, out, episode) => void",
      dist,
    );
  }
  const out: Episode[] = [];
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  const c1 = new Float64Array(1);
  let timeSum = 0;
  let timeCount = 0;
  let costSum = 0;
  for (let e = 0; e < episodes; e++) {
    const x0 =
      typeof options.initialState === "function" ? options.initialState(e) : options.initialState;
    if (!(x0 instanceof Float64Array) || x0.length !== n) {
      throw new RecedeError("dimension", FN, "initialState", `a Float64Array of length ${n}`, x0);
    }
    ctrl.reset();
    const states = new Float64Array((steps + 1) * n);
    const controls = new Float64Array(steps * m);
    const stepCosts = new Float64Array(steps);
    const times = new Float64Array(steps);
    const reports: StepReport[] = [];
    x.set(x0);
    states.set(x0, 0);
    let running = 0;
    let diverged = false;
    let t = 0;
    for (; t < steps; t++) {
      const start = performance.now();
      const step = ctrl.act(x);
      times[t] = performance.now() - start;
      timeSum += times[t];
      timeCount++;
      reports.push({ ...step.report });
      const u = step.control;
      controls.set(u, t * m);
      c1[0] = 0;
      cost.running(x, 0, u, 0, 1, 0, c1, 0);
      stepCosts[t] = c1[0];
      running += c1[0];
      plant.step(x, 0, controls, t * m, 1, t);
      if (dist !== undefined) {
        w.fill(0);
        dist(t, x, w, e);
        for (let i = 0; i < n; i++) x[i] += w[i];
      }
      let finite = true;
      for (let i = 0; i < n; i++) if (!Number.isFinite(x[i])) finite = false;
      states.set(x, (t + 1) * n);
      if (!finite) {
        diverged = true;
        t++;
        break;
      }
    }
    let terminal = 0;
    if (withTerminal && !diverged) {
      c1[0] = 0;
      cost.terminal(x, 0, 1, c1, 0);
      terminal = c1[0];
    }
    const total = diverged ? Number.POSITIVE_INFINITY : running + terminal;
    costSum += total;
    out.push({
      states: diverged ? states.slice(0, (t + 1) * n) : states,
      controls: diverged ? controls.slice(0, t * m) : controls,
      stepCosts: diverged ? stepCosts.slice(0, t) : stepCosts,
      runningCost: running,
      terminalCost: terminal,
      totalCost: total,
      reports,
      actTimesMs: diverged ? times.slice(0, t) : times,
      steps: t,
      diverged,
    });
  }
  return { episodes: out, meanCost: costSum / episodes, meanActTimeMs: timeSum / timeCount };
}
