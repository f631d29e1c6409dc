import { describe, expect, it } from "vitest";
import { doubleIntegrator } from "./doubleIntegrator.js";

describe("doubleIntegrator", () => {
  it("orders the state as all positions, then all velocities", () => {
    const p = doubleIntegrator({ axes: 2, dt: 0.5 });
    expect(p.stateNames).toEqual(["p1", "p2", "v1", "v2"]);
    const x = new Float64Array([0, 0, 1, -1]);
    p.dynamics.step(x, 0, new Float64Array([2, 0]), 0, 1, 0);
    // p1 = 0.5·1 + ½·0.25·2, v1 = 1 + 0.5·2; p2 = −0.5, v2 = −1
    expect(Array.from(x)).toEqual([0.75, -0.5, 2, -1]);
  });

  it("exposes its weights and bounds and succeeds near the origin", () => {
    const p = doubleIntegrator({ q: [1, 2], r: 0.5, qf: 7, controlLimit: 3, holdSteps: 2 });
    const lq = p.linearQuadratic!;
    expect(Array.from(lq.q)).toEqual([1, 0, 0, 2]);
    expect(Array.from(lq.r)).toEqual([0.5]);
    expect(Array.from(lq.qf)).toEqual([7, 0, 0, 7]);
    expect(Array.from(p.bounds.upper)).toEqual([3]);
    expect(p.success(Float64Array.from([1, 0, 0.01, 0.02, 0.0, -0.03]))).toBe(true);
    expect(p.success(Float64Array.from([0, 0, 0.1, 0, 0, 0]))).toBe(false);
    expect(Array.from(doubleIntegrator().bounds.upper)).toEqual([Number.POSITIVE_INFINITY]);
  });

  it("rejects bad options with typed errors", () => {
    expect(() => doubleIntegrator({ axes: 0 })).toThrow(
      /doubleIntegrator: axes must be an integer >= 1/,
    );
    expect(() => doubleIntegrator({ r: 0 })).toThrow(
      /doubleIntegrator: r must be positive definite/,
    );
    expect(() => doubleIntegrator({ controlLimit: -1 })).toThrow(/controlLimit/);
  });
});
