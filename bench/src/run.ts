/**
 * One run of a sweep: build the problem and the controller for a (problem, optimizer, seed,
 * episode) cell, simulate the closed loop on the plant, and measure it.
 *
 * Randomness: the controller gets the run's seed; the plant (initial state, disturbances) draws
 * from `createStream("plant:<seed>").fork(episode)`, which does not depend on the optimizer, so
 * every optimizer meets the same gusts on the same seed, and a run's result does not depend on the
 * worker or shard that executes it.
 *
 * @module
 */
import { performance } from "node:perf_hooks";
import { createStream } from "@recede/core";
import type { BenchController, BenchProblem, Registry } from "./registry.js";
import type { RunCell, SweepSpec } from "./spec.js";
import { quantile } from "./stats.js";

/** Everything measured in one run; one line of results.jsonl. */
export interface RunRecord {
  /** The run's key `problem/optimizer/seed/episode`. */
  readonly key: string;
  readonly problem: string;
  readonly optimizer: string;
  readonly seed: number;
  readonly episode: number;
  /** Hash of the run's configuration (see {@link RunCell.config}). */
  readonly config: string;
  /** Episode cost: Σ_t c(x_t, u_t) + c_H(x_T) along the realized path, with the problem's cost. */
  readonly cost: number;
  /** Did the episode meet the problem's success test? */
  readonly success: boolean;
  /** Control steps with a constraint violated (problem-defined). */
  readonly violations: number;
  /** Control period of the problem, s (for time axes). */
  readonly dt: number;
  /** Control steps taken (≤ the problem's episode length when it ends early). */
  readonly steps: number;
  /** Model rollouts per control step (samples × iterations), mean over steps. */
  readonly samplesPerStep: number;
  /** Median wall time of one control step (the controller's `act`), milliseconds. */
  readonly computeMedianMs: number;
  /** 95th percentile of the control-step wall time, milliseconds. */
  readonly computeP95Ms: number;
  /** Setup time (building the controller, training a distilled policy), milliseconds. */
  readonly setupMs: number;
  /** Cost paid at each step (stage cost; the last entry includes the terminal cost). */
  readonly costSeries: readonly number[];
  /** The controller's own cumulative regret series, when it tracks one. */
  readonly regret?: readonly number[];
  /** Scenario metrics, e.g. touchdown speed and miss distance. */
  readonly metrics: Readonly<Record<string, number>>;
  /** The visited states x_0 … x_T (row per step), kept when the sweep asks for trajectories. */
  readonly trajectory?: readonly (readonly number[])[];
  /** Error message when the run failed (cost is then NaN and success false). */
  readonly error?: string;
}

/** Options of {@link executeRun}. */
export interface ExecuteOptions {
  /** Keep the state trajectory in the record. @defaultValue false */
  readonly keepTrajectory?: boolean;
  /** Reduced setting. @defaultValue false */
  readonly quick?: boolean;
}

/** Round for compact JSON (timings only; never costs). */
function round3(v: number): number {
  return Math.round(v * 1000) / 1000;
}

/** Build and run one cell of `spec`. Failures are recorded in `error`, never thrown. */
export async function executeRun(
  spec: SweepSpec,
  cell: RunCell,
  registry: Registry,
  options: ExecuteOptions = {},
): Promise<RunRecord> {
  const quick = options.quick ?? false;
  const pe = spec.problems.find((p) => p.label === cell.problem);
  const oe = spec.optimizers.find((o) => o.label === cell.optimizer);
  if (!pe || !oe) throw new Error(`executeRun: no entry for run ${cell.key}`);
  const base = {
    key: cell.key,
    problem: cell.problem,
    optimizer: cell.optimizer,
    seed: cell.seed,
    episode: cell.episode,
    config: cell.config,
  };
  const ctx = {
    seed: cell.seed,
    quick,
    registry,
    optimizerEntry: (label: string) => spec.optimizers.find((o) => o.label === label),
  };
  let problem: BenchProblem;
  let controller: BenchController;
  const t0 = performance.now();
  try {
    problem = registry.problem(pe.problem)!.create(pe.params, ctx);
    controller = await registry.optimizer(oe.kind)!.create(oe.params, problem, ctx);
  } catch (e) {
    return failed(base, e, performance.now() - t0);
  }
  const setupMs = performance.now() - t0;
  try {
    return { ...base, ...simulate(problem, controller, cell, options), setupMs: round3(setupMs) };
  } catch (e) {
    return failed(base, e, setupMs);
  }
}

function failed(
  base: Omit<
    RunRecord,
    | "cost"
    | "success"
    | "violations"
    | "dt"
    | "steps"
    | "samplesPerStep"
    | "computeMedianMs"
    | "computeP95Ms"
    | "setupMs"
    | "costSeries"
    | "metrics"
  >,
  e: unknown,
  setupMs: number,
): RunRecord {
  return {
    ...base,
    cost: Number.NaN,
    success: false,
    violations: 0,
    dt: Number.NaN,
    steps: 0,
    samplesPerStep: 0,
    computeMedianMs: Number.NaN,
    computeP95Ms: Number.NaN,
    setupMs: round3(setupMs),
    costSeries: [],
    metrics: {},
    error: e instanceof Error ? e.message : String(e),
  };
}

/** Simulate one closed-loop episode of `controller` on `problem`'s plant and measure it. */
export function simulate(
  problem: BenchProblem,
  controller: BenchController,
  cell: Pick<RunCell, "seed" | "episode">,
  options: ExecuteOptions = {},
): Omit<RunRecord, "key" | "problem" | "optimizer" | "seed" | "episode" | "config" | "setupMs"> {
  const n = problem.stateSize;
  const m = problem.controlSize;
  const T = problem.steps;
  const rng = createStream(`plant:${cell.seed}`).fork(cell.episode);
  const x = Float64Array.from(problem.initialState(rng));
  if (x.length !== n) throw new Error(`initialState: expected length ${n}, got ${x.length}`);
  const states = new Float64Array((T + 1) * n);
  states.set(x, 0);
  const u = new Float64Array(m);
  const times = new Float64Array(T);
  const costSeries: number[] = [];
  const one = new Float64Array(1);
  let samples = 0;
  let violations = 0;
  let steps = 0;
  for (let t = 0; t < T; t++) {
    const start = performance.now();
    const r = controller.act(x, t);
    times[t] = performance.now() - start;
    for (let j = 0; j < m; j++) {
      const v = r.control[j];
      if (!Number.isFinite(v))
        throw new Error(`controller returned a non-finite control at step ${t}`);
      u[j] = Math.min(problem.bounds.upper[j], Math.max(problem.bounds.lower[j], v));
    }
    samples += r.samples;
    one[0] = 0;
    problem.cost.running(x, 0, u, 0, 1, t, one, 0);
    costSeries.push(one[0]);
    if (problem.violation(x, u) > 0) violations++;
    problem.plantStep(x, u, t, rng);
    steps = t + 1;
    states.set(x, steps * n);
    if (problem.finished(x, t)) break;
  }
  one[0] = 0;
  problem.cost.terminal(x, 0, 1, one, 0);
  if (costSeries.length > 0) costSeries[costSeries.length - 1] += one[0];
  let cost = 0;
  for (const c of costSeries) cost += c;
  const outcome = problem.outcome(states, steps + 1);
  const used = times.subarray(0, steps);
  const record: Omit<
    RunRecord,
    "key" | "problem" | "optimizer" | "seed" | "episode" | "config" | "setupMs"
  > = {
    cost,
    success: outcome.success,
    violations,
    dt: problem.dt,
    steps,
    samplesPerStep: steps > 0 ? samples / steps : 0,
    computeMedianMs: round3(quantile(used, 0.5)),
    computeP95Ms: round3(quantile(used, 0.95)),
    costSeries,
    metrics: outcome.metrics,
    ...(controller.regretSeries ? { regret: controller.regretSeries() } : {}),
    ...(options.keepTrajectory
      ? {
          trajectory: Array.from({ length: steps + 1 }, (_, i) =>
            Array.from(states.subarray(i * n, (i + 1) * n)),
          ),
        }
      : {}),
  };
  return record;
}
