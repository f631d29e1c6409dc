import fc from "fast-check";
import { describe, expect, it } from "vitest";
import type { RunRecord } from "./run.js";
import { summarize } from "./summary.js";

/** A synthetic record (the summary only reads these fields). */
function record(
  problem: string,
  optimizer: string,
  seed: number,
  episode: number,
  series: number[],
): RunRecord {
  return {
    key: `${problem}/${optimizer}/${seed}/${episode}`,
    problem,
    optimizer,
    seed,
    episode,
    config: "00000000",
    cost: series.reduce((a, b) => a + b, 0),
    success: series.length % 2 === 0,
    violations: seed % 3,
    dt: 0.1,
    steps: series.length,
    samplesPerStep: 64,
    computeMedianMs: 1,
    computeP95Ms: 2,
    setupMs: 0,
    costSeries: series,
    metrics: { m: series[0] ?? 0 },
  };
}

const records = fc
  .uniqueArray(
    fc.record({
      problem: fc.constantFrom("a", "b"),
      optimizer: fc.constantFrom("x", "y", "z"),
      seed: fc.integer({ min: 0, max: 5 }),
      episode: fc.integer({ min: 0, max: 1 }),
      series: fc.array(fc.double({ min: 0, max: 100, noNaN: true }), {
        minLength: 1,
        maxLength: 12,
      }),
    }),
    {
      selector: (r) => `${r.problem}/${r.optimizer}/${r.seed}/${r.episode}`,
      minLength: 1,
      maxLength: 30,
    },
  )
  .map((rs) => rs.map((r) => record(r.problem, r.optimizer, r.seed, r.episode, r.series)));

describe("summarize", () => {
  it("does not depend on the order of the records, bit for bit (property)", () => {
    fc.assert(
      fc.property(records, fc.integer(), (rs, salt) => {
        // A deterministic shuffle from the salt.
        const shuffled = rs
          .map((r, i) => ({ r, k: Math.imul(i + 1, 0x9e3779b1) ^ salt }))
          .sort((a, b) => a.k - b.k)
          .map((x) => x.r);
        expect(JSON.stringify(summarize(shuffled))).toBe(JSON.stringify(summarize(rs)));
      }),
      { numRuns: 100 },
    );
  });

  it("cost intervals contain their mean, and the best optimizer in hindsight has zero final regret (property)", () => {
    fc.assert(
      fc.property(records, (rs) => {
        const s = summarize(rs);
        for (const g of s.outcomes) {
          expect(g.cost.low).toBeLessThanOrEqual(g.cost.mean);
          expect(g.cost.high).toBeGreaterThanOrEqual(g.cost.mean);
          // Regret against the per-seed best in hindsight is ≥ 0 at the end of the episode.
          const last = g.regretCurve[g.regretCurve.length - 1];
          expect(last.mean).toBeGreaterThanOrEqual(-1e-9);
        }
      }),
      { numRuns: 100 },
    );
  });

  it("averages the episodes of a seed before taking the interval over seeds", () => {
    const rs = [
      record("p", "o", 1, 0, [1]),
      record("p", "o", 1, 1, [3]),
      record("p", "o", 2, 0, [6]),
    ];
    const g = summarize(rs).outcomes[0];
    // seed 1 → 2, seed 2 → 6: mean 4 over 2 seeds, sd = √8.
    expect(g.seeds).toBe(2);
    expect(g.cost.mean).toBe(4);
    expect(g.cost.sd).toBeCloseTo(Math.sqrt(8), 14);
  });
});
