import { createStream } from "@recede/core";
import { cartPole } from "@recede/problems";
import { bitEqual, catchRecedeError } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { type ControllerParts, createController } from "../controller.js";
import { gaussianPlan } from "../distributions/gaussian.js";
import { pointPlan } from "../distributions/point.js";
import type { PlanConfig } from "../distributions/types.js";
import { exponentialUtility } from "../losses/exponentialUtility.js";
import { annealNoise } from "./annealNoise.js";
import { essTemperature } from "./essTemperature.js";
import { reuseBest } from "./reuseBest.js";

const cp = cartPole();
const H = 10;
const config = (samples: number): PlanConfig => ({
  horizon: H,
  controlSize: 1,
  samples,
  lower: new Float64Array([-Infinity]),
  upper: new Float64Array([Infinity]),
  caller: "test",
});
const parts = (over: Partial<ControllerParts> = {}): ControllerParts => ({
  dynamics: cp.dynamics,
  cost: cp.cost,
  horizon: H,
  samples: 24,
  iterations: 3,
  plan: gaussianPlan({ std: 4, correlation: 0.5 }),
  loss: exponentialUtility({ temperature: 5 }),
  bounds: cp.bounds,
  seed: 11,
  sliceSize: 8,
  ...over,
});

/** Closed-loop steps on the cart-pole model: controls, plans and last samples per step. */
function run(p: ControllerParts, steps: number): Float64Array[] {
  const ctrl = createController(p);
  const x = cp.initialState();
  const out: Float64Array[] = [];
  for (let t = 0; t < steps; t++) {
    const u = new Float64Array(ctrl.act(x).control);
    out.push(u, new Float64Array(ctrl.plan()), new Float64Array(ctrl.sampled));
    cp.dynamics.step(x, 0, u, 0, 1, t);
  }
  return out;
}

describe("annealNoise", () => {
  it("scales [1] is the wrapped family, bit for bit (controls, plans, samples)", () => {
    for (const base of [
      gaussianPlan({ std: 4 }),
      gaussianPlan({ std: 3, correlation: 0.8, adaptVariance: true, minStd: 0.1 }),
    ]) {
      const a = run(parts({ plan: base }), 5);
      const b = run(parts({ plan: annealNoise(base, { scales: [1] }) }), 5);
      for (let i = 0; i < a.length; i++) expect(bitEqual(a[i], b[i])).toBe(true);
    }
  });

  it("draw i after the last sync has its deviations from the mean scaled by s_i (property)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 1e6 }),
        fc.array(fc.double({ min: 0.01, max: 3, noNaN: true }), { minLength: 1, maxLength: 4 }),
        fc.double({ min: -2, max: 2, noNaN: true }),
        fc.double({ min: 0, max: 0.95, noNaN: true }),
        (seed, scales, mu, a) => {
          const k = 6;
          const base = gaussianPlan({ std: 1.5, mean: mu, correlation: a }).create(config(k));
          const wrapped = annealNoise(gaussianPlan({ std: 1.5, mean: mu, correlation: a }), {
            scales,
          }).create(config(k));
          const w = new Float64Array(k).fill(1 / k);
          const ub = new Float64Array(k * H);
          const uw = new Float64Array(k * H);
          // Five draws, each followed by an update: the scale index runs 0, 1, … and saturates.
          for (let i = 0; i < 5; i++) {
            const s = scales[Math.min(i, scales.length - 1)];
            base.sample(createStream(seed + i), 0, k, ub);
            wrapped.sample(createStream(seed + i), 0, k, uw);
            for (let p = 0; p < k * H; p++) {
              const m = base.mean[p % H];
              expect(wrapped.mean[p % H]).toBe(m);
              const want = m + s * (ub[p] - m);
              expect(Math.abs(uw[p] - want)).toBeLessThanOrEqual(1e-12 * (1 + Math.abs(want)));
            }
            // Same update on both (from the base's samples, so both means stay equal).
            base.update(ub, k, w, true, 1);
            wrapped.update(ub, k, w, true, 1);
          }
          // sync (the dynamic step) starts the schedule again at s_0.
          wrapped.sync();
          base.sync();
          base.sample(createStream(seed), 0, k, ub);
          wrapped.sample(createStream(seed), 0, k, uw);
          const m = base.mean[0];
          expect(Math.abs(uw[0] - (m + scales[0] * (ub[0] - m)))).toBeLessThanOrEqual(
            1e-12 * (1 + Math.abs(uw[0])),
          );
        },
      ),
      { numRuns: 100 },
    );
  });

  it("in a controller, iteration i samples with s_i·σ and the shift restarts the schedule", () => {
    // With a fixed σ the sample spread around the (pre-update) mean shrinks as the schedule says:
    // compare the empirical standard deviation of the last iteration's unclipped deviations.
    const sigma = 2;
    const k = 400;
    const spreadOf = (scales: number[], iterations: number, acts = 1): number => {
      const ctrl = createController(
        parts({
          samples: k,
          iterations,
          bounds: undefined,
          plan: annealNoise(gaussianPlan({ std: sigma }), { scales }),
          loss: exponentialUtility({ temperature: 1e9 }), // nearly uniform weights
          sliceSize: 64,
        }),
      );
      const x = cp.initialState();
      for (let a = 0; a < acts; a++) ctrl.act(x);
      // Deviations of the last iteration's samples from their own mean, first time step.
      let m = 0;
      for (let i = 0; i < k; i++) m += ctrl.sampled[i * H];
      m /= k;
      let v = 0;
      for (let i = 0; i < k; i++) v += (ctrl.sampled[i * H] - m) ** 2;
      return Math.sqrt(v / (k - 1));
    };
    // Sampling error of an s.d. from 400 normal draws: about 3.5 %; bounds at ±20 %.
    expect(spreadOf([1, 0.1], 1) / sigma).toBeGreaterThan(0.8);
    expect(spreadOf([1, 0.1], 1) / sigma).toBeLessThan(1.2);
    expect(spreadOf([1, 0.1], 2) / (0.1 * sigma)).toBeGreaterThan(0.8);
    expect(spreadOf([1, 0.1], 2) / (0.1 * sigma)).toBeLessThan(1.2);
    // The shift restarts the schedule: the second control step's single iteration is wide again
    // (without the restart it would draw with s₂ = 0.1), and its second iteration narrow again.
    expect(spreadOf([1, 0.1], 1, 2) / sigma).toBeGreaterThan(0.8);
    expect(spreadOf([1, 0.1], 1, 2) / sigma).toBeLessThan(1.2);
    expect(spreadOf([1, 0.1], 2, 2) / (0.1 * sigma)).toBeGreaterThan(0.8);
    expect(spreadOf([1, 0.1], 2, 2) / (0.1 * sigma)).toBeLessThan(1.2);
    expect(spreadOf([1, 0.5, 0.25], 4) / (0.25 * sigma)).toBeGreaterThan(0.8);
    expect(spreadOf([1, 0.5, 0.25], 4) / (0.25 * sigma)).toBeLessThan(1.2);
  });

  it("is deterministic under a seed, and composes with reuseBest and essTemperature", () => {
    const p = parts({
      iterations: 2,
      plan: reuseBest(annealNoise(gaussianPlan({ std: 6, correlation: 0.8 })), { keep: 4 }),
      loss: essTemperature({ targetFraction: 0.1 }),
    });
    const a = run(p, 6);
    const b = run({ ...p }, 6);
    for (let i = 0; i < a.length; i++) expect(bitEqual(a[i], b[i])).toBe(true);
    const c = run({ ...p, seed: 12 }, 6);
    expect(bitEqual(a[0], c[0]) && bitEqual(a[1], c[1])).toBe(false);
  });

  it("reset and restore start the schedule again (same controls as a fresh controller)", () => {
    const p = parts({ plan: annealNoise(gaussianPlan({ std: 4 }), { scales: [1, 0.2, 0.05] }) });
    const ctrl = createController(p);
    const x = cp.initialState();
    const snap = ctrl.snapshot();
    const first = new Float64Array(ctrl.act(x).control);
    ctrl.act(x);
    ctrl.restore(snap);
    expect(bitEqual(ctrl.act(x).control, first)).toBe(true);
    ctrl.reset();
    expect(bitEqual(ctrl.act(x).control, first)).toBe(true);
  });

  it("rejects bad input with typed errors", () => {
    const g = gaussianPlan();
    catchRecedeError(() => annealNoise(null as never), { fn: "annealNoise", arg: "base" });
    catchRecedeError(() => annealNoise(g, { scales: [] }), { fn: "annealNoise", arg: "scales" });
    catchRecedeError(() => annealNoise(g, { scales: [1, 0] }), {
      fn: "annealNoise",
      arg: "scales[1]",
    });
    catchRecedeError(() => annealNoise(g, { scales: [Number.NaN] }), { arg: "scales[0]" });
    catchRecedeError(() => annealNoise(g, { scales: [Number.POSITIVE_INFINITY] }), {
      arg: "scales[0]",
    });
    catchRecedeError(() => createController(parts({ plan: annealNoise(pointPlan()) })), {
      arg: "plan",
    });
  });
});
