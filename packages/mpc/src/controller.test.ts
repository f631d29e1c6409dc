import type { Dynamics, RoundRecord } from "@recede/core";
import { doubleIntegrator } from "@recede/problems";
import { bitEqual, catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";
import { type ControllerParts, createController } from "./controller.js";
import { categoricalPlan } from "./distributions/categorical.js";
import { gaussianPlan } from "./distributions/gaussian.js";
import { eliteFraction } from "./losses/eliteFraction.js";
import { expectedCost } from "./losses/expectedCost.js";
import { exponentialUtility } from "./losses/exponentialUtility.js";
import { cem } from "./presets/cem.js";
import { mppi } from "./presets/mppi.js";
import { shiftPlan } from "./shift.js";

const prob = doubleIntegrator();
const bounds = { lower: new Float64Array([-3]), upper: new Float64Array([3]) };
const base = (over: Partial<ControllerParts> = {}): ControllerParts => ({
  dynamics: prob.dynamics,
  cost: prob.cost,
  horizon: 12,
  samples: 100,
  plan: gaussianPlan({ std: 0.8 }),
  loss: exponentialUtility({ temperature: 0.1 }),
  bounds,
  seed: 7,
  sliceSize: 32,
  ...over,
});
const x0 = Float64Array.from([1, 0]);

function trace(parts: ControllerParts, steps: number): Float64Array[] {
  const ctrl = createController(parts);
  const out: Float64Array[] = [];
  const x = new Float64Array(x0);
  for (let t = 0; t < steps; t++) {
    const u = ctrl.act(x).control;
    out.push(new Float64Array(ctrl.plan()));
    prob.dynamics.step(x, 0, u, 0, 1, t);
  }
  return out;
}

describe("createController", () => {
  it("is deterministic: same seed → bit-identical plans; another seed differs", () => {
    for (const plan of [
      gaussianPlan({ std: 0.8 }),
      gaussianPlan({ std: 0.8, correlation: 0.7, adaptVariance: true, minStd: 0.05 }),
      categoricalPlan({ choices: [[-2], [0], [2]] }),
    ]) {
      const a = trace(base({ plan }), 6);
      const b = trace(base({ plan }), 6);
      const c = trace(base({ plan, seed: 8 }), 6);
      for (let t = 0; t < 6; t++) expect(bitEqual(a[t], b[t])).toBe(true);
      expect(a.some((p, t) => !bitEqual(p, c[t]))).toBe(true);
    }
  });

  it("gives bit-identical results with buffers on SharedArrayBuffers", () => {
    const a = trace(base(), 4);
    const b = trace(base({ sharedMemory: true }), 4);
    for (let t = 0; t < 4; t++) expect(bitEqual(a[t], b[t])).toBe(true);
    const ctrl = createController(base({ sharedMemory: true }));
    expect(ctrl.sampled.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(ctrl.costs.buffer).toBeInstanceOf(SharedArrayBuffer);
  });

  it("keeps the plan within the bounds and returns its first control", () => {
    const ctrl = createController(base({ plan: gaussianPlan({ std: 10 }), loss: expectedCost() }));
    for (let t = 0; t < 5; t++) {
      const step = ctrl.act(x0);
      expect(step.control[0]).toBeGreaterThanOrEqual(-3);
      expect(step.control[0]).toBeLessThanOrEqual(3);
      for (const u of ctrl.plan()) expect(Math.abs(u)).toBeLessThanOrEqual(3);
    }
  });

  it("reports costs, effective sample size, entropy, iterations and wall time", () => {
    const ctrl = createController(
      base({
        iterations: 3,
        loss: eliteFraction({ fraction: 0.2 }),
        plan: gaussianPlan({ std: 1, adaptVariance: true }),
        timing: true,
      }),
    );
    const { report } = ctrl.act(x0);
    expect(report.round).toBe(1);
    expect(report.iterations).toBe(3);
    expect(report.updated).toBe(true);
    expect(report.failedSamples).toBe(0);
    expect(report.costMin).toBeLessThanOrEqual(report.costMean);
    // CEM weights: exactly K_e = 20 elites of weight 1/20 → ESS = 20, entropy = ln 20 (MATH.md §8.2).
    expect(report.effectiveSampleSize).toBeCloseTo(20, 10);
    expect(report.weightEntropy).toBeCloseTo(Math.log(20), 10);
    expect(report.wallTimeMs).toBeGreaterThanOrEqual(0);
    expect(report.loss).toBeGreaterThanOrEqual(report.costMin);
    // Timing is opt-in (clock reads allocate on Node 20): without it the report carries NaN.
    expect(Number.isNaN(createController(base()).act(x0).report.wallTimeMs)).toBe(true);
  });

  it("emits one RoundRecord per step: decision = plan before the update, loss = report.loss", () => {
    const ctrl = createController(base());
    const seen: { round: number; decision: Float64Array; loss: number }[] = [];
    const off = ctrl.observe((r: RoundRecord) =>
      seen.push({ round: r.round, decision: new Float64Array(r.decision), loss: r.loss }),
    );
    const before = new Float64Array(ctrl.plan());
    const { report } = ctrl.act(x0);
    expect(seen.length).toBe(1);
    expect(seen[0].round).toBe(1);
    expect(bitEqual(seen[0].decision, before)).toBe(true);
    expect(seen[0].loss).toBe(report.loss);
    off();
    ctrl.act(x0);
    expect(seen.length).toBe(1);
  });

  it("snapshot/restore round trip reproduces the same future bit for bit", () => {
    const ctrl = createController(base({ plan: gaussianPlan({ std: 0.8, adaptVariance: true }) }));
    ctrl.act(x0);
    ctrl.act(x0);
    const snap = ctrl.snapshot();
    const a1 = new Float64Array(ctrl.act(x0).control);
    const p1 = new Float64Array(ctrl.plan());
    ctrl.act(x0);
    ctrl.restore(snap);
    expect(ctrl.round).toBe(2);
    const a2 = new Float64Array(ctrl.act(x0).control);
    expect(bitEqual(a1, a2)).toBe(true);
    expect(bitEqual(p1, ctrl.plan())).toBe(true);
    // reset = a fresh controller
    ctrl.reset();
    const fresh = createController(base({ plan: gaussianPlan({ std: 0.8, adaptVariance: true }) }));
    expect(bitEqual(ctrl.act(x0).control, fresh.act(x0).control)).toBe(true);
  });

  it("rejects a snapshot of another shape with a typed error and keeps its state", () => {
    const ctrl = createController(base());
    const other = createController(base({ horizon: 5 }));
    ctrl.act(x0);
    const plan = new Float64Array(ctrl.plan());
    catchRecedeError(() => ctrl.restore(other.snapshot()), {
      fn: "controller.restore",
      code: "dimension",
    });
    expect(bitEqual(plan, ctrl.plan())).toBe(true);
    expect(ctrl.round).toBe(1);
  });
});

describe("failure handling", () => {
  // A model that throws for controls above 1.5 and returns NaN for controls below −1.5.
  const fragile: Dynamics = {
    stateSize: 2,
    controlSize: 1,
    step(x, xo, u, uo, count, t) {
      for (let k = 0; k < count; k++)
        if (u[uo + k] > 1.5) throw new Error("actuator model out of range");
      prob.dynamics.step(x, xo, u, uo, count, t);
      for (let k = 0; k < count; k++) if (u[uo + k] < -1.5) x[xo + k * 2] = Number.NaN;
    },
  };

  it("gives failed samples infinite cost and zero weight, and counts them", () => {
    const ctrl = createController(base({ dynamics: fragile, plan: gaussianPlan({ std: 1 }) }));
    const { report } = ctrl.act(x0);
    // Expected failures: samples with any control outside [−1.5, 1.5] (after clipping to ±3).
    const reference = createController(base({ plan: gaussianPlan({ std: 1 }) }));
    reference.act(x0);
    expect(report.failedSamples).toBeGreaterThan(0);
    expect(report.failedSamples).toBeLessThan(100);
    let inf = 0;
    for (let k = 0; k < 100; k++) {
      if (ctrl.costs[k] === Number.POSITIVE_INFINITY) {
        inf++;
        expect(ctrl.weights[k]).toBe(0);
      } else {
        // Surviving samples keep their exact cost (same samples, same model).
        expect(ctrl.costs[k]).toBe(reference.costs[k]);
      }
    }
    expect(inf).toBe(report.failedSamples);
    expect(report.updated).toBe(true);
  });

  it("keeps the previous plan (shifted) and says so when every sample fails", () => {
    const broken: Dynamics = {
      stateSize: 2,
      controlSize: 1,
      step() {
        throw new Error("simulator crashed");
      },
    };
    const ctrl = createController(
      base({
        dynamics: broken,
        plan: gaussianPlan({ mean: [0.5, 1, 1.5, 2, 2.5, 3, -1, -2, 0, 0, 0, 0.25], std: 1 }),
        shift: shiftPlan({ fill: "repeat" }),
      }),
    );
    const before = Array.from(ctrl.plan());
    const { report, control } = ctrl.act(x0);
    expect(report.updated).toBe(false);
    expect(report.skippedIterations).toBe(1);
    expect(report.failedSamples).toBe(100);
    expect(control[0]).toBe(before[0]);
    expect(Array.from(ctrl.plan())).toEqual([...before.slice(1), before[11]]);
  });
});

describe("typed errors", () => {
  it("at construction: K < 1, H < 1, γ ∉ (0, 1], bounds of the wrong size, λ ≤ 0, ρ ∉ (0, 1]", () => {
    catchRecedeError(() => createController(base({ samples: 0 })), {
      fn: "createController",
      arg: "samples",
      code: "range",
    });
    catchRecedeError(() => createController(base({ horizon: 0 })), {
      fn: "createController",
      arg: "horizon",
      code: "range",
    });
    catchRecedeError(() => createController(base({ stepSize: 0 })), {
      fn: "createController",
      arg: "stepSize",
      message: "(got 0)",
    });
    catchRecedeError(() => createController(base({ stepSize: 1.5 })), {
      fn: "createController",
      arg: "stepSize",
      code: "range",
    });
    catchRecedeError(
      () =>
        createController(
          base({ bounds: { lower: new Float64Array(2), upper: new Float64Array(2) } }),
        ),
      { fn: "createController", arg: "bounds.lower", code: "dimension" },
    );
    catchRecedeError(
      () =>
        createController(
          base({ bounds: { lower: new Float64Array([1]), upper: new Float64Array([-1]) } }),
        ),
      { fn: "createController", code: "range" },
    );
    catchRecedeError(
      () => mppi({ dynamics: prob.dynamics, cost: prob.cost, horizon: 5, temperature: -0.5 }),
      {
        fn: "mppi",
        arg: "temperature",
        message: "mppi: temperature must be > 0 (got -0.5)",
      },
    );
    catchRecedeError(
      () => cem({ dynamics: prob.dynamics, cost: prob.cost, horizon: 5, eliteFraction: 0 }),
      { fn: "cem", arg: "eliteFraction" },
    );
    catchRecedeError(
      () => cem({ dynamics: prob.dynamics, cost: prob.cost, horizon: 5, eliteFraction: 1.01 }),
      { fn: "cem", arg: "eliteFraction" },
    );
    catchRecedeError(() => createController(base({ plan: gaussianPlan({ mean: 5 }) })), {
      fn: "gaussianPlan",
      code: "range",
    });
  });

  it("at act: wrong state size, non-finite state, bad scheduled γ — state untouched", () => {
    const ctrl = createController(base({ stepSize: (round) => (round < 3 ? 0.5 : 2) }));
    ctrl.act(x0);
    ctrl.act(x0);
    const snap = ctrl.snapshot();
    const plan = new Float64Array(ctrl.plan());
    catchRecedeError(() => ctrl.act(new Float64Array(3)), {
      fn: "controller.act",
      arg: "state",
      code: "dimension",
    });
    catchRecedeError(() => ctrl.act(Float64Array.from([0, Number.NaN])), {
      fn: "controller.act",
      arg: "state[1]",
      code: "non-finite",
    });
    catchRecedeError(() => ctrl.act(x0), {
      fn: "controller.act",
      arg: "stepSize(3, 0)",
      code: "range",
    });
    expect(ctrl.round).toBe(2);
    expect(bitEqual(plan, ctrl.plan())).toBe(true);
    expect(bitEqual(snap.blocks[1], ctrl.snapshot().blocks[1])).toBe(true);
  });

  it("a throwing user loss leaves the plan and round as they were", () => {
    const ctrl = createController(
      base({
        loss: {
          name: "bad",
          normalized: true,
          weigh() {
            throw new Error("user bug");
          },
        },
      }),
    );
    const plan = new Float64Array(ctrl.plan());
    expect(() => ctrl.act(x0)).toThrow("user bug");
    expect(ctrl.round).toBe(0);
    expect(bitEqual(plan, ctrl.plan())).toBe(true);
  });
});

describe("weights limits through the controller (MATH.md §10 (c), (d))", () => {
  const still = { map: () => {} };
  it("MPPI with λ → 0 moves the plan onto the best sample; λ → ∞ onto the plain sample mean", () => {
    for (const [temperature, pick] of [
      [1e-9, "best"],
      [1e12, "mean"],
    ] as const) {
      const ctrl = createController(
        base({
          loss: exponentialUtility({ temperature }),
          shift: { name: "none", check() {}, apply: still.map },
        }),
      );
      ctrl.act(x0);
      const h = 12;
      const expected = new Float64Array(h);
      if (pick === "best") {
        let best = 0;
        for (let k = 1; k < 100; k++) if (ctrl.costs[k] < ctrl.costs[best]) best = k;
        expected.set(ctrl.sampled.subarray(best * h, best * h + h));
      } else {
        for (let k = 0; k < 100; k++)
          for (let t = 0; t < h; t++) expected[t] += ctrl.sampled[k * h + t] / 100;
      }
      for (let t = 0; t < h; t++) expect(ctrl.plan()[t]).toBeCloseTo(expected[t], 10);
    }
  });

  it("CEM with ρ = 1 and γ = 1 refits the sample mean (MATH.md §10 (d))", () => {
    const ctrl = createController(
      base({
        loss: eliteFraction({ fraction: 1 }),
        plan: gaussianPlan({ std: 1, adaptVariance: true }),
        shift: { name: "none", check() {}, apply() {} },
      }),
    );
    ctrl.act(x0);
    for (let t = 0; t < 12; t++) {
      let m = 0;
      for (let k = 0; k < 100; k++) m += ctrl.sampled[k * 12 + t] / 100;
      expect(ctrl.plan()[t]).toBeCloseTo(m, 12);
    }
  });
});

describe("other parts in closed loop on the double integrator", () => {
  // Passive cost (u ≡ 0) from x₀ = (1, 0) over 60 steps, for scale.
  const passive = (() => {
    const x = new Float64Array(x0);
    const c = new Float64Array(1);
    const u = new Float64Array(1);
    for (let t = 0; t < 60; t++) {
      prob.cost.running(x, 0, u, 0, 1, 0, c, 0);
      prob.dynamics.step(x, 0, u, 0, 1, t);
    }
    prob.cost.terminal(x, 0, 1, c, 0);
    return c[0];
  })();
  const closed = (parts: ControllerParts) => {
    const ctrl = createController(parts);
    const x = new Float64Array(x0);
    const c = new Float64Array(1);
    for (let t = 0; t < 60; t++) {
      const u = ctrl.act(x).control;
      prob.cost.running(x, 0, u, 0, 1, 0, c, 0);
      prob.dynamics.step(x, 0, u, 0, 1, t);
    }
    prob.cost.terminal(x, 0, 1, c, 0);
    return { cost: c[0], x };
  };

  it("a categorical plan over five accelerations regulates the state (cost < 40% of passive)", () => {
    const r = closed(
      base({
        horizon: 15,
        samples: 128,
        plan: categoricalPlan({ choices: [[-2], [-1], [0], [1], [2]], minProbability: 0.02 }),
        loss: exponentialUtility({ temperature: 0.05 }),
        stepSize: 0.7,
      }),
    );
    expect(r.cost).toBeLessThan(0.4 * passive);
    expect(Math.abs(r.x[0])).toBeLessThan(0.3);
  });

  it("the expected-cost loss with the un-normalized step regulates the state (cost < 40% of passive)", () => {
    const r = closed(
      base({
        horizon: 15,
        samples: 128,
        plan: gaussianPlan({ std: 0.5 }),
        loss: expectedCost(),
        stepSize: 0.5,
        iterations: 3,
      }),
    );
    expect(r.cost).toBeLessThan(0.4 * passive);
    expect(Math.abs(r.x[0])).toBeLessThan(0.3);
  });
});
