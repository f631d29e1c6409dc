import { readFileSync } from "node:fs";
import { discreteLyapunov } from "@recede/core";
import { describe, expect, it } from "vitest";
import { closedLoopValue, dare, finiteHorizonLqr } from "./riccati.js";

type M = number[][];
interface DareCase {
  name: string;
  a: M;
  b: M;
  q: M;
  r: M;
  s?: M;
  p: M;
  k: M;
  rho: number;
}
interface FiniteCase {
  name: string;
  a: M | M[];
  b: M | M[];
  q: M | M[];
  r: M | M[];
  s?: M;
  qf: M;
  x0: number[];
  u: number[];
  x: number[];
  j: number;
}
const fixture: { dare: DareCase[]; finite: FiniteCase[] } = JSON.parse(
  readFileSync(new URL("../fixtures/riccati.json", import.meta.url), "utf8"),
);
const lyap: { cases: { n: number; a: M; q: M; x: M }[] } = JSON.parse(
  readFileSync(new URL("../fixtures/riccati_lyapunov.json", import.meta.url), "utf8"),
);

function maxRelDiff(got: Float64Array, want: M): number {
  const flat = want.flat();
  let scale = 1;
  for (const v of flat) scale = Math.max(scale, Math.abs(v));
  let worst = 0;
  flat.forEach((v, i) => {
    worst = Math.max(worst, Math.abs(got[i] - v));
  });
  return worst / scale;
}

describe("dare against scipy.linalg.solve_discrete_are", () => {
  // Source: scipy.linalg.solve_discrete_are (SciPy 1.17), values written by
  // scripts/reference/mpc_riccati.py. Cases: the worked example in SciPy's documentation of
  // solve_discrete_are (a = [[0,1],[0,−1]], b = [[1,0],[2,1]], q = [[−4,−4],[−4,7]],
  // r = [[9,3],[3,1]]; scipy's solution equals q), the double integrator (MATH.md §7.3), the
  // cart-pole upright linearization of MATH.md §7.1 (ZOH, τ = 0.02 s) and random stabilizable systems
  // (one with a cross term S).
  it.each(fixture.dare.map((c) => [c.name, c] as const))("%s", (_name, c) => {
    const sol = dare({ a: c.a, b: c.b, q: c.q, r: c.r, s: c.s });
    expect(maxRelDiff(sol.value.data, c.p)).toBeLessThan(1e-9);
    expect(maxRelDiff(sol.gain.data, c.k)).toBeLessThan(1e-8);
    expect(Math.abs(sol.closedLoopSpectralRadius - c.rho)).toBeLessThan(1e-7);
    expect(sol.residual).toBeLessThan(1e-12);
  });

  it("covers the documented example exactly: P = q", () => {
    const c = fixture.dare.find((d) => d.name === "scipy-doc-example")!;
    const sol = dare({ a: c.a, b: c.b, q: c.q, r: c.r });
    expect(
      maxRelDiff(sol.value.data, [
        [-4, -4],
        [-4, 7],
      ]),
    ).toBeLessThan(1e-12);
  });
});

describe("finiteHorizonLqr against a dense open-loop solve", () => {
  // Source: the optimal open-loop sequence U* = argmin J(U) over the stacked states
  // X = Ā x₀ + B̄ U, computed by numpy (least squares for the time-varying case, the dense normal
  // equations with the cross term otherwise; MATH.md §4.3) in scripts/reference/mpc_riccati.py.
  // For deterministic dynamics the Riccati feedback rollout must reproduce U* and J* = x₀ᵀP₀x₀.
  it.each(fixture.finite.map((c) => [c.name, c] as const))("%s", (_name, c) => {
    const timeVarying = Array.isArray((c.a as M[])[0][0]);
    const m = timeVarying ? (c.r as M[])[0].length : (c.r as M).length;
    const horizon = c.u.length / m;
    if (timeVarying) expect((c.a as M[]).length).toBe(horizon);
    const sol = finiteHorizonLqr({
      a: c.a,
      b: c.b,
      q: c.q,
      r: c.r,
      s: c.s,
      qf: c.qf,
      horizon,
    });
    const { states, controls } = sol.rollout(c.x0);
    let worstU = 0;
    c.u.forEach((v, i) => {
      worstU = Math.max(worstU, Math.abs(controls[i] - v));
    });
    let worstX = 0;
    c.x.forEach((v, i) => {
      worstX = Math.max(worstX, Math.abs(states[i] - v));
    });
    expect(controls.length).toBe(c.u.length);
    expect(worstU).toBeLessThan(1e-9);
    expect(worstX).toBeLessThan(1e-9);
    expect(Math.abs(sol.cost(c.x0) - c.j)).toBeLessThan(1e-9 * Math.max(1, c.j));
  });
});

describe("discreteLyapunov against scipy.linalg.solve_discrete_lyapunov", () => {
  // Source: scipy.linalg.solve_discrete_lyapunov(Aᵀ, Q) (SciPy 1.17), which solves
  // X = Aᵀ X A + Q, via scripts/reference/mpc_riccati.py; sizes 1–15, ρ(A) up to 0.99, and a
  // non-symmetric Q.
  it.each(lyap.cases.map((c, i) => [i, c.n, c] as const))("case %i (n = %i)", (_i, _n, c) => {
    for (const method of ["kronecker", "doubling"] as const) {
      const x = discreteLyapunov(c.a, c.q, { method });
      expect(maxRelDiff(x.data, c.x)).toBeLessThan(1e-10);
    }
  });

  // Closed-loop value of the DARE gain is the DARE solution itself (Hewer 1971 fixed point).
  it("closedLoopValue of scipy's gain equals scipy's P", () => {
    for (const c of fixture.dare) {
      const p = closedLoopValue({ a: c.a, b: c.b, q: c.q, r: c.r, s: c.s }, c.k);
      expect(maxRelDiff(p.data, c.p)).toBeLessThan(1e-8);
    }
  });
});
