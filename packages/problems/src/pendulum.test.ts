import { describe, expect, it } from "vitest";
import { pendulum } from "./pendulum.js";

/** Largest |E(t) − E(0)| over an undamped, unforced run of `seconds` with step dt. */
function energyDrift(dt: number, seconds: number): number {
  const p = pendulum({ damping: 0, dt });
  const x = new Float64Array([2.5, 0]); // a large swing (143°), strongly nonlinear
  const u = new Float64Array(1);
  const e0 = p.energy(x);
  let worst = 0;
  const steps = Math.round(seconds / dt);
  for (let t = 0; t < steps; t++) {
    p.dynamics.step(x, 0, u, 0, 1, t);
    worst = Math.max(worst, Math.abs(p.energy(x) - e0));
  }
  return worst;
}

describe("pendulum", () => {
  // Physics: with b = 0 and u = 0 the mechanical energy ½ml²θ̇² − mgl cos θ is conserved
  // (R. Tedrake, Underactuated Robotics, "The Simple Pendulum"); the classical RK4 method has
  // global error O(dt⁴) (E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential
  // Equations I, 1993), so the drift over a fixed time shrinks about 16× when dt halves.
  it("conserves energy to O(dt⁴) with RK4 when undamped and unforced", () => {
    const dts = [0.04, 0.02, 0.01, 0.005];
    const drift = dts.map((dt) => energyDrift(dt, 10));
    // |E(0)| ≈ 7.9 J for this swing; the drift is tiny in absolute terms …
    expect(drift[0]).toBeLessThan(2e-4);
    expect(drift[3]).toBeLessThan(2e-8);
    // … and its observed order log₂(drift(dt)/drift(dt/2)) is about 4 (measured 4.7, 4.6, 4.4:
    // the asymptotic 4 is approached from above).
    for (let i = 0; i + 1 < dts.length; i++) {
      const order = Math.log2(drift[i] / drift[i + 1]);
      expect(order).toBeGreaterThan(3.7);
      expect(order).toBeLessThan(5);
    }
  });

  it("rests at θ = 0 and at θ = π (equilibria) with u = 0", () => {
    const p = pendulum();
    const x = new Float64Array([0, 0, Math.PI, 0]);
    p.dynamics.step(x, 0, new Float64Array(2), 0, 2, 0);
    expect(x[0]).toBe(0);
    expect(x[1]).toBe(0);
    expect(Math.abs(x[2] - Math.PI)).toBeLessThan(1e-15);
    expect(Math.abs(x[3])).toBeLessThan(1e-14);
  });

  it("has the upright linearization g/l, −b/(ml²), 1/(ml²) (MATH.md §7.2)", () => {
    const p = pendulum({ mass: 2, length: 0.5, damping: 0.3, gravity: 9.81 });
    const lq = p.linearQuadratic!;
    const I = 2 * 0.25;
    expect(Array.from(lq.continuousA!)).toEqual([0, 1, 9.81 / 0.5, -0.3 / I]);
    expect(Array.from(lq.continuousB!)).toEqual([0, 1 / I]);
  });

  it("success needs the last holdSteps states upright and slow", () => {
    const p = pendulum({ holdSteps: 3, angleTolerance: 0.1, rateTolerance: 0.5 });
    const up = [Math.PI + 0.05, 0.1];
    const ok = Float64Array.from([0, 0, ...up, ...up, -Math.PI + 0.05, -0.2]);
    expect(p.success(ok)).toBe(true); // −π + 0.05 wraps to within 0.05 of π
    const bad = Float64Array.from([...up, ...up, Math.PI + 0.2, 0]);
    const rep = p.assess(bad);
    expect(rep.success).toBe(false);
    expect(rep.heldSteps).toBe(0);
    expect(rep.reason).toMatch(/θ−π/);
    expect(p.success(ok, 2)).toBe(false); // only 2 states given, 3 required
  });

  it("rejects bad options with typed errors", () => {
    expect(() => pendulum({ mass: -1 })).toThrow(/pendulum: mass must be > 0 \(got -1\)/);
    expect(() => pendulum({ damping: Number.NaN })).toThrow(/pendulum: damping/);
    expect(() => pendulum({ q: [1, -1] })).toThrow(/pendulum: q must be positive semidefinite/);
    expect(() => pendulum({ initialState: [0] })).toThrow(/initialState must be of length 2/);
  });
});
