import { RecedeError } from "@recede/core";
import { describe, expect, it } from "vitest";
import { cem } from "../presets/cem.js";
import { mppi } from "../presets/mppi.js";
import { leanMppi } from "../variants/leanMppi.js";
import { laundering } from "./launderingModel.fixture.js";
import { startRolloutWorkers } from "./pool.js";

// The option reaches the rollout from the presets, on the main thread and on worker threads: with
// noise σ = 4 some samples exceed u = 5 and pass through +∞ mid-horizon, which only the per-step
// check sees.
describe("checkEveryStep through the controller", () => {
  const options = { horizon: 6, samples: 128, sliceSize: 16, noise: [4], seed: 3 };

  it("flags laundered samples only when asked (main thread)", () => {
    const model = laundering();
    const plain = mppi({ ...model, ...options });
    const strict = mppi({ ...model, ...options, checkEveryStep: true });
    const x = new Float64Array(1);
    const a = plain.act(x).report.failedSamples;
    const b = strict.act(x).report.failedSamples;
    // the default sees only samples that end at +∞ (u > 5 at the last step)
    expect(b).toBeGreaterThan(a);
    expect(b).toBeLessThan(options.samples);
  });

  it("worker threads use the controller's setting (same failures as the main thread)", async () => {
    const pool = await startRolloutWorkers({
      model: {
        module: new URL("./launderingModel.fixture.ts", import.meta.url).href,
        factory: "laundering",
        args: [],
      },
      workers: 1,
      minWork: 0,
    });
    try {
      const strict = mppi({ ...laundering(), ...options, checkEveryStep: true });
      const parallel = mppi({
        dynamics: pool.dynamics,
        cost: pool.cost,
        workers: pool,
        ...options,
        checkEveryStep: true,
      });
      const x = new Float64Array(1);
      const single = strict.act(x).report.failedSamples;
      const split = parallel.act(x).report.failedSamples;
      expect(single).toBeGreaterThan(0);
      expect(split).toBe(single);
      expect(Array.from(parallel.plan())).toEqual(Array.from(strict.plan()));
    } finally {
      await pool.close();
    }
  });

  it("cem and leanMppi pass it on too", () => {
    const x = new Float64Array(1);
    const run = (
      make: (o: { checkEveryStep: boolean }) => {
        act(x: Float64Array): { report: { failedSamples: number } };
      },
    ) => [false, true].map((c) => make({ checkEveryStep: c }).act(x).report.failedSamples);
    const [cemPlain, cemStrict] = run((o) => cem({ ...laundering(), ...options, std: [4], ...o }));
    expect(cemStrict).toBeGreaterThan(cemPlain);
    const [leanPlain, leanStrict] = run((o) =>
      leanMppi({
        ...laundering(),
        horizon: 6,
        samples: 128,
        sliceSize: 16,
        noise: 4,
        seed: 3,
        ...o,
      }),
    );
    expect(leanStrict).toBeGreaterThan(leanPlain);
  });

  it("rejects a non-boolean with a typed error", () => {
    expect(() =>
      mppi({ ...laundering(), ...options, checkEveryStep: 1 as unknown as boolean }),
    ).toThrow(RecedeError);
  });
});
