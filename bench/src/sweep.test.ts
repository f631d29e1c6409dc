import { appendFileSync, existsSync, mkdtempSync, readdirSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { mergeResults } from "./cli.js";
import { writeSweepOutputs } from "./outputs.js";
import { currentMeta } from "./report.js";
import { readResults } from "./results.js";
import type { RunRecord } from "./run.js";
import { sortRecords, summarize } from "./summary.js";
import { planSweep, readSweepFile, runSweep, type SweepSource } from "./sweep.js";

const plugin = fileURLToPath(new URL("./testing/feedbackPlugin.ts", import.meta.url));

/** A small sweep: 2 problems, 4 optimizer entries (one from a plugin), 3 seeds — 27 runs. */
const source: SweepSource = {
  dir: tmpdir(),
  raw: {
    name: "small",
    plugins: [plugin],
    problems: [
      { problem: "double-integrator", initialNoise: 0.3, steps: 30 },
      { problem: "parcel-drone", steps: 40 },
    ],
    optimizers: [
      { label: "mppi-32", kind: "mppi", samples: 32, horizon: 8 },
      { kind: "nominal" },
      { kind: "lqr", only: ["double-integrator"] },
      { label: "pd", kind: "linear-feedback", gains: [1, 1.5], only: ["double-integrator"] },
    ],
    seeds: { first: 1, count: 3 },
  },
};
const TOTAL = (4 + 2) * 3;

const quiet = { write: () => true, isTTY: false };

/** Everything but the measured times. */
function outcome(r: RunRecord): Omit<RunRecord, "computeMedianMs" | "computeP95Ms" | "setupMs"> {
  const { computeMedianMs: _a, computeP95Ms: _b, setupMs: _c, ...rest } = r;
  return rest;
}

const fresh = (): string => mkdtempSync(join(tmpdir(), "recede-sweep-"));

let reference: RunRecord[] | undefined;
async function single(): Promise<RunRecord[]> {
  if (!reference) {
    const out = await runSweep(source, { outDir: fresh(), workers: 1, progress: quiet });
    expect(out.executed).toBe(TOTAL);
    reference = out.records;
  }
  return reference;
}

describe("runSweep", () => {
  it("runs every cell once and records what it promises", async () => {
    const recs = await single();
    expect(recs).toHaveLength(TOTAL);
    for (const r of recs) {
      expect(r.error).toBeUndefined();
      expect(r.costSeries.length).toBe(r.steps);
      expect(Number.isFinite(r.cost)).toBe(true);
      expect(r.computeMedianMs).toBeGreaterThanOrEqual(0);
      expect(r.computeP95Ms).toBeGreaterThanOrEqual(r.computeMedianMs);
    }
    const mppi = recs.find((r) => r.optimizer === "mppi-32")!;
    expect(mppi.samplesPerStep).toBe(32);
    // The tracked regret Σ (ℓ̂_t − min_i C_{t,i}) has one entry per step and never decreases
    // (the free energy is at least the least sampled cost).
    const reg = mppi.regret!;
    expect(reg).toHaveLength(mppi.steps);
    for (let t = 1; t < reg.length; t++) expect(reg[t]).toBeGreaterThanOrEqual(reg[t - 1]);
    expect(recs.find((r) => r.optimizer === "lqr")!.regret).toBeUndefined();
    // LQR is optimal for the double integrator's own quadratic cost: it beats the do-nothing baseline.
    const s = summarize(recs).outcomes;
    const cost = (o: string) =>
      s.find((g) => g.problem === "double-integrator" && g.optimizer === o)!.cost.mean;
    expect(cost("lqr")).toBeLessThan(cost("nominal"));
  });

  it("resumes: an interrupted sweep keeps its runs and the rerun skips them", async () => {
    const dir = fresh();
    const first = await runSweep(source, { outDir: dir, workers: 1, progress: quiet, maxRuns: 7 });
    expect(first.executed).toBe(7);
    expect(readResults(join(dir, "results.jsonl"))).toHaveLength(7);
    // A kill in the middle of a write leaves a cut line; it must be ignored, not fatal.
    appendFileSync(join(dir, "results.jsonl"), '{"key":"double-integr');
    const second = await runSweep(source, { outDir: dir, workers: 1, progress: quiet });
    expect(second.skipped).toBe(7);
    expect(second.executed).toBe(TOTAL - 7);
    expect(second.records.map(outcome)).toEqual((await single()).map(outcome));
    const third = await runSweep(source, { outDir: dir, workers: 1, progress: quiet });
    expect(third.executed).toBe(0);
  });

  it("re-runs cells whose configuration changed since the results were written", async () => {
    const dir = fresh();
    await runSweep(source, { outDir: dir, workers: 1, progress: quiet });
    const raw = structuredClone(source.raw) as { optimizers: Record<string, unknown>[] };
    raw.optimizers[0].samples = 16;
    const again = await runSweep(
      { raw, dir: source.dir },
      { outDir: dir, workers: 1, progress: quiet },
    );
    expect(again.executed).toBe(2 * 3); // the mppi entry on 2 problems × 3 seeds
    expect(again.records.find((r) => r.optimizer === "mppi-32")!.samplesPerStep).toBe(16);
  });

  it("merge(shards) gives the single-process summary bit for bit", async () => {
    const dirs = [fresh(), fresh(), fresh()];
    for (let i = 0; i < 3; i++)
      await runSweep(source, {
        outDir: dirs[i],
        workers: 1,
        progress: quiet,
        shard: { index: i, count: 3 },
      });
    const out = fresh();
    const merged = mergeResults([dirs[2], dirs[0], dirs[1]], out);
    const one = await single();
    expect(merged.map(outcome)).toEqual(sortRecords(one).map(outcome));
    // The deterministic part of the summary is identical as text (every bit of every number).
    const a = JSON.stringify(summarize(merged).outcomes);
    const b = JSON.stringify(summarize(one).outcomes);
    expect(a).toBe(b);
    // And the summary does not depend on record order.
    expect(JSON.stringify(summarize([...merged].reverse()))).toBe(
      JSON.stringify(summarize(merged)),
    );
    const files = await writeSweepOutputs(out, merged, currentMeta("test"), "merged");
    expect(existsSync(files.reportHtml)).toBe(true);
    expect(
      JSON.stringify(JSON.parse(readFileSync(files.summaryJson, "utf8")).summary.outcomes),
    ).toBe(a);
  });

  it("checks every entry against the built problem before running, naming the field", async () => {
    const raw = structuredClone(source.raw) as { optimizers: Record<string, unknown>[] };
    raw.optimizers[0].noise = [1, 2, 3];
    const dir = fresh();
    await expect(
      runSweep({ raw, dir: source.dir }, { outDir: dir, workers: 1, progress: quiet }),
    ).rejects.toThrow(
      /^optimizers\[0\]\.noise: on problem "double-integrator": mppi: noise must be of length 1/,
    );
    expect(existsSync(join(dir, "results.jsonl"))).toBe(false);
  });

  it("the example sweep files in bench/sweeps are valid", async () => {
    const dir = fileURLToPath(new URL("../sweeps/", import.meta.url));
    const files = readdirSync(dir).filter((f) => f.endsWith(".json"));
    expect(files.length).toBeGreaterThan(0);
    for (const f of files) {
      const plan = await planSweep(readSweepFile(join(dir, f)), undefined);
      expect(plan.runs.length, f).toBeGreaterThan(0);
    }
  });

  it("worker threads give the same results as one thread", async () => {
    const out = await runSweep(source, { outDir: fresh(), workers: 2, progress: quiet });
    expect(out.executed).toBe(TOTAL);
    expect(out.records.map(outcome)).toEqual((await single()).map(outcome));
  });
});
