import { readFileSync } from "node:fs";
import { doubleIntegrator } from "@recede/problems";
import { describe, expect, it } from "vitest";
import { closedLoop } from "../closedLoop.js";
import { createController } from "../controller.js";
import { pointPlan } from "../distributions/point.js";
import { hessianMetric } from "../hessianMetric.js";
import { quadraticPlanLoss } from "../losses/quadraticPlanLoss.js";
import { linearDynamics, linearQuadraticCost } from "../model.js";
import { finiteHorizonLqr } from "../riccati.js";
import { customShift } from "../shift.js";
import { lqr } from "./lqr.js";
import { lqrNewton } from "./lqrNewton.js";

interface Case {
  n: number;
  m: number;
  horizon: number;
  a: number[];
  b: number[];
  q: number[];
  r: number[];
  s: number[];
  qf: number[];
  x0: number[];
  controls: number[];
  states: number[];
  cost: number;
  hessian: number[];
}

// Fixture: scripts/reference/mpc_newton.py — the open-loop LQ problem stacked densely and solved by
// numpy.linalg.lstsq (formulation: B. D. O. Anderson, J. B. Moore, "Optimal Control: Linear
// Quadratic Methods", 1990; MATH.md §4.3).
const fixture = JSON.parse(
  readFileSync(new URL("../../fixtures/newton.json", import.meta.url), "utf8"),
) as {
  cases: Case[];
};

function parts(c: Case) {
  const f = (v: number[]) => Float64Array.from(v);
  const dynamics = linearDynamics({ a: f(c.a), b: f(c.b), stateSize: c.n, controlSize: c.m });
  const cost = linearQuadraticCost({
    stateSize: c.n,
    controlSize: c.m,
    q: f(c.q),
    r: f(c.r),
    s: f(c.s),
    qf: f(c.qf),
  });
  return { dynamics, cost };
}

function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d;
}

describe("one Newton mirror step (Hessian metric, γ = 1) on LQ problems", () => {
  for (const [i, c] of fixture.cases.entries()) {
    const scale = Math.max(1, ...c.controls.map(Math.abs));
    it(`case ${i} (n=${c.n}, m=${c.m}, N=${c.horizon}): plan equals the dense least-squares U* (numpy lstsq)`, () => {
      const { dynamics, cost } = parts(c);
      // The generic machinery with an identity dynamic step, so the whole updated plan is visible.
      const ctrl = createController({
        dynamics,
        cost,
        horizon: c.horizon,
        samples: 1,
        plan: pointPlan({ mean: 0.37 }), // any start: one Newton step lands on U*
        loss: quadraticPlanLoss(),
        geometry: hessianMetric(),
        stepSize: 1,
        shift: customShift({ map: () => {} }),
      });
      const step = ctrl.act(Float64Array.from(c.x0));
      expect(maxAbsDiff(ctrl.plan(), c.controls)).toBeLessThan(1e-9 * scale);
      expect(step.report.updated).toBe(true);
    });

    it(`case ${i}: the Hessian equals 2(ℬᵀ𝒬ℬ + ℬᵀ𝒮 + 𝒮ᵀℬ + ℛ) from the fixture`, () => {
      const { dynamics, cost } = parts(c);
      const obj = quadraticPlanLoss().create({
        dynamics,
        cost,
        horizon: c.horizon,
        caller: "test",
      });
      const hs = Math.max(...c.hessian.map(Math.abs));
      expect(maxAbsDiff(obj.hessian!, c.hessian)).toBeLessThan(1e-11 * hs);
      // J(U*) and ∇J(U*) = 0 from the adjoint gradient.
      const g = new Float64Array(c.horizon * c.m);
      const j = obj.gradient(Float64Array.from(c.x0), Float64Array.from(c.controls), g);
      expect(Math.abs(j - c.cost)).toBeLessThan(1e-9 * Math.max(1, Math.abs(c.cost)));
      for (const gi of g) expect(Math.abs(gi)).toBeLessThan(1e-8 * hs * scale);
    });

    it(`case ${i}: the lqrNewton preset applies u₀ = −K₀x₀ of the Riccati recursion`, () => {
      const { dynamics, cost } = parts(c);
      const riccati = finiteHorizonLqr({
        a: { data: Float64Array.from(c.a), rows: c.n, cols: c.n },
        b: { data: Float64Array.from(c.b), rows: c.n, cols: c.m },
        q: { data: Float64Array.from(c.q), rows: c.n, cols: c.n },
        r: { data: Float64Array.from(c.r), rows: c.m, cols: c.m },
        s: { data: Float64Array.from(c.s), rows: c.n, cols: c.m },
        qf: { data: Float64Array.from(c.qf), rows: c.n, cols: c.n },
        horizon: c.horizon,
      });
      const path = riccati.rollout(c.x0);
      // Riccati feedback along the realized path equals the open-loop optimum (MATH.md §4.3).
      expect(maxAbsDiff(path.controls, c.controls)).toBeLessThan(1e-9 * scale);
      const ctrl = lqrNewton({ dynamics, cost, horizon: c.horizon });
      const u = ctrl.act(Float64Array.from(c.x0)).control;
      expect(maxAbsDiff(u, path.controls.subarray(0, c.m))).toBeLessThan(1e-9 * scale);
    });
  }
});

describe("Newton-step MPC vs receding-horizon Riccati on the double integrator", () => {
  it("gives the same closed loop (controls to 1e-9) over 60 steps", () => {
    const prob = doubleIntegrator({ axes: 2 });
    const lq = prob.linearQuadratic!;
    const n = lq.stateSize;
    const m = lq.controlSize;
    const horizon = 15;
    const newton = lqrNewton({
      dynamics: prob.dynamics,
      cost: prob.cost,
      horizon,
      q: lq.q,
      r: lq.r,
      qf: lq.qf,
    });
    const riccati = lqr({
      a: { data: lq.a, rows: n, cols: n },
      b: { data: lq.b, rows: n, cols: m },
      q: { data: lq.q, rows: n, cols: n },
      r: { data: lq.r, rows: m, cols: m },
      qf: { data: lq.qf, rows: n, cols: n },
      horizon,
    });
    const x0 = Float64Array.from([1, -0.5, 0.3, 0.2]);
    const a = closedLoop({
      controller: newton,
      plant: prob.dynamics,
      cost: prob.cost,
      initialState: x0,
      steps: 60,
    });
    const b = closedLoop({
      controller: riccati,
      plant: prob.dynamics,
      cost: prob.cost,
      initialState: x0,
      steps: 60,
    });
    expect(maxAbsDiff(a.episodes[0].controls, b.episodes[0].controls)).toBeLessThan(1e-9);
    expect(Math.abs(a.meanCost - b.meanCost)).toBeLessThan(1e-9 * b.meanCost);
  });
});

describe("round records of the Newton-step controller", () => {
  it("carry ℓ_t(θ_t), ∇ℓ_t(θ_t) and ℓ_t itself, so regret can be computed against U*", () => {
    const c = fixture.cases[1];
    const { dynamics, cost } = parts(c);
    const ctrl = lqrNewton({ dynamics, cost, horizon: c.horizon, mean: 0.1 });
    let checked = false;
    ctrl.observe((r) => {
      expect(r.round).toBe(1);
      expect(Array.from(r.decision).every((u) => u === 0.1)).toBe(true);
      expect(r.lossObject).toBeDefined();
      const lo = r.lossObject!;
      expect(lo.value(r.decision)).toBe(r.loss);
      const g = lo.gradient(r.decision, new Float64Array(r.decision.length));
      expect(Array.from(g)).toEqual(Array.from(r.gradient!));
      // The comparator U* (fixture) has loss J* ≤ ℓ_t(θ_t): instantaneous regret ≥ 0.
      const jStar = lo.value(Float64Array.from(c.controls));
      expect(Math.abs(jStar - c.cost)).toBeLessThan(1e-9 * Math.max(1, c.cost));
      expect(r.loss).toBeGreaterThan(jStar);
      checked = true;
    });
    ctrl.act(Float64Array.from(c.x0));
    expect(checked).toBe(true);
  });
});
