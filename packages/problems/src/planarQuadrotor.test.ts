import { describe, expect, it } from "vitest";
import { planarQuadrotor } from "./planarQuadrotor.js";

describe("planarQuadrotor", () => {
  // MATH.md §7.4 (from R. Tedrake, Underactuated Robotics, "Acrobots, Cart-Poles, and
  // Quadrotors"): at hover ẍ ≈ −gθ, ÿ ≈ (δu₁ + δu₂)/m, θ̈ = r(δu₁ − δu₂)/I.
  it("hover is an equilibrium whose linearization is the one in MATH.md §7.4", () => {
    const p = planarQuadrotor({ mass: 0.8, armLength: 0.15, inertia: 0.01, gravity: 9.81 });
    const lq = p.linearQuadratic!;
    const hover = (0.8 * 9.81) / 2;
    expect(Array.from(lq.control)).toEqual([hover, hover]);
    const x = new Float64Array(p.goal);
    p.dynamics.step(x, 0, lq.control, 0, 1, 0);
    for (let i = 0; i < 6; i++) expect(Math.abs(x[i] - p.goal[i])).toBeLessThan(1e-15);
    const A = lq.continuousA!;
    const B = lq.continuousB!;
    const expectA = new Float64Array(36);
    expectA[0 * 6 + 3] = 1;
    expectA[1 * 6 + 4] = 1;
    expectA[2 * 6 + 5] = 1;
    expectA[3 * 6 + 2] = -9.81;
    const expectB = new Float64Array(12);
    expectB[4 * 2] = 1 / 0.8;
    expectB[4 * 2 + 1] = 1 / 0.8;
    expectB[5 * 2] = 0.15 / 0.01;
    expectB[5 * 2 + 1] = -0.15 / 0.01;
    for (let i = 0; i < 36; i++) expect(A[i]).toBeCloseTo(expectA[i], 12);
    for (let i = 0; i < 12; i++) expect(B[i]).toBeCloseTo(expectB[i], 12);
  });

  // Kinematics: with θ ≡ 0 the accelerations are constant, and RK4 integrates a quadratic in time
  // exactly, so free fall gives y = y₀ − ½gt² and a constant side force F gives x = ½(F/m)t².
  it("integrates free fall and a constant gust exactly", () => {
    const fall = planarQuadrotor();
    const x = new Float64Array([0, 10, 0, 0, 0, 0]);
    const u = new Float64Array(2);
    for (let t = 0; t < 50; t++) fall.dynamics.step(x, 0, u, 0, 1, t);
    const T = 50 * fall.dt;
    expect(x[1]).toBeCloseTo(10 - 0.5 * 9.81 * T * T, 12);
    expect(x[4]).toBeCloseTo(-9.81 * T, 12);

    const times: number[] = [];
    const gusty = planarQuadrotor({
      mass: 2,
      disturbance: (time, _x, _o, out) => {
        times.push(time);
        out[0] = 3; // 3 N towards +x
      },
    });
    expect(gusty.disturbed).toBe(true);
    const y = new Float64Array(gusty.goal);
    const hover = gusty.goalControl;
    for (let t = 0; t < 40; t++) gusty.dynamics.step(y, 0, hover, 0, 1, t);
    const S = 40 * gusty.dt;
    expect(y[0] - gusty.goal[0]).toBeCloseTo(0.5 * (3 / 2) * S * S, 12);
    expect(y[1]).toBeCloseTo(gusty.goal[1], 12);
    expect(times.slice(0, 3)).toEqual([0, gusty.dt, 2 * gusty.dt]);
    // the undisturbed model is not affected
    const model = planarQuadrotor({ mass: 2 });
    expect(model.disturbed).toBe(false);
    const z = new Float64Array(model.goal);
    model.dynamics.step(z, 0, model.goalControl, 0, 1, 0);
    expect(Array.from(z)).toEqual(Array.from(model.goal));
  });

  // Linear drag: at hover attitude the side velocity obeys m v̇ = −c_d v, so v(t) = v₀ e^{−c_d t/m}
  // and the drift x(t) = v₀ m/c_d (1 − e^{−c_d t/m}) (closed form of a linear ODE).
  it("decays side velocity exponentially under linear drag", () => {
    const p = planarQuadrotor({ mass: 1.8, drag: 0.35, dt: 0.02 });
    const x = new Float64Array(p.goal);
    x[3] = 2;
    for (let t = 0; t < 100; t++) p.dynamics.step(x, 0, p.goalControl, 0, 1, t);
    const T = 100 * 0.02;
    const decay = Math.exp((-0.35 * T) / 1.8);
    expect(x[3]).toBeCloseTo(2 * decay, 10);
    expect(x[0] - p.goal[0]).toBeCloseTo(((2 * 1.8) / 0.35) * (1 - decay), 10);
    expect(p.parameters.drag).toBe(0.35);
  });

  it("needs u_max > mg/2 and bounds thrust to [0, u_max]", () => {
    expect(() => planarQuadrotor({ mass: 1, maxThrust: 4 })).toThrow(
      /planarQuadrotor: maxThrust must be > m·g\/2 = 4\.905 \(got 4\)/,
    );
    const p = planarQuadrotor({ maxThrust: 7 });
    expect(Array.from(p.bounds.lower)).toEqual([0, 0]);
    expect(Array.from(p.bounds.upper)).toEqual([7, 7]);
  });

  it("success requires position, speed and attitude within tolerance at the end", () => {
    const p = planarQuadrotor({ target: [1, 2], holdSteps: 2 });
    const at = [1.05, 1.95, 0.05, 0.1, 0, 0];
    expect(p.success(Float64Array.from([0, 0, 0, 0, 0, 0, ...at, ...at]))).toBe(true);
    const tilted = [1, 2, 0.2, 0, 0, 0];
    const rep = p.assess(Float64Array.from([...at, ...tilted]));
    expect(rep.success).toBe(false);
    expect(rep.reason).toMatch(/\|θ\|/);
  });
});
