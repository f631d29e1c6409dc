import { cartPole, pendulum } from "@recede/problems";
import { bitEqual, catchRecedeError } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { createController } from "../controller.js";
import { gaussianPlan } from "../distributions/gaussian.js";
import { shiftPlan } from "../shift.js";
import { annealNoise } from "./annealNoise.js";
import { essTemperature } from "./essTemperature.js";
import { leanMppi } from "./leanMppi.js";
import { reuseBest } from "./reuseBest.js";

const cp = cartPole();

describe("leanMppi", () => {
  it("equals its composition of the generic parts, bit for bit (same seed)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 1e6 }),
        fc.integer({ min: 8, max: 40 }),
        fc.integer({ min: 1, max: 3 }),
        fc.double({ min: 0.5, max: 8, noNaN: true }),
        fc.double({ min: 0, max: 0.95, noNaN: true }),
        fc.integer({ min: 0, max: 3 }),
        fc.double({ min: 0.01, max: 1, noNaN: true }),
        fc.boolean(),
        fc.array(fc.double({ min: 0.05, max: 2, noNaN: true }), { minLength: 1, maxLength: 3 }),
        (
          seed,
          samples,
          iterations,
          noise,
          correlation,
          keep,
          targetFraction,
          adaptVariance,
          anneal,
        ) => {
          const common = {
            dynamics: cp.dynamics,
            cost: cp.cost,
            horizon: 8,
            samples,
            iterations,
            bounds: cp.bounds,
            seed,
            sliceSize: 16,
          };
          const a = leanMppi({
            ...common,
            noise,
            correlation,
            keep,
            targetFraction,
            adaptVariance,
            anneal,
          });
          const b = createController({
            ...common,
            name: "lean-mppi",
            plan: reuseBest(
              annealNoise(
                gaussianPlan({ std: noise, correlation, adaptVariance, minStd: 0.1 * noise }),
                { scales: anneal },
              ),
              { keep },
            ),
            loss: essTemperature({ targetFraction }),
            geometry: "kl",
            stepSize: 1,
            shift: shiftPlan(),
          });
          const x = cp.initialState();
          for (let t = 0; t < 4; t++) {
            const ua = new Float64Array(a.act(x).control);
            const ub = b.act(x).control;
            expect(bitEqual(ua, ub)).toBe(true);
            expect(bitEqual(a.plan(), b.plan())).toBe(true);
            cp.dynamics.step(x, 0, ua, 0, 1, t);
          }
        },
      ),
      { numRuns: 40 },
    );
  });

  it("swings the pendulum up with 32 samples per control step (16 × 2 iterations, defaults)", () => {
    // Success criterion of the reference problem (R. Tedrake, Underactuated Robotics, "The Simple
    // Pendulum"; thresholds of @recede/problems). Deterministic for this seed.
    const p = pendulum();
    const ctrl = leanMppi({
      dynamics: p.dynamics,
      cost: p.cost,
      horizon: p.horizon,
      noise: 0.5 * p.bounds.upper[0],
      bounds: p.bounds,
      seed: 2,
      timing: false,
    });
    const x = p.initialState();
    const states = new Float64Array((p.episodeLength + 1) * 2);
    states.set(x, 0);
    for (let t = 0; t < p.episodeLength; t++) {
      const u = ctrl.act(x).control;
      p.dynamics.step(x, 0, u, 0, 1, t);
      states.set(x, (t + 1) * 2);
    }
    expect(p.assess(states).reason).toBe("ok");
  });

  it("swings the cart-pole up with 64 samples per control step (32 × 2 iterations, σ₀ = bound)", () => {
    // Success criterion of the reference problem (A. G. Barto, R. S. Sutton, C. W. Anderson, 1983
    // track and force limits; hold thresholds of @recede/problems). Deterministic for this seed.
    const p = cartPole();
    const ctrl = leanMppi({
      dynamics: p.dynamics,
      cost: p.cost,
      horizon: p.horizon,
      samples: 32,
      noise: p.bounds.upper[0],
      bounds: p.bounds,
      seed: 1,
      timing: false,
    });
    const x = p.initialState();
    const states = new Float64Array((p.episodeLength + 1) * 4);
    states.set(x, 0);
    for (let t = 0; t < p.episodeLength; t++) {
      const u = ctrl.act(x).control;
      p.dynamics.step(x, 0, u, 0, 1, t);
      states.set(x, (t + 1) * 4);
    }
    expect(p.assess(states).reason).toBe("ok");
  });

  it("rejects bad options with typed errors", () => {
    const base = { dynamics: cp.dynamics, cost: cp.cost, horizon: 8 };
    catchRecedeError(() => leanMppi({ ...base, noise: -1 }), { fn: "leanMppi", arg: "noise" });
    catchRecedeError(() => leanMppi({ ...base, samples: 1 }), { fn: "leanMppi", arg: "samples" });
    catchRecedeError(() => leanMppi({ ...base, samples: 8, keep: 8 }), { arg: "plan.keep" });
    catchRecedeError(() => leanMppi({ ...base, anneal: [1, -0.1] }), {
      fn: "annealNoise",
      arg: "scales[1]",
    });
  });
});
