/**
 * Allocation suite: bytes allocated on the JavaScript heap per control step after warm-up, for the
 * library's `mppi` preset, its `cem` preset and the composed `leanMppi` variant, on the bicycle and
 * the cart-pole (closed loop: the controller acts, a separate instance of the problem's model
 * advances the state), in two configurations:
 *  - "1e5 steps": K = 64 samples, H = 20, 1e5 control steps for `mppi` (2·10⁴ for the other two);
 *  - "real": K = 2000, H = 50 (the throughput configuration), 2000 steps of `mppi` on both models,
 *    300 of `cem` and `leanMppi` on the cart-pole (2–3 mirror steps per control step).
 *
 * Method. Each measurement runs in a fresh child process `node --expose-gc
 * --min-semi-space-size=128 --max-semi-space-size=128 --trace-opt --trace-deopt`, and every
 * measurement runs in `PROCESSES` (≥ 2) such processes; the figure reported is the maximum, so that
 * "zero" cannot come from one process's lucky inlining decisions. In the child:
 *  1. build the controller; run `warmup` steps in ten calls of the measured loop function (so V8
 *     compiles that function itself before the window, not during it);
 *  2. start recording collections with a `PerformanceObserver` on "gc" entries; `gc()` twice; run
 *     `warmup`/10 more steps (a full collection can discard optimized code that referred to dead
 *     objects: it is re-optimized here, not in the window);
 *  3. measure an empty window twice (the measurement's own bytes, reported as `empty_window_bytes`);
 *  4. print a window-start marker, read `process.memoryUsage().heapUsed` = h₀, run N/2 steps, read
 *     it again (a steady per-step cost shows in both halves, a one-time cost in one), run N/2 more,
 *     read h₁, print a window-end marker;
 *  5. count the collections that started inside the window; `gc()` twice more for the retained
 *     growth h₂ − h₀ (a leak check).
 * V8 allocates new objects by bumping a pointer in the young generation (128 MB here), so every
 * allocated byte shows in `heapUsed` until a collection runs: with no collection in the window,
 * (h₁ − h₀)/N is exactly the bytes allocated per step, up to the few bytes of the measurement calls.
 * The parent reads V8's `--trace-opt`/`--trace-deopt` lines between the two markers and reports
 * how many functions V8 compiled (tier-ups) and deoptimized inside the window: compiling allocates
 * on the heap once (feedback, code metadata), and a deoptimized function runs unoptimized, boxing
 * doubles, until it is re-optimized. Some one-time costs print no trace line (baseline compiles,
 * inline-cache updates): the two halves separate those from a steady per-step cost, which shows
 * equally in both.
 *
 * `--quick` divides steps and warm-ups by 10: a smoke test only (100 warm-up steps at K = 2000 leave
 * `act` unoptimized, about 300 B per step), its figures say nothing about the target.
 *
 * Positive controls (same loop, bicycle, `mppi`): one `new Float64Array(8)` per step (1e4 steps at
 * K = 64), and one boxed double per step (a non-integer stored into an array of tagged elements:
 * 16 bytes; 1e4 steps at K = 64 and 200 at K = 2000). Both must show up.
 *
 * @module
 */
import { spawn } from "node:child_process";
import { PerformanceObserver } from "node:perf_hooks";
import { fileURLToPath, pathToFileURL } from "node:url";
import { type Controller, cem, leanMppi, mppi } from "@recede/mpc";
import { bicycle, cartPole, type Problem } from "@recede/problems";
import type { Suite, SuiteContext, SuiteOutput } from "../suite.js";

/** Fresh processes per measurement (the reported figure is their maximum). */
const PROCESSES = 2;

type ModelName = "bicycle" | "cart-pole";
type Variant = "mppi" | "cem" | "lean-mppi";
type Control = "none" | "float64array" | "boxed-double";

/** One measurement, run in a child process. */
interface Job {
  readonly config: string;
  readonly model: ModelName;
  readonly variant: Variant;
  readonly samples: number;
  readonly horizon: number;
  readonly warmup: number;
  readonly steps: number;
  readonly control: Control;
}

/** What a child reports (plus what the parent reads from the V8 trace). */
interface ChildResult extends Job {
  seconds: number;
  heap_used_before: number;
  heap_used_after: number;
  heap_growth_bytes: number;
  bytes_per_step: number;
  /** The same over the first and the second half of the window (the midpoint reading counts in the second). */
  bytes_per_step_halves: [number, number];
  gc_during_steps: number;
  exact: boolean;
  retained_growth_after_gc_bytes: number;
  /** Heap growth of the same window around zero steps (the measurement's own allocation). */
  empty_window_bytes: number;
  /** Functions V8 finished optimizing inside the window (from --trace-opt). */
  tier_ups_in_window: number;
  /** Deoptimizations inside the window (from --trace-deopt). */
  deopts_in_window: number;
  /** The functions named in those events (deduplicated). */
  window_events: string[];
}

/**
 * Child flags: `--expose-gc` for forced collections; a 128 MB young generation (V8's semi-space
 * size in MB) so no scavenge interrupts the count unless a step allocates more than about a
 * kilobyte (K = 64) or 60 kB (K = 2000); V8's optimization and deoptimization traces.
 */
const CHILD_FLAGS = [
  "--expose-gc",
  "--min-semi-space-size=128",
  "--max-semi-space-size=128",
  "--trace-opt",
  "--trace-deopt",
];

/** Objects the child keeps reachable until it exits. */
const alive: unknown[] = [];

const START = "@@recede-alloc-window-start";
const END = "@@recede-alloc-window-end";
const RESULT = "@@recede-alloc-result ";

function noiseOf(model: ModelName): number[] {
  return model === "bicycle" ? [0.75, 0.3] : [4];
}

function buildController(job: Job, p: Problem): Controller {
  const common = {
    dynamics: p.dynamics,
    cost: p.cost,
    horizon: job.horizon,
    samples: job.samples,
    bounds: p.bounds,
    seed: 3,
  };
  const noise = noiseOf(job.model);
  if (job.variant === "mppi") return mppi({ ...common, temperature: 1, noise });
  if (job.variant === "cem") return cem({ ...common, std: noise });
  // leanMppi measures wall time by default (two clock reads, 32 B per step, documented): off here.
  return leanMppi({ ...common, noise, timing: false });
}

/** What the child measures itself (the parent adds the job and the trace counts). */
type ChildMeasurement = Omit<
  ChildResult,
  keyof Job | "tier_ups_in_window" | "deopts_in_window" | "window_events"
>;

async function child(job: Job): Promise<ChildMeasurement> {
  const gc = (globalThis as { gc?: () => void }).gc;
  if (typeof gc !== "function") throw new Error("alloc child: run with node --expose-gc");
  const make = job.model === "bicycle" ? bicycle : cartPole;
  const p = make();
  // The plant: a separate instance of the same model, stepped once per control step. Both
  // instances stay reachable (`alive`): optimized code may refer weakly to objects of either,
  // and a forced collection that freed them would throw that code away just before the window.
  const plantProblem = make();
  const plant = plantProblem.dynamics;
  alive.push(p, plantProblem);
  const ctrl = buildController(job, p);
  const x0 = p.initialState();
  const x = p.initialState();
  const control = job.control === "float64array" ? 1 : job.control === "boxed-double" ? 2 : 0;
  // Controls write here; `sink` holds an object too, so its elements are tagged and a double
  // stored into it is boxed (a fresh 16-byte heap number per step).
  const sink: unknown[] = [{}, 0];
  const loop = (first: number, n: number): void => {
    for (let s = first; s < first + n; s++) {
      // Restart the episode every 200 steps so the state stays in a realistic range.
      if (s % 200 === 0) x.set(x0);
      const u = ctrl.act(x).control;
      plant.step(x, 0, u, 0, 1, 0);
      if (control === 1) sink[1] = new Float64Array(8);
      else if (control === 2) sink[1] = s + 0.5;
    }
  };
  const chunk = Math.ceil(job.warmup / 10);
  for (let c = 0; c < 10; c++) loop(c * chunk, chunk);
  // Record every collection's start time; count those inside the window afterwards, so late
  // delivery of the observer's entries cannot mix up the forced and the spontaneous ones.
  const gcStarts: number[] = [];
  const obs = new PerformanceObserver((list) => {
    for (const e of list.getEntries()) gcStarts.push(e.startTime);
  });
  obs.observe({ entryTypes: ["gc"] });
  gc();
  gc();
  // One more warm-up chunk after the collections (which may have discarded optimized code that
  // referred to dead objects), so that V8 re-optimizes such code before the window, not in it.
  loop(10 * chunk, chunk);
  const first = 11 * chunk;
  // Calibration: the same window around zero steps, twice (the first absorbs one-time setup of the
  // measurement calls), so the report can say how much of a tiny figure is the measurement's own.
  let emptyBytes = 0;
  for (let c = 0; c < 2; c++) {
    const e0 = process.memoryUsage().heapUsed;
    const et0 = performance.now();
    loop(first, 0);
    const et1 = performance.now();
    const e1 = process.memoryUsage().heapUsed;
    if (et1 < et0) throw new Error("alloc child: clock went backwards");
    emptyBytes = e1 - e0;
  }
  process.stdout.write(`${START}\n`);
  const h0 = process.memoryUsage().heapUsed;
  const t0 = performance.now();
  // Two halves: a steady per-step cost shows equally in both, a one-time cost in one only.
  const half = Math.floor(job.steps / 2);
  loop(first, half);
  const hm = process.memoryUsage().heapUsed;
  loop(first + half, job.steps - half);
  const t1 = performance.now();
  const h1 = process.memoryUsage().heapUsed;
  process.stdout.write(`${END}\n`);
  await new Promise((r) => setTimeout(r, 50)); // let the observer deliver
  obs.disconnect();
  const gcs = gcStarts.filter((t) => t >= t0 && t <= t1).length;
  gc();
  gc();
  const h2 = process.memoryUsage().heapUsed;
  return {
    seconds: Number(((t1 - t0) / 1000).toFixed(3)),
    heap_used_before: h0,
    heap_used_after: h1,
    heap_growth_bytes: h1 - h0,
    bytes_per_step: (h1 - h0) / job.steps,
    bytes_per_step_halves: [(hm - h0) / half, (h1 - hm) / (job.steps - half)],
    gc_during_steps: gcs,
    exact: gcs === 0,
    retained_growth_after_gc_bytes: h2 - h0,
    empty_window_bytes: emptyBytes,
  };
}

/** Run one job in a fresh process; parse its result and the V8 trace lines inside the window. */
function spawnChild(job: Job): Promise<ChildResult> {
  const self = fileURLToPath(import.meta.url);
  const args = [...CHILD_FLAGS, self, "--alloc-child", JSON.stringify(job)];
  return new Promise((resolve, reject) => {
    const proc = spawn(process.execPath, args, { stdio: ["ignore", "pipe", "pipe"] });
    let out = "";
    let err = "";
    proc.stdout.setEncoding("utf8");
    proc.stderr.setEncoding("utf8");
    proc.stdout.on("data", (d: string) => {
      out += d;
    });
    proc.stderr.on("data", (d: string) => {
      err += d;
    });
    proc.on("error", reject);
    proc.on("close", (code) => {
      const lines = out.split("\n");
      const resultLine = lines.find((l) => l.startsWith(RESULT));
      if (code !== 0 || resultLine === undefined) {
        reject(new Error(`alloc child failed (${JSON.stringify(job)}): ${err.trim()}`));
        return;
      }
      const a = lines.indexOf(START);
      const b = lines.indexOf(END);
      const inside = a >= 0 && b > a ? lines.slice(a + 1, b) : [];
      let tierUps = 0;
      let deopts = 0;
      const events = new Set<string>();
      const name = (l: string): string => /<JSFunction ([^ >]*)/.exec(l)?.[1] || "(anonymous)";
      for (const l of inside) {
        if (l.startsWith("[completed optimizing")) {
          tierUps++;
          events.add(`optimized ${name(l)}`);
        } else if (l.startsWith("[bailout")) {
          deopts++;
          events.add(`deoptimized ${name(l)} (${/reason: ([^)]*)/.exec(l)?.[1] ?? "?"})`);
        } else if (l.startsWith("[marking dependent code")) {
          // Optimized code discarded (e.g. a map or weak reference it relied on changed).
          deopts++;
          events.add(`discarded code (${/reason: ([^\]]*)/.exec(l)?.[1] ?? "?"})`);
        }
      }
      const r = JSON.parse(resultLine.slice(RESULT.length)) as ChildMeasurement;
      resolve({
        ...job,
        ...r,
        tier_ups_in_window: tierUps,
        deopts_in_window: deopts,
        window_events: [...events],
      });
    });
  });
}

/** Run `PROCESSES` fresh processes of the same job side by side (one per core). */
function measure(job: Job): Promise<ChildResult[]> {
  return Promise.all(Array.from({ length: PROCESSES }, () => spawnChild(job)));
}

function describe(runs: readonly ChildResult[]): string {
  const j = runs[0];
  const max = Math.max(...runs.map((r) => r.bytes_per_step));
  const each = runs
    .map((r) => {
      const ev =
        r.tier_ups_in_window + r.deopts_in_window === 0
          ? "no tier-up or deopt"
          : `${r.tier_ups_in_window} tier-ups, ${r.deopts_in_window} deopts: ${r.window_events.join(", ")}`;
      const halves = r.bytes_per_step_halves.map((v) => v.toFixed(3)).join(" / ");
      return `${r.bytes_per_step.toFixed(3)} (halves ${halves}; ${r.gc_during_steps} GCs${r.exact ? ", exact" : ", lower bound"}; ${ev}; empty window ${r.empty_window_bytes} B; retained ${r.retained_growth_after_gc_bytes} B)`;
    })
    .join(" | ");
  const what = j.control === "none" ? j.variant : `${j.variant} + control ${j.control}`;
  return `${j.config} ${j.model} ${what} K=${j.samples} H=${j.horizon}, ${j.steps} steps: max ${max.toFixed(3)} B/step over ${runs.length} processes [${each}]`;
}

async function run(ctx: SuiteContext): Promise<SuiteOutput> {
  const q = ctx.quick ? 10 : 1;
  const jobs: Job[] = [];
  // K = 64, H = 20: every model × variant, and both positive controls.
  const small = { config: "1e5 steps", samples: 64, horizon: 20, warmup: 10_000 / q } as const;
  for (const model of ["bicycle", "cart-pole"] as const) {
    for (const variant of ["mppi", "cem", "lean-mppi"] as const) {
      const steps = (variant === "mppi" ? 100_000 : 20_000) / q;
      jobs.push({ ...small, model, variant, steps, control: "none" });
    }
  }
  for (const control of ["float64array", "boxed-double"] as const) {
    jobs.push({ ...small, model: "bicycle", variant: "mppi", steps: 10_000 / q, control });
  }
  // K = 2000, H = 50: mppi on both models, the two composed controllers on the cart-pole (the
  // cheaper model: one step of cem takes 3 mirror steps), the 16-byte control. The warm-up is
  // 1000 steps because `act` runs once per step: V8 optimizes it only after about 650–850 calls
  // (measured with --trace-opt for all three controllers), whatever K is.
  const real = { config: "real", samples: 2000, horizon: 50, warmup: 1000 / q } as const;
  jobs.push({ ...real, model: "bicycle", variant: "mppi", steps: 2000 / q, control: "none" });
  jobs.push({ ...real, model: "cart-pole", variant: "mppi", steps: 2000 / q, control: "none" });
  jobs.push({ ...real, model: "cart-pole", variant: "cem", steps: 300 / q, control: "none" });
  jobs.push({ ...real, model: "cart-pole", variant: "lean-mppi", steps: 300 / q, control: "none" });
  jobs.push({
    ...real,
    model: "bicycle",
    variant: "mppi",
    steps: 200 / q,
    control: "boxed-double",
  });
  const all: ChildResult[][] = [];
  const lines: string[] = [];
  for (const job of jobs) {
    ctx.log(
      `${job.config}: ${job.model} ${job.variant}${job.control === "none" ? "" : ` + control ${job.control}`}, K=${job.samples} H=${job.horizon}, ${job.steps} steps × ${PROCESSES} processes…`,
    );
    const runs = await measure(job);
    all.push(runs);
    lines.push(describe(runs));
  }
  const summary = all.map((runs) => ({
    config: runs[0].config,
    model: runs[0].model,
    variant: runs[0].variant,
    control: runs[0].control,
    samples: runs[0].samples,
    horizon: runs[0].horizon,
    steps: runs[0].steps,
    max_bytes_per_step: Math.max(...runs.map((r) => r.bytes_per_step)),
    bytes_per_step_by_process: runs.map((r) => r.bytes_per_step),
    bytes_per_step_halves_by_process: runs.map((r) => r.bytes_per_step_halves),
    all_exact: runs.every((r) => r.exact),
    events_in_window: runs.map((r) => r.tier_ups_in_window + r.deopts_in_window),
    empty_window_bytes: runs.map((r) => r.empty_window_bytes),
  }));
  return {
    result: {
      method:
        "each measurement in ≥ 2 fresh child processes (reported: the maximum); child: --expose-gc, 128 MB semi-space, --trace-opt --trace-deopt; warm-up steps in ten calls of the measured loop, two forced GCs, one more warm-up chunk, then heapUsed before/after N closed-loop steps; GCs in the window counted with a PerformanceObserver (0 ⇒ growth/N is the exact allocation per step); V8 tier-ups and deopts in the window counted from the trace (one-time allocation); positive controls add one Float64Array(8) or one boxed double per step",
      child_flags: CHILD_FLAGS,
      processes_per_measurement: PROCESSES,
      summary,
      runs: all.flat(),
    },
    lines,
  };
}

/** The allocation suite (`pnpm bench alloc`). */
export const suite: Suite = {
  name: "alloc",
  description:
    "heap bytes allocated per control step after warm-up (mppi, cem, leanMppi on bicycle and cart-pole; K=64 H=20 for 1e5 steps and K=2000 H=50; each in 2 fresh processes, max reported)",
  run,
};

// Child-process entry: node --expose-gc … alloc.js --alloc-child '<job JSON>'
if (
  process.argv[2] === "--alloc-child" &&
  import.meta.url === pathToFileURL(process.argv[1]).href
) {
  const job = JSON.parse(process.argv[3]) as Job;
  child(job).then(
    (r) => process.stdout.write(`${RESULT}${JSON.stringify(r)}\n`),
    (e: unknown) => {
      process.stderr.write(`${e instanceof Error ? e.stack : String(e)}\n`);
      process.exitCode = 1;
    },
  );
}
