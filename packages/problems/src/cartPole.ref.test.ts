import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { cartPole } from "./cartPole.js";

interface CartPoleFixture {
  samples: { state: number[]; force: number; xdd: number; thdd: number }[];
  uprightA: number[][];
  uprightB: number[];
}
const fixture: CartPoleFixture = JSON.parse(
  readFileSync(new URL("../fixtures/cartpole.json", import.meta.url), "utf8"),
);

describe("cartPole against outside references", () => {
  const p = cartPole();

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
});
