import fc from "fast-check";
import ndarray from "ndarray";
import { describe, expect, it } from "vitest";
import { RecedeError } from "../errors.js";
import { discreteLyapunov, spectralRadius } from "./lyapunov.js";

/** A random n×n matrix rescaled to spectral radius ≤ `rho`, and a random symmetric PSD Q. */
const stableCase = fc
  .integer({ min: 1, max: 6 })
  .chain((n) =>
    fc.record({
      n: fc.constant(n),
      a: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), {
        minLength: n * n,
        maxLength: n * n,
      }),
      g: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), {
        minLength: n * n,
        maxLength: n * n,
      }),
      rho: fc.double({ min: 0.05, max: 0.98, noNaN: true }),
    }),
  )
  .filter(({ a }) => a.some((v) => Math.abs(v) > 1e-3))
  .map(({ n, a, g, rho }) => {
    // ρ(A) ≤ rho, without blowing up nearly nilpotent draws
    const r0 = spectralRadius({ data: Float64Array.from(a), rows: n, cols: n });
    const frob = Math.sqrt(a.reduce((s, v) => s + v * v, 0));
    const A = Float64Array.from(a, (v) => (v * rho) / Math.max(r0, 0.3 * frob));
    const Q = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let s = i === j ? 0.1 : 0;
        for (let k = 0; k < n; k++) s += g[i * n + k] * g[j * n + k];
        Q[i * n + j] = s;
      }
    }
    return { n, A, Q };
  });

function residual(n: number, a: Float64Array, q: Float64Array, x: Float64Array): number {
  let worst = 0;
  let scale = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) {
        for (let l = 0; l < n; l++) s += a[k * n + i] * x[k * n + l] * a[l * n + j];
      }
      worst = Math.max(worst, Math.abs(x[i * n + j] - s - q[i * n + j]));
      scale = Math.max(scale, Math.abs(x[i * n + j]));
    }
  }
  return worst / Math.max(1, scale);
}

describe("discreteLyapunov", () => {
  // Identity: X solves X = AᵀXA + Q (definition), both methods agree, X is symmetric PSD
  // (X = Σ (Aᵀ)^k Q A^k with Q ⪰ 0).
  it("solves X = AᵀXA + Q by both methods, symmetric and PSD", () => {
    fc.assert(
      fc.property(stableCase, ({ n, A, Q }) => {
        const a = { data: A, rows: n, cols: n };
        const q = { data: Q, rows: n, cols: n };
        const xk = discreteLyapunov(a, q, { method: "kronecker" }).data;
        const xd = discreteLyapunov(a, q, { method: "doubling" }).data;
        expect(residual(n, A, Q, xk)).toBeLessThan(1e-11);
        expect(residual(n, A, Q, xd)).toBeLessThan(1e-11);
        let scale = 0;
        for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(xk[i]));
        for (let i = 0; i < n * n; i++) expect(Math.abs(xk[i] - xd[i])).toBeLessThan(1e-10 * scale);
        for (let i = 0; i < n; i++) {
          expect(xk[i * n + i]).toBeGreaterThan(0);
          for (let j = 0; j < n; j++) expect(xk[i * n + j]).toBe(xk[j * n + i]);
        }
      }),
      { numRuns: 100, seed: 3 },
    );
  });

  it("gives q/(1 − a²) for scalars and accepts arrays of rows", () => {
    expect(discreteLyapunov([[0.5]], [[3]]).data[0]).toBeCloseTo(4, 14);
    expect(discreteLyapunov([[-0.9]], [[1]], { method: "doubling" }).data[0]).toBeCloseTo(
      1 / 0.19,
      11,
    );
  });

  it("accepts ndarray views, including a transposed (strided) one", () => {
    const a = [
      [0.5, 0.2],
      [-0.1, 0.3],
    ];
    const q = [
      [2, 0.5],
      [0.5, 1],
    ];
    const ref = discreteLyapunov(a, q).data;
    const aT = ndarray(new Float64Array([0.5, -0.1, 0.2, 0.3]), [2, 2]).transpose(1, 0);
    const x = discreteLyapunov(aT, ndarray(new Float64Array([2, 0.5, 0.5, 1]), [2, 2])).data;
    expect(Array.from(x)).toEqual(Array.from(ref));
  });

  it("rejects ρ(A) ≥ 1 and bad shapes with typed errors, naming ρ", () => {
    const unstable = [
      [1.01, 0],
      [0, 0.2],
    ];
    expect(() =>
      discreteLyapunov(unstable, [
        [1, 0],
        [0, 1],
      ]),
    ).toThrow(RecedeError);
    expect(() =>
      discreteLyapunov(unstable, [
        [1, 0],
        [0, 1],
      ]),
    ).toThrow(
      /discreteLyapunov: a must be a matrix with spectral radius < 1 \(got "ρ\(A\) = 1\.01/,
    );
    expect(() => discreteLyapunov([[0.5, 0]], [[1]])).toThrow(/a must be square/);
    expect(() => discreteLyapunov([[0.5]], [[1, 0]])).toThrow(/q must be of shape 1×1/);
    expect(() => discreteLyapunov([[0.5]], [[1]], { method: "qr" as "auto" })).toThrow(/method/);
  });
});

describe("spectralRadius", () => {
  // Eigenvalues of a triangular matrix are its diagonal (common practice); a rotation scaled by r
  // has eigenvalues r·e^{±iφ}; a Jordan block J_3(λ) has the single eigenvalue λ.
  it("matches known spectra: triangular, scaled rotation, Jordan block, nilpotent", () => {
    expect(
      spectralRadius([
        [0.5, 10, -3],
        [0, -0.9, 7],
        [0, 0, 0.2],
      ]),
    ).toBeCloseTo(0.9, 13);
    const r = 0.97;
    const phi = 1.1;
    expect(
      spectralRadius([
        [r * Math.cos(phi), -r * Math.sin(phi)],
        [r * Math.sin(phi), r * Math.cos(phi)],
      ]),
    ).toBeCloseTo(r, 13);
    expect(
      spectralRadius([
        [0.8, 1, 0],
        [0, 0.8, 1],
        [0, 0, 0.8],
      ]),
    ).toBeCloseTo(0.8, 12);
    expect(
      spectralRadius([
        [0, 1],
        [0, 0],
      ]),
    ).toBe(0);
    expect(
      spectralRadius([
        [1e200, 0],
        [0, 1],
      ]),
    ).toBeCloseTo(1e200, -187);
  });
});
