import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { doubleIntegrator } from "./doubleIntegrator.js";

interface DiFixture {
  cases: { axes: number; dt: number; A: number[][]; B: number[][] }[];
}
const fixture: DiFixture = JSON.parse(
  readFileSync(new URL("../fixtures/double_integrator.json", import.meta.url), "utf8"),
);

describe("doubleIntegrator against scipy", () => {
  // Source: scipy.signal.cont2discrete(method="zoh") (SciPy 1.17), via
  // scripts/reference/problems_double_integrator.py.
  it.each(fixture.cases)("A, B equal scipy's ZOH for d = $axes, dt = $dt", (c) => {
    const p = doubleIntegrator({ axes: c.axes, dt: c.dt });
    const n = 2 * c.axes;
    const m = c.axes;
    const lq = p.linearQuadratic!;
    expect(lq.exact).toBe(true);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) expect(Math.abs(lq.a[i * n + j] - c.A[i][j])).toBeLessThan(1e-14);
      for (let j = 0; j < m; j++) expect(Math.abs(lq.b[i * m + j] - c.B[i][j])).toBeLessThan(1e-14);
    }
  });

  // The step function must be exactly x⁺ = A x + B u with scipy's (A, B).
  it("step equals A x + B u with scipy's matrices", () => {
    const c = fixture.cases.find((k) => k.axes === 2 && k.dt === 0.37)!;
    const p = doubleIntegrator({ axes: 2, dt: 0.37 });
    const x = new Float64Array([0.3, -1.2, 2.0, 0.7]);
    const u = new Float64Array([1.5, -0.25]);
    const expected = new Float64Array(4);
    for (let i = 0; i < 4; i++) {
      let s = 0;
      for (let j = 0; j < 4; j++) s += c.A[i][j] * x[j];
      for (let j = 0; j < 2; j++) s += c.B[i][j] * u[j];
      expected[i] = s;
    }
    p.dynamics.step(x, 0, u, 0, 1, 0);
    for (let i = 0; i < 4; i++) expect(x[i]).toBeCloseTo(expected[i], 13);
  });
});
