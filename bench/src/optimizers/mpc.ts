/**
 * Sweep adapters for the controllers of `@recede/mpc`:
 *
 * - `mppi` — the MPPI preset; `cem` — the CEM preset;
 * - `variant` — the generic controller composed from parts named in the sweep file (loss, step
 *   size γ, covariance adaptation, iterations, noise correlation, shift fill): how a user derives
 *   and benchmarks a new variant without code;
 * - `lqr` — the infinite-horizon LQR gain from the discrete algebraic Riccati equation about the
 *   problem's equilibrium, u = ū − K (x − x̄) (needs the problem's linear-quadratic data), or, with
 *   `track`, the same gain tracking the problem's moving setpoint r_t: u = ū − K (x − r_t).
 *
 * Sampling kinds accept `warmup`: control steps run at setup and then undone by `reset()`, so the
 * measured compute time per step is the steady state's.
 *
 * The Gaussian plan starts at the problem's equilibrium control (hover thrust for the drone), so
 * every sampling controller starts from "hold still" rather than from zero thrust.
 *
 * @module
 */
import { createStream, RecedeError } from "@recede/core";
import {
  type Controller,
  cem,
  createController,
  eliteFraction,
  expectedCost,
  exponentialUtility,
  gaussianPlan,
  lqr,
  mppi,
  type SampleLoss,
  shiftPlan,
} from "@recede/mpc";
import { wrapAngle } from "@recede/problems";
import type { ParamSchemaMap, ParamValues } from "../params.js";
import type {
  BenchController,
  BenchProblem,
  FactoryContext,
  OptimizerDefinition,
} from "../registry.js";

/** Parameters shared by the sampling kinds (sweep-file names). */
const samplingParams: ParamSchemaMap = {
  samples: { type: "integer", min: 1, default: 256, description: "samples K per iteration" },
  horizon: { type: "integer", min: 1, default: 30, description: "horizon H in control steps" },
  noise: {
    type: "numbers",
    above: 0,
    description:
      "initial sampling standard deviation per control component (length m; default 1 each)",
  },
  iterations: {
    type: "integer",
    min: 1,
    description: "mirror steps per control step (default: the preset's)",
  },
  correlation: {
    type: "number",
    min: 0,
    max: 0.99,
    default: 0,
    description: "correlation a ∈ [0, 1) of the sampling noise between consecutive steps",
  },
  keepMeanSample: {
    type: "boolean",
    default: false,
    description: "keep one sample at the unperturbed plan",
  },
  fill: {
    type: "string",
    values: ["repeat", "zero", "nominal"],
    default: "nominal",
    description: "tail fill of the shifted plan",
  },
  warmup: {
    type: "integer",
    min: 0,
    default: 0,
    description:
      "control steps run at setup (then reset) so the JavaScript engine compiles the hot loops before the episode; counted in setup time",
  },
};

/**
 * Warm up a freshly built controller: `steps` control steps from an initial state drawn from a
 * stream of its own (`warmup:<seed>`), then `reset()`, which restores the plan and the random
 * streams, so the episode that follows is bit-identical to one without warm-up. What it buys is
 * timing: V8 compiles the rollout, cost and update loops here (counted in the run's setup time)
 * instead of in the first control steps, so compute time per step shows the steady state, as it
 * would on a controller started before the machine takes off (common practice for JIT runtimes).
 */
function warmUp(c: Controller, problem: BenchProblem, steps: number, seed: number): Controller {
  if (steps <= 0) return c;
  const x = problem.initialState(createStream(`warmup:${seed}`));
  for (let i = 0; i < steps; i++) c.act(x);
  c.reset();
  return c;
}

function noiseOf(params: ParamValues, problem: BenchProblem, kind: string): Float64Array {
  const m = problem.controlSize;
  const v = params.noise as readonly number[] | undefined;
  if (v === undefined) return new Float64Array(m).fill(1);
  if (v.length !== m)
    throw new RecedeError(
      "dimension",
      kind,
      "noise",
      `of length ${m} (one entry per control of ${problem.id})`,
      v,
    );
  return Float64Array.from(v);
}

function meanOf(problem: BenchProblem): Float64Array {
  return problem.equilibrium
    ? Float64Array.from(problem.equilibrium.control)
    : new Float64Array(problem.controlSize);
}

/**
 * Wrap an `@recede/mpc` controller: samples per step = K × iterations actually run.
 *
 * It also tracks the learner's own regret from its step reports: the dynamic regret against the
 * per-round best sampled sequence, R_T = Σ_{t≤T} (ℓ̂_t − min_i C_{t,i}), where ℓ̂_t is the loss the
 * controller estimates at the plan it played (free energy for MPPI, mean elite cost for CEM, mean
 * cost for the expected-cost loss) and C_{t,i} the sampled costs of round t. The comparator is the
 * per-round minimizer over the samples, as in dynamic regret (Zinkevich, ICML 2003; Hall & Willett,
 * IEEE J. Sel. Topics Signal Process., 2015); R_T ≥ 0 and grows by what the plan pays over the best
 * sequence the controller itself found. Rounds whose update was skipped add nothing.
 */
export function wrapController(c: Controller): BenchController {
  const regret: number[] = [];
  let acc = 0;
  return {
    act(x) {
      const { control, report } = c.act(x);
      const gap = report.loss - report.costMin;
      if (Number.isFinite(gap)) acc += gap;
      regret.push(acc);
      return { control, samples: c.samples * report.iterations };
    },
    reset() {
      c.reset();
      regret.length = 0;
      acc = 0;
    },
    regretSeries() {
      return regret.slice();
    },
  };
}

function checkNoise(params: ParamValues, problem: BenchProblem, kind: string): void {
  noiseOf(params, problem, kind);
}

/** The `mppi` kind. */
export const mppiDefinition: OptimizerDefinition = {
  kind: "mppi",
  description:
    "MPPI (Williams et al. 2017): exponential-utility weights, KL step with γ = 1, fixed noise.",
  params: {
    ...samplingParams,
    temperature: { type: "number", above: 0, default: 1, description: "temperature λ" },
  },
  check: (params, problem) => checkNoise(params, problem, "mppi"),
  create(params, problem, ctx: FactoryContext) {
    return wrapController(
      warmUp(
        mppi({
          dynamics: problem.model,
          cost: problem.cost,
          horizon: params.horizon as number,
          samples: params.samples as number,
          temperature: params.temperature as number,
          noise: noiseOf(params, problem, "mppi"),
          mean: meanOf(problem),
          correlation: params.correlation as number,
          keepMeanSample: params.keepMeanSample as boolean,
          ...(params.iterations !== undefined ? { iterations: params.iterations as number } : {}),
          fill: params.fill as "repeat" | "zero" | "nominal",
          bounds: problem.bounds,
          seed: ctx.seed,
        }),
        problem,
        params.warmup as number,
        ctx.seed,
      ),
    );
  },
};

/** The `cem` kind. */
export const cemDefinition: OptimizerDefinition = {
  kind: "cem",
  description:
    "Cross-entropy method (Rubinstein 1999): elite fraction, mean and variance refit, γ = 1.",
  params: {
    ...samplingParams,
    eliteFraction: {
      type: "number",
      above: 0,
      max: 1,
      default: 0.1,
      description: "elite fraction ρ",
    },
    minStd: {
      type: "number",
      min: 0,
      default: 0.01,
      description: "floor on the refitted standard deviation",
    },
    spreadFill: {
      type: "string",
      values: ["repeat", "initial", "reset"],
      default: "reset",
      description: "how the variance is carried to the next control step",
    },
  },
  check: (params, problem) => checkNoise(params, problem, "cem"),
  create(params, problem, ctx) {
    return wrapController(
      warmUp(
        cem({
          dynamics: problem.model,
          cost: problem.cost,
          horizon: params.horizon as number,
          samples: params.samples as number,
          eliteFraction: params.eliteFraction as number,
          std: noiseOf(params, problem, "cem"),
          minStd: params.minStd as number,
          mean: meanOf(problem),
          correlation: params.correlation as number,
          keepMeanSample: params.keepMeanSample as boolean,
          ...(params.iterations !== undefined ? { iterations: params.iterations as number } : {}),
          fill: params.fill as "repeat" | "zero" | "nominal",
          spreadFill: params.spreadFill as "repeat" | "initial" | "reset",
          bounds: problem.bounds,
          seed: ctx.seed,
        }),
        problem,
        params.warmup as number,
        ctx.seed,
      ),
    );
  },
};

/** The `variant` kind: the generic controller from named parts. */
export const variantDefinition: OptimizerDefinition = {
  kind: "variant",
  description:
    "The generic controller composed from parts: Gaussian plan, a sample loss, KL step with step size γ, shift.",
  params: {
    ...samplingParams,
    loss: {
      type: "string",
      values: ["exponential", "elite", "expected"],
      default: "exponential",
      description: "per-sample loss: exponential utility (λ), elite fraction (ρ), or expected cost",
    },
    temperature: {
      type: "number",
      above: 0,
      default: 1,
      description: "temperature λ (loss exponential)",
    },
    eliteFraction: {
      type: "number",
      above: 0,
      max: 1,
      default: 0.1,
      description: "elite fraction ρ (loss elite)",
    },
    stepSize: {
      type: "number",
      above: 0,
      max: 1,
      default: 1,
      description: "mirror step size γ ∈ (0, 1]",
    },
    adaptCovariance: {
      type: "boolean",
      default: false,
      description: "update the (diagonal) covariance by the mirror step too",
    },
    minStd: {
      type: "number",
      min: 0,
      default: 0.01,
      description: "floor on an adapted standard deviation",
    },
    spreadFill: {
      type: "string",
      values: ["repeat", "initial", "reset"],
      default: "initial",
      description: "tail fill of the adapted variance after the shift",
    },
  },
  check: (params, problem) => checkNoise(params, problem, "variant"),
  create(params, problem, ctx) {
    let loss: SampleLoss;
    if (params.loss === "elite") loss = eliteFraction({ fraction: params.eliteFraction as number });
    else if (params.loss === "expected") loss = expectedCost();
    else loss = exponentialUtility({ temperature: params.temperature as number });
    return wrapController(
      warmUp(
        createController({
          name: "variant",
          dynamics: problem.model,
          cost: problem.cost,
          horizon: params.horizon as number,
          samples: params.samples as number,
          plan: gaussianPlan({
            mean: meanOf(problem),
            std: noiseOf(params, problem, "variant"),
            adaptVariance: params.adaptCovariance as boolean,
            minStd: params.minStd as number,
            correlation: params.correlation as number,
            keepMeanSample: params.keepMeanSample as boolean,
          }),
          loss,
          geometry: "kl",
          stepSize: params.stepSize as number,
          iterations: (params.iterations as number | undefined) ?? 1,
          shift: shiftPlan({
            fill: params.fill as "repeat" | "zero" | "nominal",
            spreadFill: params.spreadFill as "repeat" | "initial" | "reset",
          }),
          bounds: problem.bounds,
          seed: ctx.seed,
        }),
        problem,
        params.warmup as number,
        ctx.seed,
      ),
    );
  },
};

/**
 * A moving setpoint r_t for a tracking controller (e.g. a glide path), fed the measured state each
 * control step so it can wait for the plant (a reference governor).
 */
export interface TrackingReference {
  /** State size n of the reference (the problem's). */
  readonly stateSize: number;
  /** Start a new episode from the measured initial state. */
  reset(x0: Float64Array): void;
  /** Advance one control step given the measured state x; write r_t (length n) into `out`. */
  next(x: Float64Array, out: Float64Array): void;
}

/** A problem that offers a reference path for tracking LQR (`lqr` with `track: true`). */
export interface TrackingReferenceSource {
  /** A fresh reference for one controller. */
  trackingReference(): TrackingReference;
}

function referenceOf(problem: BenchProblem): (() => TrackingReference) | undefined {
  const f = (problem as Partial<TrackingReferenceSource>).trackingReference;
  return typeof f === "function" ? f.bind(problem) : undefined;
}

/**
 * The `lqr` kind: the library's LQR about the problem's equilibrium, u = ū − K(x − x̄), saturated
 * to the control bounds. With `track: true` the same DARE gain tracks the problem's moving setpoint
 * r_t instead (e.g. the drone's glide path): u = clip(ū − K(x − r_t)), linearized about the
 * equilibrium as before (gain scheduling is not used: the model's Jacobians about hover do not
 * depend on position). Source: R. E. Kalman, "Contributions to the theory of optimal control",
 * 1960; tracking a slowly moving setpoint with a regulator gain is common practice.
 */
export const lqrDefinition: OptimizerDefinition = {
  kind: "lqr",
  description:
    "LQR about the problem's equilibrium (the lqr preset): u = ū − K(x − x̄) saturated to the bounds, K from the DARE, or K_0 of a finite-horizon Riccati recursion when a horizon is given; with track, u = ū − K(x − r_t) on the problem's moving setpoint.",
  params: {
    horizon: {
      type: "integer",
      min: 1,
      description: "finite Riccati horizon (receding); default: infinite horizon (DARE gain)",
    },
    track: {
      type: "boolean",
      default: false,
      description:
        "track the problem's moving setpoint (e.g. a glide path) instead of regulating to the equilibrium",
    },
  },
  check(params, problem) {
    if (!problem.linearQuadratic)
      throw new RecedeError(
        "domain",
        "lqr",
        "problem",
        "a problem with linear-quadratic data",
        problem.id,
      );
    if (params.track === true && !referenceOf(problem))
      throw new RecedeError(
        "domain",
        "lqr",
        "track",
        "a problem that offers a tracking reference",
        problem.id,
      );
  },
  create(params, problem) {
    const lq = problem.linearQuadratic;
    if (!lq)
      throw new RecedeError(
        "domain",
        "lqr",
        "problem",
        "a problem with linear-quadratic data",
        problem.id,
      );
    const makeReference = params.track === true ? referenceOf(problem) : undefined;
    if (params.track === true && !makeReference)
      throw new RecedeError(
        "domain",
        "lqr",
        "track",
        "a problem that offers a tracking reference",
        problem.id,
      );
    const n = lq.stateSize;
    const m = lq.controlSize;
    const mat = (data: Float64Array, rows: number, cols: number) => ({ data, rows, cols });
    const controller = lqr({
      a: mat(lq.a, n, n),
      b: mat(lq.b, n, m),
      q: mat(lq.q, n, n),
      r: mat(lq.r, m, m),
      qf: mat(lq.qf, n, n),
      state: lq.state,
      control: lq.control,
      bounds: problem.bounds,
      ...(params.horizon !== undefined ? { horizon: params.horizon as number } : {}),
    });
    // Angle components are regulated by their wrapped error: x' = x̄ + wrap(x − x̄). A tracking
    // controller regulates x − r_t the same way: x' = x̄ + (x − r_t), so u = ū − K(x − r_t).
    const angles = problem.angleIndices ?? [];
    const xw = new Float64Array(n);
    const reference = makeReference?.();
    const r = new Float64Array(n);
    let started = false;
    return {
      act(x) {
        if (reference) {
          if (!started) {
            reference.reset(x);
            started = true;
          }
          reference.next(x, r);
          for (let i = 0; i < n; i++) xw[i] = lq.state[i] + (x[i] - r[i]);
        } else xw.set(x);
        for (const i of angles) xw[i] = lq.state[i] + wrapAngle(xw[i] - lq.state[i]);
        return { control: controller.act(xw).control, samples: 0 };
      },
      reset() {
        started = false;
      },
    };
  },
};

/** Every MPC kind. */
export function mpcOptimizerDefinitions(): OptimizerDefinition[] {
  return [mppiDefinition, cemDefinition, variantDefinition, lqrDefinition];
}
