import { readFileSync } from "node:fs";
import { RecedeError } from "@recede/core";
import { lqrPolicyProblem, lqrPolicyProblemFrom } from "@recede/policy-gradient";
import { doubleIntegrator } from "@recede/problems";
import { describe, expect, it } from "vitest";

// Reference: scripts/reference/pg_lqr_gradient.py — scipy.linalg.solve_discrete_lyapunov and
// solve_discrete_are (scipy 1.17), with the formulas of M. Fazel, R. Ge, S. Kakade, M. Mesbahi,
// "Global Convergence of Policy Gradient Methods for the Linear Quadratic Regulator", ICML 2018.
interface Case {
  name: string;
  A: number[][];
  B: number[][];
  Q: number[][];
  R: number[][];
  Sigma0: number[][];
  discount: number;
  noiseCovariance: number[][];
  K: number[][];
  cost: number;
  gradient: number[][];
  P: number[][];
  SigmaK: number[][];
}
interface Dare {
  name: string;
  A: number[][];
  B: number[][];
  Q: number[][];
  R: number[][];
  Sigma0: number[][];
  P: number[][];
  K: number[][];
  cost: number;
}
const fixture = JSON.parse(
  readFileSync(new URL("../../fixtures/lqr_gradient.json", import.meta.url), "utf8"),
) as { cases: Case[]; dare: Dare[] };

const flat = (m: number[][]) => new Float64Array(m.flat());
const maxAbs = (a: ArrayLike<number>, b: ArrayLike<number>) => {
  let s = 0;
  for (let i = 0; i < a.length; i++) s = Math.max(s, Math.abs(a[i] - b[i]));
  return s;
};
const scaleOf = (a: ArrayLike<number>) => Math.max(1, ...Array.from(a, Math.abs));

function problemOf(c: Case | Dare, withNoise = true) {
  const cc = c as Case;
  return lqrPolicyProblem({
    a: c.A,
    b: c.B,
    q: c.Q,
    r: c.R,
    initialCovariance: c.Sigma0,
    discount: cc.discount ?? 1,
    actionNoise: withNoise && cc.noiseCovariance ? cc.noiseCovariance : undefined,
  });
}

describe("exact LQR policy gradient (Fazel et al. 2018) against scipy", () => {
  for (const c of fixture.cases) {
    it(`${c.name}: C(K), P_K, Σ_K and ∇C(K) match the scipy computation`, () => {
      const ev = problemOf(c).evaluate(flat(c.K));
      expect(Math.abs(ev.cost - c.cost)).toBeLessThan(1e-10 * Math.abs(c.cost));
      expect(maxAbs(ev.valueMatrix, flat(c.P))).toBeLessThan(1e-10 * scaleOf(flat(c.P)));
      expect(maxAbs(ev.stateCovariance, flat(c.SigmaK))).toBeLessThan(
        1e-10 * scaleOf(flat(c.SigmaK)),
      );
      expect(maxAbs(ev.gradient, flat(c.gradient))).toBeLessThan(1e-9 * scaleOf(flat(c.gradient)));
    });

    it(`${c.name}: ∇C(K) matches central finite differences of C`, () => {
      const p = problemOf(c);
      const k = flat(c.K);
      const g = p.evaluate(k).gradient;
      const h = 1e-6;
      for (let i = 0; i < k.length; i++) {
        const kp = k.slice();
        const km = k.slice();
        kp[i] += h;
        km[i] -= h;
        const fd = (p.cost(kp) - p.cost(km)) / (2 * h);
        // central differences: truncation O(h²) plus rounding ~ ε·C/h
        expect(Math.abs(fd - g[i])).toBeLessThan(1e-6 * scaleOf(g));
      }
    });
  }
});

describe("LQR policy updates converge to the DARE gain (scipy.linalg.solve_discrete_are)", () => {
  for (const d of fixture.dare) {
    it(`${d.name}: natural policy gradient with a constant step`, () => {
      const p = problemOf(d, false);
      // Start from a stabilizing gain: the DARE gain of a much more expensive control (R × 100).
      const start = fixture.cases.find((c) => c.name === d.name)?.K;
      let k: Float64Array = start ? flat(start) : new Float64Array(d.K.flat().length);
      // Fazel et al. (Thm 7): NPG with η ≤ 1/(2‖R + BᵀP_{K₀}B‖) (constant from memory; we use the
      // 2-norm bound ‖·‖ ≤ Frobenius norm) converges linearly.
      const curv = p.evaluate(k).curvature;
      const fro = Math.sqrt(curv.reduce((s, v) => s + v * v, 0));
      const eta = 1 / (2 * fro);
      for (let it = 0; it < 3000; it++) k = p.step(k, "natural", eta);
      expect(maxAbs(k, flat(d.K))).toBeLessThan(1e-8 * scaleOf(flat(d.K)));
      expect(Math.abs(p.cost(k) - d.cost)).toBeLessThan(1e-10 * d.cost);
    });

    it(`${d.name}: Gauss–Newton with η = ½ (Hewer's policy iteration) converges in a few steps`, () => {
      const p = problemOf(d, false);
      const start = fixture.cases.find((c) => c.name === d.name)?.K;
      let k: Float64Array = start ? flat(start) : new Float64Array(d.K.flat().length);
      for (let it = 0; it < 12; it++) k = p.step(k, "gauss-newton", 0.5);
      expect(maxAbs(k, flat(d.K))).toBeLessThan(1e-9 * scaleOf(flat(d.K)));
    });
  }

  it("natural step equals K − 2η E_K and Gauss–Newton ½ equals Hewer's K⁺ = (R + BᵀPB)⁻¹BᵀPA", () => {
    const c = fixture.cases[0];
    const p = problemOf(c);
    const k = flat(c.K);
    const ev = p.evaluate(k);
    const nat = p.step(k, "natural", 0.01);
    for (let i = 0; i < k.length; i++) expect(nat[i]).toBeCloseTo(k[i] - 0.02 * ev.e[i], 12);
    // Hewer: K⁺ = K − (R + BᵀPB)⁻¹ E_K  ⇔  (R + BᵀPB) K⁺ = BᵀPA.
    const gn = p.step(k, "gauss-newton", 0.5);
    const m = 2;
    const n = 3;
    const ev2 = p.evaluate(k);
    // (R + BᵀPB)(K − K⁺) = E_K
    for (let a = 0; a < m; a++) {
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let b = 0; b < m; b++) s += ev2.curvature[a * m + b] * (k[b * n + j] - gn[b * n + j]);
        expect(s).toBeCloseTo(ev2.e[a * n + j], 10);
      }
    }
  });
});

describe("lqrPolicyProblemFrom a reference problem's LQ data", () => {
  it("the double integrator of @recede/problems gives the fixture's DARE gain by Gauss–Newton", () => {
    const lq = doubleIntegrator({ dt: 0.1, q: 1, r: 0.1 }).linearQuadratic;
    if (lq === null) throw new Error("no LQ data");
    const p = lqrPolicyProblemFrom(lq);
    let k: Float64Array = new Float64Array([1, 1.5]);
    for (let i = 0; i < 12; i++) k = p.step(k, "gauss-newton", 0.5);
    const d = fixture.dare.find((x) => x.name === "double-integrator");
    if (d === undefined) throw new Error("fixture entry missing");
    expect(maxAbs(k, flat(d.K))).toBeLessThan(1e-9 * scaleOf(flat(d.K)));
  });
});

describe("typed errors", () => {
  const c = fixture.cases[2];
  it("a non-stabilizing gain is a domain error naming ρ", () => {
    const p = problemOf(c);
    const bad = new Float64Array([-1, 0]);
    expect(() => p.evaluate(bad)).toThrow(RecedeError);
    expect(() => p.evaluate(bad)).toThrow(/stabilizing/);
  });
  it("a step that would destabilize throws and leaves the input gain untouched", () => {
    const p = problemOf(c);
    const k = flat(c.K);
    const before = k.slice();
    expect(() => p.step(k, "gradient", 1e3)).toThrow(/stabilizing/);
    expect(Array.from(k)).toEqual(Array.from(before));
  });
  it("noise without discount, wrong shapes, non-SPD R", () => {
    expect(() => lqrPolicyProblem({ a: c.A, b: c.B, q: c.Q, r: c.R, actionNoise: [[1]] })).toThrow(
      /discount/,
    );
    expect(() => lqrPolicyProblem({ a: c.A, b: [[1, 2, 3]], q: c.Q, r: c.R })).toThrow(RecedeError);
    expect(() => lqrPolicyProblem({ a: c.A, b: c.B, q: c.Q, r: [[-1]] })).toThrow(
      /positive definite/,
    );
  });
});
