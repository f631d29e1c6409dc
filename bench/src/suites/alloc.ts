/**
 * Allocation suite: bytes allocated on the JavaScript heap per MPPI control step after warm-up,
 * shown by running 1e5 control steps of the library's `mppi` preset (closed loop on the
 * problem's own model) and reporting heap growth.
 *
 * Method. The measurement runs in a child process started with `node --expose-gc` (so it can
 * force full collections) and a large young generation (`--min-semi-space-size=128
 * --max-semi-space-size=128`, so that allocation of up to about 1 kB per step triggers no
 * collection during the run), in these phases per model:
 *  1. build the controller and run `warmup` steps (JIT compilation, lazily sized buffers);
 *  2. `gc()` twice, read `process.memoryUsage().heapUsed` = h₀ and start counting garbage
 *     collections with a `PerformanceObserver` on "gc" entries;
 *  3. run N = 1e5 steps (nothing else runs in the process), read h₁;
 *  4. let the observer deliver its entries and count the collections that happened during step 3.
 * V8 allocates new objects by bumping a pointer in the young generation, so every allocated byte
 * shows in heapUsed until a collection runs. If no collection ran during the N steps,
 * (h₁ − h₀)/N is exactly the bytes allocated per step (up to the few bytes of the two
 * measurement calls themselves); if collections ran, the difference is only a lower bound and the
 * count says so. Then `gc()` again gives the retained growth h₂ − h₀ (a leak check).
 * A positive control runs the same loop (1e4 steps) plus one `new Float64Array(8)` per step, to show
 * the method sees a small per-step allocation.
 *
 * Sizes: K = 64 samples, H = 20 steps (chosen so 1e5 steps per model finish in well under a
 * minute on the benchmark machine; the code path is the same as at K = 2000, H = 50).
 *
 * @module
 */
import { spawnSync } from "node:child_process";
import { PerformanceObserver } from "node:perf_hooks";
import { fileURLToPath, pathToFileURL } from "node:url";
import { createRollout, exponentialUtility, gaussianPlan, mppi, shiftPlan } from "@recede/mpc";
import { bicycle, cartPole } from "@recede/problems";
import type { Suite, SuiteContext, SuiteOutput } from "../suite.js";

const SAMPLES = 64;
const HORIZON = 20;
const STEPS = 100_000;
const QUICK_STEPS = 10_000;
const WARMUP = 2_000;

type ModelName = "bicycle" | "cart-pole";

/**
 * Child flags: `--expose-gc` for forced collections, and a 128 MB young generation (V8's
 * semi-space size in MB) so no scavenge interrupts the count unless a step allocates more than
 * about a kilobyte.
 */
const CHILD_FLAGS = ["--expose-gc", "--min-semi-space-size=128", "--max-semi-space-size=128"];

interface ChildResult {
  model: string;
  control: boolean;
  samples: number;
  horizon: number;
  warmup: number;
  steps: number;
  seconds: number;
  heap_used_before: number;
  heap_used_after: number;
  heap_growth_bytes: number;
  bytes_per_step: number;
  gc_during_steps: number;
  exact: boolean;
  retained_growth_after_gc_bytes: number;
}

async function child(model: ModelName, steps: number, control: boolean): Promise<ChildResult> {
  const gc = (globalThis as { gc?: () => void }).gc;
  if (typeof gc !== "function") throw new Error("alloc child: run with node --expose-gc");
  const p = model === "bicycle" ? bicycle() : cartPole();
  const noise = model === "bicycle" ? [0.75, 0.3] : [4];
  const ctrl = mppi({
    dynamics: p.dynamics,
    cost: p.cost,
    horizon: HORIZON,
    samples: SAMPLES,
    temperature: 1,
    noise,
    bounds: p.bounds,
    seed: 3,
  });
  const x0 = p.initialState();
  const x = p.initialState();
  const keep: Float64Array[] = [];
  const stepOnce = (s: number): void => {
    // Restart the episode every 200 steps so the state stays in a realistic range.
    if (s % 200 === 0) x.set(x0);
    const { control: u } = ctrl.act(x);
    p.dynamics.step(x, 0, u, 0, 1, 0);
    if (control) {
      const a = new Float64Array(8);
      if (s === -1) keep.push(a); // never true: the array dies young
    }
  };
  for (let s = 0; s < WARMUP; s++) stepOnce(s);
  // Record every collection's start time; count those inside the timed window afterwards, so
  // late delivery of the observer's entries cannot mix up the forced and the spontaneous ones.
  const gcStarts: number[] = [];
  const obs = new PerformanceObserver((list) => {
    for (const e of list.getEntries()) gcStarts.push(e.startTime);
  });
  obs.observe({ entryTypes: ["gc"] });
  gc();
  gc();
  const h0 = process.memoryUsage().heapUsed;
  const t0 = performance.now();
  for (let s = 0; s < steps; s++) stepOnce(s);
  const t1 = performance.now();
  const h1 = process.memoryUsage().heapUsed;
  const seconds = (t1 - t0) / 1000;
  await new Promise((r) => setTimeout(r, 50)); // let the observer deliver
  obs.disconnect();
  const gcs = gcStarts.filter((t) => t >= t0 && t <= t1).length;
  gc();
  gc();
  const h2 = process.memoryUsage().heapUsed;
  return {
    model,
    control,
    samples: SAMPLES,
    horizon: HORIZON,
    warmup: WARMUP,
    steps,
    seconds: Number(seconds.toFixed(3)),
    heap_used_before: h0,
    heap_used_after: h1,
    heap_growth_bytes: h1 - h0,
    bytes_per_step: (h1 - h0) / steps,
    gc_during_steps: gcs,
    exact: gcs === 0,
    retained_growth_after_gc_bytes: h2 - h0,
  };
}

/**
 * Where the bytes come from: the same measurement (heapUsed growth over `calls` calls after
 * warm-up, in the 128 MB young generation) for each generic part of the MPPI step called on its
 * own, and for `act` as a whole.
 */
async function childParts(model: ModelName, calls: number): Promise<Record<string, number>> {
  const gc = (globalThis as { gc?: () => void }).gc as () => void;
  const p = model === "bicycle" ? bicycle() : cartPole();
  const m = p.controlSize;
  const noise = model === "bicycle" ? [0.75, 0.3] : [4];
  const { lower, upper } = p.bounds;
  const rollout = createRollout({
    dynamics: p.dynamics,
    cost: p.cost,
    samples: SAMPLES,
    horizon: HORIZON,
    lower,
    upper,
  });
  const plan = gaussianPlan({ std: noise }).create({
    horizon: HORIZON,
    controlSize: m,
    samples: SAMPLES,
    lower,
    upper,
    caller: "alloc",
  });
  const loss = exponentialUtility({ temperature: 1 });
  const shift = shiftPlan();
  const ctrl = mppi({
    dynamics: p.dynamics,
    cost: p.cost,
    horizon: HORIZON,
    samples: SAMPLES,
    temperature: 1,
    noise,
    bounds: p.bounds,
    seed: 3,
  });
  const { createStream } = await import("@recede/core");
  const stream = createStream(1);
  const buf = new Float64Array(SAMPLES * HORIZON * m);
  const w = new Float64Array(SAMPLES);
  const x0 = p.initialState();
  const parts: Record<string, () => void> = {
    "plan.sample (fillNormal + μ + σz)": () => plan.sample(stream, 0, SAMPLES, buf),
    "rollout.clip": () => rollout.clip(buf, 0, SAMPLES),
    "rollout.run": () => {
      rollout.run(x0, buf, 0, SAMPLES);
    },
    "loss.weigh": () => {
      loss.weigh(rollout.costs, SAMPLES, w);
    },
    "plan.update": () => plan.update(buf, SAMPLES, w, true, 1),
    "shift.apply": () => shift.apply(plan, 1),
    "controller.act (whole step)": () => {
      ctrl.act(x0);
    },
  };
  const out: Record<string, number> = {};
  for (const [name, f] of Object.entries(parts)) {
    for (let i = 0; i < calls; i++) f();
    gc();
    const h0 = process.memoryUsage().heapUsed;
    for (let i = 0; i < calls; i++) f();
    const h1 = process.memoryUsage().heapUsed;
    out[name] = Number(((h1 - h0) / calls).toFixed(2));
  }
  return out;
}

function spawnParts(model: ModelName, calls: number): Record<string, number> {
  const self = fileURLToPath(import.meta.url);
  const args = [...CHILD_FLAGS, self, "--alloc-child", model, String(calls), "parts"];
  const r = spawnSync(process.execPath, args, { encoding: "utf8" });
  if (r.error || r.status !== 0) {
    throw new Error(`alloc parts child failed (${model}): ${r.error?.message ?? r.stderr.trim()}`);
  }
  return JSON.parse(r.stdout.trim().split("\n").pop() as string) as Record<string, number>;
}

function spawnChild(model: ModelName, steps: number, control: boolean): ChildResult {
  const self = fileURLToPath(import.meta.url);
  const args = [
    ...CHILD_FLAGS,
    self,
    "--alloc-child",
    model,
    String(steps),
    control ? "control" : "library",
  ];
  const r = spawnSync(process.execPath, args, { encoding: "utf8" });
  if (r.error || r.status !== 0) {
    throw new Error(`alloc child failed (${model}): ${r.error?.message ?? r.stderr.trim()}`);
  }
  return JSON.parse(r.stdout.trim().split("\n").pop() as string) as ChildResult;
}

async function run(ctx: SuiteContext): Promise<SuiteOutput> {
  const steps = ctx.quick ? QUICK_STEPS : STEPS;
  const results: ChildResult[] = [];
  const lines: string[] = [];
  for (const model of ["bicycle", "cart-pole"] as const) {
    for (const control of [false, true]) {
      // The positive control only has to show that a small per-step allocation is seen.
      const n = control ? Math.max(1000, steps / 10) : steps;
      ctx.log(
        `${model}${control ? " (positive control: +1 Float64Array(8) per step)" : ""}: ${n} steps…`,
      );
      const r = spawnChild(model, n, control);
      results.push(r);
      lines.push(
        `${model}${control ? " control" : ""} K=${SAMPLES} H=${HORIZON}: ${r.bytes_per_step.toFixed(3)} bytes/step over ${n} steps (heap +${r.heap_growth_bytes} B, ${r.gc_during_steps} GCs during the run${r.exact ? ", exact" : ", lower bound"}; retained after gc ${r.retained_growth_after_gc_bytes} B) in ${r.seconds} s`,
      );
    }
  }
  const parts: Record<string, Record<string, number>> = {};
  const calls = ctx.quick ? 5_000 : 20_000;
  for (const model of ["bicycle", "cart-pole"] as const) {
    ctx.log(`${model}: bytes per call of each part (${calls} calls each)…`);
    parts[model] = spawnParts(model, calls);
    lines.push(
      `${model} per part (B/call): ${Object.entries(parts[model])
        .map(([k, v]) => `${k} ${v}`)
        .join(", ")}`,
    );
  }
  return {
    result: {
      method:
        "child process with --expose-gc and a 128 MB semi-space; heapUsed before/after N steps after warm-up and two forced GCs; GCs during the run counted with a PerformanceObserver (0 GCs ⇒ growth/N is the exact allocation per step); positive control (1e4 steps) adds one Float64Array(8) per step",
      child_flags: CHILD_FLAGS,
      samples: SAMPLES,
      horizon: HORIZON,
      steps,
      warmup: WARMUP,
      runs: results,
      bytes_per_call_by_part: parts,
      bytes_per_call_by_part_calls: calls,
    },
    lines,
  };
}

/** The allocation suite (`pnpm bench alloc`). */
export const suite: Suite = {
  name: "alloc",
  description: `heap bytes allocated per MPPI control step after warm-up (1e5 steps, K=${SAMPLES}, H=${HORIZON}; bicycle and cart-pole)`,
  run,
};

// Child-process entry: node --expose-gc alloc.js --alloc-child <model> <steps> <library|control|parts>
if (
  process.argv[2] === "--alloc-child" &&
  import.meta.url === pathToFileURL(process.argv[1]).href
) {
  const [model, steps, kind] = process.argv.slice(3);
  const job =
    kind === "parts"
      ? childParts(model as ModelName, Number(steps))
      : child(model as ModelName, Number(steps), kind === "control");
  job.then(
    (r) => process.stdout.write(`${JSON.stringify(r)}\n`),
    (e: unknown) => {
      process.stderr.write(`${e instanceof Error ? e.stack : String(e)}\n`);
      process.exitCode = 1;
    },
  );
}
