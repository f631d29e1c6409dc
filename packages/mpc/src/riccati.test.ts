import { RecedeError } from "@recede/core";
import { describe, expect, it } from "vitest";
import {
  closedLoopValue,
  dare,
  finiteHorizonLqr,
  riccatiStep,
  riccatiWorkspace,
} from "./riccati.js";

const di = {
  a: [
    [1, 0.1],
    [0, 1],
  ],
  b: [[0.005], [0.1]],
  q: [
    [1, 0],
    [0, 1],
  ],
  r: [[0.1]],
};

describe("dare", () => {
  // Closed form for a scalar system (x⁺ = a x + b u, cost q x² + r u²): the DARE reduces to
  // b²P² + (r(1 − a²) − q b²)P − q r = 0, whose positive root is the stabilizing solution
  // (Anderson & Moore, Optimal Control: Linear Quadratic Methods, 1990, ch. 2).
  it("matches the scalar closed form, including an unstable mode Q does not see", () => {
    for (const [a, b, q, r] of [
      [2, 1, 0, 1],
      [0.5, 2, 3, 0.7],
      [-1.5, 0.3, 1, 2],
    ]) {
      const B = b * b;
      const C = r * (1 - a * a) - q * B;
      const P = (-C + Math.sqrt(C * C + 4 * B * q * r)) / (2 * B);
      const sol = dare({ a: [[a]], b: [[b]], q: [[q]], r: [[r]] });
      expect(sol.value.data[0]).toBeCloseTo(P, 11);
      expect(sol.gain.data[0]).toBeCloseTo((a * b * P) / (r + B * P), 11);
      expect(sol.closedLoopSpectralRadius).toBeLessThan(1);
      expect(sol.definite).toBe(true);
    }
  });

  it("is optimal among stabilizing gains: P_K − P ⪰ 0 for perturbed gains", () => {
    const sol = dare(di);
    const K = sol.gain.data;
    for (const [d0, d1] of [
      [0.5, 0],
      [0, -0.3],
      [-1, 0.2],
      [0.05, 0.05],
    ]) {
      const pk = closedLoopValue(di, [[K[0] + d0, K[1] + d1]]).data;
      const diff = [
        pk[0] - sol.value.data[0],
        pk[1] - sol.value.data[1],
        pk[3] - sol.value.data[3],
      ];
      // 2×2 PSD: diagonal ≥ 0 and determinant ≥ 0 (up to rounding)
      expect(diff[0]).toBeGreaterThan(-1e-10);
      expect(diff[2]).toBeGreaterThan(-1e-10);
      expect(diff[0] * diff[2] - diff[1] * diff[1]).toBeGreaterThan(-1e-10);
      expect(diff[0] + diff[2]).toBeGreaterThan(0);
    }
  });

  it("gives the same answer from a user's stabilizing initial gain", () => {
    const a = dare(di);
    const b = dare(di, { initialGain: [[1, 1]] });
    expect(b.riccatiIterations).toBe(0);
    for (let i = 0; i < 4; i++) expect(b.value.data[i]).toBeCloseTo(a.value.data[i], 10);
    expect(() => dare(di, { initialGain: [[0, 0]] })).toThrow(
      /dare: initialGain must be stabilizing/,
    );
  });

  it("rejects a non-stabilizable pair with a typed error and does not mutate its inputs", () => {
    const sys = {
      a: [
        [1.2, 0],
        [0, 0.5],
      ],
      b: [[0], [1]],
      q: [
        [1, 0],
        [0, 1],
      ],
      r: [[1]],
    };
    const before = JSON.stringify(sys);
    let err: unknown;
    try {
      dare(sys);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(RecedeError);
    expect((err as RecedeError).fn).toBe("dare");
    expect((err as RecedeError).arg).toBe("(A, B)");
    expect((err as RecedeError).code).toBe("domain");
    expect(JSON.stringify(sys)).toBe(before);
  });

  it("rejects bad shapes and options", () => {
    expect(() => dare({ ...di, b: [[1, 2, 3]] })).toThrow(/dare: b must be of shape 2×\*/);
    expect(() =>
      dare({
        ...di,
        q: [
          [1, 2],
          [0, 1],
        ],
      }),
    ).toThrow(/dare: q must be symmetric/);
    expect(() => dare(di, { tolerance: 0 })).toThrow(/dare: tolerance must be > 0/);
    expect(() => dare({ ...di, a: [[1, 0]] })).toThrow(/dare: a must be square/);
  });
});

describe("finiteHorizonLqr", () => {
  // Anderson & Moore (1990), ch. 3: as N → ∞ the finite-horizon P₀ converges to the stabilizing
  // DARE solution; with Q_f = P the recursion sits at its fixed point for every k.
  it("converges to the DARE solution and is stationary with Q_f = P", () => {
    const inf = dare(di);
    const long = finiteHorizonLqr({
      ...di,
      qf: [
        [0, 0],
        [0, 0],
      ],
      horizon: 400,
    });
    for (let i = 0; i < 4; i++) expect(long.values[i]).toBeCloseTo(inf.value.data[i], 9);
    const fixed = finiteHorizonLqr({ ...di, qf: inf.value, horizon: 5 });
    for (let k = 0; k <= 5; k++) {
      const p = fixed.value(k).data;
      for (let i = 0; i < 4; i++) expect(p[i]).toBeCloseTo(inf.value.data[i], 10);
    }
    for (let k = 0; k < 5; k++) {
      const g = fixed.gain(k).data;
      expect(g[0]).toBeCloseTo(inf.gain.data[0], 10);
      expect(g[1]).toBeCloseTo(inf.gain.data[1], 10);
    }
  });

  it("returns symmetric value matrices and the cost x₀ᵀP₀x₀ of its own rollout", () => {
    const sol = finiteHorizonLqr({ ...di, s: [[0.05], [0.01]], qf: di.q, horizon: 20 });
    for (let k = 0; k <= 20; k++) expect(sol.values[k * 4 + 1]).toBe(sol.values[k * 4 + 2]);
    const x0 = [1, -0.5];
    const { states, controls } = sol.rollout(x0);
    let j = 0;
    for (let k = 0; k < 20; k++) {
      const x = [states[2 * k], states[2 * k + 1]];
      const u = controls[k];
      j += x[0] * x[0] + x[1] * x[1] + 2 * (x[0] * 0.05 + x[1] * 0.01) * u + 0.1 * u * u;
    }
    j += states[40] ** 2 + states[41] ** 2;
    expect(sol.cost(x0)).toBeCloseTo(j, 12);
  });

  it("accepts per-stage sequences (including S) and RowMajorMatrix inputs equivalently", () => {
    const s = [[0.05], [0.01]];
    const constant = finiteHorizonLqr({ ...di, s, qf: di.q, horizon: 3 });
    const seq = finiteHorizonLqr({
      a: [di.a, di.a, di.a],
      b: [di.b, { data: new Float64Array([0.005, 0.1]), rows: 2, cols: 1 }, di.b],
      q: [di.q, di.q, di.q],
      r: [di.r, di.r, di.r],
      s: [s, s, s],
      qf: di.q,
      horizon: 3,
    });
    expect(Array.from(seq.gains)).toEqual(Array.from(constant.gains));
    expect(Array.from(seq.values)).toEqual(Array.from(constant.values));
  });

  it("rejects bad input with typed errors naming the argument", () => {
    expect(() => finiteHorizonLqr({ ...di, qf: di.q, horizon: 0 })).toThrow(
      /finiteHorizonLqr: horizon must be an integer >= 1/,
    );
    expect(() => finiteHorizonLqr({ ...di, a: [di.a, di.a], qf: di.q, horizon: 3 })).toThrow(
      /finiteHorizonLqr: a must be a sequence of 3 matrices/,
    );
    expect(() => finiteHorizonLqr({ ...di, r: [[-1]], qf: di.q, horizon: 3 })).toThrow(
      /finiteHorizonLqr: r\[2\] must be such that R \+ BᵀPB is positive definite/,
    );
    expect(() => finiteHorizonLqr({ ...di, qf: [[1, 0, 0]], horizon: 3 })).toThrow(
      /qf must be of shape 2×2/,
    );
    const sol = finiteHorizonLqr({ ...di, qf: di.q, horizon: 3 });
    expect(() => sol.gain(3)).toThrow(RecedeError);
    expect(() => sol.cost([1])).toThrow(/x0 must be a vector of length 2/);
  });
});

describe("riccatiStep", () => {
  it("writes only its outputs, at the given offsets", () => {
    const w = riccatiWorkspace(2, 1);
    const a = new Float64Array([9, 1, 0.1, 0, 1]); // A at offset 1
    const b = new Float64Array([0.005, 0.1]);
    const q = new Float64Array([1, 0, 0, 1]);
    const r = new Float64Array([0.1]);
    const pn = new Float64Array([1, 0, 0, 1]);
    const k = new Float64Array(4).fill(-7);
    const p = new Float64Array(6).fill(-7);
    expect(riccatiStep(w, a, 1, b, 0, q, 0, r, 0, null, 0, pn, 0, k, 1, p, 1)).toBe(true);
    expect([k[0], k[3], p[0], p[5]]).toEqual([-7, -7, -7, -7]);
    const ref = finiteHorizonLqr({ ...di, qf: di.q, horizon: 1 });
    expect(k[1]).toBeCloseTo(ref.gains[0], 14);
    expect(k[2]).toBeCloseTo(ref.gains[1], 14);
    for (let i = 0; i < 4; i++) expect(p[1 + i]).toBeCloseTo(ref.values[i], 14);
  });
});
