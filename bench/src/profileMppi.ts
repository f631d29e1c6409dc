/**
 * Profile the library's MPPI control step (the `mppi` preset of @recede/mpc, K = 2000, H = 50)
 * on the bicycle or the cart-pole of @recede/problems with V8's sampling CPU profiler, and print
 * where the time goes: self time per function, grouped into the phases of the step.
 *
 *   node --cpu-prof --cpu-prof-dir=out/profile bench/dist/profileMppi.js run bicycle 40
 *   node bench/dist/profileMppi.js summarize out/profile/CPU.*.cpuprofile
 *
 * `run` does 5 warm-up steps and then the given number of steps (default 60), printing ms/step;
 * `summarize` reads a .cpuprofile (also viewable in Chrome DevTools) and prints the tables.
 * The settings are those of the throughput suite. Not a suite: it prints tables for people.
 *
 * @module
 */
import { readFileSync } from "node:fs";
import { mppi } from "@recede/mpc";
import { bicycle, cartPole } from "@recede/problems";

interface ProfileNode {
  id: number;
  callFrame: { functionName: string; url: string; lineNumber: number };
  children?: number[];
}
interface CpuProfile {
  nodes: ProfileNode[];
  samples: number[];
  timeDeltas: number[];
}

/** Phase of the MPPI step a function belongs to (by name and file). */
function phaseOf(fn: string, url: string): string {
  const file = url.split("/").pop() ?? "";
  if (fn === "fillNormal" || fn === "normalSlow" || fn === "next32" || fn === "auxOpen01") {
    return "sampling: normals (core rng)";
  }
  if (file === "gaussian.js" && (fn === "sample" || fn === "sampleGaussianRows")) {
    return "sampling: μ + σ·z (plan.sample)";
  }
  if (fn === "clip") return "clipping";
  if (file === "bicycle.js" || file === "cartPole.js") {
    return fn === "step" || fn === "accel" ? "rollout: dynamics" : "rollout: other (problem)";
  }
  if (
    file === "quadraticCost.js" ||
    file === "stateLimitPenalty.js" ||
    file === "sumCosts.js" ||
    file === "problem.js" ||
    fn === "wrapAngle"
  ) {
    return "rollout: costs";
  }
  if (file === "rollout.js") return "rollout: engine (gather, checks)";
  if (fn === "weigh" || fn === "weighInto" || fn === "expWeights" || fn === "logSumExp") {
    return "weights";
  }
  if (fn === "update" || fn === "weightedSum" || fn === "gaussianDiagonalStep")
    return "mean update";
  if (fn === "apply" || fn === "sync") return "shift";
  if (file === "controller.js") return "controller (act, report, bookkeeping)";
  if (fn === "(garbage collector)") return "garbage collector";
  if (fn === "(program)" || fn === "(idle)" || fn === "(root)") return "other";
  if (
    fn === "sin" ||
    fn === "cos" ||
    fn === "tan" ||
    fn === "atan" ||
    fn === "exp" ||
    fn === "log"
  ) {
    return "math builtins (callers inlined)";
  }
  return "other";
}

function run(model: "bicycle" | "cart-pole", steps: number): void {
  const p = model === "bicycle" ? bicycle() : cartPole();
  const ctrl = mppi({
    dynamics: p.dynamics,
    cost: p.cost,
    horizon: 50,
    samples: 2000,
    temperature: 1,
    noise: model === "bicycle" ? [0.75, 0.3] : [4],
    bounds: p.bounds,
    seed: 7,
  });
  const x = p.initialState();
  const once = (): void => {
    const { control } = ctrl.act(x);
    p.dynamics.step(x, 0, control, 0, 1, 0);
  };
  for (let s = 0; s < 5; s++) once(); // warm-up (JIT)
  const t0 = performance.now();
  for (let s = 0; s < steps; s++) once();
  const ms = performance.now() - t0;
  process.stdout.write(
    `${model}: ${steps} steps, ${(ms / steps).toFixed(2)} ms/step, K=2000 H=50\n`,
  );
}

function summarize(path: string): void {
  const profile = JSON.parse(readFileSync(path, "utf8")) as CpuProfile;
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const selfUs = new Map<number, number>();
  profile.samples.forEach((id, i) => {
    selfUs.set(id, (selfUs.get(id) ?? 0) + (profile.timeDeltas[i] ?? 0));
  });
  const byFn = new Map<string, number>();
  const byPhase = new Map<string, number>();
  let total = 0;
  for (const [id, us] of selfUs) {
    const n = byId.get(id) as ProfileNode;
    const fn = n.callFrame.functionName || "(anonymous)";
    const url = n.callFrame.url;
    if (fn === "(idle)" || fn === "(program)" || fn === "(root)") continue; // not the step
    if (!url.includes("/dist/") && !url.includes("/src/") && !fn.startsWith("(")) {
      // node internals (module loading, I/O) before and after the run
      continue;
    }
    const key = `${fn} (${url.split("/").slice(-2).join("/")}:${n.callFrame.lineNumber + 1})`;
    byFn.set(key, (byFn.get(key) ?? 0) + us);
    const ph = phaseOf(fn, url);
    byPhase.set(ph, (byPhase.get(ph) ?? 0) + us);
    total += us;
  }
  const pct = (us: number): string => `${((100 * us) / total).toFixed(1).padStart(5)}%`;
  process.stdout.write(
    `${path}: ${(total / 1000).toFixed(0)} ms of samples in the library and bench code\n\nby phase:\n`,
  );
  for (const [k, us] of [...byPhase].sort((a, b) => b[1] - a[1])) {
    process.stdout.write(`  ${pct(us)}  ${k}\n`);
  }
  process.stdout.write("\ntop functions (self time):\n");
  for (const [k, us] of [...byFn].sort((a, b) => b[1] - a[1]).slice(0, 15)) {
    process.stdout.write(`  ${pct(us)}  ${k}\n`);
  }
}

async function main(): Promise<void> {
  const [mode, a, b] = process.argv.slice(2);
  if (mode === "run") run(a === "cart-pole" ? "cart-pole" : "bicycle", Number(b ?? 60));
  else if (mode === "summarize" && a) summarize(a);
  else {
    process.stderr.write(
      "usage: node --cpu-prof bench/dist/profileMppi.js run [bicycle|cart-pole] [steps]\n       node bench/dist/profileMppi.js summarize FILE.cpuprofile\n",
    );
    process.exitCode = 2;
  }
}

main().catch((e: unknown) => {
  process.stderr.write(`${e instanceof Error ? e.stack : String(e)}\n`);
  process.exitCode = 1;
});
