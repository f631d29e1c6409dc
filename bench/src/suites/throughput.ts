/**
 * Throughput suite: control steps per second of the library's MPPI (the `mppi` preset of
 * @recede/mpc on the kinematic bicycle and the cart-pole of @recede/problems, K = 2000, H = 50)
 * against the hand-written C reference (bench/native/mppi.c, gcc -O2) and a hand-written
 * JavaScript twin of it (the "JS ceiling", bench/src/mppiReference.ts), in the same run,
 * alternating, several repetitions. All three do the same work: same model, cost, bounds,
 * seeds, normal sampler, per-step gather, clipping, weights, mean update and shift — the suite
 * checks it by comparing their plans after a few steps from the same seed (to rounding: the
 * library's models use the core trig kernel, the two hand-written steps the platform's Math/libm).
 *
 * Also measures the normal samplers on the same generator (ziggurat = the library's; Marsaglia
 * polar; Box–Muller), which is how the library's method was chosen, and the cost per call of
 * V8's Math.sin/cos/tan/atan/exp/log against the C library's (bench/native/libm.c), which bounds
 * how close JavaScript can get to C on these trigonometry-bound rollouts, and the core trig kernel
 * (`kernels.sinCos` of @recede/core, which the library's models use) against Math.sin + Math.cos.
 *
 * Each timed run is a closed loop on the model itself: `warmup` untimed steps, then `steps` timed
 * steps, each followed by advancing the state with the applied control. Rates are medians over
 * repetitions. `ratio` = library / native is the median over repetitions of the ratio within each
 * repetition (the two runs of a repetition are adjacent in time, so a change of background load
 * between repetitions cancels); `ratio_of_medians` is the other estimate.
 *
 * @module
 */
import { loadavg } from "node:os";
import { createStream, kernels } from "@recede/core";
import { mppi } from "@recede/mpc";
import { type BicycleOptions, bicycle, type CartPoleOptions, cartPole } from "@recede/problems";
import { referenceStep } from "../mppiReference.js";
import {
  buildNative,
  type NativeModel,
  type NativeRunConfig,
  runLibm,
  runNative,
} from "../native.js";
import type { Suite, SuiteContext, SuiteOutput } from "../suite.js";

const SAMPLES = 2000;
const HORIZON = 50;
const SLICE = 64; // the mppi preset's default sliceSize
const SEED = 7;

const BICYCLE: BicycleOptions = {
  frontLength: 0.3,
  rearLength: 0.3,
  maxSteering: 0.6,
  maxAcceleration: 1.5,
  minSpeed: -0.5,
  maxSpeed: 1.5,
  speedWeight: 100,
  dt: 0.1,
  goal: [4, 3],
  goalHeading: 0,
  initialState: [0, 0, 0, 0],
  q: [1, 1, 0, 0.1],
  r: [0.1, 0.1],
  qf: [10, 10, 0, 1],
};

/** The cart-pole options of the throughput comparison (also used by the numpy suite). */
export const CART_POLE: CartPoleOptions = {
  cartMass: 1,
  poleMass: 0.1,
  halfLength: 0.5,
  gravity: 9.8,
  forceLimit: 10,
  trackLimit: 2.4,
  trackWeight: 1000,
  trackViolationCost: 100,
  dt: 0.02,
  q: [1, 0.1, 10, 0.1],
  r: 0.001,
  qf: [10, 1, 100, 1],
  initialState: [0, 0, Math.PI, 0],
};

interface ModelCase {
  readonly model: NativeModel;
  readonly problem: ReturnType<typeof bicycle> | ReturnType<typeof cartPole>;
  readonly noise: number[];
  readonly temperature: number;
  /** Parameters in mppi.c's order. */
  readonly params: number[];
}

function cases(): ModelCase[] {
  const b = BICYCLE;
  const c = CART_POLE;
  const goal = [...(b.goal as number[]), b.goalHeading as number, 0];
  return [
    {
      model: "bicycle",
      problem: bicycle(b),
      noise: [0.75, 0.3],
      temperature: 1,
      params: [
        b.dt as number,
        b.frontLength as number,
        b.rearLength as number,
        ...(b.q as number[]),
        ...(b.r as number[]),
        ...(b.qf as number[]),
        ...goal,
        b.minSpeed as number,
        b.maxSpeed as number,
        b.speedWeight as number,
        0, // speed-limit violation cost (stateLimitPenalty's default)
      ],
    },
    {
      model: "cart-pole",
      problem: cartPole(c),
      noise: [4],
      temperature: 1,
      params: [
        c.cartMass as number,
        c.poleMass as number,
        c.halfLength as number,
        c.gravity as number,
        c.dt as number,
        ...(c.q as number[]),
        c.r as number,
        ...(c.qf as number[]),
        c.trackLimit as number,
        c.trackWeight as number,
        c.trackViolationCost as number,
      ],
    },
  ];
}

function config(mc: ModelCase, warmup: number, steps: number): NativeRunConfig {
  const m = mc.problem.controlSize;
  const std = new Float64Array(HORIZON * m);
  for (let p = 0; p < std.length; p++) std[p] = mc.noise[p % m];
  return {
    model: mc.model,
    samples: SAMPLES,
    horizon: HORIZON,
    sliceSize: SLICE,
    warmup,
    steps,
    params: mc.params,
    state: mc.problem.initialState(),
    mean: new Float64Array(HORIZON * m),
    std,
    lower: mc.problem.bounds.lower,
    upper: mc.problem.bounds.upper,
    temperature: mc.temperature,
    seed: SEED,
  };
}

interface Timed {
  /** Timed steps per wall-clock second. */
  stepsPerS: number;
  /** Timed steps per second of process CPU time (less sensitive to other load on the machine). */
  stepsPerCpuS: number;
  plan: Float64Array;
  state: Float64Array;
}

function timed(steps: number, body: () => void): { stepsPerS: number; stepsPerCpuS: number } {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  for (let s = 0; s < steps; s++) body();
  const ms = performance.now() - t0;
  const c = process.cpuUsage(c0);
  return { stepsPerS: (1000 * steps) / ms, stepsPerCpuS: (1e6 * steps) / (c.user + c.system) };
}

/** The library path: the mppi preset on the problem, closed loop on the problem's own model. */
function libraryRun(mc: ModelCase, warmup: number, steps: number): Timed {
  const p = mc.problem;
  const ctrl = mppi({
    dynamics: p.dynamics,
    cost: p.cost,
    horizon: HORIZON,
    samples: SAMPLES,
    temperature: mc.temperature,
    noise: mc.noise,
    mean: 0,
    bounds: p.bounds,
    fill: "nominal",
    seed: SEED,
    sliceSize: SLICE,
  });
  const x = p.initialState();
  for (let s = 0; s < warmup; s++) {
    const { control } = ctrl.act(x);
    p.dynamics.step(x, 0, control, 0, 1, 0);
  }
  const rate = timed(steps, () => {
    const { control } = ctrl.act(x);
    p.dynamics.step(x, 0, control, 0, 1, 0);
  });
  return { ...rate, plan: new Float64Array(ctrl.plan()), state: x };
}

/** The JS ceiling: the hand-written twin of mppi.c. */
function ceilingRun(mc: ModelCase, warmup: number, steps: number): Timed {
  const ref = referenceStep(config(mc, warmup, steps));
  const x = mc.problem.initialState();
  const u = new Float64Array(mc.problem.controlSize);
  for (let s = 0; s < warmup; s++) {
    ref.step(x, u);
    ref.advance(x, u);
  }
  const rate = timed(steps, () => {
    ref.step(x, u);
    ref.advance(x, u);
  });
  return { ...rate, plan: new Float64Array(ref.mean), state: x };
}

/** Median over repetitions of a[r] / b[r]. */
function pairedRatio(a: readonly number[], b: readonly number[]): number {
  return median(a.map((v, r) => v / b[r]));
}

/**
 * Same-work check: the library's models evaluate sin/cos with the core trig kernel
 * (`kernels.sinCosInPlace`, within 1–2 ulp of libm) and the bicycle forms β through exact
 * identities instead of `atan`; the hand-written twin and C keep the platform's `Math`/libm. So
 * the three plans agree to rounding, not bit for bit: |Δ| ≤ tolerance·(1 + |plan|) after
 * `steps` closed-loop steps (the largest difference measured is recorded beside it).
 */
const SAME_WORK_TOLERANCE = 1e-9;
const SAME_WORK_NOTE =
  "plans after `steps` closed-loop steps from the same seed; the library's models use the core trig kernel, the twin and C use Math/libm, so they agree to rounding: |Δ| ≤ tolerance·(1 + |plan|)";

/** max_i |a_i − b_i| / (1 + |b_i|). */
function maxRelDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]) / (1 + Math.abs(b[i])));
  return d;
}

function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d;
}

function median(v: readonly number[]): number {
  const s = [...v].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 === 1 ? s[h] : 0.5 * (s[h - 1] + s[h]);
}

const round = (x: number, digits = 4): number => Number(x.toPrecision(digits));

// ---------------------------------------------------------------- normal samplers
// The same xoshiro128** generator as @recede/core, inlined, feeding the two classical
// alternatives to the ziggurat (MATH.md §8.3). Benchmark code only.

function xoshiroPolar(st: Int32Array, out: Float64Array, n: number): void {
  let s0 = st[0];
  let s1 = st[1];
  let s2 = st[2];
  let s3 = st[3];
  let j = 0;
  while (j < n) {
    let u = 0;
    let v = 0;
    let s = 0;
    do {
      let r = Math.imul(s1, 5);
      r = Math.imul((r << 7) | (r >>> 25), 9);
      let t = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= t;
      s3 = (s3 << 11) | (s3 >>> 21);
      u = r * 4.656612873077393e-10; // signed word / 2³¹ ∈ [−1, 1)
      r = Math.imul(s1, 5);
      r = Math.imul((r << 7) | (r >>> 25), 9);
      t = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= t;
      s3 = (s3 << 11) | (s3 >>> 21);
      v = r * 4.656612873077393e-10;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    out[j++] = u * f;
    if (j < n) out[j++] = v * f;
  }
  st[0] = s0;
  st[1] = s1;
  st[2] = s2;
  st[3] = s3;
}

function xoshiroBoxMuller(st: Int32Array, out: Float64Array, n: number): void {
  let s0 = st[0];
  let s1 = st[1];
  let s2 = st[2];
  let s3 = st[3];
  let j = 0;
  while (j < n) {
    let r = Math.imul(s1, 5);
    r = Math.imul((r << 7) | (r >>> 25), 9);
    let t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = (s3 << 11) | (s3 >>> 21);
    const u1 = ((r >>> 0) + 0.5) * 2.3283064365386963e-10; // (0, 1)
    r = Math.imul(s1, 5);
    r = Math.imul((r << 7) | (r >>> 25), 9);
    t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = (s3 << 11) | (s3 >>> 21);
    const a = (r >>> 0) * 1.4629180792671596e-9; // 2π·u₂, u₂ ∈ [0, 1)
    const rad = Math.sqrt(-2 * Math.log(u1));
    out[j++] = rad * Math.cos(a);
    if (j < n) out[j++] = rad * Math.sin(a);
  }
  st[0] = s0;
  st[1] = s1;
  st[2] = s2;
  st[3] = s3;
}

function samplerNs(reps: number): Record<string, number> {
  const n = SAMPLES * HORIZON * 2; // one MPPI step's draws on the bicycle (K·H·m)
  const out = new Float64Array(n);
  const stream = createStream(1);
  const st = new Int32Array([0x2545f491, 0x4f6cdd1d, 0x12345678, -0x6789abcd]);
  const runs: Record<string, () => void> = {
    ziggurat_library: () => {
      stream.fillNormal(out, 0, n);
    },
    polar_xoshiro: () => xoshiroPolar(st, out, n),
    box_muller_xoshiro: () => xoshiroBoxMuller(st, out, n),
  };
  const best: Record<string, number> = {};
  for (const k of Object.keys(runs)) {
    for (let w = 0; w < 10; w++) runs[k]();
    best[k] = Number.POSITIVE_INFINITY;
  }
  // Alternate the samplers; keep each one's fastest repetition (least disturbed by other load).
  for (let r = 0; r < reps; r++) {
    for (const k of Object.keys(runs)) {
      const c0 = process.cpuUsage();
      for (let i = 0; i < 5; i++) runs[k]();
      const c = process.cpuUsage(c0);
      const ns = ((c.user + c.system) * 1e3) / (5 * n); // process CPU time
      if (ns < best[k]) best[k] = ns;
    }
  }
  const result: Record<string, number> = {};
  for (const k of Object.keys(best)) result[k] = round(best[k], 3);
  return result;
}

// ---------------------------------------------------------------- V8 Math.* vs the C library
// The rollouts are dominated by sin/cos/tan/atan; these loops match bench/native/libm.c.

const mathLoops: Record<string, (n: number) => number> = {
  sin: (n) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.sin(i * 1e-3);
    return s;
  },
  cos: (n) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.cos(i * 1e-3);
    return s;
  },
  tan: (n) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.tan(i * 1e-7);
    return s;
  },
  atan: (n) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.atan(i * 1e-6);
    return s;
  },
  exp: (n) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.exp(-(i * 1e-6));
    return s;
  },
  log: (n) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.log(1 + i * 1e-6);
    return s;
  },
};

// The core trig kernel (kernels.sinCos of @recede/core, used by the bicycle and cart-pole models)
// against the pair Math.sin + Math.cos, in the same loop as above, plus the same on random
// arguments in [−4, 4] (quadrants change unpredictably, as in a rollout).
const trigScratch = new Float64Array(2);
const trigArgs = (() => {
  const a = new Float64Array(1 << 16);
  const st = createStream(3);
  for (let i = 0; i < a.length; i++) a[i] = 8 * st.uniform() - 4;
  return a;
})();
const trigLoops: Record<string, (n: number) => number> = {
  math_sin_plus_cos: (n) => {
    let s = 0;
    for (let i = 0; i < n; i++) {
      const x = i * 1e-3;
      s += Math.sin(x) + Math.cos(x);
    }
    return s;
  },
  kernel_sinCos: (n) => {
    const sc = trigScratch;
    let s = 0;
    for (let i = 0; i < n; i++) {
      kernels.sinCos(i * 1e-3, sc, 0);
      s += sc[0] + sc[1];
    }
    return s;
  },
  kernel_sinCosInPlace: (n) => {
    const sc = trigScratch;
    let s = 0;
    for (let i = 0; i < n; i++) {
      sc[0] = i * 1e-3;
      kernels.sinCosInPlace(sc, 0);
      s += sc[0] + sc[1];
    }
    return s;
  },
  random_math_sin_plus_cos: (n) => {
    const a = trigArgs;
    let s = 0;
    for (let i = 0; i < n; i++) {
      const x = a[i & 65535];
      s += Math.sin(x) + Math.cos(x);
    }
    return s;
  },
  random_kernel_sinCos: (n) => {
    const a = trigArgs;
    const sc = trigScratch;
    let s = 0;
    for (let i = 0; i < n; i++) {
      kernels.sinCos(a[i & 65535], sc, 0);
      s += sc[0] + sc[1];
    }
    return s;
  },
};

/** ns per call (process CPU time), best of `reps` repetitions of `calls` calls. */
function v8MathNs(
  calls: number,
  reps: number,
  loops: Record<string, (n: number) => number> = mathLoops,
): Record<string, number> {
  const out: Record<string, number> = {};
  let sink = 0;
  for (const [name, loop] of Object.entries(loops)) {
    sink += loop(calls); // warm-up (optimize the loop)
    let best = Number.POSITIVE_INFINITY;
    for (let r = 0; r < reps; r++) {
      const c0 = process.cpuUsage();
      sink += loop(calls);
      const c = process.cpuUsage(c0);
      best = Math.min(best, ((c.user + c.system) * 1e3) / calls);
    }
    out[name] = round(best, 3);
  }
  if (sink === 0.5) out.sink = sink; // keeps the loops observable
  return out;
}

// ---------------------------------------------------------------- the suite

async function run(ctx: SuiteContext): Promise<SuiteOutput> {
  const reps = ctx.quick ? 2 : 9;
  const warmup = ctx.quick ? 2 : 5;
  const lines: string[] = [];
  const native = buildNative();
  if (native.ok) ctx.log(`native reference: ${native.compiler}, flags ${native.flags}`);
  else ctx.log(`native reference skipped: ${native.reason}`);

  const loadBefore = loadavg()[0];
  const models: Record<string, unknown>[] = [];
  for (const mc of cases()) {
    // Steps per timed run: a few tenths of a second of library work per repetition.
    const steps = ctx.quick ? 3 : mc.model === "bicycle" ? 24 : 16;
    // Same-work check: three steps from the same seed and state, plans compared.
    const checkSteps = 3;
    const lib0 = libraryRun(mc, 0, checkSteps);
    const js0 = ceilingRun(mc, 0, checkSteps);
    const nat0 = native.ok ? runNative(native.binary, config(mc, 0, checkSteps)) : null;
    const lib: number[] = [];
    const js: number[] = [];
    const nat: number[] = [];
    const libCpu: number[] = [];
    const jsCpu: number[] = [];
    const natCpu: number[] = [];
    for (let r = 0; r < reps; r++) {
      const a = libraryRun(mc, warmup, steps);
      lib.push(a.stepsPerS);
      libCpu.push(a.stepsPerCpuS);
      const b = ceilingRun(mc, warmup, steps);
      js.push(b.stepsPerS);
      jsCpu.push(b.stepsPerCpuS);
      if (native.ok) {
        const c = runNative(native.binary, config(mc, warmup, steps));
        nat.push(c.steps_per_s);
        natCpu.push(c.steps_per_cpu_s);
      }
      ctx.log(
        `${mc.model} rep ${r + 1}/${reps}: library ${lib[r].toFixed(1)}, JS ceiling ${js[r].toFixed(1)}${native.ok ? `, native ${nat[r].toFixed(1)}` : ""} steps/s`,
      );
    }
    // Where the time goes in the two hand-written steps: a separate run with CPU-clock reads
    // around each phase (not used for the throughput figures).
    const phaseSteps = ctx.quick ? 3 : 10;
    const phaseNames = ["normals", "mu_plus_sigma_z", "clip", "rollout", "weights_update_shift"];
    const perStep = (v: ArrayLike<number>, scale: number): Record<string, number> =>
      Object.fromEntries(phaseNames.map((k, q) => [k, round((v[q] * scale) / phaseSteps, 3)]));
    const ceilingPhases = (() => {
      const ref = referenceStep(config(mc, warmup, phaseSteps));
      const x = mc.problem.initialState();
      const u = new Float64Array(mc.problem.controlSize);
      for (let s = 0; s < warmup; s++) {
        ref.step(x, u);
        ref.advance(x, u);
      }
      const acc = ref.timePhases();
      for (let s = 0; s < phaseSteps; s++) {
        ref.step(x, u);
        ref.advance(x, u);
      }
      return perStep(acc, 1);
    })();
    const nativePhases = native.ok
      ? perStep(
          runNative(native.binary, { ...config(mc, warmup, phaseSteps), phases: true })
            .phase_seconds as number[],
          1000,
        )
      : null;
    const libMed = median(lib);
    const jsMed = median(js);
    const natMed = native.ok ? median(nat) : null;
    const libCpuMed = median(libCpu);
    const jsCpuMed = median(jsCpu);
    const natCpuMed = native.ok ? median(natCpu) : null;
    const entry: Record<string, unknown> = {
      model: mc.model,
      samples: SAMPLES,
      horizon: HORIZON,
      library_steps_per_s: round(libMed),
      native_steps_per_s: natMed === null ? null : round(natMed),
      ratio: natMed === null ? null : round(pairedRatio(lib, nat), 3),
      ratio_of_medians: natMed === null ? null : round(libMed / natMed, 3),
      js_ceiling_steps_per_s: round(jsMed),
      js_ceiling_ratio: natMed === null ? null : round(pairedRatio(js, nat), 3),
      library_vs_js_ceiling: round(pairedRatio(lib, js), 3),
      library_ms_per_step: round(1000 / libMed),
      cpu_time: {
        library_steps_per_cpu_s: round(libCpuMed),
        native_steps_per_cpu_s: natCpuMed === null ? null : round(natCpuMed),
        ratio: natCpuMed === null ? null : round(pairedRatio(libCpu, natCpu), 3),
        js_ceiling_steps_per_cpu_s: round(jsCpuMed),
        js_ceiling_ratio: natCpuMed === null ? null : round(pairedRatio(jsCpu, natCpu), 3),
      },
      repetitions: reps,
      timed_steps_per_repetition: steps,
      warmup_steps: warmup,
      runs_steps_per_s: {
        library: lib.map((v) => round(v)),
        js_ceiling: js.map((v) => round(v)),
        native: nat.map((v) => round(v)),
      },
      phase_ms_per_step: {
        note: "CPU ms per step by phase, from a separate run with CPU-clock reads around each phase",
        js_ceiling: ceilingPhases,
        native: nativePhases,
      },
      same_work_check: {
        note: SAME_WORK_NOTE,
        steps: checkSteps,
        tolerance: SAME_WORK_TOLERANCE,
        plan_max_abs_diff_library_vs_js_ceiling: maxAbsDiff(lib0.plan, js0.plan),
        plan_max_abs_diff_library_vs_native: nat0 ? maxAbsDiff(lib0.plan, nat0.plan) : null,
        state_max_abs_diff_library_vs_native: nat0 ? maxAbsDiff(lib0.state, nat0.state) : null,
        within_tolerance:
          maxRelDiff(lib0.plan, js0.plan) <= SAME_WORK_TOLERANCE &&
          (nat0 === null || maxRelDiff(lib0.plan, nat0.plan) <= SAME_WORK_TOLERANCE),
      },
      settings: {
        temperature: mc.temperature,
        noise: mc.noise,
        slice_size: SLICE,
        seed: SEED,
        bounds: {
          lower: Array.from(mc.problem.bounds.lower),
          upper: Array.from(mc.problem.bounds.upper),
        },
      },
    };
    models.push(entry);
    lines.push(
      `${mc.model} K=${SAMPLES} H=${HORIZON}: library ${round(libMed)} steps/s, JS ceiling ${round(jsMed)}, native ${natMed === null ? "skipped" : round(natMed)}; ratio ${entry.ratio ?? "n/a"} (JS ceiling ${entry.js_ceiling_ratio ?? "n/a"})`,
    );
  }

  const normals = samplerNs(ctx.quick ? 3 : 15);
  const mathCalls = ctx.quick ? 200_000 : 2_000_000;
  const mathReps = ctx.quick ? 2 : 5;
  const v8Math = v8MathNs(mathCalls, mathReps);
  const libm = native.ok ? runLibm(native.libmBinary, mathCalls, mathReps) : null;
  const trig = v8MathNs(mathCalls, mathReps, trigLoops);
  lines.push(
    `math ns/call (CPU time) V8 vs C library: ${Object.keys(v8Math)
      .map((k) => `${k} ${v8Math[k]}${libm ? ` vs ${libm[k]}` : ""}`)
      .join(", ")}`,
  );
  lines.push(
    `trig kernel ns per (sin, cos) pair (CPU time): ${Object.entries(trig)
      .map(([k, v]) => `${k} ${v}`)
      .join(", ")}`,
  );
  lines.push(
    `normals (ns/draw, CPU time, fastest of repetitions): ${Object.entries(normals)
      .map(([k, v]) => `${k} ${v}`)
      .join(", ")}`,
  );
  return {
    result: {
      native: native.ok
        ? { available: true, compiler: native.compiler, flags: native.flags }
        : { available: false, reason: native.reason },
      models,
      normal_sampler_ns_per_draw: normals,
      math_ns_per_call: {
        v8: v8Math,
        c_library: libm,
        trig_kernel: {
          note: "ns per (sin x, cos x) pair: kernels.sinCos of @recede/core vs Math.sin(x) + Math.cos(x); x = i·1e-3 as above, or random in [-4, 4]",
          ...trig,
        },
      },
      load_average_1min: { before: round(loadBefore, 3), after: round(loadavg()[0], 3) },
    },
    lines,
  };
}

/** The throughput suite (`pnpm bench throughput`). */
export const suite: Suite = {
  name: "throughput",
  description:
    "MPPI control steps/s (K=2000, H=50) on the bicycle and cart-pole: library vs hand-written C (gcc -O2) vs hand-written JS, alternating",
  run,
};
