import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { builtinRegistry } from "./builtins.js";
import { SpecError } from "./params.js";
import { enumerateRuns, parseShard, parseSweepSpec, type RunCell, shardRuns } from "./spec.js";

const registry = builtinRegistry();

const good = {
  name: "small",
  problems: [
    { problem: "double-integrator", steps: 20 },
    { problem: "pendulum", label: "pend" },
  ],
  optimizers: [
    { label: "mppi-64", kind: "mppi", samples: 64, horizon: 10 },
    { kind: "cem", samples: 32, horizon: 10 },
    { label: "lqr", kind: "lqr", only: ["double-integrator"] },
  ],
  seeds: { first: 3, count: 2 },
  episodes: 2,
};

/** Parse `mutate(copy of good)` and return the SpecError's path and message. */
function errorOf(mutate: (s: Record<string, unknown>) => void): SpecError {
  const s = structuredClone(good) as unknown as Record<string, unknown>;
  mutate(s);
  try {
    parseSweepSpec(s, registry);
  } catch (e) {
    expect(e).toBeInstanceOf(SpecError);
    return e as SpecError;
  }
  throw new Error("expected a SpecError");
}

const opt = (s: Record<string, unknown>, i: number): Record<string, unknown> =>
  (s.optimizers as Record<string, unknown>[])[i];

describe("parseSweepSpec", () => {
  it("accepts a valid file, fills defaults and expands seeds", () => {
    const spec = parseSweepSpec(good, registry);
    expect(spec.seeds).toEqual([3, 4]);
    expect(spec.optimizers[1].label).toBe("cem");
    expect(spec.optimizers[0].params.temperature).toBe(1);
    expect(spec.problems[1].label).toBe("pend");
    // 2 problems × (2 optimizers + lqr only on the first) × 2 seeds × 2 episodes
    expect(enumerateRuns(spec)).toHaveLength((3 + 2) * 2 * 2);
  });

  it.each([
    [
      "a number that is not an integer",
      (s: Record<string, unknown>) => {
        opt(s, 0).samples = 0.5;
      },
      "optimizers[0].samples",
      "integer",
    ],
    [
      "a number below its minimum",
      (s: Record<string, unknown>) => {
        opt(s, 1).samples = 0;
      },
      "optimizers[1].samples",
      "≥ 1",
    ],
    [
      "a wrong type",
      (s: Record<string, unknown>) => {
        opt(s, 0).temperature = "hot";
      },
      "optimizers[0].temperature",
      "finite number",
    ],
    [
      "a non-positive temperature",
      (s: Record<string, unknown>) => {
        opt(s, 0).temperature = 0;
      },
      "optimizers[0].temperature",
      "> 0",
    ],
    [
      "a typo in a field name",
      (s: Record<string, unknown>) => {
        opt(s, 0).temprature = 1;
      },
      "optimizers[0].temprature",
      'did you mean "temperature"',
    ],
    [
      "an unknown kind",
      (s: Record<string, unknown>) => {
        opt(s, 2).kind = "mpi";
      },
      "optimizers[2].kind",
      'did you mean "mppi"',
    ],
    [
      "an unknown problem",
      (s: Record<string, unknown>) => {
        (s.problems as Record<string, unknown>[])[0].problem = "pendulm";
      },
      "problems[0].problem",
      'did you mean "pendulum"',
    ],
    [
      "a bad enum value",
      (s: Record<string, unknown>) => {
        opt(s, 1).spreadFill = "keep";
      },
      "optimizers[1].spreadFill",
      '"repeat", "initial", "reset"',
    ],
    [
      "a bad array entry",
      (s: Record<string, unknown>) => {
        opt(s, 0).noise = [1, -2];
      },
      "optimizers[0].noise[1]",
      "> 0",
    ],
    [
      "a duplicate label",
      (s: Record<string, unknown>) => {
        opt(s, 1).label = "mppi-64";
      },
      "optimizers[1].label",
      "unique",
    ],
    [
      "an unknown problem label in only",
      (s: Record<string, unknown>) => {
        opt(s, 2).only = ["cart"];
      },
      "optimizers[2].only[0]",
      "problem labels",
    ],
    [
      "a negative seed",
      (s: Record<string, unknown>) => {
        s.seeds = [1, -1];
      },
      "seeds[1]",
      "≥ 0",
    ],
    [
      "a repeated seed",
      (s: Record<string, unknown>) => {
        s.seeds = [1, 1];
      },
      "seeds",
      "repeat",
    ],
    [
      "a bad seed count",
      (s: Record<string, unknown>) => {
        s.seeds = { count: 0 };
      },
      "seeds.count",
      "≥ 1",
    ],
    [
      "zero episodes",
      (s: Record<string, unknown>) => {
        s.episodes = 0;
      },
      "episodes",
      "≥ 1",
    ],
    [
      "an unknown top-level field",
      (s: Record<string, unknown>) => {
        s.optimisers = [];
      },
      "optimisers",
      'did you mean "optimizers"',
    ],
    [
      "no optimizers",
      (s: Record<string, unknown>) => {
        s.optimizers = [];
      },
      "optimizers",
      "non-empty",
    ],
    [
      "an expert that is not in the sweep",
      (s: Record<string, unknown>) => {
        (s.optimizers as unknown[]).push({ kind: "distilled", expert: "nobody" });
      },
      "optimizers[3].expert",
      "another optimizer entry",
    ],
  ])("rejects %s, naming the field", (_what, mutate, path, words) => {
    const e = errorOf(mutate);
    expect(e.path).toBe(path);
    expect(e.message.startsWith(`${path}: `)).toBe(true);
    expect(e.message).toContain(words);
  });
});

describe("shards", () => {
  it("parseShard reads i/n and rejects out-of-range shards", () => {
    expect(parseShard("2/5")).toEqual({ index: 2, count: 5 });
    expect(() => parseShard("5/5")).toThrow(/0 ≤ i < n/);
    expect(() => parseShard("1-4")).toThrow(/i\/n/);
  });

  it("the shards of any n partition the runs, each run in exactly one shard (property)", () => {
    const runs = enumerateRuns(parseSweepSpec(good, registry));
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 25 }), (n) => {
        const seen: RunCell[] = [];
        for (let i = 0; i < n; i++) seen.push(...shardRuns(runs, { index: i, count: n }));
        expect(seen.map((r) => r.key).sort()).toEqual(runs.map((r) => r.key).sort());
      }),
      { numRuns: 25 },
    );
  });
});
