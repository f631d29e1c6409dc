import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { cartPole } from "./cartPole.js";

interface CartPoleFixture {
  samples: { state: number[]; force: number; xdd: number; thdd: number }[];
  frictionSamples: {
    state: number[];
    force: number;
    cartFriction: number;
    poleFriction: number;
    xdd: number;
    thdd: number;
    normalForce: number;
  }[];
  uprightA: number[][];
  uprightB: number[];
  zohDt: number;
  zohA: number[][];
  zohB: number[];
}
const fixture: CartPoleFixture = JSON.parse(
  readFileSync(new URL("../fixtures/cartpole.json", import.meta.url), "utf8"),
);

describe("cartPole against outside references", () => {
  const p = cartPole();

  it("defaults are the published parameters (Barto, Sutton & Anderson 1983; Florian 2007)", () => {
    // A. G. Barto, R. S. Sutton, C. W. Anderson, "Neuronlike Adaptive Elements That Can Solve
    // Difficult Learning Control Problems", IEEE Trans. SMC, 1983, as restated by R. V. Florian,
    // "Correct Equations for the Dynamics of the Cart-Pole System", 2007: m_c = 1.0 kg,
    // m_p = 0.1 kg, half-pole length l = 0.5 m, g = 9.8 m/s², |F| ≤ 10 N, track ±2.4 m,
    // Euler step τ = 0.02 s (values from memory of those papers).
    const q = p.parameters;
    expect([q.cartMass, q.poleMass, q.halfLength, q.gravity]).toEqual([1.0, 0.1, 0.5, 9.8]);
    expect([q.forceLimit, q.trackLimit, p.dt]).toEqual([10, 2.4, 0.02]);
    expect([q.cartFriction, q.poleFriction]).toEqual([0, 0]); // the frictionless model by default
  });

  // Source: an independent Newton–Euler model of the uniform-rod cart-pole (pivot forces as
  // unknowns, 4×4 solve by numpy.linalg.solve) in scripts/reference/problems_cartpole.py, with the
  // parameters of Barto, Sutton & Anderson, "Neuronlike Adaptive Elements …", IEEE Trans. SMC, 1983.
  it("accelerations match a numpy Newton–Euler solve at 40 random states", () => {
    const out = new Float64Array(2);
    let worst = 0;
    for (const s of fixture.samples) {
      p.accelerations(Float64Array.from(s.state), 0, s.force, out, 0);
      worst = Math.max(worst, Math.abs(out[0] - s.xdd), Math.abs(out[1] - s.thdd));
      expect(out[0]).toBeCloseTo(s.xdd, 12);
      expect(out[1]).toBeCloseTo(s.thdd, 12);
    }
    expect(worst).toBeLessThan(1e-12);
  });

  // Source: the same script's Newton–Euler model with Coulomb cart friction −μ_c|N_c|sgn(ẋ) (the
  // normal force's sign resolved by re-solving) and viscous joint friction, for the coefficients
  // of Barto et al. (1983) and a large pair (μ_c = 0.3, μ_p = 0.01); some samples have N_c < 0 and
  // exercise the sign flip of R. V. Florian, "Correct Equations for the Dynamics of the Cart-Pole
  // System", 2007.
  it("friction accelerations match the Newton–Euler solve, including N_c < 0", () => {
    const out = new Float64Array(2);
    let negative = 0;
    for (const s of fixture.frictionSamples) {
      const q = cartPole({ cartFriction: s.cartFriction, poleFriction: s.poleFriction });
      q.accelerations(Float64Array.from(s.state), 0, s.force, out, 0);
      expect(Math.abs(out[0] - s.xdd)).toBeLessThan(1e-11);
      expect(Math.abs(out[1] - s.thdd)).toBeLessThan(1e-11);
      if (s.normalForce < 0) negative++;
    }
    expect(negative).toBeGreaterThan(0);
  });

  // Source: MATH.md §7.1 (derived there, checked numerically): d0 = l(4/3 − m_p/M) = 0.621212,
  // A_{12} = 1, A_{23} = −0.717073, A_{34} = 1, A_{43} = 15.775610, B = (0, 0.975610, 0, −1.463415).
  it("upright linearization equals the entries printed in MATH.md §7.1", () => {
    const lq = p.linearQuadratic!;
    const a = lq.continuousA!;
    const b = lq.continuousB!;
    const expectedA = [0, 1, 0, 0, 0, 0, -0.717073, 0, 0, 0, 0, 1, 0, 0, 15.77561, 0];
    const expectedB = [0, 0.97561, 0, -1.463415];
    for (let i = 0; i < 16; i++) expect(Math.abs(a[i] - expectedA[i])).toBeLessThan(1e-6);
    for (let i = 0; i < 4; i++) expect(Math.abs(b[i] - expectedB[i])).toBeLessThan(1e-6);
  });

  // Source: numpy central finite differences of the Newton–Euler model (same script).
  it("upright linearization matches numpy finite differences", () => {
    const lq = p.linearQuadratic!;
    for (let i = 0; i < 4; i++) {
      for (let j = 0; j < 4; j++) {
        expect(Math.abs(lq.continuousA![i * 4 + j] - fixture.uprightA[i][j])).toBeLessThan(1e-7);
      }
      expect(Math.abs(lq.continuousB![i] - fixture.uprightB[i])).toBeLessThan(1e-7);
    }
  });

  // Source: scipy.linalg.expm of the augmented linearization (exact ZOH, τ = 0.02 s), same script.
  // The problem's discrete A is the exact Jacobian of one RK4 step, i.e. the Taylor series of e^{Aτ}
  // through τ⁴ (Hairer, Nørsett & Wanner, Solving ODEs I, 1993), so A_rk4 − e^{Aτ} ≈ −A⁵τ⁵/5!.
  it("discrete upright linearization (RK4 Jacobian) differs from scipy's ZOH by the A⁵τ⁵/5! term", () => {
    const lq = p.linearQuadratic!;
    const tau = fixture.zohDt;
    expect(p.dt).toBe(tau);
    const Ac = fixture.uprightA;
    const mul = (x: number[][], y: number[][]) =>
      x.map((row, i) => y[0].map((_, j) => row.reduce((s, _v, k) => s + x[i][k] * y[k][j], 0)));
    let a5 = Ac;
    for (let k = 1; k < 5; k++) a5 = mul(a5, Ac);
    let worst = 0;
    let predicted = 0;
    for (let i = 0; i < 4; i++) {
      for (let j = 0; j < 4; j++) {
        worst = Math.max(worst, Math.abs(lq.a[i * 4 + j] - fixture.zohA[i][j]));
        predicted = Math.max(predicted, (Math.abs(a5[i][j]) * tau ** 5) / 120);
      }
    }
    expect(worst / predicted).toBeGreaterThan(0.95);
    expect(worst / predicted).toBeLessThan(1.05);
    for (let i = 0; i < 4; i++) expect(Math.abs(lq.b[i] - fixture.zohB[i])).toBeLessThan(2e-8);
  });
});
