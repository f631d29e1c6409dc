import { cartPole, doubleIntegrator } from "@recede/problems";
import { describe, expect, it } from "vitest";
import {
  categoricalPlan,
  closedLoop,
  createController,
  customLoss,
  exponentialUtility,
  gaussianPlan,
  linearDynamics,
  mppi,
} from "./index.js";

// The examples of the doc comments and of packages/mpc/README.md, run as written.

describe("doc examples", () => {
  it("exponentialUtility: w ∝ [1, e^-2, e^-4] for costs [1, 2, 3] and λ = 0.5", () => {
    const loss = exponentialUtility({ temperature: 0.5 });
    const w = new Float64Array(3);
    loss.weigh(new Float64Array([1, 2, 3]), 3, w);
    const z = 1 + Math.exp(-2) + Math.exp(-4);
    expect(w[0]).toBeCloseTo(1 / z, 15);
    expect(w[1]).toBeCloseTo(Math.exp(-2) / z, 15);
    expect(w[2]).toBeCloseTo(Math.exp(-4) / z, 15);
  });

  it("linearDynamics: the double integrator", () => {
    const dt = 0.1;
    const model = linearDynamics({
      a: [
        [1, dt],
        [0, 1],
      ],
      b: [[(dt * dt) / 2], [dt]],
    });
    const x = new Float64Array([0, 1]);
    model.step(x, 0, new Float64Array([2]), 0, 1, 0);
    expect(x[0]).toBeCloseTo(0.1 + 0.01, 15);
    expect(x[1]).toBeCloseTo(1.2, 15);
  });

  it("customLoss, gaussianPlan and categoricalPlan examples build controllers", () => {
    const p = doubleIntegrator();
    const loss = customLoss({
      score: (c, n, a) => {
        for (let i = 0; i < n; i++) a[i] = -Math.sqrt(c[i]);
      },
    });
    for (const plan of [
      gaussianPlan({ std: 0.5, correlation: 0.8 }),
      categoricalPlan({ choices: [[0], [0.5], [1]] }),
    ]) {
      const ctrl = createController({
        dynamics: p.dynamics,
        cost: p.cost,
        horizon: 10,
        samples: 32,
        plan,
        loss,
      });
      expect(ctrl.act(p.initialState()).report.updated).toBe(true);
    }
  });

  it("createController example (stepSize 0.8, bounds ±2)", () => {
    const p = doubleIntegrator();
    const ctrl = createController({
      dynamics: p.dynamics,
      cost: p.cost,
      horizon: 30,
      samples: 256,
      plan: gaussianPlan({ std: 1 }),
      loss: exponentialUtility({ temperature: 1 }),
      stepSize: 0.8,
      bounds: { lower: new Float64Array([-2]), upper: new Float64Array([2]) },
    });
    const { control, report } = ctrl.act(p.initialState());
    expect(Math.abs(control[0])).toBeLessThanOrEqual(2);
    expect(report.round).toBe(1);
  });

  it("README: MPPI swings the cart-pole up", () => {
    const p = cartPole();
    const ctrl = mppi({
      dynamics: p.dynamics,
      cost: p.cost,
      horizon: p.horizon,
      bounds: p.bounds,
      samples: 256,
      noise: 5,
      temperature: 1,
      keepMeanSample: true,
      seed: 1,
    });
    const run = closedLoop({
      controller: ctrl,
      plant: p.dynamics,
      cost: p.cost,
      initialState: p.initialState(),
      steps: p.episodeLength,
    });
    expect(p.assess(run.episodes[0].states).success).toBe(true);
  });
});
