/**
 * NumPy suite: one MPPI control step on the cart-pole (RK4), K = 2000, H = 50, in vectorized
 * NumPy (bench/python/mppi_step.py) against the library on one core (issue 7, target 3: "at least
 * 3× faster than a vectorized numpy implementation of the same cart-pole step, on one core").
 *
 * Same problem: cartPole() of @recede/problems with the throughput suite's options (CART_POLE),
 * σ = 4 N, λ = 1, force bounds ±10 N. Before timing, the suite checks that the NumPy rollout computes
 * the same costs as the library's model and cost on 64 seeded control sequences (relative
 * difference reported as `same_costs_max_rel_diff`; the plans themselves differ because NumPy draws
 * its own noise). Timing alternates a NumPy process (3 warm-up + `steps` timed steps, per-step
 * `time.process_time`) and the library in this process (warm-up, then per-step process CPU time),
 * `reps` times (the library warms up for 40 steps first, so V8's background compilation — counted
 * in process CPU time — is over); figures are medians of per-step CPU milliseconds, and `speedup` is the median over
 * repetitions of NumPy ms / library ms within a repetition (so a change of background load between
 * repetitions cancels). "One core": the library runs on the main thread only (no worker pool).
 *
 * Skips with a reason when python3 or NumPy is missing.
 *
 * @module
 */
import { spawnSync } from "node:child_process";
import { loadavg } from "node:os";
import { fileURLToPath } from "node:url";
import { createStream } from "@recede/core";
import { mppi } from "@recede/mpc";
import { cartPole } from "@recede/problems";
import type { Suite, SuiteContext, SuiteOutput } from "../suite.js";
import { CART_POLE } from "./throughput.js";

const SAMPLES = 2000;
const HORIZON = 50;
const NOISE = 4;
const TEMPERATURE = 1;
/**
 * Library warm-up steps per repetition: enough for V8 to finish optimizing the step, so that
 * background compilation (which process CPU time counts) is not charged to the timed steps.
 */
const LIBRARY_WARMUP = 40;
const SCRIPT = fileURLToPath(new URL("../../python/mppi_step.py", import.meta.url));

function median(a: readonly number[]): number {
  const s = [...a].sort((x, y) => x - y);
  const h = s.length >> 1;
  return s.length % 2 === 1 ? s[h] : 0.5 * (s[h - 1] + s[h]);
}

const round = (v: number, d = 3): number => Number(v.toFixed(d));

function python(input: unknown): Record<string, unknown> {
  const r = spawnSync("python3", [SCRIPT], {
    input: JSON.stringify(input),
    encoding: "utf8",
    maxBuffer: 64 * 1024 * 1024,
  });
  if (r.error || r.status !== 0) {
    throw new Error(`bench/python/mppi_step.py failed: ${r.error?.message ?? r.stderr.trim()}`);
  }
  return JSON.parse(r.stdout) as Record<string, unknown>;
}

/** The problem's options in the NumPy script's names (the same numbers cartPole() uses). */
function params(): Record<string, unknown> {
  const c = CART_POLE;
  return {
    cartMass: c.cartMass,
    poleMass: c.poleMass,
    halfLength: c.halfLength,
    gravity: c.gravity,
    dt: c.dt,
    q: c.q,
    r: c.r,
    qf: c.qf,
    trackLimit: c.trackLimit,
    trackWeight: c.trackWeight,
    trackViolationCost: c.trackViolationCost,
  };
}

/** Max relative difference between NumPy's and the library's costs of the same controls. */
function sameCosts(): number {
  const p = cartPole(CART_POLE);
  const k = 64;
  const rng = createStream(11);
  const controls: number[][] = [];
  for (let s = 0; s < k; s++) {
    const row: number[] = [];
    for (let t = 0; t < HORIZON; t++) row.push(Math.max(-10, Math.min(10, 6 * rng.normal())));
    controls.push(row);
  }
  const out = python({
    mode: "costs",
    params: params(),
    state: Array.from(p.initialState()),
    controls,
  });
  const theirs = out.costs as number[];
  let worst = 0;
  const u = new Float64Array(1);
  const c = new Float64Array(1);
  for (let s = 0; s < k; s++) {
    const x = p.initialState();
    c[0] = 0;
    for (let t = 0; t < HORIZON; t++) {
      u[0] = controls[s][t];
      p.cost.running(x, 0, u, 0, 1, t, c, 0);
      p.dynamics.step(x, 0, u, 0, 1, t);
    }
    p.cost.terminal(x, 0, 1, c, 0);
    worst = Math.max(worst, Math.abs(theirs[s] - c[0]) / Math.abs(c[0]));
  }
  return worst;
}

/**
 * The library on the main thread, built once per suite run: one problem instance and one
 * controller serve every repetition, as in an application. (Building a fresh problem and
 * controller per repetition measured about 11 % slower from the second instance on: each
 * `cartPole()` makes new closures, so V8's call sites in the rollout see several targets.)
 */
function makeLibrary(): (warmup: number, steps: number) => number[] {
  const p = cartPole(CART_POLE);
  const ctrl = mppi({
    dynamics: p.dynamics,
    cost: p.cost,
    horizon: HORIZON,
    samples: SAMPLES,
    temperature: TEMPERATURE,
    noise: [NOISE],
    mean: 0,
    bounds: p.bounds,
    seed: 7,
  });
  const x = p.initialState();
  /** Per-step process CPU ms of `steps` steps after `warmup` steps, from the start state. */
  return (warmup, steps) => {
    x.set(p.initialState());
    const ms: number[] = [];
    for (let s = 0; s < warmup + steps; s++) {
      const c0 = process.cpuUsage();
      const { control } = ctrl.act(x);
      const c = process.cpuUsage(c0);
      p.dynamics.step(x, 0, control, 0, 1, 0);
      if (s >= warmup) ms.push((c.user + c.system) / 1000);
    }
    return ms;
  };
}

export const suite: Suite = {
  name: "numpy",
  description:
    "MPPI cart-pole step (K = 2000, H = 50, RK4): vectorized NumPy vs the library on one core",
  async run(ctx: SuiteContext): Promise<SuiteOutput> {
    const probe = spawnSync("python3", ["-c", "import numpy; print(numpy.__version__)"], {
      encoding: "utf8",
    });
    if (probe.error || probe.status !== 0) {
      const reason = "python3 with NumPy not found; the NumPy comparison is skipped";
      return { result: { skipped: reason }, lines: [reason] };
    }
    const numpyVersion = probe.stdout.trim();
    const reps = ctx.quick ? 2 : 5;
    const steps = ctx.quick ? 5 : 20;
    const load0 = loadavg()[0];
    const library = makeLibrary();
    const np: number[] = [];
    const lib: number[] = [];
    const ratios: number[] = [];
    for (let r = 0; r < reps; r++) {
      const out = python({
        mode: "time",
        params: params(),
        samples: SAMPLES,
        horizon: HORIZON,
        noise: NOISE,
        lower: -10,
        upper: 10,
        temperature: TEMPERATURE,
        state: Array.from(cartPole(CART_POLE).initialState()),
        warmup: 3,
        steps,
        seed: r + 1,
      });
      const a = median(out.cpu_ms_per_step as number[]);
      const b = median(library(LIBRARY_WARMUP, steps));
      np.push(a);
      lib.push(b);
      ratios.push(a / b);
      ctx.log(`rep ${r + 1}/${reps}: numpy ${a.toFixed(2)} ms, library ${b.toFixed(2)} ms`);
    }
    const load1 = loadavg()[0];
    // After the timing: calling the model and cost one sample at a time first would change V8's
    // type feedback for the batched calls (measured: about 10 % slower timed steps).
    const diff = sameCosts();
    ctx.log(`same costs: max relative difference ${diff.toExponential(2)}`);
    const speedup = median(ratios);
    const result = {
      samples: SAMPLES,
      horizon: HORIZON,
      numpy_version: numpyVersion,
      same_costs_max_rel_diff: diff,
      numpy_cpu_ms_per_step: round(median(np)),
      library_cpu_ms_per_step_one_core: round(median(lib)),
      speedup: round(speedup),
      per_rep: { numpy: np.map((v) => round(v)), library: lib.map((v) => round(v)) },
      target_speedup: 3,
      load_average_1min: { before: round(load0, 2), after: round(load1, 2) },
    };
    return {
      result,
      lines: [
        `NumPy ${numpyVersion}: ${result.numpy_cpu_ms_per_step} CPU ms per step; library (one core) ${result.library_cpu_ms_per_step_one_core} ms; speed-up ×${result.speedup} (target ×3)`,
        `same costs on 64 sequences: max relative difference ${diff.toExponential(2)}`,
      ],
    };
  },
};
