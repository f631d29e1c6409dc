import { cartPole, doubleIntegrator } from "@recede/problems";
import { bitEqual } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { type Controller, createController } from "../controller.js";
import { gaussianPlan } from "../distributions/gaussian.js";
import { pointPlan } from "../distributions/point.js";
import { hessianMetric } from "../hessianMetric.js";
import { eliteFraction } from "../losses/eliteFraction.js";
import { exponentialUtility } from "../losses/exponentialUtility.js";
import { quadraticPlanLoss } from "../losses/quadraticPlanLoss.js";
import { shiftPlan } from "../shift.js";
import { cem } from "./cem.js";
import { lqrNewton } from "./lqrNewton.js";
import { mppi } from "./mppi.js";

// A preset is a composition of the generic parts, never a copy: on the same seed it must produce
// the same controls, plans and reports, bit for bit (STYLE.md habit 1).

function sameRun(
  a: Controller,
  b: Controller,
  x0: Float64Array,
  step: (x: Float64Array, u: Float64Array, t: number) => void,
  steps: number,
): void {
  const xa = new Float64Array(x0);
  for (let t = 0; t < steps; t++) {
    const sa = a.act(xa);
    const ua = new Float64Array(sa.control);
    const la = sa.report.loss;
    const sb = b.act(xa);
    expect(bitEqual(ua, sb.control)).toBe(true);
    expect(Object.is(la, sb.report.loss)).toBe(true);
    expect(bitEqual(a.plan(), b.plan())).toBe(true);
    step(xa, ua, t);
  }
}

const cp = cartPole();
const cpStep = (x: Float64Array, u: Float64Array, t: number) => cp.dynamics.step(x, 0, u, 0, 1, t);

describe("preset = composition (bit for bit, same seed)", () => {
  it("mppi", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 1e6 }),
        fc.integer({ min: 1, max: 70 }),
        fc.double({ min: 0.01, max: 100, noNaN: true }),
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        fc.double({ min: 0, max: 0.95, noNaN: true }),
        fc.boolean(),
        (seed, samples, temperature, noise, correlation, keepMeanSample) => {
          const common = {
            dynamics: cp.dynamics,
            cost: cp.cost,
            horizon: 8,
            samples,
            bounds: cp.bounds,
            seed,
          };
          const preset = mppi({ ...common, temperature, noise, correlation, keepMeanSample });
          const generic = createController({
            ...common,
            name: "mppi",
            plan: gaussianPlan({ std: noise, correlation, keepMeanSample }),
            loss: exponentialUtility({ temperature }),
            geometry: "kl",
            stepSize: 1,
            shift: shiftPlan(),
          });
          sameRun(preset, generic, cp.initialState(), cpStep, 3);
        },
      ),
      { numRuns: 25 },
    );
  });

  it("cem", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 1e6 }),
        fc.integer({ min: 1, max: 70 }),
        fc.double({ min: 0.01, max: 1, noNaN: true }),
        fc.integer({ min: 1, max: 3 }),
        (seed, samples, fraction, iterations) => {
          const common = {
            dynamics: cp.dynamics,
            cost: cp.cost,
            horizon: 8,
            samples,
            bounds: cp.bounds,
            seed,
            iterations,
          };
          const preset = cem({ ...common, eliteFraction: fraction, std: 4 });
          const generic = createController({
            ...common,
            name: "cem",
            plan: gaussianPlan({ std: 4, adaptVariance: true, minStd: 0.01 }),
            loss: eliteFraction({ fraction }),
            geometry: "kl",
            stepSize: 1,
            shift: shiftPlan({ spreadFill: "reset" }),
          });
          sameRun(preset, generic, cp.initialState(), cpStep, 3);
        },
      ),
      { numRuns: 25 },
    );
  });

  it("lqrNewton", () => {
    const di = doubleIntegrator({ axes: 2 });
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: 4, maxLength: 4 }),
        fc.integer({ min: 1, max: 20 }),
        (x, horizon) => {
          const preset = lqrNewton({ dynamics: di.dynamics, cost: di.cost, horizon });
          const generic = createController({
            name: "lqrNewton",
            dynamics: di.dynamics,
            cost: di.cost,
            horizon,
            samples: 1,
            plan: pointPlan(),
            loss: quadraticPlanLoss(),
            geometry: hessianMetric(),
            stepSize: 1,
            shift: shiftPlan({ fill: "zero" }),
          });
          sameRun(
            preset,
            generic,
            Float64Array.from(x),
            (s, u, t) => di.dynamics.step(s, 0, u, 0, 1, t),
            3,
          );
        },
      ),
      { numRuns: 25 },
    );
  });
});
