/**
 * MPC suite: control steps per second of the library's controllers (the `mppi` and `cem` presets
 * of @recede/mpc) for K ∈ {256, 2000} samples and horizon H = 50 on the cart-pole (RK4) and the
 * kinematic bicycle of @recede/problems, and the bytes allocated per control step after warm-up.
 *
 * Timing: each case is a closed loop on the model itself — `warmup` untimed control steps, then
 * `steps` timed ones, each followed by advancing the state with the applied control; the figure is
 * the median over `repetitions` of steps / wall time (performance.now around the whole loop).
 *
 * Allocation, two independent measurements after warm-up (method recorded in the JSON):
 *  1. heap growth: three consecutive windows, each (with `--expose-gc`) a full GC, then
 *     `allocSteps` control steps with no forced GC, then `process.memoryUsage().heapUsed` again;
 *     bytes/step = growth / allocSteps, and the figure is the smallest window (the first may hold
 *     one-time JIT allocations). A young-generation collection during a window would hide
 *     allocations, so (2) is also reported;
 *  2. garbage collections observed (PerformanceObserver "gc" entries) during a long run of
 *     `gcSteps` control steps: a step that allocated even a few bytes would trigger scavenges
 *     over 1e4–1e5 steps; zero collections means (to the resolution of the young generation,
 *     a few MB over the run) no allocation.
 * Without `--expose-gc` the suite enables the flag at run time (v8.setFlagsFromString); if that
 * fails, (1) starts from the current heap and is marked `"gcForced": false`.
 *
 * @module
 */
import { PerformanceObserver } from "node:perf_hooks";
import { setFlagsFromString } from "node:v8";
import { runInNewContext } from "node:vm";
import { batchDynamics, type Dynamics, type PointDynamics } from "@recede/core";
import { type Controller, cem, mppi } from "@recede/mpc";
import { bicycle, cartPole, type Problem } from "@recede/problems";
import type { Suite, SuiteContext, SuiteOutput } from "../suite.js";

const HORIZON = 50;
const SEED = 11;

interface Case {
  readonly problem: string;
  readonly optimizer: "mppi" | "cem";
  readonly samples: number;
}

function noiseOf(p: Problem): number[] {
  const out: number[] = [];
  for (let j = 0; j < p.controlSize; j++) {
    const half = 0.5 * (p.bounds.upper[j] - p.bounds.lower[j]);
    out.push(Number.isFinite(half) ? 0.5 * half : 1);
  }
  return out;
}

function build(p: Problem, c: Case, timing = false, dynamics: Dynamics = p.dynamics): Controller {
  const common = {
    timing,
    dynamics,
    cost: p.cost,
    horizon: HORIZON,
    samples: c.samples,
    bounds: p.bounds,
    seed: SEED,
  };
  return c.optimizer === "mppi"
    ? mppi({ ...common, noise: noiseOf(p), temperature: 1 })
    : cem({ ...common, std: noiseOf(p), iterations: 1 });
}

function closedLoopSteps(
  ctrl: Controller,
  p: Problem,
  x: Float64Array,
  steps: number,
  t0: number,
): void {
  for (let s = 0; s < steps; s++) {
    const { control } = ctrl.act(x);
    p.dynamics.step(x, 0, control, 0, 1, t0 + s);
    // Restart from the initial state if the closed loop leaves the model's domain.
    for (let i = 0; i < x.length; i++) {
      if (!Number.isFinite(x[i])) {
        x.set(p.initialState());
        break;
      }
    }
  }
}

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : 0.5 * (s[h - 1] + s[h]);
}

interface AllocResult {
  /** Steady-state estimate: the smallest per-step heap growth over the windows. */
  readonly bytesPerStep: number;
  /** Heap growth per step of each window (the first may include one-time JIT allocations). */
  readonly windows: readonly number[];
  readonly steps: number;
  readonly gcForced: boolean;
  readonly gcEventsDuringLongRun: number;
  readonly longRunSteps: number;
}

/**
 * The V8 full-GC hook: `globalThis.gc` under `--expose-gc`, else obtained at run time by setting
 * the flag and reading `gc` from a fresh context (common practice for Node benchmarks).
 */
function fullGc(): (() => void) | undefined {
  const g = (globalThis as { gc?: () => void }).gc;
  if (typeof g === "function") return g;
  try {
    setFlagsFromString("--expose-gc");
    const h = runInNewContext("gc") as unknown;
    return typeof h === "function" ? (h as () => void) : undefined;
  } catch {
    return undefined;
  }
}

async function measureAllocation(
  ctrl: Controller,
  p: Problem,
  allocSteps: number,
  gcSteps: number,
): Promise<AllocResult> {
  const gc = fullGc();
  const x = p.initialState();
  closedLoopSteps(ctrl, p, x, 50, 0); // warm-up (JIT, lazily grown scratch)
  const windows: number[] = [];
  let t = 50;
  for (let w = 0; w < 3; w++) {
    if (gc) gc();
    const h0 = process.memoryUsage().heapUsed;
    closedLoopSteps(ctrl, p, x, allocSteps, t);
    const h1 = process.memoryUsage().heapUsed;
    t += allocSteps;
    windows.push((h1 - h0) / allocSteps);
  }
  let events = 0;
  if (gcSteps > 0) {
    const obs = new PerformanceObserver((list) => {
      events += list.getEntries().length;
    });
    if (gc) gc();
    obs.observe({ entryTypes: ["gc"] });
    // Let the forced collection's entry drain before counting.
    await new Promise((r) => setTimeout(r, 20));
    events = 0;
    closedLoopSteps(ctrl, p, x, gcSteps, t);
    await new Promise((r) => setTimeout(r, 50));
    obs.disconnect();
  }
  return {
    bytesPerStep: Math.min(...windows),
    windows,
    steps: allocSteps,
    gcForced: gc !== undefined,
    gcEventsDuringLongRun: events,
    longRunSteps: gcSteps,
  };
}

/**
 * The per-sample adapter `batchDynamics` of @recede/core against the problem's batched model:
 * the same model equations, written once as a per-sample function (next(x, u, t, out) advancing one
 * state with the batched step at count 1) and wrapped by the adapter. Dynamics alone
 * (ns per sample-step, median of repetitions, K = 2000 states, process CPU time) and the whole
 * mppi step (K = 2000, H = 50, steps/s).
 */
function adapterCost(
  problems: Record<string, Problem>,
  quick: boolean,
  ctx: SuiteContext,
): Record<string, number | string>[] {
  const out: Record<string, number | string>[] = [];
  const k = 2000;
  for (const [name, p] of Object.entries(problems)) {
    const n = p.stateSize;
    const m = p.controlSize;
    const point: PointDynamics = {
      stateSize: n,
      controlSize: m,
      next(x, u, t, o): void {
        for (let i = 0; i < n; i++) o[i] = x[i];
        p.dynamics.step(o, 0, u, 0, 1, t);
      },
    };
    const adapted = batchDynamics(point);
    const x = new Float64Array(k * n);
    const u = new Float64Array(k * m);
    for (let i = 0; i < k; i++) x.set(p.initialState(), i * n);
    for (let i = 0; i < u.length; i++) u[i] = 0.1 * Math.sin(i);
    const nsPer = (d: Dynamics): number => {
      const reps: number[] = [];
      const calls = quick ? 20 : 100;
      for (let r = 0; r < (quick ? 3 : 7); r++) {
        for (let i = 0; i < k; i++) x.set(p.initialState(), i * n);
        const c0 = process.cpuUsage();
        for (let c = 0; c < calls; c++) d.step(x, 0, u, 0, k, c);
        const c1 = process.cpuUsage(c0);
        reps.push(((c1.user + c1.system) * 1000) / (calls * k));
      }
      return median(reps);
    };
    nsPer(p.dynamics);
    nsPer(adapted);
    const batched = nsPer(p.dynamics);
    const perSample = nsPer(adapted);
    const rate = (d: Dynamics): number => {
      const c: Case = { problem: name, optimizer: "mppi", samples: k };
      const ctrl = build(p, c, false, d);
      const xs = p.initialState();
      closedLoopSteps(ctrl, p, xs, 3, 0);
      const steps = quick ? 4 : 12;
      const c0 = process.cpuUsage();
      closedLoopSteps(ctrl, p, xs, steps, 3);
      const c1 = process.cpuUsage(c0);
      return steps / ((c1.user + c1.system) / 1e6);
    };
    const rb: number[] = [];
    const ra: number[] = [];
    for (let r = 0; r < (quick ? 1 : 3); r++) {
      rb.push(rate(p.dynamics));
      ra.push(rate(adapted));
    }
    ctx.log(
      `mpc: adapter ${name}: ${batched.toFixed(1)} vs ${perSample.toFixed(1)} ns/sample-step`,
    );
    out.push({
      problem: name,
      batchedNsPerSampleStep: Number(batched.toFixed(2)),
      adapterNsPerSampleStep: Number(perSample.toFixed(2)),
      adapterOverBatched: Number((perSample / batched).toFixed(3)),
      batchedStepsPerSecond: Number(median(rb).toFixed(2)),
      adapterStepsPerSecond: Number(median(ra).toFixed(2)),
      timeBase: "process CPU time",
    });
  }
  return out;
}

/** The suite. */
export const suite: Suite = {
  name: "mpc",
  description:
    "Control steps/s of the mppi and cem presets (K ∈ {256, 2000}, H = 50) on cart-pole and bicycle, and bytes allocated per control step after warm-up",
  async run(ctx: SuiteContext): Promise<SuiteOutput> {
    const quick = ctx.quick;
    const repetitions = quick ? 2 : 5;
    const problems: Record<string, Problem> = { "cart-pole": cartPole(), bicycle: bicycle() };
    const cases: Case[] = [];
    for (const problem of ["cart-pole", "bicycle"]) {
      for (const samples of [256, 2000]) {
        for (const optimizer of ["mppi", "cem"] as const)
          cases.push({ problem, optimizer, samples });
      }
    }
    const rows: Record<string, unknown>[] = [];
    const lines: string[] = [];
    for (const c of cases) {
      const p = problems[c.problem];
      const steps = Math.max(10, Math.round((quick ? 2e5 : 2e6) / c.samples / HORIZON));
      const warmup = Math.max(5, steps >> 2);
      const rates: number[] = [];
      for (let r = 0; r < repetitions; r++) {
        const ctrl = build(p, c);
        const x = p.initialState();
        closedLoopSteps(ctrl, p, x, warmup, 0);
        const t0 = performance.now();
        closedLoopSteps(ctrl, p, x, steps, warmup);
        const dt = (performance.now() - t0) / 1000;
        rates.push(steps / dt);
      }
      const stepsPerSecond = median(rates);
      const sampleSteps = stepsPerSecond * c.samples * HORIZON;
      ctx.log(
        `mpc: ${c.optimizer} ${c.problem} K=${c.samples}: ${stepsPerSecond.toFixed(1)} steps/s`,
      );
      // Allocation with the default timing: false; the two performance.now() reads of the report's
      // wallTimeMs (timing: true) allocate 16 B each on Node 20 (measured separately as `withTiming`).
      const windowSteps = Math.max(20, Math.round((quick ? 2e6 : 1e7) / c.samples / HORIZON));
      const alloc = await measureAllocation(
        build(p, c, false),
        p,
        windowSteps,
        Math.round((quick ? 4e6 : 2e7) / c.samples / HORIZON),
      );
      const withTiming = await measureAllocation(build(p, c, true), p, windowSteps, 0);
      rows.push({
        ...c,
        horizon: HORIZON,
        stepsPerSecond,
        msPerStep: 1000 / stepsPerSecond,
        sampleStepsPerSecond: sampleSteps,
        repetitions: rates,
        timedSteps: steps,
        warmupSteps: warmup,
        allocation: alloc,
        allocationWithTiming: {
          bytesPerStep: withTiming.bytesPerStep,
          steps: withTiming.steps,
          gcForced: withTiming.gcForced,
        },
      });
      lines.push(
        `${c.optimizer.padEnd(4)} ${c.problem.padEnd(9)} K=${String(c.samples).padStart(4)} H=${HORIZON}: ` +
          `${stepsPerSecond.toFixed(1).padStart(8)} steps/s (${(1000 / stepsPerSecond).toFixed(2)} ms/step, ` +
          `${(sampleSteps / 1e6).toFixed(2)} M sample-steps/s); ` +
          `heap ${alloc.bytesPerStep.toFixed(1)} B/step over ${alloc.steps} steps${alloc.gcForced ? "" : " (no --expose-gc)"} ` +
          `(${withTiming.bytesPerStep.toFixed(1)} with timing), ` +
          `${alloc.gcEventsDuringLongRun} GCs in ${alloc.longRunSteps} steps`,
      );
    }
    const adapter = adapterCost(problems, quick, ctx);
    for (const a of adapter) {
      lines.push(
        `${a.problem} dynamics: batched ${a.batchedNsPerSampleStep} ns/sample-step, per-sample adapter (batchDynamics) ${a.adapterNsPerSampleStep} ns (×${a.adapterOverBatched}); mppi K=2000 H=50: ${a.batchedStepsPerSecond} vs ${a.adapterStepsPerSecond} steps/s`,
      );
    }
    return {
      result: {
        adapter,
        horizon: HORIZON,
        seed: SEED,
        quick,
        method: {
          timing:
            "closed loop on the model: warm-up steps, then timed steps; median over repetitions of steps / wall time",
          allocation:
            "controllers built with the default timing: false; (1) heapUsed growth over three consecutive windows of N control steps after warm-up, each after a forced full GC (needs --expose-gc), divided by N; bytesPerStep = the smallest window (the first may hold one-time JIT allocations); (2) count of GC events (PerformanceObserver 'gc') during a long run; allocationWithTiming repeats (1) with timing: true (two performance.now() reads per step)",
          fullGcAvailable: fullGc() !== undefined,
          node: process.version,
        },
        cases: rows,
      },
      lines,
    };
  },
};
