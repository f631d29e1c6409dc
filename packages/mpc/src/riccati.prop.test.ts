import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { closedLoopValue, dare, finiteHorizonLqr } from "./riccati.js";

type M = number[][];

/** Random (A, B, Q, R): generic random pairs are controllable; A may be open-loop unstable. */
const systemArb = fc
  .record({ n: fc.integer({ min: 1, max: 5 }), m: fc.integer({ min: 1, max: 3 }) })
  .chain(({ n, m }) => {
    // entries on a 1e-3 grid: fast-check's raw doubles favour subnormals and extremes, which make
    // genuinely unstabilizable pairs (those get their own typed-error test)
    const entry = (lo: number, hi: number) =>
      fc.integer({ min: Math.round(lo * 1000), max: Math.round(hi * 1000) }).map((v) => v / 1000);
    const mat = (r: number, c: number, lo: number, hi: number) =>
      fc.array(fc.array(entry(lo, hi), { minLength: c, maxLength: c }), {
        minLength: r,
        maxLength: r,
      });
    return fc.record({
      a: mat(n, n, -1.2, 1.2),
      b: mat(n, m, -1, 1),
      gq: mat(n, n, -1, 1),
      gr: mat(m, m, -1, 1),
    });
  })
  .filter(({ b }) => b.flat().some((v) => Math.abs(v) > 0.1))
  .map(({ a, b, gq, gr }) => {
    const gram = (g: M, eps: number): M =>
      g.map((_, i) =>
        g.map((__, j) => g[i].reduce((s, v, k) => s + v * g[j][k], 0) + (i === j ? eps : 0)),
      );
    return { a, b, q: gram(gq, 0.1), r: gram(gr, 0.2) };
  });

function quad(x: number[], p: ArrayLike<number>, n: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) s += x[i] * p[i * n + j] * x[j];
  return s;
}

describe("Riccati laws on random systems", () => {
  it("dare: stabilizing, tiny residual, and P is the closed-loop value of its own gain", () => {
    let solved = 0;
    let runs = 0;
    fc.assert(
      fc.property(systemArb, (sys) => {
        runs++;
        let sol: ReturnType<typeof dare>;
        try {
          sol = dare(sys);
        } catch {
          // a nearly uncontrollable draw: the typed error is the right answer, nothing to compare
          return;
        }
        solved++;
        expect(sol.closedLoopSpectralRadius).toBeLessThan(1);
        expect(sol.residual).toBeLessThan(1e-10);
        expect(sol.definite).toBe(true);
        const pk = closedLoopValue(sys, sol.gain).data;
        const n = sys.a.length;
        let scale = 1;
        for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(sol.value.data[i]));
        for (let i = 0; i < n * n; i++) {
          expect(Math.abs(pk[i] - sol.value.data[i])).toBeLessThan(1e-8 * scale);
        }
      }),
      { numRuns: 120, seed: 21 },
    );
    // generic random pairs are stabilizable: nearly every draw must be solved
    expect(solved).toBeGreaterThanOrEqual(0.95 * runs);
  });

  it("finite horizon: x₀ᵀP₀x₀ equals the cost of the rollout, and perturbing it costs more", () => {
    fc.assert(
      fc.property(
        systemArb,
        fc.integer({ min: 1, max: 12 }),
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 8, maxLength: 8 }),
        (sys, N, seedVec) => {
          const n = sys.a.length;
          const m = sys.b[0].length;
          const sol = finiteHorizonLqr({ ...sys, qf: sys.q, horizon: N });
          const x0 = Array.from({ length: n }, (_, i) => seedVec[i] + 0.1);
          const cost = (controls: Float64Array): number => {
            let x = x0.slice();
            let j = 0;
            for (let k = 0; k < N; k++) {
              const u = Array.from(controls.subarray(k * m, (k + 1) * m));
              j += quad(x, sys.q.flat(), n) + quad(u, sys.r.flat(), m);
              x = sys.a.map(
                (row, i) =>
                  row.reduce((s, v, t) => s + v * x[t], 0) +
                  sys.b[i].reduce((s, v, t) => s + v * u[t], 0),
              );
            }
            return j + quad(x, sys.q.flat(), n);
          };
          const { controls } = sol.rollout(x0);
          const jStar = cost(controls);
          expect(Math.abs(sol.cost(x0) - jStar)).toBeLessThan(1e-8 * Math.max(1, jStar));
          const bumped = new Float64Array(controls);
          bumped[(N * m - 1) % bumped.length] += 0.01 * (seedVec[7] + 1.5);
          expect(cost(bumped)).toBeGreaterThan(jStar);
        },
      ),
      { numRuns: 120, seed: 22 },
    );
  });
});
