import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { getProblem, type ProblemName } from "./registry.js";

interface TrajectoryCase {
  problem: ProblemName;
  options: Record<string, number>;
  dt: number;
  x0: number[];
  controls: number[][];
  states: number[][];
}
const fixture: { cases: TrajectoryCase[] } = JSON.parse(
  readFileSync(new URL("../fixtures/trajectories.json", import.meta.url), "utf8"),
);

/** Largest state error over the trajectory when each control is held for `sub` RK4 substeps. */
function maxError(c: TrajectoryCase, sub: number): number {
  const p = getProblem(c.problem, { ...c.options, dt: c.dt / sub });
  const x = Float64Array.from(c.x0);
  let worst = 0;
  c.controls.forEach((u, k) => {
    const uu = Float64Array.from(u);
    for (let s = 0; s < sub; s++) p.dynamics.step(x, 0, uu, 0, 1, k * sub + s);
    const ref = c.states[k + 1];
    for (let i = 0; i < x.length; i++) worst = Math.max(worst, Math.abs(x[i] - ref[i]));
  });
  return worst;
}

describe("trajectories against scipy.integrate.solve_ivp", () => {
  // Source: each model re-written from its published equations in numpy (the cart-pole as a
  // Newton–Euler solve, the bicycle with ψ̇ = v sin β / l_r as in Kong et al. 2015) and integrated
  // with scipy.integrate.solve_ivp (DOP853, rtol = atol = 1e-12) under the same zero-order-hold
  // controls, in scripts/reference/problems_trajectories.py. One RK4 step per period must stay
  // close, and halving the step must cut the error about 2⁴ = 16× (RK4 is fourth order; Hairer,
  // Nørsett & Wanner, Solving ODEs I, 1993).
  it.each(fixture.cases.map((c) => [c.problem, c] as const))("%s", (_name, c) => {
    const e1 = maxError(c, 1);
    const e2 = maxError(c, 2);
    expect(e1).toBeLessThan(1e-4);
    const order = Math.log2(e1 / e2);
    expect(order).toBeGreaterThan(3.8); // measured 3.99–4.02
    expect(order).toBeLessThan(4.3);
  });
});
