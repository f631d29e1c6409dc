/**
 * Regret-tracker overhead on an MPPI control step, and the tracker's own per-round cost and
 * allocation.
 *
 * 1. Overhead: two MPPI controllers built identically (pendulum swing-up from @recede/problems,
 *    same seed, so they do identical work), one with a regret tracker attached, one without. Each
 *    repetition runs `steps` closed-loop control steps from the start state (plant = model);
 *    the two controllers step in lock-step, alternating which goes first, so drift in machine
 *    speed hits both sides equally. Reported: median ms per control step of each, the ratio of
 *    medians, the median of per-repetition wall-time ratios, the median of per-repetition
 *    process-CPU-time ratios (the target figure, ≤ 1.05: CPU time is not inflated when other
 *    processes deschedule this one), the ratio of the fastest steps, and — because the true
 *    overhead is far below timing noise — the cost of `record()` on the controller's own records
 *    replayed in a tight loop, as a fraction of a step. For the tracker in "summary" (the
 *    streaming mode) and "full" (per-round rows kept) histories.
 * 2. Per-round cost: `record` on synthetic rounds (d = 40, linear comparator over a box, two
 *    experts, adaptive window 100) in each history mode, ns per round.
 * 3. Allocation: heap growth over 10⁶ summary-mode rounds after a forced GC, with no GC in
 *    between (smallest of three trials) (the GC hook is obtained at run time through V8's `--expose-gc` flag; null if that
 *    fails).
 *
 * @module
 */
import { setFlagsFromString } from "node:v8";
import { runInNewContext } from "node:vm";
import { createStream } from "@recede/core";
import { mppi } from "@recede/mpc";
import { pendulum } from "@recede/problems";
import {
  boxDomain,
  createRegretTracker,
  type HistoryMode,
  type RegretTracker,
} from "@recede/regret";
import type { Suite, SuiteContext, SuiteOutput } from "../suite.js";

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const n = s.length;
  return n % 2 === 1 ? s[(n - 1) / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
}

interface OverheadResult {
  readonly history: HistoryMode;
  readonly repetitions: number;
  readonly stepsPerRepetition: number;
  readonly msPerStepWithout: number;
  readonly msPerStepWith: number;
  /** median(with) / median(without) over repetitions. */
  readonly ratioOfMedians: number;
  /** Median over repetitions of (wall time with)/(wall time without) within the repetition. */
  readonly medianPairRatio: number;
  /** Median over repetitions of (process CPU time with)/(CPU time without): the target figure. */
  readonly cpuTimeRatio: number;
  /** (fastest step with) / (fastest step without), over all timed steps. */
  readonly minStepRatio: number;
  /** `record()` on the controller's own RoundRecords, replayed in a tight loop. */
  readonly recordNsPerRound: number;
  /** recordNsPerRound / (msPerStepWithout · 10⁶): the overhead attributable to the tracker. */
  readonly attributedOverhead: number;
  readonly trackedRounds: number;
  readonly skippedRounds: number;
  readonly targetMet: boolean;
}

/**
 * Lock-step alternation: within a repetition the two controllers take their control steps in
 * turn (the order flips every step), each on its own copy of the closed loop, and each side's
 * time is summed. Load on the machine then hits both sides alike.
 */
function overhead(
  ctx: SuiteContext,
  history: HistoryMode,
  reps: number,
  steps: number,
): OverheadResult {
  const problem = pendulum();
  const make = () =>
    mppi({
      dynamics: problem.dynamics,
      cost: problem.cost,
      horizon: problem.horizon,
      samples: 256,
      temperature: 1,
      noise: 1,
      bounds: problem.bounds,
      seed: 11,
    });
  const plain = make();
  const tracked = make();
  const d = problem.horizon * problem.controlSize;
  const tracker = createRegretTracker({ dimension: d, history, invalidRounds: "skip" });
  tracker.attach(tracked);
  const xa = new Float64Array(problem.stateSize);
  const xb = new Float64Array(problem.stateSize);
  const fastest = [Number.POSITIVE_INFINITY, Number.POSITIVE_INFINITY];
  const repetition = (): [number, number, number] => {
    plain.reset();
    tracked.reset();
    xa.set(problem.initialState());
    xb.set(problem.initialState());
    let ta = 0;
    let tb = 0;
    let ca = 0;
    let cb = 0;
    for (let s = 0; s < steps; s++) {
      const first = s % 2 === 0;
      for (let side = 0; side < 2; side++) {
        const usePlain = (side === 0) === first;
        const ctrl = usePlain ? plain : tracked;
        const x = usePlain ? xa : xb;
        const c0 = process.cpuUsage();
        const t0 = performance.now();
        const { control } = ctrl.act(x);
        const dt = performance.now() - t0;
        const cu = process.cpuUsage(c0);
        const dc = cu.user + cu.system;
        problem.dynamics.step(x, 0, control, 0, 1, 0);
        if (usePlain) {
          ta += dt;
          ca += dc;
          fastest[0] = Math.min(fastest[0], dt);
        } else {
          tb += dt;
          cb += dc;
          fastest[1] = Math.min(fastest[1], dt);
        }
      }
    }
    return [ta / steps, tb / steps, cb / ca];
  };
  repetition(); // warm-up (JIT)
  repetition();
  tracker.reset();
  fastest[0] = Number.POSITIVE_INFINITY;
  fastest[1] = Number.POSITIVE_INFINITY;
  const a: number[] = [];
  const b: number[] = [];
  const pair: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < reps; r++) {
    const [ta, tb, rc] = repetition();
    a.push(ta);
    b.push(tb);
    pair.push(tb / ta);
    cpu.push(rc);
  }
  const tracked1 = tracker.rounds;
  const skipped = tracker.skippedRounds;

  // Replay: capture the controller's records (copies), then time record() alone on them.
  const records: { decision: Float64Array; loss: number }[] = [];
  const off = tracked.observe((r) => {
    records.push({ decision: r.decision.slice(), loss: r.loss });
  });
  tracked.reset();
  xb.set(problem.initialState());
  for (let s = 0; s < steps; s++) {
    const { control } = tracked.act(xb);
    problem.dynamics.step(xb, 0, control, 0, 1, 0);
  }
  off();
  const replay = createRegretTracker({ dimension: d, history: "summary", invalidRounds: "skip" });
  const passes = Math.max(1, Math.ceil(200_000 / records.length));
  for (const r of records) replay.record(r); // warm-up
  const t0 = performance.now();
  for (let p = 0; p < passes; p++) for (const r of records) replay.record(r);
  const recordNs = ((performance.now() - t0) * 1e6) / (passes * records.length);

  const ma = median(a);
  const mb = median(b);
  const attributed = recordNs / (ma * 1e6);
  ctx.log(
    `mppi K=256 H=${problem.horizon} history=${history}: ${ma.toFixed(3)} ms/step without, ${mb.toFixed(3)} with; CPU ×${median(cpu).toFixed(4)}, fastest ×${(fastest[1] / fastest[0]).toFixed(4)}, wall pairs ×${median(pair).toFixed(4)}; record() ${recordNs.toFixed(0)} ns = ${(100 * attributed).toFixed(3)}% of a step`,
  );
  return {
    history,
    repetitions: reps,
    stepsPerRepetition: steps,
    msPerStepWithout: ma,
    msPerStepWith: mb,
    ratioOfMedians: mb / ma,
    medianPairRatio: median(pair),
    cpuTimeRatio: median(cpu),
    minStepRatio: fastest[1] / fastest[0],
    recordNsPerRound: recordNs,
    attributedOverhead: attributed,
    trackedRounds: tracked1,
    skippedRounds: skipped,
    targetMet: median(cpu) <= 1.05,
  };
}

function syntheticTracker(history: HistoryMode, d: number): RegretTracker {
  return createRegretTracker({
    dimension: d,
    domain: boxDomain(-1, 1, d),
    experts: [new Float64Array(d).fill(0.5), new Float64Array(d).fill(-0.5)],
    adaptiveWindow: 100,
    history,
    window: 1000,
  });
}

function feed(tracker: RegretTracker, rounds: number, d: number, seed: number): number {
  const s = createStream(seed);
  const x = new Float64Array(d);
  const g = new Float64Array(d);
  s.fillUniform(x, 0, d);
  s.fillUniform(g, 0, d);
  const lossObject = {
    value: (u: Float64Array): number => {
      let v = 0;
      for (let i = 0; i < d; i++) v += g[i] * u[i];
      return v;
    },
    gradient: (_u: Float64Array, out: Float64Array): Float64Array => {
      out.set(g);
      return out;
    },
  };
  const input = { decision: x, gradient: g, loss: 0, lossObject };
  const t0 = performance.now();
  for (let t = 0; t < rounds; t++) {
    const j = t % d;
    g[j] = -g[j];
    x[j] = 0.5 * x[j] + 0.1;
    input.loss = g[j] * x[j];
    tracker.record(input);
  }
  return ((performance.now() - t0) * 1e6) / rounds;
}

function perRound(ctx: SuiteContext, rounds: number): Record<string, number> {
  const d = 40;
  const out: Record<string, number> = {};
  for (const h of ["summary", "window", "thinned", "full"] as const) {
    const tr = syntheticTracker(h, d);
    feed(tr, Math.min(rounds, 20_000), d, 1); // warm-up
    tr.reset();
    out[h] = feed(tr, rounds, d, 2);
    ctx.log(`record(), d=${d}, history=${h}: ${out[h].toFixed(0)} ns/round`);
  }
  return out;
}

function allocation(
  ctx: SuiteContext,
  rounds: number,
): { heapGrowthBytes: number | null; rounds: number; trials?: number[] } {
  let gc = (globalThis as { gc?: () => void }).gc;
  if (typeof gc !== "function") {
    try {
      setFlagsFromString("--expose-gc");
      gc = runInNewContext("gc") as () => void;
    } catch {
      gc = undefined;
    }
  }
  if (typeof gc !== "function") {
    ctx.log("allocation: no GC hook available; run node with --expose-gc");
    return { heapGrowthBytes: null, rounds };
  }
  const d = 40;
  const tr = syntheticTracker("summary", d);
  feed(tr, 50_000, d, 3);
  // Three trials; the smallest growth is reported (background compilation and GC bookkeeping of
  // the rest of the process can only add to it).
  const growth: number[] = [];
  let settled = 0;
  for (let trial = 0; trial < 3; trial++) {
    gc();
    const before = process.memoryUsage().heapUsed;
    feed(tr, rounds, d, 4 + trial);
    const after = process.memoryUsage().heapUsed; // no GC in between: growth = allocated bytes
    growth.push(after - before);
    gc();
    settled = process.memoryUsage().heapUsed - before;
  }
  const min = Math.min(...growth);
  ctx.log(
    `allocation over ${rounds} summary-mode rounds: heap +${growth.join(", +")} B in three trials (min ${min}); ${settled} B after GC`,
  );
  return { heapGrowthBytes: min, rounds, trials: growth };
}

export const suite: Suite = {
  name: "regret",
  description:
    "regret-tracker overhead on an MPPI control step (target ≤ 5%), per-round cost, allocation",
  async run(ctx: SuiteContext): Promise<SuiteOutput> {
    const reps = ctx.quick ? 6 : 30;
    const steps = ctx.quick ? 20 : 60;
    const summary = overhead(ctx, "summary", reps, steps);
    const full = overhead(ctx, "full", reps, steps);
    const record = perRound(ctx, ctx.quick ? 100_000 : 1_000_000);
    const alloc = allocation(ctx, ctx.quick ? 100_000 : 1_000_000);
    return {
      result: {
        overhead: { summary, full },
        recordNsPerRound: record,
        allocation: alloc,
      },
      lines: [
        `MPPI step with/without tracker (summary): CPU ×${summary.cpuTimeRatio.toFixed(4)}, fastest ×${summary.minStepRatio.toFixed(4)}, wall pairs ×${summary.medianPairRatio.toFixed(4)}, record() = ${(100 * summary.attributedOverhead).toFixed(3)}% of a step — target ≤ 1.05: ${summary.targetMet ? "met" : "NOT met"}`,
        `MPPI step with/without tracker (full): CPU ×${full.cpuTimeRatio.toFixed(4)}, fastest ×${full.minStepRatio.toFixed(4)}, wall pairs ×${full.medianPairRatio.toFixed(4)}, record() = ${(100 * full.attributedOverhead).toFixed(3)}% of a step`,
        `record() ns/round at d=40: summary ${record.summary.toFixed(0)}, window ${record.window.toFixed(0)}, thinned ${record.thinned.toFixed(0)}, full ${record.full.toFixed(0)}`,
        `heap growth over ${alloc.rounds} summary rounds: ${alloc.heapGrowthBytes === null ? "n/a (no GC hook)" : `${alloc.heapGrowthBytes} B (${(alloc.heapGrowthBytes / alloc.rounds).toFixed(3)} B/round)`}`,
      ],
    };
  },
};
