import { describe, expect, it } from "vitest";
import { bicycle } from "./bicycle.js";

/** Drive at constant speed v and steering δ; return the visited (x, y). */
function circle(rearLength: number, delta: number, v: number, steps: number) {
  const p = bicycle({ frontLength: 0.4, rearLength, dt: 0.05 });
  const x = new Float64Array([0, 0, 0, v]);
  const u = new Float64Array([0, delta]);
  const pts: [number, number][] = [[0, 0]];
  for (let t = 0; t < steps; t++) {
    p.dynamics.step(x, 0, u, 0, 1, t);
    pts.push([x[0], x[1]]);
  }
  return { p, pts, psi: x[2] };
}

describe("bicycle", () => {
  // Kinematic identity (R. Rajamani, Vehicle Dynamics and Control, 2006, §2.2): with constant
  // steering δ the rear axle turns on a circle of radius L / tan δ around a centre on the rear-axle
  // line; a point l_r ahead of the rear axle then moves on a circle of radius √(l_r² + (L/tan δ)²)
  // around the same centre.
  it("turns with radius L / tan δ at the rear axle (l_r = 0)", () => {
    const delta = 0.35;
    const { pts } = circle(0, delta, 1.2, 400);
    const R = 0.4 / Math.tan(delta);
    // start at the origin heading +x, turning left: centre (0, R)
    for (const [x, y] of pts) expect(Math.abs(Math.hypot(x, y - R) - R)).toBeLessThan(1e-8);
  });

  it("moves its reference point on a circle of radius √(l_r² + (L/tan δ)²)", () => {
    const delta = -0.5;
    const lr = 0.25;
    const { pts } = circle(lr, delta, 0.8, 400);
    const L = 0.4 + lr;
    const Rr = L / Math.tan(delta); // signed: negative turns right
    const R = Math.hypot(lr, Rr);
    // the centre sits on the rear-axle line, l_r behind the start point: (−l_r, Rr)
    for (const [x, y] of pts) expect(Math.abs(Math.hypot(x + lr, y - Rr) - R)).toBeLessThan(1e-8);
  });

  it("holds still with zero speed and acceleration (the goal is an equilibrium)", () => {
    const p = bicycle({ goal: [1, -2] });
    const x = new Float64Array(p.goal);
    p.dynamics.step(x, 0, new Float64Array([0, 0.4]), 0, 1, 0);
    expect(Array.from(x)).toEqual(Array.from(p.goal));
  });

  it("charges obstacles and speed limits in the cost, and fails trajectories that collide", () => {
    const p = bicycle({
      goal: [4, 0],
      obstacles: [{ x: 2, y: 0, radius: 0.5 }],
      obstacleClearance: 0.2,
      obstacleWeight: 100,
      collisionCost: 1000,
      q: [0, 0, 0, 0],
      speedWeight: 10,
      maxSpeed: 1,
    });
    const xs = new Float64Array([0, 0, 0, 0, 2, 0.6, 0, 0, 2, 0, 0, 0, 0, 0, 0, 1.5]);
    const out = new Float64Array(4);
    p.cost.running(xs, 0, new Float64Array(8), 0, 4, 0, out, 0);
    expect(out[0]).toBe(0);
    expect(out[1]).toBeCloseTo(100 * 0.1 * 0.1, 12); // inside the clearance ring
    expect(out[2]).toBeCloseTo(100 * 0.7 * 0.7 + 1000, 12); // at the centre: collision
    expect(out[3]).toBeCloseTo(10 * 0.25, 12); // 0.5 m/s over the speed limit
    const through = Float64Array.from([0, 0, 0, 0, 2, 0.1, 0, 0.5, 4, 0, 0, 0, 4, 0, 0, 0]);
    const rep = p.assess(through, 4);
    expect(rep.success).toBe(false);
    expect(rep.reason).toMatch(/inside obstacle 0/);
    const around = Float64Array.from([0, 0, 0, 0, 2, 1, 0, 0.5, 4, 0, 0, 0, 4, 0, 0, 0]);
    expect(bicycle({ goal: [4, 0], holdSteps: 2, obstacles: p.obstacles }).success(around)).toBe(
      true,
    );
  });

  it("rejects bad geometry with typed errors", () => {
    expect(() => bicycle({ rearLength: -0.1 })).toThrow(/bicycle: rearLength must be >= 0/);
    expect(() => bicycle({ maxSteering: 2 })).toThrow(/maxSteering must be < π\/2/);
    expect(() => bicycle({ minSpeed: 2, maxSpeed: 1 })).toThrow(/minSpeed/);
    expect(() => bicycle({ obstacles: [{ x: 0, y: 0, radius: 0 }] })).toThrow(
      /circleObstacles: obstacles\[0\]\.radius must be > 0/,
    );
  });
});
