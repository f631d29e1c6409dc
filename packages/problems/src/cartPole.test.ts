import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { cartPole } from "./cartPole.js";

/** Mechanical energy of the uniform-rod cart-pole (Lagrangian T + V, θ from upright). */
function energy(x: Float64Array, mc = 1, mp = 0.1, l = 0.5, g = 9.8): number {
  const [, v, th, w] = x;
  const c = Math.cos(th);
  const T =
    0.5 * (mc + mp) * v * v +
    mp * l * c * v * w +
    0.5 * mp * l * l * w * w +
    (mp * l * l * w * w) / 6;
  return T + mp * g * l * c;
}

describe("cartPole physics", () => {
  // Physics: without friction and force the energy T + V is conserved; Coulomb and viscous
  // friction only dissipate it (power −μ_c|N_c||ẋ| − μ_p θ̇² ≤ 0).
  it("conserves energy without friction and dissipates it with friction", () => {
    const free = cartPole({ dt: 0.005 });
    const rough = cartPole({ dt: 0.005, cartFriction: 0.3, poleFriction: 0.01 });
    const u = new Float64Array(1);
    const a = new Float64Array([0, 1, 2.5, 3]);
    const b = new Float64Array(a);
    const e0 = energy(a);
    let prev = e0;
    let drift = 0;
    for (let t = 0; t < 1000; t++) {
      free.dynamics.step(a, 0, u, 0, 1, t);
      rough.dynamics.step(b, 0, u, 0, 1, t);
      drift = Math.max(drift, Math.abs(energy(a) - e0));
      const e = energy(b);
      // a fixed-step integrator crossing the Coulomb discontinuity at ẋ = 0 errs by O(μ_c N_c dt²)
      // in that step, so allow a few µJ there
      expect(e).toBeLessThanOrEqual(prev + 1e-5);
      prev = e;
    }
    expect(drift).toBeLessThan(1e-7);
    expect(prev).toBeLessThan(e0 - 0.1);
  });

  it("friction-model Jacobians match central differences of the step away from ẋ = 0", () => {
    const p = cartPole({ cartFriction: 0.3, poleFriction: 0.01 });
    const a = new Float64Array(16);
    const b = new Float64Array(4);
    const xp = new Float64Array(4);
    const xm = new Float64Array(4);
    const speed = fc.double({ min: 0.2, max: 3, noNaN: true });
    fc.assert(
      fc.property(
        fc.double({ min: -2, max: 2, noNaN: true }),
        fc.oneof(
          speed,
          speed.map((v) => -v),
        ),
        fc.double({ min: -3, max: 3, noNaN: true }),
        fc.double({ min: -4, max: 4, noNaN: true }),
        fc.double({ min: -10, max: 10, noNaN: true }),
        (px, v, th, w, F) => {
          const x = new Float64Array([px, v, th, w]);
          const u = new Float64Array([F]);
          p.dynamics.jacobians!(x, u, 0, a, b);
          const h = 1e-6;
          for (let j = 0; j < 4; j++) {
            xp.set(x);
            xm.set(x);
            xp[j] += h;
            xm[j] -= h;
            p.dynamics.step(xp, 0, u, 0, 1, 0);
            p.dynamics.step(xm, 0, u, 0, 1, 0);
            for (let i = 0; i < 4; i++) {
              const fd = (xp[i] - xm[i]) / (2 * h);
              expect(Math.abs(a[i * 4 + j] - fd)).toBeLessThan(1e-5 * (1 + Math.abs(fd)));
            }
          }
          xp.set(x);
          xm.set(x);
          p.dynamics.step(xp, 0, new Float64Array([F + h]), 0, 1, 0);
          p.dynamics.step(xm, 0, new Float64Array([F - h]), 0, 1, 0);
          for (let i = 0; i < 4; i++) {
            const fd = (xp[i] - xm[i]) / (2 * h);
            expect(Math.abs(b[i] - fd)).toBeLessThan(1e-5 * (1 + Math.abs(fd)));
          }
        },
      ),
      { numRuns: 60, seed: 31 },
    );
  });

  it("rejects negative friction and reports the parameters in use", () => {
    expect(() => cartPole({ cartFriction: -0.1 })).toThrow(/cartPole: cartFriction must be >= 0/);
    const p = cartPole({ cartFriction: 0.0005, poleFriction: 0.000002 });
    expect(p.parameters.cartFriction).toBe(0.0005);
    expect(p.parameters.poleFriction).toBe(0.000002);
  });
});

describe("cartPole success test", () => {
  it("needs the pole upright, slow and on the track for the last holdSteps states", () => {
    const p = cartPole({ holdSteps: 2 });
    const up = [0.5, 0, 0.1, -0.5];
    expect(p.success(Float64Array.from([0, 0, Math.PI, 0, ...up, ...up]))).toBe(true);
    const off = [2.5, 0, 0.1, -0.5]; // upright but off the 2.4 m track
    const rep = p.assess(Float64Array.from([...up, ...off]));
    expect(rep.success).toBe(false);
    expect(rep.heldSteps).toBe(0);
    expect(rep.reason).toMatch(/\|x\| = 2\.500 m > 2\.4/);
    expect(rep.criterion).toMatch(/last 2 states/);
    expect(p.assess(Float64Array.from([...off, ...up])).heldSteps).toBe(1);
    expect(() => p.assess(new Float64Array(3))).toThrow(/cartPole.assess: count/);
  });

  it("charges the track ends in the cost", () => {
    const p = cartPole({ q: [0, 0, 0, 0], r: 1, trackWeight: 10, trackViolationCost: 5 });
    const out = new Float64Array(2);
    const x = Float64Array.from([2.0, 0, 0, 0, -2.9, 0, 0, 0]);
    p.cost.running(x, 0, new Float64Array(2), 0, 2, 0, out, 0);
    expect(out[0]).toBe(0);
    expect(out[1]).toBeCloseTo(10 * 0.25 + 5, 12);
  });
});
