import fc from "fast-check";
import { describe, expect, it } from "vitest";
import type { Problem } from "./problem.js";
import { getProblem, problemNames } from "./registry.js";

const all: Problem[] = [
  ...problemNames.map((name) => getProblem(name)),
  // non-default variants whose extra terms the defaults do not exercise
  Object.assign(getProblem("planar-quadrotor", { drag: 0.35 }), { name: "planar-quadrotor+drag" }),
  Object.assign(getProblem("bicycle", { rearLength: 0 }), { name: "bicycle (rear-axle point)" }),
  Object.assign(getProblem("double-integrator", { axes: 3, q: 2, r: [0.5, 1, 2] }), {
    name: "double-integrator (3 axes)",
  }),
];

/** A state near the problem's operating region, from unit-scale numbers. */
const stateArb = (p: Problem) =>
  fc.array(fc.double({ min: -3, max: 3, noNaN: true }), {
    minLength: p.stateSize,
    maxLength: p.stateSize,
  });
/** A control inside the bounds (or in [−5, 5] where unbounded). */
const controlArb = (p: Problem) =>
  fc
    .array(fc.double({ min: 0, max: 1, noNaN: true }), {
      minLength: p.controlSize,
      maxLength: p.controlSize,
    })
    .map((f) =>
      f.map((v, j) => {
        const lo = Math.max(p.bounds.lower[j], -5);
        const hi = Math.min(p.bounds.upper[j], 5);
        return lo + v * (hi - lo);
      }),
    );

describe.each(all.map((p) => [p.name, p] as const))("%s: batched model laws", (_name, p) => {
  const n = p.stateSize;
  const m = p.controlSize;

  // Central differences (common practice): error O(h²) ≈ 1e-10 relative, far below the tolerance.
  it("analytic Jacobians of the discrete step match central finite differences", () => {
    const a = new Float64Array(n * n);
    const b = new Float64Array(n * m);
    const xp = new Float64Array(n);
    const xm = new Float64Array(n);
    fc.assert(
      fc.property(stateArb(p), controlArb(p), (xs, us) => {
        const x = Float64Array.from(xs);
        const u = Float64Array.from(us);
        p.dynamics.jacobians!(x, u, 0, a, b);
        const h = 1e-6;
        for (let j = 0; j < n; j++) {
          xp.set(x);
          xm.set(x);
          xp[j] += h;
          xm[j] -= h;
          p.dynamics.step(xp, 0, u, 0, 1, 0);
          p.dynamics.step(xm, 0, u, 0, 1, 0);
          for (let i = 0; i < n; i++) {
            const fd = (xp[i] - xm[i]) / (2 * h);
            expect(Math.abs(a[i * n + j] - fd)).toBeLessThan(1e-6 * (1 + Math.abs(fd)));
          }
        }
        const up = new Float64Array(m);
        for (let j = 0; j < m; j++) {
          xp.set(x);
          xm.set(x);
          up.set(u);
          up[j] += h;
          p.dynamics.step(xp, 0, up, 0, 1, 0);
          up[j] -= 2 * h;
          p.dynamics.step(xm, 0, up, 0, 1, 0);
          for (let i = 0; i < n; i++) {
            const fd = (xp[i] - xm[i]) / (2 * h);
            expect(Math.abs(b[i * m + j] - fd)).toBeLessThan(1e-6 * (1 + Math.abs(fd)));
          }
        }
      }),
      { numRuns: 60, seed: 11 },
    );
  });

  it("a batch at offsets equals per-sample calls and leaves sentinels untouched", () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(stateArb(p), controlArb(p)), { minLength: 1, maxLength: 6 }),
        fc.integer({ min: 0, max: 5 }),
        fc.integer({ min: 0, max: 5 }),
        fc.integer({ min: 0, max: 30 }),
        (batch, xo, uo, t) => {
          const K = batch.length;
          const sentinel = -12345.5;
          const X = new Float64Array(xo + K * n + 3).fill(sentinel);
          const U = new Float64Array(uo + K * m + 3).fill(sentinel);
          batch.forEach(([xs, us], k) => {
            X.set(xs, xo + k * n);
            U.set(us, uo + k * m);
          });
          const Ucopy = new Float64Array(U);
          const costs = new Float64Array(2 + K + 2).fill(sentinel);
          for (let k = 0; k < K; k++) costs[2 + k] = 0.5;
          p.cost.running(X, xo, U, uo, K, t, costs, 2);
          p.dynamics.step(X, xo, U, uo, K, t);
          p.cost.terminal(X, xo, K, costs, 2);
          expect(Array.from(U)).toEqual(Array.from(Ucopy)); // inputs not mutated
          for (let i = 0; i < xo; i++) expect(X[i]).toBe(sentinel);
          for (let i = xo + K * n; i < X.length; i++) expect(X[i]).toBe(sentinel);
          expect(costs[0]).toBe(sentinel);
          expect(costs[1]).toBe(sentinel);
          expect(costs[2 + K]).toBe(sentinel);
          expect(costs[3 + K]).toBe(sentinel);
          batch.forEach(([xs, us], k) => {
            const x = Float64Array.from(xs);
            const u = Float64Array.from(us);
            const c = new Float64Array([0.5]);
            p.cost.running(x, 0, u, 0, 1, t, c, 0);
            p.dynamics.step(x, 0, u, 0, 1, t);
            p.cost.terminal(x, 0, 1, c, 0);
            for (let i = 0; i < n; i++) expect(X[xo + k * n + i]).toBe(x[i]);
            expect(costs[2 + k]).toBe(c[0]);
          });
        },
      ),
      { numRuns: 60, seed: 12 },
    );
  });

  it("the goal with the goal control is an equilibrium of zero running cost", () => {
    const x = new Float64Array(p.goal);
    const u = new Float64Array(p.goalControl);
    const c = new Float64Array(1);
    p.cost.running(x, 0, u, 0, 1, 0, c, 0);
    p.dynamics.step(x, 0, u, 0, 1, 0);
    for (let i = 0; i < n; i++) expect(Math.abs(x[i] - p.goal[i])).toBeLessThan(1e-12);
    expect(c[0]).toBeLessThan(1e-20);
  });

  it("describes itself consistently", () => {
    expect(p.stateNames).toHaveLength(n);
    expect(p.controlNames).toHaveLength(m);
    expect(p.bounds.lower).toHaveLength(m);
    expect(p.bounds.upper).toHaveLength(m);
    expect(p.initialState()).toHaveLength(n);
    expect(p.initialState()).not.toBe(p.initialState());
    expect(p.source.length).toBeGreaterThan(20);
    expect(p.dt).toBeGreaterThan(0);
    expect(p.horizon).toBeGreaterThan(0);
    const lq = p.linearQuadratic;
    if (lq) {
      expect(lq.a).toHaveLength(n * n);
      expect(lq.b).toHaveLength(n * m);
      expect(lq.q).toHaveLength(n * n);
      expect(lq.r).toHaveLength(m * m);
      // the LQ (A, B) is the Jacobian of the discrete step at the goal
      const a = new Float64Array(n * n);
      const b = new Float64Array(n * m);
      p.dynamics.jacobians!(lq.state, lq.control, 0, a, b);
      expect(Array.from(a)).toEqual(Array.from(lq.a));
      expect(Array.from(b)).toEqual(Array.from(lq.b));
    }
  });
});
